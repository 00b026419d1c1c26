package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * Every dataset-level problem stops the job before anything is written: exit code by kind, a message that names the
 * file or column and the rule, the output path untouched, no staging folder left behind.
 */
class DatasetErrorsTest {
    @TempDir
    Path tmp;

    private final SparkSession spark = SharedSpark.spark();

    private Path goodInput() {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        return in;
    }

    private static List<Path> dataFiles(Path dir) throws IOException {
        try (Stream<Path> s = Files.walk(dir)) {
            return s.filter(p -> p.getFileName().toString().endsWith(".parquet")).sorted().collect(Collectors.toList());
        }
    }

    /** Runs derive expecting failure; checks exit code, message fragments, and that out is as before. */
    static CliRunner expectFailure(int exit, Path out, List<String> mustMention, String... args) {
        Map<String, String> before = TestCatalogs.treeHash(out);
        boolean existed = Files.exists(out);
        CliRunner r = CliRunner.run(args);
        assertEquals(exit, r.exitCode, r.toString());
        for (String m : mustMention) {
            assertTrue(r.err.contains(m), "message should name '" + m + "': " + r.err);
        }
        assertTrue(r.err.contains("rule") || r.err.contains("must"), "message states the rule: " + r.err);
        assertEquals(existed, Files.exists(out), "output existence unchanged");
        assertEquals(before, TestCatalogs.treeHash(out), "output untouched");
        try (Stream<Path> s = Files.list(out.getParent())) {
            assertEquals(0, s.filter(p -> p.getFileName().toString().contains(".staging-")).count(), "no staging left");
        } catch (IOException e) {
            throw new RuntimeException(e);
        }
        return r;
    }

