package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import picocli.CommandLine;

/**
 * Every help screen renders cleanly: picocli formats descriptions with java.util.Formatter, so a bare '%' in a
 * description makes it print a warning and the raw text instead (common practice: '%%' for a literal percent sign).
 */
class HelpTextTest {
    @Test
    void everySubCommandsHelpRendersWithoutAWarning() {
        List<List<String>> calls = new ArrayList<>();
        calls.add(List.of("--help"));
        for (String sub : new CommandLine(new Main()).getSubcommands().keySet()) {
            if (!sub.equals("help")) {
                calls.add(List.of(sub, "--help"));
            }
        }
        assertTrue(calls.size() >= 8, "sub-commands found: " + calls);
        assertTrue(calls.contains(List.of("check", "--help")), "check is a sub-command: " + calls);
        for (List<String> args : calls) {
            CliRunner r = CliRunner.run(args.toArray(new String[0]));
            assertEquals(0, r.exitCode, args + ": " + r);
            assertFalse(r.err.contains("picocli WARN") || r.err.contains("Could not format"), args + ": " + r.err);
            assertFalse(r.out.contains("%n") || r.out.contains("%%"), args + ": unformatted text in " + r.out);
            assertTrue(r.out.contains("Usage: starderive"), args + ": " + r.out);
        }
    }
}
