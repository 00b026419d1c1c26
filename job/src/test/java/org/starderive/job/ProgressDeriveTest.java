package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Properties;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.apache.logging.log4j.Level;
import org.apache.logging.log4j.LogManager;
import org.apache.logging.log4j.core.LogEvent;
import org.apache.logging.log4j.core.LoggerContext;
import org.apache.logging.log4j.core.appender.AbstractAppender;
import org.apache.logging.log4j.core.config.Configurator;
import org.apache.logging.log4j.core.config.Property;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * What a user sees while derive runs outside a terminal (a log, a pipe, a cluster's driver log — the test's captured
 * streams): one start and one end line per step, in order, named as the manifest's step timings; no Spark stage bar;
 * no log line of Spark's or Hadoop's under the shipped logging configuration; and after a refusal the step that stopped,
 * then the refusal in plain words. The listener is gone after every run (the SparkContext is shared by all tests).
 */
class ProgressDeriveTest {
    @TempDir
    Path tmp;

    private final SparkSession spark = SharedSpark.spark();

    private static final Pattern STEP_LINE = Pattern.compile("^\\[derive \\d+:\\d\\d] (\\w+) (started|done in|stopped after)(.*)$");

    /** Log events that reach the root logger while {@code run} runs, with the levels of the shipped log4j2.properties. */
    private static List<LogEvent> underShippedLogging(Runnable run) throws IOException {
        Properties shipped = new Properties();
        try (Reader r = Files.newBufferedReader(ProjectFiles.path("job", "src", "main", "resources", "log4j2.properties"))) {
            shipped.load(r);
        }
        List<LogEvent> events = Collections.synchronizedList(new ArrayList<>());
        AbstractAppender capture = new AbstractAppender("progress-test-capture", null, null, true, Property.EMPTY_ARRAY) {
            @Override
            public void append(LogEvent e) {
                events.add(e.toImmutable());
            }
        };
        capture.start();
        LoggerContext ctx = (LoggerContext) LogManager.getContext(false);
        try {
            Configurator.setRootLevel(Level.valueOf(shipped.getProperty("rootLogger.level")));
            for (String k : shipped.stringPropertyNames()) {
                if (k.startsWith("logger.") && k.endsWith(".name")) {
                    String level = shipped.getProperty(k.substring(0, k.length() - ".name".length()) + ".level");
                    Configurator.setLevel(shipped.getProperty(k), Level.valueOf(level));
                }
            }
            ctx.getConfiguration().getRootLogger().addAppender(capture, null, null);
            ctx.updateLoggers();
            run.run();
        } finally {
            ctx.reconfigure(); // back to the test configuration, without the capture
            capture.stop();
        }
        return events;
    }

    /** (step, kind) of every step line of the output, in order. */
    private static List<String[]> stepLines(String err) {
        List<String[]> out = new ArrayList<>();
        for (String line : err.split("\n")) {
            Matcher m = STEP_LINE.matcher(line);
            if (m.matches()) {
                out.add(new String[] {m.group(1), m.group(2), m.group(3)});
            }
        }
        return out;
    }

    private static void assertNoSparkNoise(CliRunner r, List<LogEvent> events) {
        assertFalse(r.err.contains("[Stage") || r.out.contains("[Stage"), "no Spark stage bar: " + r);
        for (LogEvent e : events) {
            assertTrue(e.getLoggerName().startsWith("org.starderive."), "a log line of Spark's or a library's: "
                    + e.getLevel() + " " + e.getLoggerName() + ": " + e.getMessage().getFormattedMessage());
        }
        assertEquals(0, ProgressListener.attached(), "the listener is removed when the run ends");
    }

