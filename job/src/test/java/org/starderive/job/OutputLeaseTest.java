package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The output lease's rules, on the local file system and without Spark. The rules are our own design (README,
 * Reliability); the checks are that the stated rule holds, not numbers from a source.
 */
class OutputLeaseTest {
    @TempDir
    java.nio.file.Path tmp;

    private static final double STALE_S = 120;

    private FileSystem fs() throws Exception {
        return FileSystem.getLocal(new Configuration());
    }

    private Path out() throws Exception {
        return fs().makeQualified(new Path(tmp.resolve("out").toString()));
    }

    /** Writes a lease file as another run would have, with the given fields, aged by {@code ageS} seconds. */
    private Path foreignLease(long generation, String host, String pid, String pidStart, long ageS) throws Exception {
        Path f = OutputLease.leaseFile(out(), generation);
        String text = "run_id=19990101000000-feedf00d\nhost=" + host + "\npid=" + pid + "\npid_start=" + pidStart
                + "\nstarted_utc=1999-01-01T00:00:00Z\n";
        Files.writeString(Paths.get(f.toUri().getPath()), text, StandardCharsets.UTF_8);
        fs().setTimes(f, System.currentTimeMillis() - ageS * 1000, -1);
        return f;
    }

    @Test
    void aSecondRunIsRefusedNamingTheHolder() throws Exception {
        try (OutputLease a = OutputLease.acquire(fs(), out(), "run-a", STALE_S)) {
            assertEquals(1, a.generation());
            JobException e = assertThrows(JobException.class, () -> OutputLease.acquire(fs(), out(), "run-b", STALE_S));
            assertEquals(4, e.kind().exitCode());
            String m = e.getMessage();
            assertTrue(m.contains("run run-a") && m.contains("host " + OutputLease.thisHost())
                    && m.contains("pid " + ProcessHandle.current().pid()) && m.contains("started 20"), m);
            assertTrue(m.contains("one run writes an output at a time"), m);
            a.checkHeld(); // still the holder
        }
    }

    @Test
    void aReleasedLeaseIsTakenByTheNextRunAndOlderGenerationsGo() throws Exception {
        OutputLease a = OutputLease.acquire(fs(), out(), "run-a", STALE_S);
        a.close();
        try (OutputLease b = OutputLease.acquire(fs(), out(), "run-b", STALE_S)) {
            assertEquals(2, b.generation());
            assertEquals(List.of(2L), OutputLease.generations(fs(), out()));
            assertFalse(Files.exists(tmp.resolve(".out.lease-0000000001.released")));
        }
        // nothing of the lease is visible to a reader of the output's parent but hidden files
        try (var s = Files.list(tmp)) {
            assertTrue(s.allMatch(p -> p.getFileName().toString().startsWith(".")));
        }
    }

    @Test
    void aLeaseNotRenewedForTheStaleIntervalIsTakenOver() throws Exception {
        foreignLease(7, "some-other-host", "12345", "", 121);
        try (OutputLease b = OutputLease.acquire(fs(), out(), "run-b", STALE_S)) {
            assertEquals(8, b.generation());
        }
    }

    @Test
    void aFreshLeaseOfAnotherHostIsRespected() throws Exception {
        foreignLease(7, "some-other-host", "12345", "", 100);
        JobException e = assertThrows(JobException.class, () -> OutputLease.acquire(fs(), out(), "run-b", STALE_S));
        assertTrue(e.getMessage().contains("run 19990101000000-feedf00d (host some-other-host, pid 12345"), e.getMessage());
    }

    @Test
    void aLeaseOfAProcessGoneFromThisHostIsTakenOverAtOnce() throws Exception {
        Process p = new ProcessBuilder(Paths.get(System.getProperty("java.home"), "bin", "java").toString(), "-version")
                .redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
        p.waitFor();
        long deadPid = p.pid();
        foreignLease(3, OutputLease.thisHost(), String.valueOf(deadPid), "", 0);
        try (OutputLease b = OutputLease.acquire(fs(), out(), "run-b", STALE_S)) {
            assertEquals(4, b.generation());
        }
    }

