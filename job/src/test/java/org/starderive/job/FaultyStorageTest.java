package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.hadoop.conf.Configuration;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * The output on a file system that fails ({@link FaultyFileSystem}, injected through the Hadoop configuration): a full
 * disk at several byte offsets, a rename refused at every step, and renames that copy then delete as object stores do.
 * The previous output must stay byte-identical every time, or — for copying renames — be exactly what the README
 * promises a reader can see mid-commit.
 */
class FaultyStorageTest {
    @TempDir
    Path tmp;

    private SparkSession spark;
    private Configuration conf;

    @BeforeEach
    void install() {
        spark = SharedSpark.spark();
        conf = spark.sparkContext().hadoopConfiguration();
        FaultyFileSystem.install(conf);
        FaultyFileSystem.reset();
    }

    @AfterEach
    void uninstall() {
        FaultyFileSystem.uninstall(conf);
        TestHooks.commitStepHook = null;
    }

    private DeriveJob.Summary derive(Path in, Path out, OutputCommitter.Mode mode) {
        DeriveJob.Request r = ConcurrentRunsTest.request(in, out, mode);
        r.output = FaultyFileSystem.uri(out);
        return DeriveJob.run(spark, r, JobConfig.defaults());
    }

    private List<String> leftovers() {
        return TestCatalogs.commitLeftovers(tmp, "out");
    }

    private static void copyTree(Path from, Path to) throws Exception {
        try (Stream<Path> s = Files.walk(from)) {
            for (Path p : (Iterable<Path>) s::iterator) {
                Path t = to.resolve(from.relativize(p).toString());
                if (Files.isDirectory(p)) {
                    Files.createDirectories(t);
                } else {
                    Files.copy(p, t);
                }
            }
        }
    }

