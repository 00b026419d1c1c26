package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * The packaged artefacts, run as users run them, in child JVMs:
 * the local launcher with plain {@code java -jar} (no --add-opens on the command line: the manifest carries them),
 * and the thin jar through Spark's own submit entry point (what {@code spark-submit} runs) with --master local[2]
 * and Spark's jars from the project's own dependencies. Both outputs must equal each other row for row.
 */
class PackagedJarsIT {
    @TempDir
    Path tmp;

    private static String prop(String k) {
        String v = System.getProperty(k);
        if (v == null) {
            throw new IllegalStateException("system property " + k + " not set (run through mvn verify)");
        }
        return v;
    }

    private static String java() {
        return Paths.get(System.getProperty("java.home"), "bin", "java").toString();
    }

    /** Spark and its dependencies from target/lib, without our own jars and libraries (those are in the thin jar). */
    private static String sparkClasspath() throws IOException {
        try (Stream<Path> s = Files.list(Paths.get(prop("starderive.lib")))) {
            return s.map(Path::toString)
                    .filter(p -> !p.contains("starderive-") && !p.contains("picocli") && !p.contains("jackson-dataformat-yaml"))
                    .sorted().collect(Collectors.joining(File.pathSeparator));
        }
    }

    private static int run(List<String> cmd, Path log) throws Exception {
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(log.toFile());
        pb.environment().put("SPARK_SCALA_VERSION", "2.12");
        Process p = pb.start();
        if (!p.waitFor(5, TimeUnit.MINUTES)) {
            p.destroyForcibly();
            throw new AssertionError("timed out: " + cmd);
        }
        return p.exitValue();
    }

