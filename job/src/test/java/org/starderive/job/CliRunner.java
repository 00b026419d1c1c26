package org.starderive.job;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;

/** Runs the command line in-process and captures exit code, stdout and stderr. */
final class CliRunner {
    final int exitCode;
    final String out;
    final String err;

    private CliRunner(int exitCode, String out, String err) {
        this.exitCode = exitCode;
        this.out = out;
        this.err = err;
    }

    static CliRunner run(String... args) {
        ByteArrayOutputStream o = new ByteArrayOutputStream();
        ByteArrayOutputStream e = new ByteArrayOutputStream();
        PrintStream oldOut = System.out;
        PrintStream oldErr = System.err;
        int code;
        try (PrintStream po = new PrintStream(o, true, StandardCharsets.UTF_8);
             PrintStream pe = new PrintStream(e, true, StandardCharsets.UTF_8)) {
            System.setOut(po);
            System.setErr(pe);
            code = Main.execute(args);
        } finally {
            System.setOut(oldOut);
            System.setErr(oldErr);
        }
        return new CliRunner(code, o.toString(StandardCharsets.UTF_8), e.toString(StandardCharsets.UTF_8));
    }

    @Override
    public String toString() {
        return "exit " + exitCode + "\n--- out\n" + out + "\n--- err\n" + err;
    }

}
