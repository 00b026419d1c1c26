package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/** Security hygiene: where the job writes, and that nothing it reads is ever executed or handed to a shell. */
class HygieneTest {
    @TempDir
    Path tmp;

    @Test
    void theJobWritesOnlyItsOutputFolderAndNothingElse() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(SharedSpark.spark(), TestCatalogs.rows(20, 1), in);
        Files.writeString(tmp.resolve("neighbour.txt"), "a file beside the output");
        Path cfg = Files.writeString(tmp.resolve("c.yaml"), "physics: {r_v: 3.1}\n");
        Map<String, String> before = TestCatalogs.treeHash(tmp);
        Path out = tmp.resolve("out");
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString()).exitCode);
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString(),
                "--write-mode", "overwrite").exitCode);
        Map<String, String> after = new TreeMap<>(TestCatalogs.treeHash(tmp));
        after.keySet().removeIf(k -> k.startsWith("out/"));
        // beside the output only the lease of the latest run stays (hidden), marked released (README, Reliability)
        List<String> lease = after.keySet().stream().filter(k -> k.startsWith(".out.lease-")).sorted().collect(Collectors.toList());
        assertEquals(List.of(".out.lease-0000000002", ".out.lease-0000000002.released"), lease);
        after.keySet().removeAll(lease);
        assertEquals(before, after, "inputs, config and neighbours unchanged; nothing new beside the output");
        try (Stream<Path> s = Files.list(tmp)) {
            List<String> names = s.map(p -> p.getFileName().toString()).filter(n -> !n.startsWith(".out.lease-")).sorted()
                    .collect(Collectors.toList());
            assertEquals(List.of("c.yaml", "in", "neighbour.txt", "out"), names, "staging folders and journals are gone after a run");
        }
    }

    @Test
    void mainCodeNeverStartsProcessesOrShells() throws IOException {
        for (String module : List.of("udfs", "sample-survey", "job")) {
            Path src = ProjectFiles.path(module, "src", "main", "java");
            try (Stream<Path> s = Files.walk(src)) {
                for (Path p : (Iterable<Path>) s.filter(f -> f.toString().endsWith(".java"))::iterator) {
                    String code = Files.readString(p);
                    for (String forbidden : List.of("ProcessBuilder", "Runtime.getRuntime().exec", "Class.forName",
                            "ScriptEngine", "enableDefaultTyping", "activateDefaultTyping")) {
                        assertTrue(!code.contains(forbidden), p + " uses " + forbidden);
                    }
                }
            }
        }
    }
}