    @Test
    void aRecycledProcessIdDoesNotKeepALeaseAlive() throws Exception {
        // our own pid is alive, but it was started at another instant than the lease records
        foreignLease(3, OutputLease.thisHost(), String.valueOf(ProcessHandle.current().pid()), "2000-01-01T00:00:00Z", 0);
        try (OutputLease b = OutputLease.acquire(fs(), out(), "run-b", STALE_S)) {
            assertEquals(4, b.generation());
        }
        // and with the right start instant it is this (alive) process: respected
        foreignLease(9, OutputLease.thisHost(), String.valueOf(ProcessHandle.current().pid()),
                ProcessHandle.current().info().startInstant().map(Object::toString).orElse(""), 0);
        assertThrows(JobException.class, () -> OutputLease.acquire(fs(), out(), "run-c", STALE_S));
    }

    @Test
    void aPausedHolderWhoseLeaseWasTakenOverStopsBeforeTheCommit() throws Exception {
        OutputLease a = OutputLease.acquire(fs(), out(), "run-a", STALE_S);
        // a paused for longer than the stale interval: its file looks unrenewed
        fs().setTimes(a.file(), System.currentTimeMillis() - 200_000, -1);
        try (OutputLease b = OutputLease.acquire(fs(), out(), "run-b", STALE_S)) {
            JobException e = assertThrows(JobException.class, a::checkHeld);
            assertEquals(4, e.kind().exitCode());
            assertTrue(e.getMessage().contains("run-a lost its lease") && e.getMessage().contains("run run-b"), e.getMessage());
            b.checkHeld();
        }
        a.close();
    }

    @Test
    void theHolderRenewsItsLease() throws Exception {
        // with a 12 s stale interval the lease is renewed every second
        try (OutputLease a = OutputLease.acquire(fs(), out(), "run-a", 12)) {
            fs().setTimes(a.file(), System.currentTimeMillis() - 10_000, -1);
            long deadline = System.currentTimeMillis() + 10_000;
            while (a.age().toMillis() > 5_000 && System.currentTimeMillis() < deadline) {
                Thread.sleep(100);
            }
            assertTrue(a.age().toMillis() < 5_000, "renewed: age " + a.age());
        }
    }

    /** Many runs racing for one output, 20 times: exactly one gets the lease each time, the others name it. */
    @Test
    void ofRunsStartedTogetherExactlyOneTakesTheLease() throws Exception {
        int runs = 4;
        ExecutorService pool = Executors.newFixedThreadPool(runs);
        try {
            for (int round = 0; round < 20; round++) {
                CyclicBarrier start = new CyclicBarrier(runs);
                List<Future<Object>> results = new ArrayList<>();
                for (int i = 0; i < runs; i++) {
                    String id = "round" + round + "-run" + i;
                    results.add(pool.submit(() -> {
                        start.await();
                        try {
                            return OutputLease.acquire(fs(), out(), id, STALE_S);
                        } catch (JobException e) {
                            return e;
                        }
                    }));
                }
                List<OutputLease> won = new ArrayList<>();
                List<JobException> refused = new ArrayList<>();
                for (Future<Object> f : results) {
                    Object o = f.get();
                    if (o instanceof OutputLease) {
                        won.add((OutputLease) o);
                    } else {
                        refused.add((JobException) o);
                    }
                }
                assertEquals(1, won.size(), "round " + round + ": " + refused);
                for (JobException e : refused) {
                    assertTrue(e.getMessage().contains("run " + won.get(0).runId() + " "),
                            "round " + round + ", holder " + won.get(0).runId() + " generation " + won.get(0).generation()
                                    + ": " + e.getMessage());
                }
                won.get(0).close();
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
