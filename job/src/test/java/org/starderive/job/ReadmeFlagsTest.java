package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.starderive.physics.QualityFlag;

/** Every flag is documented in the README with its bit and value (the flag table is part of the output format). */
class ReadmeFlagsTest {
    @Test
    void everyFlagHasItsRowInTheReadme() throws IOException {
        Path readme = ProjectFiles.path("README.md");
        String text = Files.readString(readme);
        for (QualityFlag f : QualityFlag.values()) {
            String row = "| " + f.bit() + " | " + f.mask() + " | `" + f.name() + "` |";
            assertTrue(text.contains(row), "README flag table lacks: " + row);
        }
    }
}
