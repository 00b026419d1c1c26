package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeSet;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.StructField;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.sample.SampleSurvey;
import org.starderive.testing.SharedSpark;

/**
 * The {@code check} sub-command on the demo survey (the synthetic Kestrel survey, astrometry and photometry tables):
 * for each dataset-level bad input of {@link DatasetErrorsTest}'s matrix it refuses exactly as derive does (same exit
 * code, same message) and writes nothing — the output path does not exist afterwards (or is byte-identical when it
 * existed) and nothing appears beside it (no lease, no staging); on a good input it predicts derive's output columns
 * (names and types) exactly, and its bytes per star within a stated tolerance.
 */
class CheckCommandTest {
    private static final String CONFIG = ProjectFiles.path("sample-survey", "config", "kestrel.yaml").toString();
    private static final int STARS = 6000;

    @TempDir
    static Path shared;

    @TempDir
    Path tmp;

    private static final SparkSession spark = SharedSpark.spark();

    private static Path survey;

    @BeforeAll
    static void demoSurvey() {
        survey = shared.resolve("survey");
        SampleSurvey.write(spark, STARS, 2026, survey.toString(), 2, SaveMode.ErrorIfExists);
    }

    private static Path astrometry() { return survey.resolve(SampleSurvey.ASTROMETRY); }

    private static Path photometry() { return survey.resolve(SampleSurvey.PHOTOMETRY); }