    @Test
    void plainLinesOneStartAndOneEndPerStepNamedAsInTheManifest() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(20, 1), in);
        Path out = tmp.resolve("out");
        CliRunner[] run = new CliRunner[1];
        List<LogEvent> events = underShippedLogging(() -> run[0] = CliRunner.run("derive", "--input", in.toString(),
                "--output", out.toString()));
        CliRunner r = run[0];
        assertEquals(0, r.exitCode, r.toString());

        List<String[]> lines = stepLines(r.err);
        List<String> steps = new ArrayList<>();
        for (int i = 0; i < lines.size(); i += 2) {
            assertEquals("started", lines.get(i)[1], "line " + i + " starts a step: " + r.err);
            assertTrue(i + 1 < lines.size(), "step " + lines.get(i)[0] + " has an end line: " + r.err);
            assertEquals(lines.get(i)[0], lines.get(i + 1)[0], "a step ends before the next starts: " + r.err);
            assertEquals("done in", lines.get(i + 1)[1], r.err);
            steps.add(lines.get(i)[0]);
        }
        // the manifest's step timings, in the order written; take_lease is timed inside check_output and
        // total_before_commit is a total; the commit comes after the manifest is written
        JsonNode manifest = new ObjectMapper().readTree(out.resolve(RunManifest.FILE_NAME).toFile());
        List<String> expected = new ArrayList<>();
        manifest.get("seconds").fieldNames().forEachRemaining(expected::add);
        expected.removeAll(List.of("take_lease", "total_before_commit"));
        expected.add("commit");
        assertEquals(expected, steps, r.err);
        assertTrue(steps.containsAll(List.of("check_output", "open_inputs", "scan_ids", "derive_and_write", "verify_rows",
                "recheck_inputs", "commit")), steps.toString());

        // the write's tasks wrote every input row (20 rows in, row conservation: README)
        String writeEnd = lines.stream().filter(l -> l[0].equals("derive_and_write") && l[1].equals("done in"))
                .findFirst().orElseThrow()[2];
        assertTrue(writeEnd.contains(" tasks") && writeEnd.contains("20 records written"), writeEnd);
        assertTrue(r.out.startsWith("starderive derive: 20 rows in, 20 rows out"), "the summary alone on stdout: " + r.out);
        assertFalse(r.out.contains("started") || r.out.contains("\r"), r.out);
        assertNoSparkNoise(r, events);
    }

    @Test
    void aRefusalLeavesTheDisplayClosedAndIsPrintedInPlainWords() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        Path out = tmp.resolve("out");
        Files.createDirectories(out);
        Files.writeString(out.resolve("keep.txt"), "a folder that is there already");
        CliRunner[] run = new CliRunner[1];
        List<LogEvent> events = underShippedLogging(() -> run[0] = CliRunner.run("derive", "--input", in.toString(),
                "--output", out.toString()));
        CliRunner r = run[0];
        assertEquals(4, r.exitCode, r.toString());
        List<String[]> lines = stepLines(r.err);
        assertEquals(2, lines.size(), r.err);
        assertEquals(List.of("check_output", "started"), List.of(lines.get(0)[0], lines.get(0)[1]), r.err);
        assertEquals(List.of("check_output", "stopped after"), List.of(lines.get(1)[0], lines.get(1)[1]), r.err);
        String[] errLines = r.err.strip().split("\n");
        String last = errLines[errLines.length - 1];
        assertTrue(last.startsWith("starderive: Output ") && last.contains("already exists"),
                "the refusal last, after the display: " + r.err);
        assertFalse(r.err.contains("\tat "), "no stack trace: " + r.err);
        assertNoSparkNoise(r, events);
    }

    @Test
    void aDatasetProblemFoundAfterSparkJobsRanStopsTheStepThatFoundIt() throws Exception {
        Path in = tmp.resolve("noid");
        TestCatalogs.frame(spark, TestCatalogs.rows(12, 1)).drop("star_id").write().parquet(in.toString());
        CliRunner[] run = new CliRunner[1];
        List<LogEvent> events = underShippedLogging(() -> run[0] = CliRunner.run("derive", "--input", in.toString(),
                "--output", tmp.resolve("out").toString()));
        CliRunner r = run[0];
        assertEquals(3, r.exitCode, r.toString());
        List<String[]> lines = stepLines(r.err);
        String[] stopped = lines.get(lines.size() - 1);
        assertEquals("open_inputs stopped after", stopped[0] + " " + stopped[1], r.err);
        String[] errLines = r.err.strip().split("\n");
        assertTrue(errLines[errLines.length - 1].startsWith("starderive: Input ")
                && errLines[errLines.length - 1].contains("missing column 'star_id'"), r.err);
        assertNoSparkNoise(r, events);
    }

    @Test
    void sparkStageBarsOffUnlessVerbose() {
        // the builder settings of every session the command line creates (local mode and spark-submit alike)
        assertEquals("false", Sessions.sessionConf(false).get("spark.ui.showConsoleProgress"));
        assertEquals("true", Sessions.sessionConf(true).get("spark.ui.showConsoleProgress"));
    }

    @Test
    void generatedMethodsAboveHotSpotsCompileLimitAreNotRunInWholeStageCodegen() {
        // HotSpot leaves a method above 8000 bytes of bytecode to the interpreter (-XX:+DontCompileHugeMethods, its
        // default; the JVM's HugeMethodLimit); Spark's documentation of spark.sql.codegen.hugeMethodLimit recommends
        // 8000 on HotSpot. Every session the command line builds, and a session that already ran (this one: tests,
        // notebooks), runs with it
        assertEquals("8000", Sessions.sessionConf(false).get("spark.sql.codegen.hugeMethodLimit"));
        spark.conf().unset("spark.sql.codegen.hugeMethodLimit");
        String[] seen = new String[1];
        Sessions.withSession(new Sessions.Options(null, false, true), "test",
                (s, progress) -> {
                    seen[0] = s.conf().get("spark.sql.codegen.hugeMethodLimit");
                    return 0;
                });
        assertEquals("8000", seen[0]);
    }
}
