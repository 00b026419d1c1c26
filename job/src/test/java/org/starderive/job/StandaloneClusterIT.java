package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.io.IOException;
import java.net.ServerSocket;
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
 * A real Spark standalone cluster on 127.0.0.1 from the project's own dependencies (no Spark download): a Master and
 * two Workers (one core each) whose SPARK_HOME/jars links Spark's jars from target/lib. The thin jar is submitted
 * through Spark's submit entry point; its output must equal local mode's row for row. Then the same job again, with
 * one Worker and its executor killed (SIGKILL) while the job runs: it must still complete with the same output.
 * Everything started is stopped by PID.
 */
class StandaloneClusterIT {
    @TempDir
    Path tmp;

    private final List<Process> started = new ArrayList<>();

    private static String prop(String k) {
        return System.getProperty(k);
    }

    private static String java() {
        return Paths.get(System.getProperty("java.home"), "bin", "java").toString();
    }

    private static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    private Path sparkHome() throws IOException {
        Path home = tmp.resolve("spark-home");
        Path jars = Files.createDirectories(home.resolve("jars"));
        try (Stream<Path> s = Files.list(Paths.get(prop("starderive.lib")))) {
            for (Path j : (Iterable<Path>) s::iterator) {
                String n = j.getFileName().toString();
                if (!n.startsWith("starderive-") && !n.startsWith("picocli") && !n.startsWith("jackson-dataformat-yaml")
                        && !n.startsWith("jfreechart")) {
                    Files.createSymbolicLink(jars.resolve(n), j.toAbsolutePath());
                }
            }
        }
        return home;
    }

    private Process start(Path home, Path log, String... args) throws IOException {
        List<String> cmd = new ArrayList<>();
        cmd.add(java());
        cmd.add("-Xmx512m");
        cmd.addAll(Arrays.asList(prop("starderive.javaOpens").trim().split("\\s+")));
        cmd.add("-cp");
        cmd.add(home.resolve("jars") + File.separator + "*");
        cmd.addAll(Arrays.asList(args));
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(log.toFile());
        pb.environment().put("SPARK_HOME", home.toString());
        pb.environment().put("SPARK_SCALA_VERSION", "2.12");
        pb.environment().put("SPARK_LOCAL_IP", "127.0.0.1");
        Process p = pb.start();
        started.add(p);
        return p;
    }

    /** The thin jar's derive, through Spark's submit entry point, against the cluster. */
    private Process submit(Path home, Path log, String master, Path in, Path out) throws IOException {
        return start(home, log, "org.apache.spark.deploy.SparkSubmit", "--master", master,
                "--conf", "spark.executor.memory=700m", "--conf", "spark.driver.host=127.0.0.1",
                "--class", "org.starderive.job.Main", prop("starderive.thinJar"),
                "derive", "--input", in.toString(), "--output", out.toString());
    }

    private static void waitFor(Path log, String text, int seconds) throws Exception {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(seconds);
        while (System.nanoTime() < end) {
            if (Files.exists(log) && Files.readString(log).contains(text)) {
                return;
            }
            Thread.sleep(200);
        }
        throw new AssertionError("'" + text + "' not in " + log + ":\n" + (Files.exists(log) ? Files.readString(log) : ""));
    }

    private static void kill(Process p) {
        p.descendants().forEach(ProcessHandle::destroyForcibly);
        p.destroyForcibly();
    }

    @Test
    void clusterOutputEqualsLocalModeAndSurvivesALostWorker() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        spark.range(0, 600_000, 1, 8).selectExpr("id AS star_id", "CAST(id % 4 AS INT) AS tile",
                "0.2 + (id % 997) / 50.0 AS parallax_mas", "0.02 + (id % 13) / 100.0 AS parallax_err_mas",
                "8.0 + (id % 1009) / 100.0 AS mag_v", "0.01 AS mag_v_err",
                "6.2 + (id % 1009) / 100.0 + (id % 7) / 10.0 AS mag_ks", "0.02 AS mag_ks_err")
                .write().partitionBy("tile").parquet(in.toString());
        Path local = tmp.resolve("out-local");
        assertEquals(0, Main.execute("derive", "--input", in.toString(), "--output", local.toString()));

