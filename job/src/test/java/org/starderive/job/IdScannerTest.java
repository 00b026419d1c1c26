package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.TreeSet;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.starderive.testing.SharedSpark;

/**
 * The id scan against a count done here in plain Java (a hash map of ids): the same census as Spark's own aggregate
 * over the rows ({@link RowCensus#ofOutput}, a group-free path) and exactly the ids that occur more than once, missing
 * ids (null, empty or blank text: common practice, as {@link String#isBlank}) never among them — through the
 * one-read path, the candidate path and the group-everything fallback, over many tasks and buckets.
 */
class IdScannerTest {
    private final SparkSession spark = SharedSpark.spark();

    private Dataset<Row> frame(List<Object> ids, DataType type, int partitions) {
        List<Row> rows = new ArrayList<>();
        for (int i = 0; i < ids.size(); i++) {
            rows.add(RowFactory.create(ids.get(i), (double) i));
        }
        StructType schema = new StructType().add("star_id", type).add("x", DataTypes.DoubleType);
        return spark.createDataFrame(rows, schema).repartition(partitions);
    }

    private static Set<String> repeatedByJava(List<Object> ids) {
        Map<Object, Integer> n = new HashMap<>();
        for (Object id : ids) {
            if (id != null && !(id instanceof String && ((String) id).isBlank())) {
                n.merge(id, 1, Integer::sum);
            }
        }
        Set<String> rep = new TreeSet<>();
        n.forEach((k, v) -> {
            if (v > 1) {
                rep.add(String.valueOf(k));
            }
        });
        return rep;
    }

    private static Set<String> repeatedByScan(DerivePipeline.IdScan scan) {
        Set<String> got = new TreeSet<>();
        if (scan.dupIds() != null) {
            for (Row r : scan.dupIds().collectAsList()) {
                got.add(String.valueOf(r.get(0)));
            }
        }
        return got;
    }

    private void check(List<Object> ids, DataType type, int partitions, int maxCandidates) {
        Dataset<Row> d = frame(ids, type, partitions);
        DerivePipeline.IdScan scan = IdScanner.scan(d, "star_id", maxCandidates);
        RowCensus reference = RowCensus.ofOutput(d.withColumn("flags", org.apache.spark.sql.functions.lit(0L)), "star_id").getKey();
        assertTrue(scan.census.sameAs(reference), scan.census + " vs " + reference);
        assertEquals(ids.size(), scan.census.rows);
        Set<String> expected = repeatedByJava(ids);
        assertEquals(expected.size(), scan.repeatedIds);
        assertEquals(expected, repeatedByScan(scan));
        if (expected.isEmpty()) {
            assertNull(scan.dupIds());
        }
    }

    @Test
    void uniqueLongIdsNeedOneReadAndGiveTheCensus() {
        List<Object> ids = new ArrayList<>();
        Random r = new Random(7);
        for (int i = 0; i < 5000; i++) {
            ids.add(r.nextLong());
        }
        ids.add(null); // a missing id: counted, never repeated
        ids.add(null);
        check(ids, DataTypes.LongType, 7, IdScanner.MAX_CANDIDATES);
    }

    @Test
    void repeatedLongIdsAreFoundExactlyOverManyBuckets() {
        List<Object> ids = new ArrayList<>();
        for (long i = 0; i < 3000; i++) {
            ids.add(i * 7919L);
        }
        ids.add(0L);
        ids.add(7919L * 2999);
        ids.add(7919L * 2999);
        ids.add(-5L);
        ids.add(-5L);
        ids.add(null);
        ids.add(null);
        ids.add(null);
        check(ids, DataTypes.LongType, 5, IdScanner.MAX_CANDIDATES);
        check(ids, DataTypes.LongType, 5, 1); // more candidates than allowed: every id grouped
        check(ids, DataTypes.LongType, 1, IdScanner.MAX_CANDIDATES); // one task, one bucket
    }

    @Test
    void blankTextIdsAreNeverRepeatsAndRealRepeatsAre() {
        List<Object> ids = new ArrayList<>(List.of("s0", "s1", "", "", "   ", "\t", "s9", "s9", "s11", "S11"));
        ids.add(null);
        ids.add(null);
        for (int i = 0; i < 400; i++) {
            ids.add("g" + i);
        }
        ids.add("g399");
        check(ids, DataTypes.StringType, 3, IdScanner.MAX_CANDIDATES);
    }

    @Test
    void anEmptyTableHasAnEmptyCensus() {
        check(new ArrayList<>(), DataTypes.LongType, 2, IdScanner.MAX_CANDIDATES);
    }

    /** The bucket of a hash is its unsigned remainder: negative hashes land in range (common practice). */
    @Test
    void bucketsOfNegativeHashesAreInRange() {
        for (long h : new long[] {Long.MIN_VALUE, -1L, -7L, 0L, Long.MAX_VALUE}) {
            int b = IdScanner.bucket(h, 7);
            assertTrue(b >= 0 && b < 7, h + " -> " + b);
            assertEquals(Long.remainderUnsigned(h, 7), b);
        }
    }
}