    @Test
    void localLauncherAndSparkSubmitGiveTheSameCatalogue() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(40, 1), in);

        Path outLocal = tmp.resolve("out-local");
        Path logLocal = tmp.resolve("local.log");
        int a = run(List.of(java(), "-jar", prop("starderive.localJar"), "derive", "--master", "local[2]",
                "--input", in.toString(), "--output", outLocal.toString()), logLocal);
        String la = Files.readString(logLocal, StandardCharsets.UTF_8);
        assertEquals(0, a, la);
        assertTrue(la.contains("40 rows in, 40 rows out"), la);
        assertTrue(!la.contains(" INFO SparkContext"), "quiet by default: " + la);
        assertTrue(!la.contains("[Stage "), "no Spark stage bar (spark.ui.showConsoleProgress off): " + la);
        assertTrue(la.contains("] derive_and_write done in "), "the run's own progress lines instead: " + la);

        Path outSubmit = tmp.resolve("out-submit");
        Path logSubmit = tmp.resolve("submit.log");
        int b = run(sparkSubmit("derive", "--input", in.toString(), "--output", outSubmit.toString()), logSubmit);
        String lb = Files.readString(logSubmit, StandardCharsets.UTF_8);
        assertEquals(0, b, lb);
        assertTrue(lb.contains("40 rows in, 40 rows out"), lb);
        // under spark-submit the session is built by the job too, with the same settings
        assertTrue(!lb.contains("[Stage "), "no Spark stage bar under spark-submit: " + lb);
        assertTrue(lb.contains("] derive_and_write done in "), "the run's own progress lines: " + lb);

        List<Row> x = spark.read().parquet(outLocal.toString()).drop("flag_names").orderBy("star_id").collectAsList();
        List<Row> y = spark.read().parquet(outSubmit.toString()).drop("flag_names").orderBy("star_id").collectAsList();
        assertEquals(40, x.size());
        assertEquals(x.size(), y.size());
        StringBuilder diff = new StringBuilder();
        for (int i = 0; i < x.size(); i++) {
            Row rx = x.get(i);
            Row ry = y.get(i);
            for (int c = 0; c < rx.length(); c++) {
                if (!java.util.Objects.equals(rx.get(c), ry.get(c))) {
                    diff.append(String.format("star %s column %s: local %s, submit %s%n", rx.get(0), rx.schema().fieldNames()[c], rx.get(c), ry.get(c)));
                }
            }
        }
        assertEquals("", diff.toString());
    }

    /**
     * The thin jar through Spark's own submit entry point, as {@code spark-submit --master local[2] --class
     * org.starderive.job.Main THIN_JAR ARGS} runs it (what scripts/submit does), with the JVM options Spark needs.
     */
    private static List<String> sparkSubmit(String... jobArgs) throws IOException {
        List<String> cmd = new ArrayList<>();
        cmd.add(java());
        cmd.addAll(Arrays.asList(prop("starderive.javaOpens").trim().split("\\s+")));
        cmd.addAll(List.of("-cp", sparkClasspath(), "org.apache.spark.deploy.SparkSubmit", "--master", "local[2]",
                "--class", "org.starderive.job.Main", prop("starderive.thinJar")));
        cmd.addAll(Arrays.asList(jobArgs));
        return cmd;
    }

    /** check runs through spark-submit as derive does (what scripts/submit does), and writes nothing there either. */
    @Test
    void checkRunsThroughSparkSubmitAndWritesNothing() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in-check");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(40, 1), in);
        Path out = tmp.resolve("out-check");
        Path log = tmp.resolve("check-submit.log");
        int code = run(sparkSubmit("check", "--input", in.toString(), "--output", out.toString()), log);
        String text = Files.readString(log, StandardCharsets.UTF_8);
        assertEquals(0, code, text);
        assertTrue(text.contains("output columns:") && text.contains("size:") && text.contains("physics on the sample (40 rows"),
                "the report's sections: " + text);
        assertTrue(!Files.exists(out), "check wrote the output path");
        try (java.util.stream.Stream<Path> beside = Files.list(tmp)) {
            assertTrue(beside.noneMatch(f -> f.getFileName().toString().startsWith(".out-check")), "nothing beside the output");
        }
    }

    @Test
    void aRunKilledWhileWritingLeavesThePreviousOutputAndARerunIsCorrect() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path survey = tmp.resolve("survey");
        org.starderive.sample.SampleSurvey.writeSingle(spark, 600_000, 4, survey.toString(), 4, org.apache.spark.sql.SaveMode.ErrorIfExists);
        Path in = survey.resolve("stars");
        Path out = tmp.resolve("out");
        assertEquals(0, Main.execute("derive", "--input", in.toString(), "--output", out.toString()));
        java.util.Map<String, String> before = TestCatalogs.treeHash(out);
        List<Row> first = spark.read().parquet(out.toString()).drop("flag_names").orderBy("star_id").limit(2000).collectAsList();

        // overwrite in a child JVM; SIGKILL it as soon as its staging folder holds data files
        Path log = tmp.resolve("killed.log");
        Process p = new ProcessBuilder(java(), "-jar", prop("starderive.localJar"), "derive", "--master", "local[2]",
                "--input", in.toString(), "--output", out.toString(), "--write-mode", "overwrite")
                .redirectErrorStream(true).redirectOutput(log.toFile()).start();
        // while the child holds the output's lease, a run here is refused (exit 4) naming it
        String childRun = null;
        long leaseDeadline = System.nanoTime() + TimeUnit.MINUTES.toNanos(2);
        while (childRun == null && System.nanoTime() < leaseDeadline && p.isAlive()) {
            try (Stream<Path> s = Files.list(tmp)) {
                for (Path f : s.filter(x -> x.getFileName().toString().matches("\\.out\\.lease-\\d+")).collect(Collectors.toList())) {
                    String text = Files.readString(f);
                    if (text.contains("\npid=" + p.pid() + "\n")) {
                        childRun = text.replaceAll("(?s).*\nrun_id=([^\n]+)\n.*", "$1");
                    }
                }
            } catch (java.nio.file.NoSuchFileException e) {
                // a lease file went while we looked: look again
            }
            Thread.sleep(50);
        }
        assertTrue(childRun != null, "the child took the lease: " + Files.readString(log));
        CliRunner refused = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString(), "--write-mode", "overwrite");
        assertEquals(4, refused.exitCode, refused.toString());
        assertTrue(refused.err.contains("is being written by run " + childRun + " (host ") && refused.err.contains("pid " + p.pid()),
                refused.toString());

        boolean killedWhileWriting = false;
        long deadline = System.nanoTime() + TimeUnit.MINUTES.toNanos(3);
        while (System.nanoTime() < deadline && p.isAlive()) {
            try (Stream<Path> s = Files.list(tmp)) {
                List<Path> staging = s.filter(x -> x.getFileName().toString().startsWith("out.staging-")).collect(Collectors.toList());
                if (!staging.isEmpty()) {
                    try (Stream<Path> w = Files.walk(staging.get(0))) {
                        if (w.anyMatch(x -> x.getFileName().toString().endsWith(".parquet"))) {
                            p.destroyForcibly(); // SIGKILL
                            killedWhileWriting = true;
                            break;
                        }
                    } catch (java.io.UncheckedIOException | java.nio.file.NoSuchFileException e) {
                        // the writer moved files while we looked: look again
                    }
                }
            }
            Thread.sleep(50);
        }
        p.waitFor(1, TimeUnit.MINUTES);
        assertTrue(killedWhileWriting, "the child was killed while writing: " + Files.readString(log));
        assertEquals(before, TestCatalogs.treeHash(out), "previous output intact after SIGKILL");

        // a rerun takes the dead run's lease over at once (its process is gone from this host), commits, and gives the
        // same content
        assertEquals(0, Main.execute("derive", "--input", in.toString(), "--output", out.toString(), "--write-mode", "overwrite"));
        try (Stream<Path> s = Files.list(tmp)) {
            List<String> leases = s.map(x -> x.getFileName().toString()).filter(n -> n.matches("\\.out\\.lease-\\d+"))
                    .collect(Collectors.toList());
            assertEquals(1, leases.size(), "the killed run's lease was replaced: " + leases);
            assertTrue(!Files.readString(tmp.resolve(leases.get(0))).contains("run_id=" + childRun + "\n"), leases.toString());
        }
        List<Row> again = spark.read().parquet(out.toString()).drop("flag_names").orderBy("star_id").limit(2000).collectAsList();
        assertEquals(first, again);
        assertEquals(600_000, spark.read().parquet(out.toString()).count());
    }

    @Test
    void helpExplainsEveryOptionWithItsDefault() throws Exception {
        Path log = tmp.resolve("help.log");
        assertEquals(0, run(List.of(java(), "-jar", prop("starderive.localJar"), "derive", "--help"), log));
        String h = Files.readString(log).replaceAll("\\s+", " ");
        for (String opt : List.of("--input", "--output", "--photometry", "--join-on", "--config", "--layout", "--columns", "--input-format",
                "--output-format", "--write-mode", "--master")) {
            assertTrue(h.contains(opt), opt + " in help: " + h);
        }
        assertTrue(h.contains("Default: fail") && h.contains("Default: parquet"), h);
    }
}