        Path home = sparkHome();
        int port = freePort();
        String master = "spark://127.0.0.1:" + port;
        try {
            Path mlog = tmp.resolve("master.log");
            start(home, mlog, "org.apache.spark.deploy.master.Master", "--host", "127.0.0.1", "--port", String.valueOf(port),
                    "--webui-port", String.valueOf(freePort()));
            waitFor(mlog, "I have been elected leader", 60);
            Process[] workers = new Process[2];
            for (int w = 0; w < 2; w++) {
                Path wlog = tmp.resolve("worker" + w + ".log");
                workers[w] = start(home, wlog, "org.apache.spark.deploy.worker.Worker", master, "--host", "127.0.0.1",
                        "--cores", "1", "--memory", "1g", "--webui-port", String.valueOf(freePort()),
                        "--work-dir", Files.createDirectories(tmp.resolve("work" + w)).toString());
                waitFor(wlog, "Successfully registered with master", 60);
            }

            // 1. the thin jar on the cluster equals local mode
            Path clean = tmp.resolve("out-cluster");
            Path slog = tmp.resolve("submit.log");
            Process submit = submit(home, slog, master, in, clean);
            assertTrue(submit.waitFor(8, TimeUnit.MINUTES), "submit finished");
            assertEquals(0, submit.exitValue(), Files.readString(slog));
            assertEqualCatalogues(spark, local, clean);
            // under spark-submit the session is built by the job too: its progress lines, no Spark stage bar
            String submitted = Files.readString(slog);
            assertTrue(submitted.contains("] derive_and_write done in "), "progress lines in the driver's log: " + submitted);
            assertTrue(!submitted.contains("[Stage "), "no Spark stage bar in the driver's log: " + submitted);

            // 2. the same job, losing a Worker (and its executor) while it runs
            Path lost = tmp.resolve("out-lost-worker");
            Path slog2 = tmp.resolve("submit2.log");
            Process submit2 = submit(home, slog2, master, in, lost);
            // kill worker 0 once the job is writing its staging output
            long end = System.nanoTime() + TimeUnit.MINUTES.toNanos(5);
            boolean killed = false;
            while (System.nanoTime() < end && submit2.isAlive() && !killed) {
                try (Stream<Path> s = Files.list(tmp)) {
                    List<Path> staging = s.filter(x -> x.getFileName().toString().startsWith("out-lost-worker.staging-"))
                            .collect(Collectors.toList());
                    if (!staging.isEmpty() && workers[0].descendants().findAny().isPresent()) {
                        kill(workers[0]);
                        killed = true;
                    }
                }
                Thread.sleep(100);
            }
            assertTrue(killed, "a worker was killed while the job ran: " + Files.readString(slog2));
            assertTrue(submit2.waitFor(8, TimeUnit.MINUTES), "submit finished");
            assertEquals(0, submit2.exitValue(), Files.readString(slog2));
            assertEqualCatalogues(spark, local, lost);
        } finally {
            for (Process p : started) {
                kill(p);
            }
            for (Process p : started) {
                p.waitFor(30, TimeUnit.SECONDS);
            }
        }
    }

    /** Row-for-row equality computed in Spark (the catalogues are too large to collect). */
    private static void assertEqualCatalogues(SparkSession spark, Path a, Path b) {
        org.apache.spark.sql.Dataset<Row> x = spark.read().parquet(a.toString());
        org.apache.spark.sql.Dataset<Row> y = spark.read().parquet(b.toString()).select(
                java.util.Arrays.stream(x.columns()).map(org.apache.spark.sql.functions::col).toArray(org.apache.spark.sql.Column[]::new));
        assertEquals(x.count(), y.count());
        assertEquals(0, x.exceptAll(y).count(), "rows of " + a + " missing from " + b);
        assertEquals(0, y.exceptAll(x).count(), "rows of " + b + " missing from " + a);
    }
}
