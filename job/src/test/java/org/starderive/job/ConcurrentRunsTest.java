package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * Two derive runs started together on one output, in every pair of write modes, 20 times: exactly one commits, the
 * other is refused with exit 4 naming the first, and the output is a clean run's. (The runs share this JVM's Spark
 * session; the lease does not care: it is taken through the file system. A run in another process is refused the same
 * way: PackagedJarsIT.)
 */
class ConcurrentRunsTest {
    @TempDir
    Path tmp;

    static DeriveJob.Request request(Path in, Path out, OutputCommitter.Mode mode) {
        DeriveJob.Request r = new DeriveJob.Request();
        r.input = List.of(in.toString());
        r.output = out.toString();
        r.writeMode = mode;
        return r;
    }

    static void deleteTree(Path p) throws Exception {
        if (Files.exists(p)) {
            try (Stream<Path> s = Files.walk(p)) {
                for (Path x : s.sorted(Comparator.reverseOrder()).collect(Collectors.toList())) {
                    Files.delete(x);
                }
            }
        }
    }

    @Test
    void ofTwoRunsStartedTogetherExactlyOneCommits() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1), in);
        Path out = tmp.resolve("out");
        DeriveJob.run(spark, request(in, tmp.resolve("clean"), OutputCommitter.Mode.FAIL), JobConfig.defaults());
        List<Row> clean = spark.read().parquet(tmp.resolve("clean").toString()).drop("flag_names").orderBy("star_id").collectAsList();

        OutputCommitter.Mode[][] pairs = {
            {OutputCommitter.Mode.FAIL, OutputCommitter.Mode.FAIL},
            {OutputCommitter.Mode.OVERWRITE, OutputCommitter.Mode.OVERWRITE},
            {OutputCommitter.Mode.OVERWRITE, OutputCommitter.Mode.REPLACE_PARTITIONS},
            {OutputCommitter.Mode.REPLACE_PARTITIONS, OutputCommitter.Mode.FAIL},
        };
        ExecutorService pool = Executors.newFixedThreadPool(2);
        try {
            for (int round = 0; round < 20; round++) {
                // every other round starts on an existing output (overwrite and replace-partitions then have work to do)
                boolean existing = round % 2 == 1;
                deleteTree(out);
                if (existing) {
                    DeriveJob.run(spark, request(in, out, OutputCommitter.Mode.FAIL), JobConfig.defaults());
                }
                OutputCommitter.Mode[] modes = pairs[round % pairs.length];
                if (existing && (modes[0] == OutputCommitter.Mode.FAIL || modes[1] == OutputCommitter.Mode.FAIL)) {
                    // fail mode would refuse an existing output on its own: race the two replacing modes instead
                    modes = new OutputCommitter.Mode[] {OutputCommitter.Mode.REPLACE_PARTITIONS, OutputCommitter.Mode.OVERWRITE};
                }
                CyclicBarrier start = new CyclicBarrier(2);
                List<Future<Object>> runs = new ArrayList<>();
                for (OutputCommitter.Mode m : modes) {
                    runs.add(pool.submit(() -> {
                        start.await();
                        try {
                            return DeriveJob.run(spark, request(in, out, m), JobConfig.defaults());
                        } catch (JobException e) {
                            return e;
                        }
                    }));
                }
                List<DeriveJob.Summary> committed = new ArrayList<>();
                List<JobException> refused = new ArrayList<>();
                for (Future<Object> f : runs) {
                    Object o = f.get();
                    if (o instanceof DeriveJob.Summary) {
                        committed.add((DeriveJob.Summary) o);
                    } else {
                        refused.add((JobException) o);
                    }
                }
                String what = "round " + round + " (" + modes[0].label() + " + " + modes[1].label() + "): " + refused;
                assertEquals(1, committed.size(), what);
                assertEquals(1, refused.size(), what);
                assertEquals(4, refused.get(0).kind().exitCode(), what);
                assertTrue(refused.get(0).getMessage().contains("is being written by run " + committed.get(0).runId + " "), what);
                List<Row> got = spark.read().parquet(out.toString()).drop("flag_names").orderBy("star_id").collectAsList();
                assertEquals(clean, got, what);
                assertEquals(List.of(), TestCatalogs.commitLeftovers(tmp, "out"), what);
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
