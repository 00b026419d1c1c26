package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * A run that dies at any step of its commit: the output is then either complete (with its manifest) or visibly in
 * the middle of a commit (no manifest), and the next run on it puts the previous output back, byte for byte, before
 * anything else. The death is simulated in-process by an Error thrown before a chosen step (nothing catches it, as
 * nothing runs after a SIGKILL); a real SIGKILL mid-write is in PackagedJarsIT.
 */
class CommitCrashTest {
    @TempDir
    Path tmp;

    /** Stands for the process dying: not an Exception, so no cleanup code runs. */
    static final class SimulatedKill extends Error {
        private static final long serialVersionUID = 1L;

        SimulatedKill(String m) { super(m); }
    }

    @AfterEach
    void clearHook() {
        TestHooks.commitStepHook = null;
        TestHooks.beforeInputRecheck = null;
    }

    @Test
    void failModeIsCheckedAgainAtTheCommit() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(SharedSpark.spark(), TestCatalogs.rows(12, 1), in);
        Path out = tmp.resolve("out");
        // something (not a starderive run: it would need the lease) creates the output while the run computes
        TestHooks.beforeInputRecheck = () -> {
            try {
                Files.createDirectories(out);
                Files.writeString(out.resolve("someone-else.txt"), "x");
            } catch (java.io.IOException e) {
                throw new java.io.UncheckedIOException(e);
            }
        };
        JobException e = assertThrows(JobException.class, () -> derive(in, out, OutputCommitter.Mode.FAIL));
        assertEquals(4, e.kind().exitCode());
        assertTrue(e.getMessage().contains("appeared while this run was writing"), e.getMessage());
        try (Stream<Path> s = Files.list(out)) {
            assertEquals(List.of("someone-else.txt"), s.map(p -> p.getFileName().toString()).collect(Collectors.toList()));
        }
    }

    @Test
    void aMoveRefusesAnExistingTargetInsteadOfNestingIntoIt() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(SharedSpark.spark(), TestCatalogs.rows(12, 1), in);
        Path out = tmp.resolve("out");
        // the folder appears between the commit's check and its move of the staging folder
        TestHooks.commitStepHook = (i, step) -> {
            if (step.startsWith("move ") && step.contains(".staging-") && step.endsWith("/out")) {
                try {
                    Files.createDirectories(out);
                } catch (java.io.IOException e) {
                    throw new java.io.UncheckedIOException(e);
                }
            }
        };
        JobException e = assertThrows(JobException.class, () -> derive(in, out, OutputCommitter.Mode.FAIL));
        assertEquals(4, e.kind().exitCode());
        assertTrue(e.getMessage().contains("commit failed") && e.getMessage().contains("undone"), e.getMessage());
        try (Stream<Path> s = Files.list(out)) {
            assertEquals(List.of(), s.collect(Collectors.toList()), "nothing moved into or nested inside the folder");
        }
        try (Stream<Path> s = Files.list(tmp)) {
            assertEquals(List.of(), s.map(p -> p.getFileName().toString())
                    .filter(n -> n.contains(".staging-") || n.contains(".commit-") || n.contains(".manifest-"))
                    .collect(Collectors.toList()));
        }
    }

    private static DeriveJob.Summary derive(Path in, Path out, OutputCommitter.Mode mode) {
        return DeriveJob.run(SharedSpark.spark(), ConcurrentRunsTest.request(in, out, mode), JobConfig.defaults());
    }

    /** What a Spark reader of the folder reads: the data files (no hidden or '_' names), with their digests. */
    static Map<String, String> readerView(Path out) {
        Map<String, String> all = TestCatalogs.treeHash(out);
        Map<String, String> v = new TreeMap<>();
        all.forEach((k, h) -> {
            boolean hidden = Stream.of(k.split("/")).anyMatch(seg -> seg.startsWith(".") || seg.startsWith("_"));
            if (!hidden) {
                v.put(k, h);
            }
        });
        return v;
    }

    /** Rows of tile 1 with a new [Fe/H], and a new tile 3: a reprocessing that replaces one partition and adds one. */
    private static List<Row> reprocessed() {
        List<Row> rows = new ArrayList<>();
        for (Row x : TestCatalogs.rows(30, 1)) {
            if (x.getInt(1) == 1) {
                Object[] v = new Object[x.length()];
                for (int i = 0; i < v.length; i++) {
                    v[i] = x.get(i);
                }
                v[13] = -1.0;
                rows.add(RowFactory.create(v));
            }
        }
        for (Row x : TestCatalogs.rows(6, 1000)) {
            Object[] v = new Object[x.length()];
            for (int i = 0; i < v.length; i++) {
                v[i] = x.get(i);
            }
            v[1] = 3;
            rows.add(RowFactory.create(v));
        }
        return rows;
    }

    @Test
    void aCommitKilledAtAnyStepIsUndoneByTheNextRun_overwrite() throws Exception {
        crashAtEveryStep(OutputCommitter.Mode.OVERWRITE, TestCatalogs.rows(30, 1).stream().filter(r -> r.getInt(1) != 2)
                .collect(Collectors.toList()));
    }

    @Test
    void aCommitKilledAtAnyStepIsUndoneByTheNextRun_replacePartitions() throws Exception {
        crashAtEveryStep(OutputCommitter.Mode.REPLACE_PARTITIONS, reprocessed());
    }

    private void crashAtEveryStep(OutputCommitter.Mode mode, List<Row> newRows) throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        Path in2 = tmp.resolve("in2");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1), in);
        TestCatalogs.writeParquet(spark, newRows, in2);
        Path out = tmp.resolve("out");
        derive(in, out, OutputCommitter.Mode.FAIL);
        Map<String, String> before = TestCatalogs.treeHash(out);
        Map<String, String> beforeView = readerView(out);

        // the plan's steps, from a run on a copy
        Path probe = tmp.resolve("probe");
        derive(in, probe, OutputCommitter.Mode.FAIL);
        List<String> steps = new ArrayList<>();
        TestHooks.commitStepHook = (i, s) -> steps.add(s);
        derive(in2, probe, mode);
        TestHooks.commitStepHook = null;
        Map<String, String> afterView = readerView(probe);
        assertTrue(steps.size() >= 5, "steps: " + steps);
        assertTrue(steps.get(steps.size() - 1).endsWith("/probe/" + RunManifest.FILE_NAME), "manifest last: " + steps);

        for (int k = 0; k < steps.size(); k++) {
            int killAt = k;
            TestHooks.commitStepHook = (i, s) -> {
                if (i == killAt) {
                    throw new SimulatedKill("killed before step " + i + ": " + s);
                }
            };
            assertThrows(SimulatedKill.class, () -> derive(in2, out, mode));
            TestHooks.commitStepHook = null;
            String at = "killed before step " + k + " of " + steps.size() + " (" + steps.get(k) + ")";
            // what a reader sees now: the old manifest goes first, so a manifest means the whole previous output, and
            // no manifest means a commit in progress
            boolean manifest = Files.exists(out.resolve(RunManifest.FILE_NAME));
            assertEquals(k == 0, manifest, at);
            if (manifest) {
                assertEquals(beforeView, readerView(out), at);
            }
            try (Stream<Path> s = Files.list(tmp)) {
                assertTrue(s.anyMatch(p -> p.getFileName().toString().startsWith(".out.commit-")), at + ": journal left");
            }
            // the next run undoes the commit first; in fail mode it then refuses the (restored) output
            CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
            assertEquals(4, r.exitCode, at + ": " + r);
            assertTrue(r.err.contains("already exists"), at + ": " + r.err);
            assertEquals(before, TestCatalogs.treeHash(out), at + ": previous output back, byte for byte");
            assertEquals(List.of(), TestCatalogs.commitLeftovers(tmp, "out"), at);
        }
        // and an undisturbed run commits what the probe has
        DeriveJob.Summary s = derive(in2, out, mode);
        assertEquals(afterView.keySet().size(), readerView(out).size());
        JsonNode m = new ObjectMapper().readTree(out.resolve(RunManifest.FILE_NAME).toFile());
        JsonNode h = m.get("history");
        if (mode == OutputCommitter.Mode.REPLACE_PARTITIONS) {
            assertEquals(2, h.size(), h.toString());
            assertEquals("fail", h.get(0).get("write_mode").asText());
            assertEquals(s.runId, h.get(1).get("run_id").asText());
            assertEquals("[\"tile=1\",\"tile=3\"]", h.get(1).get("partitions_written").toString());
            assertEquals(List.of("tile=1", "tile=3"), s.partitionsReplaced);
        } else {
            assertEquals(1, h.size(), h.toString());
            assertFalse(readerView(out).keySet().stream().anyMatch(f -> f.startsWith("tile=2/")), "overwrite replaced the whole");
        }
    }

    @Test
    void replacePartitionsKeepsOneHistoryEntryPerRun() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1), in);
        Path tile0 = tmp.resolve("in0");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1).stream().filter(r -> r.getInt(1) == 0).collect(Collectors.toList()), tile0);
        Path out = tmp.resolve("out");
        DeriveJob.Summary a = derive(in, out, OutputCommitter.Mode.FAIL);
        DeriveJob.Summary b = derive(tile0, out, OutputCommitter.Mode.REPLACE_PARTITIONS);
        DeriveJob.Summary c = derive(tile0, out, OutputCommitter.Mode.REPLACE_PARTITIONS);
        JsonNode h = new ObjectMapper().readTree(out.resolve(RunManifest.FILE_NAME).toFile()).get("history");
        assertEquals(3, h.size(), h.toString());
        assertEquals(List.of(a.runId, b.runId, c.runId),
                List.of(h.get(0).get("run_id").asText(), h.get(1).get("run_id").asText(), h.get(2).get("run_id").asText()));
        assertEquals("[\"tile=0\",\"tile=1\",\"tile=2\"]", h.get(0).get("partitions_written").toString());
        assertEquals("[\"tile=0\"]", h.get(2).get("partitions_written").toString());
        // overwrite starts the history again: the whole output is new
        derive(in, out, OutputCommitter.Mode.OVERWRITE);
        assertEquals(1, new ObjectMapper().readTree(out.resolve(RunManifest.FILE_NAME).toFile()).get("history").size());
    }
}