    @Test
    void missingMappedColumn() {
        Path in = tmp.resolve("in");
        TestCatalogs.frame(spark, TestCatalogs.rows(5, 1)).drop("parallax_err_mas").write().parquet(in.toString());
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of("parallax_err_mas", in.toString()), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void stringInANumericColumn() {
        Path in = tmp.resolve("in");
        TestCatalogs.frame(spark, TestCatalogs.rows(5, 1)).withColumn("mag_v", functions.col("mag_v").cast("string"))
                .write().parquet(in.toString());
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of("mag_v", "string"), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void truncatedParquetFile() throws IOException {
        Path in = goodInput();
        Path victim = dataFiles(in).get(0);
        byte[] b = Files.readAllBytes(victim);
        Files.write(victim, java.util.Arrays.copyOf(b, b.length / 2));
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of(victim.getFileName().toString()), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void zeroByteFile() throws IOException {
        Path in = goodInput();
        Path empty = in.resolve("tile=0").resolve("part-empty.parquet");
        Files.createFile(empty);
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of("part-empty.parquet"), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void emptyTableAndEmptyFolder() throws IOException {
        Path in = tmp.resolve("in");
        TestCatalogs.frame(spark, TestCatalogs.rows(5, 1)).limit(0).write().parquet(in.toString());
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of("no rows"), "derive", "--input", in.toString(), "--output", out.toString());
        Path none = Files.createDirectories(tmp.resolve("nothing"));
        expectFailure(3, out, List.of("no data files"), "derive", "--input", none.toString(), "--output", out.toString());
        expectFailure(3, out, List.of("does not exist"), "derive", "--input", tmp.resolve("absent").toString(), "--output", out.toString());
    }

    @Test
    void schemaDiffersBetweenPartitions() {
        Path in = tmp.resolve("in");
        List<Row> rows = TestCatalogs.rows(6, 1);
        TestCatalogs.frame(spark, rows).filter("tile = 0").drop("tile").write().parquet(in.resolve("tile=0").toString());
        TestCatalogs.frame(spark, rows).filter("tile = 1").drop("tile").withColumn("mag_v", functions.col("mag_v").cast("string"))
                .write().parquet(in.resolve("tile=1").toString());
        Path out = tmp.resolve("out");
        expectFailure(3, out, List.of("schema differs", "mag_v"), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void anotherRvWithGaiaBandsIsRefused() throws IOException {
        // the G, BP, RP extinction coefficients (Casagrande et al. 2021) hold for R_V = 3.1 only: another R_V would
        // redden the optical bands by one law and these by another
        Path in = tmp.resolve("in-gaia");
        TestCatalogs.frame(spark, TestCatalogs.rows(12, 1)).withColumn("mag_g", functions.col("mag_v").minus(0.1))
                .withColumn("mag_g_err", functions.lit(0.01)).write().parquet(in.toString());
        Path cfg = tmp.resolve("survey.yaml");
        Files.writeString(cfg, "physics:\n  r_v: 3.3\n");
        Path out = tmp.resolve("out");
        expectFailure(2, out, List.of("survey.yaml", "physics.r_v", "mag_g", "R_V = 3.1"),
                "derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString());
        // without Gaia-like bands the same R_V is accepted (CCM takes any R_V)
        assertEquals(0, CliRunner.run("derive", "--input", goodInput().toString(), "--output", tmp.resolve("out-rv").toString(),
                "--config", cfg.toString()).exitCode);
    }

    @Test
    void unknownConfigKeyAndBadValue() throws IOException {
        Path in = goodInput();
        Path out = tmp.resolve("out");
        Path cfg = tmp.resolve("survey.yaml");
        Files.writeString(cfg, "physics:\n  parallax_snr_minimum: 5\n");
        expectFailure(2, out, List.of("survey.yaml", "physics.parallax_snr_minimum"),
                "derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString());
        Files.writeString(cfg, "physics:\n  r_v: -3.1\n");
        expectFailure(2, out, List.of("survey.yaml", "R_V", "-3.1"),
                "derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString());
        Files.writeString(cfg, "columns:\n  parallax: plx\n");
        expectFailure(3, out, List.of("plx"),
                "derive", "--input", in.toString(), "--output", out.toString(), "--config", cfg.toString());
    }

    @Test
    void outputInsideInputAndOutputExisting() {
        Path in = goodInput();
        Path inside = in.resolve("derived");
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", inside.toString());
        assertEquals(4, r.exitCode, r.toString());
        assertTrue(r.err.contains("inside input"), r.err);
        assertFalse(Files.exists(inside));

        Path out = tmp.resolve("out");
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString()).exitCode);
        expectFailure(4, out, List.of("already exists", out.getFileName().toString()), "derive", "--input", in.toString(), "--output", out.toString());
    }

    @Test
    void unwritableOutput() throws IOException {
        Path in = goodInput();
        Path file = Files.writeString(tmp.resolve("a-file"), "not a folder");
        Path out = file.resolve("out");
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(4, r.exitCode, r.toString());
        assertTrue(r.err.contains(out.toString()) || r.err.contains("a-file"), r.err);
        assertEquals("not a folder", Files.readString(file));
    }

    @Test
    void badCommandLineValues() {
        Path in = goodInput();
        Path out = tmp.resolve("out");
        expectFailure(2, out, List.of("--write-mode", "sometimes"), "derive", "--input", in.toString(), "--output", out.toString(),
                "--write-mode", "sometimes");
        expectFailure(2, out, List.of("--input-format", "hdf5", "fits or votable"), "derive", "--input", in.toString(),
                "--output", out.toString(), "--input-format", "hdf5");
        expectFailure(2, out, List.of("replace-partitions"), "derive", "--input", tmp.resolve("in").resolve("tile=0").toString(),
                "--output", out.toString(), "--write-mode", "replace-partitions");
    }

    @Test
    void interruptedCommitIsRestoredBeforeAnythingElse() throws IOException {
        Path in = goodInput();
        Path out = tmp.resolve("out");
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString()).exitCode);
        Map<String, String> committed = TestCatalogs.treeHash(out);
        // simulate a run that died between moving the old output aside and moving the new one in
        Files.move(out, tmp.resolve(".out.previous-20260101000000-deadbeef"));
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(4, r.exitCode, "restored output exists again, so fail mode refuses: " + r);
        assertEquals(committed, TestCatalogs.treeHash(out));
    }
}