    private Path input(String name, int stars, long offset) {
        Path in = tmp.resolve(name);
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(stars, offset), in);
        return in;
    }

    @Test
    void aFullDiskAtAnyPointOfTheWriteLeavesThePreviousOutput() throws Exception {
        Path in = input("in", 300, 1);
        Path out = tmp.resolve("out");
        derive(in, out, OutputCommitter.Mode.FAIL);
        Map<String, String> before = TestCatalogs.treeHash(out);
        // 0: the first byte; then inside the data files, and (large) at the manifest written after them
        for (long budget : new long[] {0, 2_000, 20_000, 60_000, 95_000}) {
            FaultyFileSystem.reset();
            FaultyFileSystem.stagingBytesLeft.set(budget);
            JobException e = assertThrows(JobException.class, () -> derive(in, out, OutputCommitter.Mode.OVERWRITE),
                    "disk full after " + budget + " bytes");
            FaultyFileSystem.reset();
            String m = e.getMessage();
            assertEquals(4, e.kind().exitCode(), m);
            assertTrue(m.contains("No space left on device") || m.contains("no space left"), m);
            assertTrue(m.contains(tmp.resolve("out").toString()), "names the path: " + m);
            assertTrue(m.contains("nothing was committed"), m);
            assertEquals(before, TestCatalogs.treeHash(out), "budget " + budget + ": previous output byte-identical");
            assertEquals(List.of(), leftovers(), "budget " + budget + ": no half output");
        }
        // the largest budget above must have failed late: after every data file was written
        FaultyFileSystem.reset();
        derive(in, out, OutputCommitter.Mode.OVERWRITE);
    }

    @Test
    void aRenameRefusedAtAnyStepLeavesThePreviousOutput() throws Exception {
        renameFailsAtEveryStep(false);
    }

    @Test
    void aCopyingRenameRefusedAtAnyStepLeavesThePreviousOutput() throws Exception {
        renameFailsAtEveryStep(true);
    }

    /** Tile 1 of the 30-star table alone: a reprocessing that replaces one partition (or, overwriting, the whole). */
    private Path tile1Reprocessed() {
        Path in1 = tmp.resolve("in1");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1).stream().filter(r -> r.getInt(1) == 1)
                .collect(Collectors.toList()), in1);
        return in1;
    }

    /** A clean output derived from {@code in}, with every fault switched off. */
    private void freshOutput(Path in, Path out) throws Exception {
        FaultyFileSystem.reset();
        ConcurrentRunsTest.deleteTree(out);
        derive(in, out, OutputCommitter.Mode.FAIL);
    }

    private void renameFailsAtEveryStep(boolean copying) throws Exception {
        Path in = input("in", 30, 1);
        Path in1 = tile1Reprocessed();
        Path out = tmp.resolve("out");
        for (OutputCommitter.Mode mode : List.of(OutputCommitter.Mode.OVERWRITE, OutputCommitter.Mode.REPLACE_PARTITIONS)) {
            freshOutput(in, out);
            Map<String, String> before = TestCatalogs.treeHash(out);
            // how many renames a clean run makes (lease, journal, the commit's moves, the lease's release)
            Path probe = tmp.resolve("probe-" + mode.label());
            derive(in, probe, OutputCommitter.Mode.FAIL);
            FaultyFileSystem.copyRename = copying;
            int start = FaultyFileSystem.renames.get();
            derive(in1, probe, mode);
            int n = FaultyFileSystem.renames.get() - start;
            assertTrue(n >= 5, "renames in a commit: " + n);
            int failedRuns = 0;
            Path pristine = tmp.resolve("pristine-" + mode.label());
            copyTree(out, pristine);
            for (int k = 1; k <= n; k++) {
                ConcurrentRunsTest.deleteTree(out);
                FaultyFileSystem.reset();
                copyTree(pristine, out);
                assertEquals(before, TestCatalogs.treeHash(out));
                FaultyFileSystem.copyRename = copying;
                FaultyFileSystem.failRename = FaultyFileSystem.renames.get() + k;
                String at = mode.label() + (copying ? " (copying renames)" : "") + ", rename " + k + " of " + n + " refused";
                try {
                    derive(in1, out, mode);
                    // only the lease's release may fail after the commit point: the output is then the new one
                    assertTrue(Files.exists(out.resolve(RunManifest.FILE_NAME)), at);
                    assertTrue(k == n, at + ": committed although a rename before the commit point failed");
                } catch (JobException e) {
                    failedRuns++;
                    assertEquals(4, e.kind().exitCode(), at + ": " + e.getMessage());
                    assertTrue(e.getMessage().contains("injected rename failure") || e.getMessage().contains("rename"),
                            at + ": " + e.getMessage());
                    assertEquals(before, TestCatalogs.treeHash(out), at + ": previous output byte-identical");
                }
                FaultyFileSystem.reset();
                assertEquals(List.of(), leftovers(), at);
            }
            assertTrue(failedRuns >= n - 1, mode.label() + ": " + failedRuns + " of " + n + " refused renames stopped the run");
        }
    }

    /**
     * Renames that copy then delete: at every copied file, a reader that finds the manifest sees a whole output (the
     * previous or the new one), never a mixture — the promise for object stores in the README.
     */
    @Test
    void withCopyingRenamesAReaderFindingTheManifestSeesAWholeOutput() throws Exception {
        Path in = input("in", 30, 1);
        Path in1 = tile1Reprocessed();
        Path out = tmp.resolve("out");
        for (OutputCommitter.Mode mode : List.of(OutputCommitter.Mode.OVERWRITE, OutputCommitter.Mode.REPLACE_PARTITIONS)) {
            freshOutput(in, out);
            Map<String, String> before = CommitCrashTest.readerView(out);
            List<Map<String, String>> seenWithManifest = new ArrayList<>();
            int[] seenWithout = {0};
            FaultyFileSystem.copyRename = true;
            FaultyFileSystem.afterCopiedFile = p -> {
                if (p.getName().contains(".lease-")) {
                    return;
                }
                if (Files.exists(out.resolve(RunManifest.FILE_NAME))) {
                    seenWithManifest.add(CommitCrashTest.readerView(out));
                } else {
                    seenWithout[0]++;
                }
            };
            derive(in1, out, mode);
            FaultyFileSystem.reset();
            Map<String, String> after = CommitCrashTest.readerView(out);
            assertTrue(seenWithout[0] > 0, mode.label() + ": the commit was watched while in progress");
            assertTrue(!seenWithManifest.isEmpty(), mode.label() + ": and after its manifest arrived");
            for (Map<String, String> v : seenWithManifest) {
                assertTrue(v.equals(before) || v.equals(after), mode.label() + ": a reader with the manifest saw " + v.keySet());
            }
            List<Row> got = spark.read().parquet(out.toString()).collectAsList();
            assertEquals(mode == OutputCommitter.Mode.OVERWRITE ? 10 : 30, got.size(), mode.label());
        }
    }

    /** A process that dies in the middle of a copying rename: the next run removes the half copy and restores. */
    @Test
    void aRunKilledInTheMiddleOfACopyingRenameIsUndone() throws Exception {
        Path in = input("in", 30, 1);
        Path out = tmp.resolve("out");
        derive(in, out, OutputCommitter.Mode.FAIL);
        Map<String, String> before = TestCatalogs.treeHash(out);
        for (int killAtFile : new int[] {1, 3, 6}) {
            FaultyFileSystem.reset();
            FaultyFileSystem.copyRename = true;
            int[] copied = {0};
            FaultyFileSystem.afterCopiedFile = p -> {
                if (!p.getName().contains(".lease-") && ++copied[0] == killAtFile) {
                    throw new CommitCrashTest.SimulatedKill("killed after copying " + p);
                }
            };
            assertThrows(CommitCrashTest.SimulatedKill.class, () -> derive(in, out, OutputCommitter.Mode.OVERWRITE));
            FaultyFileSystem.reset();
            FaultyFileSystem.copyRename = true;
            DeriveJob.Request r = ConcurrentRunsTest.request(in, out, OutputCommitter.Mode.FAIL);
            r.output = FaultyFileSystem.uri(out);
            JobException e = assertThrows(JobException.class, () -> DeriveJob.run(spark, r, JobConfig.defaults()));
            assertTrue(e.getMessage().contains("already exists"), e.getMessage());
            assertEquals(before, TestCatalogs.treeHash(out), "killed at copied file " + killAtFile);
            assertEquals(List.of(), leftovers(), "killed at copied file " + killAtFile);
        }
    }
}
