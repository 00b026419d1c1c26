package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.attribute.FileTime;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * Inputs that change under the run: just before the commit the job lists its inputs again and compares names, sizes
 * and modification times with what it read. Any difference refuses the commit (exit 3) naming the file and what
 * changed, and the previous output stays byte-identical. The change is made by {@link TestHooks#beforeInputRecheck},
 * i.e. after the data was read, written to staging and checked.
 */
class InputChangeTest {
    private static final String RULE = "inputs must not change while a run reads them";

    @TempDir
    Path tmp;

    private final SparkSession spark = SharedSpark.spark();

    /** The non-hidden Parquet files under dir, sorted. */
    private static List<Path> dataFiles(Path dir) {
        try (Stream<Path> s = Files.walk(dir)) {
            return s.filter(Files::isRegularFile)
                    .filter(p -> p.getFileName().toString().endsWith(".parquet"))
                    .filter(p -> !dir.relativize(p).toString().matches("(^|.*/)[._].*"))
                    .sorted().collect(Collectors.toList());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Runs the command line with the hook set, and always resets it. */
    private static CliRunner runChanging(IoAction change, String... args) {
        TestHooks.beforeInputRecheck = () -> {
            try {
                change.run();
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        };
        try {
            return CliRunner.run(args);
        } finally {
            TestHooks.beforeInputRecheck = null;
        }
    }

    interface IoAction {
        void run() throws IOException;
    }

    /** Exit 3, the message names the file, says what changed, states the rule and that nothing was committed. */
    private void assertRefused(CliRunner r, Path file, String what) {
        assertEquals(3, r.exitCode, r.toString());
        assertTrue(r.err.contains(file.toString()), "names the file " + file + ": " + r.err);
        assertTrue(r.err.contains(what), "says what changed (" + what + "): " + r.err);
        assertTrue(r.err.contains(RULE), "states the rule: " + r.err);
        assertTrue(r.err.contains("nothing was committed"), r.err);
        try (Stream<Path> s = Files.list(tmp)) {
            List<String> left = s.map(p -> p.getFileName().toString())
                    .filter(n -> n.contains(".staging-") || n.contains(".previous-")).collect(Collectors.toList());
            assertEquals(List.of(), left, "no staging or set-aside folder left beside the output");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    @Test
    void replacedFileRefusesTheCommitAndLeavesThePreviousOutputByteIdentical() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString()).exitCode);
        Map<String, String> before = TestCatalogs.treeHash(out);

        // a newer version of the same file: other rows, another size
        Path other = tmp.resolve("other");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(40, 500), other);
        Path victim = dataFiles(in).get(0);
        long oldSize = Files.size(victim);
        Path replacement = dataFiles(other).stream().filter(p -> sizeOf(p) != oldSize).findFirst().orElseThrow();
        long newSize = Files.size(replacement);

        CliRunner r = runChanging(() -> Files.copy(replacement, victim, StandardCopyOption.REPLACE_EXISTING),
                "derive", "--input", in.toString(), "--output", out.toString(), "--write-mode", "overwrite");
        assertRefused(r, victim, "size " + oldSize + " -> " + newSize + " bytes");
        assertEquals(before, TestCatalogs.treeHash(out), "previous output byte-identical");
        assertNull(TestHooks.beforeInputRecheck, "hook reset");
    }

    @Test
    void touchedFileOfTheSameSizeRefusesTheCommit() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        Path victim = dataFiles(in).get(1);
        long size = Files.size(victim);
        long was = Files.getLastModifiedTime(victim).toMillis();
        long now = was - 3_600_000L;

        CliRunner r = runChanging(() -> Files.setLastModifiedTime(victim, FileTime.fromMillis(now)),
                "derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(size, Files.size(victim), "same size, only the time changed");
        assertRefused(r, victim, "modified " + Instant.ofEpochMilli(was) + " -> " + Instant.ofEpochMilli(now));
        assertFalse(r.err.contains("size "), "the size did not change: " + r.err);
        assertFalse(Files.exists(out), "no output appeared");
    }

    @Test
    void removedFileRefusesTheCommit() {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        Path victim = dataFiles(in).get(0);

        CliRunner r = runChanging(() -> Files.delete(victim), "derive", "--input", in.toString(), "--output", out.toString());
        assertRefused(r, victim, "file removed");
        assertFalse(Files.exists(out), "no output appeared");
    }

    @Test
    void fileAddedToThePhotometryTableRefusesTheCommit() {
        Path astro = tmp.resolve("astro");
        Path phot = tmp.resolve("phot");
        Path out = tmp.resolve("out");
        var all = TestCatalogs.frame(spark, TestCatalogs.rows(12, 1));
        all.select("star_id", "parallax_mas", "parallax_err_mas").repartition(2).write().parquet(astro.toString());
        all.select("star_id", "mag_v", "mag_v_err", "mag_ks", "mag_ks_err").repartition(2).write().parquet(phot.toString());
        Path source = dataFiles(phot).get(0);
        Path added = phot.resolve("part-99999-added.snappy.parquet");

        CliRunner r = runChanging(() -> Files.copy(source, added), "derive", "--input", astro.toString(),
                "--photometry", phot.toString(), "--join-on", "star_id", "--output", out.toString());
        assertRefused(r, added, "new file appeared");
        assertTrue(r.err.contains("Input photometry file"), r.err);
        assertFalse(Files.exists(out), "no output appeared");
    }

    @Test
    void unchangedInputsCommitAndTheManifestListsEveryInputFile() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);
        List<Path> files = dataFiles(in);

        // hidden files are not inputs (the listing skips them, as Spark's reader does): writing some is no change
        CliRunner r = runChanging(() -> {
            Files.writeString(in.resolve("_notes"), "not data");
            Files.writeString(files.get(0).getParent().resolve(".tmp-marker"), "not data");
        }, "derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());

        JsonNode m = new ObjectMapper().readTree(Files.readString(out.resolve(RunManifest.FILE_NAME)));
        JsonNode table = m.get("input_tables").get(0);
        JsonNode list = table.get("file_list");
        assertEquals(files.size(), list.size(), list.toString());
        assertEquals(files.size(), table.get("files").asInt());
        Map<String, String> want = new TreeMap<>();
        for (Path f : files) {
            want.put(f.toAbsolutePath().toString(), Files.size(f) + " " + Instant.ofEpochMilli(Files.getLastModifiedTime(f).toMillis()));
        }
        Map<String, String> got = new TreeMap<>();
        List<String> order = new ArrayList<>();
        for (JsonNode f : list) {
            order.add(f.get("path").asText());
            got.put(URI.create(f.get("path").asText()).getPath(), f.get("bytes").asLong() + " " + f.get("modified_utc").asText());
        }
        assertEquals(want, got, "every data file with its size and modification time, as on disk");
        assertEquals(order.stream().sorted().collect(Collectors.toList()), order, "sorted by path");
        assertTrue(m.get("seconds").has("recheck_inputs"), m.get("seconds").toString());
    }

    private static long sizeOf(Path p) {
        try {
            return Files.size(p);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