    private static TreeSet<String> namesIn(Path dir) {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).collect(Collectors.toCollection(TreeSet::new));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static void copyTree(Path from, Path to) {
        try (Stream<Path> s = Files.walk(from)) {
            for (Path p : (Iterable<Path>) s::iterator) {
                Path t = to.resolve(from.relativize(p).toString());
                if (Files.isDirectory(p)) {
                    Files.createDirectories(t);
                } else {
                    Files.copy(p, t);
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static List<Path> dataFiles(Path dir) {
        try (Stream<Path> s = Files.walk(dir)) {
            return s.filter(p -> p.getFileName().toString().endsWith(".parquet")).sorted().collect(Collectors.toList());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A message with the run-specific staging folder name (derive's run id, check's fixed one) made comparable. */
    private static String comparable(String err) {
        // the one cause check words itself: derive's comes from the file system's refused mkdirs, which check does not try
        // the progress display's lines ("[derive 0:01] open_inputs started") name each command's own steps: only the
        // refusal itself is compared
        return err.replaceAll("(?m)^\\[[a-z]+ [0-9:]+\\] .*\\R", "")
                .replaceAll("\\.staging-[0-9A-Za-z-]+", ".staging-RUN")
                .replaceAll("cannot take the lease beside it \\(.*\\) \\(rule", "cannot take the lease beside it (CAUSE) (rule")
                .replaceAll("lease renewed [0-9]+ s ago", "lease renewed N s ago").trim();
    }

    private static String[] with(String sub, String... args) {
        String[] a = new String[args.length + 1];
        a[0] = sub;
        System.arraycopy(args, 0, a, 1, args.length);
        return a;
    }

    /**
     * Runs check, then derive, with the same arguments (output {@code out}); both must fail with {@code exit}, the
     * same message naming {@code culprits}, and check must leave the output's folder exactly as it found it.
     */
    private void sameRefusal(int exit, Path out, List<String> culprits, String... args) {
        Path parent = out.getParent();
        TreeSet<String> beside = Files.isDirectory(parent) ? namesIn(parent) : null;
        Map<String, String> before = TestCatalogs.treeHash(out);
        boolean existed = Files.exists(out);
        CliRunner check = CliRunner.run(with("check", args));
        assertEquals(exit, check.exitCode, "check: " + check);
        for (String c : culprits) {
            assertTrue(check.err.contains(c), "check's message should name '" + c + "': " + check.err);
        }
        assertEquals(existed, Files.exists(out), "check must not create the output: " + out);
        assertEquals(before, TestCatalogs.treeHash(out), "check must not touch the output");
        if (beside != null) {
            assertEquals(beside, namesIn(parent), "check must not write beside the output (lease, staging)");
        }
        CliRunner derive = CliRunner.run(with("derive", args));
        assertEquals(exit, derive.exitCode, "derive: " + derive);
        assertEquals(comparable(derive.err), comparable(check.err), "check refuses with derive's message");
    }

    private String[] demoArgs(Path astro, Path phot, Path out, String... more) {
        List<String> a = new ArrayList<>(List.of("--input", astro.toString(), "--photometry", phot.toString(),
                "--join-on", "star_id", "--config", CONFIG, "--output", out.toString()));
        a.addAll(List.of(more));
        return a.toArray(new String[0]);
    }

    @Test
    void columnAndFileProblemsAreRefusedAsDeriveRefusesThem() throws IOException {
        Path out = tmp.resolve("out");
        // a mapped column missing (DatasetErrorsTest.missingMappedColumn)
        Path noErr = tmp.resolve("astro-no-err");
        spark.read().parquet(astrometry().toString()).drop("parallax_err_mas").write().partitionBy("tile").parquet(noErr.toString());
        sameRefusal(3, out, List.of("parallax_err_mas"), demoArgs(noErr, photometry(), out));
        // text in a numeric column (stringInANumericColumn)
        Path textV = tmp.resolve("phot-text-v");
        spark.read().parquet(photometry().toString()).withColumn("mag_v", functions.col("mag_v").cast("string"))
                .write().partitionBy("tile").parquet(textV.toString());
        sameRefusal(3, out, List.of("mag_v", "string"), demoArgs(astrometry(), textV, out));
        // a truncated Parquet file (truncatedParquetFile)
        Path truncated = tmp.resolve("astro-truncated");
        copyTree(astrometry(), truncated);
        Path victim = dataFiles(truncated).get(0);
        byte[] b = Files.readAllBytes(victim);
        Files.write(victim, java.util.Arrays.copyOf(b, b.length / 2));
        sameRefusal(3, out, List.of(victim.getFileName().toString()), demoArgs(truncated, photometry(), out));
        // a zero-byte file (zeroByteFile)
        Path zero = tmp.resolve("phot-zero");
        copyTree(photometry(), zero);
        Files.createFile(dataFiles(zero).get(0).getParent().resolve("part-empty.parquet"));
        sameRefusal(3, out, List.of("part-empty.parquet"), demoArgs(astrometry(), zero, out));
        // schema differs between partitions (schemaDiffersBetweenPartitions)
        Path mixed = tmp.resolve("astro-mixed");
        copyTree(astrometry(), mixed);
        Path tile = dataFiles(mixed).get(0).getParent();
        Path rewritten = tmp.resolve("one-tile-text");
        spark.read().parquet(tile.toString()).withColumn("parallax_mas", functions.col("parallax_mas").cast("string"))
                .write().parquet(rewritten.toString());
        for (Path f : dataFiles(tile)) {
            Files.delete(f);
        }
        for (Path f : dataFiles(rewritten)) {
            Files.copy(f, tile.resolve(f.getFileName()));
        }
        sameRefusal(3, out, List.of("schema differs", "astro-mixed"), demoArgs(mixed, photometry(), out));
    }

    @Test
    void emptyAndAbsentInputsAreRefusedAsDeriveRefusesThem() throws IOException {
        Path out = tmp.resolve("out");
        // emptyTableAndEmptyFolder: a table without rows, a folder without files, a path that does not exist
        Path empty = tmp.resolve("empty");
        spark.read().parquet(astrometry().toString()).limit(0).write().parquet(empty.toString());
        sameRefusal(3, out, List.of("no rows"), "--input", empty.toString(), "--config", CONFIG, "--output", out.toString());
        Path none = Files.createDirectories(tmp.resolve("nothing"));
        sameRefusal(3, out, List.of("no data files"), demoArgs(astrometry(), none, out));
        sameRefusal(3, out, List.of("does not exist"), demoArgs(tmp.resolve("absent"), photometry(), out));
    }

    @Test
    void configAndCommandLineProblemsAreRefusedAsDeriveRefusesThem() throws IOException {
        Path out = tmp.resolve("out");
        Path cfg = tmp.resolve("survey.yaml");
        // anotherRvWithGaiaBandsIsRefused: the demo survey has G, BP and RP
        Files.writeString(cfg, "physics:\n  r_v: 3.3\n");
        List<String> a = new ArrayList<>(List.of(demoArgs(astrometry(), photometry(), out)));
        a.set(a.indexOf(CONFIG), cfg.toString());
        sameRefusal(2, out, List.of("survey.yaml", "physics.r_v", "R_V = 3.1"), a.toArray(new String[0]));
        // unknownConfigKeyAndBadValue
        Files.writeString(cfg, "physics:\n  parallax_snr_minimum: 5\n");
        sameRefusal(2, out, List.of("survey.yaml", "physics.parallax_snr_minimum"), a.toArray(new String[0]));
        Files.writeString(cfg, "physics:\n  r_v: -3.1\n");
        sameRefusal(2, out, List.of("survey.yaml", "-3.1"), a.toArray(new String[0]));
        Files.writeString(cfg, "columns:\n  parallax: plx\n");
        sameRefusal(3, out, List.of("plx"), a.toArray(new String[0]));
        // check's own option (derive has none to compare with): a usage error, exit 2, naming the option and the rule
        CliRunner badSample = CliRunner.run(with("check", demoArgs(astrometry(), photometry(), out, "--sample-rows", "0")));
        assertEquals(2, badSample.exitCode, badSample.toString());
        assertTrue(badSample.err.contains("--sample-rows: 0 (must be 1 to 1,000,000"), badSample.err);
        assertFalse(Files.exists(out));
        // badCommandLineValues
        sameRefusal(2, out, List.of("--write-mode", "sometimes"), demoArgs(astrometry(), photometry(), out, "--write-mode", "sometimes"));
        sameRefusal(2, out, List.of("--input-format", "hdf5"), demoArgs(astrometry(), photometry(), out, "--input-format", "hdf5"));
        Path tile0 = dataFiles(astrometry()).get(0).getParent();
        Path ptile0 = dataFiles(photometry()).get(0).getParent();
        sameRefusal(2, out, List.of("replace-partitions"), demoArgs(tile0, ptile0, out, "--write-mode", "replace-partitions"));
    }

    @Test
    void outputProblemsAreRefusedAsDeriveRefusesThem() throws IOException {
        // outputInsideInputAndOutputExisting
        Path inside = astrometry().resolve("derived");
        sameRefusal(4, inside, List.of("inside input"), demoArgs(astrometry(), photometry(), inside));
        assertFalse(Files.exists(inside));
        Path out = tmp.resolve("out");
        assertEquals(0, CliRunner.run(with("derive", demoArgs(astrometry(), photometry(), out))).exitCode);
        sameRefusal(4, out, List.of("already exists", out.getFileName().toString()), demoArgs(astrometry(), photometry(), out));
        // unwritableOutput: the output's parent is a file
        Path file = Files.writeString(tmp.resolve("a-file"), "not a folder");
        Path under = file.resolve("out");
        sameRefusal(4, under, List.of("a-file"), demoArgs(astrometry(), photometry(), under));
        assertEquals("not a folder", Files.readString(file));
        // a live run holds the output's lease (ConcurrentRunsTest's refusal): check reads the lease, takes none
        Path busy = tmp.resolve("busy");
        org.apache.hadoop.fs.FileSystem fs = org.apache.hadoop.fs.FileSystem.getLocal(spark.sparkContext().hadoopConfiguration());
        try (OutputLease held = OutputLease.acquire(fs, fs.makeQualified(new org.apache.hadoop.fs.Path(busy.toString())),
                "20260101000000-otherrun", 120)) {
            sameRefusal(4, busy, List.of("is being written by", "otherrun"), demoArgs(astrometry(), photometry(), busy));
        }
    }

    private static JsonNode checkJson(String... args) throws IOException {
        return checkJson(300, args);
    }

    private static JsonNode checkJson(int sampleRows, String... args) throws IOException {
        List<String> a = new ArrayList<>(List.of(args));
        a.addAll(List.of("--json", "--sample-rows", String.valueOf(sampleRows)));
        CliRunner r = CliRunner.run(with("check", a.toArray(new String[0])));
        assertEquals(0, r.exitCode, r.toString());
        return new ObjectMapper().readTree(r.out);
    }

    private static List<String> predictedColumns(JsonNode report) {
        List<String> cols = new ArrayList<>();
        report.path("output columns").path("columns").forEach(n -> cols.add(n.asText()));
        return cols;
    }

    private static List<String> realColumns(Path out) {
        List<String> cols = new ArrayList<>();
        for (StructField f : spark.read().parquet(out.toString()).schema().fields()) {
            cols.add(f.name() + " " + f.dataType().simpleString());
        }
        return cols;
    }

    @Test
    void predictsDerivesOutputColumnsExactly() throws IOException {
        for (List<String> layout : List.of(List.<String>of(), List.of("--layout", "full"), List.of("--columns", "core"),
                List.of("--uncertainty", "montecarlo", "--draws", "8"))) {
            Path out = tmp.resolve("out" + String.join("", layout).replace("-", ""));
            String[] args = demoArgs(astrometry(), photometry(), out, layout.toArray(new String[0]));
            List<String> predicted = predictedColumns(checkJson(args));
            assertFalse(Files.exists(out), "check wrote " + out);
            String name = out.getFileName().toString();
            assertTrue(namesIn(out.getParent()).stream().noneMatch(n -> n.startsWith(name) || n.startsWith("." + name)),
                    "nothing beside the output: " + namesIn(out.getParent()));
            CliRunner d = CliRunner.run(with("derive", args));
            assertEquals(0, d.exitCode, d.toString());
            // the reference: the schema Spark reads back from the real output (names, types, order)
            assertEquals(realColumns(out), predicted, "layout " + layout);
        }
    }

    @Test
    void bytesPerStarIsNearARealDerives() throws IOException {
        Path out = tmp.resolve("out");
        String[] args = demoArgs(astrometry(), photometry(), out);
        System.out.println(CliRunner.run(with("check", args)).out);
        List<double[]> estimates = new ArrayList<>();
        for (int n : new int[] {500, 1000, 2000}) {
            JsonNode size = checkJson(n, args).path("size");
            double perStar = size.path("estimate_bytes_per_star").asDouble(Double.NaN);
            double perFile = size.path("estimate_fixed_bytes_per_file").asDouble(Double.NaN);
            assertTrue(perStar > 0 && perFile >= 0, "estimates: " + size);
            estimates.add(new double[] {n, perStar, perFile});
        }
        assertEquals(0, CliRunner.run(with("derive", args)).exitCode);
        List<Path> files = dataFiles(out);
        long bytes = 0;
        for (Path f : files) {
            bytes += Files.size(f);
        }
        for (double[] e : estimates) {
            double predicted = e[1] * STARS + e[2] * files.size();
            System.out.printf("bytes: sample %.0f rows: predicted %.0f (%.1f per star + %.0f per file x %d files), written %d "
                    + "(%.1f per star)%n", e[0], predicted, e[1], e[2], files.size(), bytes, (double) bytes / STARS);
            // tolerance 25 %, our choice: the sample is the first rows of one sky tile, written in one file
            assertEquals(1.0, predicted / bytes, 0.25, "sample " + e[0] + ": predicted " + predicted + " bytes, written " + bytes);
        }
    }

    @Test
    void aSingleCsvTableIsCheckedToo() throws IOException {
        // the demo survey's two tables as one CSV table (derive's other reader): the columns are predicted as well
        Path csv = tmp.resolve("stars-csv");
        spark.read().parquet(astrometry().toString()).join(spark.read().parquet(photometry().toString()).drop("tile"), "star_id")
                .coalesce(2).write().option("header", "true").csv(csv.toString());
        Path out = tmp.resolve("out");
        String[] args = {"--input", csv.toString(), "--input-format", "csv", "--config", CONFIG, "--output", out.toString()};
        JsonNode report = checkJson(args);
        assertEquals("unknown (CSV)", report.path("inputs").path("table").path("rows (footers)").asText(), report.toString());
        assertFalse(Files.exists(out));
        assertEquals(0, CliRunner.run(with("derive", args)).exitCode);
        assertEquals(realColumns(out), predictedColumns(report));
    }
}
