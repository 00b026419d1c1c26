package org.starderive.job;

import static org.apache.spark.sql.functions.broadcast;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.not;
import static org.apache.spark.sql.functions.xxhash64;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Iterator;
import java.util.List;
import org.apache.spark.HashPartitioner;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import scala.Tuple2;

/**
 * The single-table id scan: the table's census ({@link RowCensus}) and its repeated ids, from one read of the id
 * column in the common case of a table without repeated ids.
 *
 * <p>Each task reads its rows' 64-bit id hashes (the census's xxHash64 of {@link RowCensus#key}) into a primitive
 * array, sums the census, and sends the hashes of present ids ({@link DerivePipeline#idMissing}: a missing id is never
 * repeated) to one of B buckets by hash; each bucket sorts its hashes and keeps those seen more than once. No hash is
 * repeated in almost every survey (distinct ids collide in 64 bits with probability about n²/2⁶⁵, 3·10⁻⁶ for 10⁷
 * ids), and the scan ends there. Otherwise the repeated hashes are candidates: the rows whose id hashes to one are
 * read again and grouped by the id itself, so a collision of two distinct ids is never taken for a repeat. With more
 * than {@link #MAX_CANDIDATES} candidates (a table full of repeats) every id is grouped, as a plain group-by does.
 *
 * <p>Why not a group-by from the start (as before): Spark's hash aggregate over 10⁷
 * distinct ids builds a hash map per task that saves nothing (every key is new), then shuffles and merges them all:
 * 18.6 s of a 94 s run at 10⁷ stars. Primitive arrays of hashes, one shuffle of B arrays per task and a sort per
 * bucket do the same job on 80 MB of longs. The scan's results do not depend on B, task order or retries (sums and a
 * set), so it is deterministic.
 */
final class IdScanner {
    /** Up to this many candidate hashes, they are broadcast and only their rows grouped; above, every id is grouped. */
    static final int MAX_CANDIDATES = 1_000_000;
    /** Up to this many repeated ids, they are collected and broadcast when marking rows (as before). */
    static final int MAX_BROADCAST_IDS = 1_000_000;
    static final String HASH_COL = "__starderive_id_hash";
    static final String DUP_ID_COL = "__dup_id";

    private IdScanner() {
    }

    /** What a bucket sends back: census sums of the tasks that reported to it, and its repeated hashes. */
    static final class BucketResult implements Serializable {
        private static final long serialVersionUID = 1L;
        long rows;
        long hashLo;
        long hashHi;
        long[] repeated = new long[0];
    }

    /** One task's hashes for one bucket; the chunk for bucket 0 also carries the task's census sums. */
    static final class Chunk implements Serializable {
        private static final long serialVersionUID = 1L;
        final long[] hashes;
        final long rows;
        final long hashLo;
        final long hashHi;

        Chunk(long[] hashes, long rows, long hashLo, long hashHi) {
            this.hashes = hashes;
            this.rows = rows;
            this.hashLo = hashLo;
            this.hashHi = hashHi;
        }
    }

    static int bucket(long hash, int buckets) {
        return (int) Long.remainderUnsigned(hash, buckets);
    }

    /**
     * The census of {@code d} and its repeated ids (as a one-column frame {@link #DUP_ID_COL}, null when there are
     * none).
     */
    static DerivePipeline.IdScan scan(Dataset<Row> d, String idColumn) {
        return scan(d, idColumn, MAX_CANDIDATES);
    }

    /** As {@link #scan(Dataset, String)}, grouping every id when there are more than {@code maxCandidates} candidates. */
    static DerivePipeline.IdScan scan(Dataset<Row> d, String idColumn, int maxCandidates) {
        DataType idType = d.schema().apply(idColumn).dataType();
        Column id = col(idColumn);
        Dataset<Row> hashes = d.select(xxhash64(RowCensus.key(id, idType)).as("h"),
                not(DerivePipeline.idMissing(id, idType)).as("p"));
        org.apache.spark.api.java.JavaRDD<InternalRow> rowsOfHashes = hashes.queryExecution().toRdd().toJavaRDD();
        int buckets = Math.max(1, rowsOfHashes.getNumPartitions());
        JavaPairRDD<Integer, Chunk> chunks = rowsOfHashes.mapPartitionsToPair(it -> chunks(it, buckets));
        List<BucketResult> results = chunks.partitionBy(new HashPartitioner(buckets))
                .mapPartitions(IdScanner::repeats).collect();
        long rows = 0;
        long lo = 0;
        long hi = 0;
        int nCandidates = 0;
        for (BucketResult r : results) {
            rows += r.rows;
            lo += r.hashLo;
            hi += r.hashHi;
            nCandidates += r.repeated.length;
        }
        RowCensus census = new RowCensus(rows, lo, hi);
        if (nCandidates == 0) {
            return new DerivePipeline.IdScan(census, 0, null);
        }
        Column present = not(DerivePipeline.idMissing(id, idType));
        Dataset<Row> counted;
        if (nCandidates <= maxCandidates) {
            List<Row> cand = new ArrayList<>(nCandidates);
            for (BucketResult r : results) {
                for (long h : r.repeated) {
                    cand.add(RowFactory.create(h));
                }
            }
            StructType candSchema = new StructType().add(HASH_COL, DataTypes.LongType, false);
            Dataset<Row> candidates = broadcast(d.sparkSession().createDataFrame(cand, candSchema));
            Dataset<Row> rowsOfCandidates = d.select(id).filter(present).withColumn(HASH_COL, xxhash64(id))
                    .join(candidates, HASH_COL);
            counted = rowsOfCandidates.groupBy(id).agg(count(lit(1)).as("n"));
        } else {
            counted = d.select(id).filter(present).groupBy(id).agg(count(lit(1)).as("n"));
        }
        Dataset<Row> dupIds = counted.filter(col("n").gt(1)).select(id.as(DUP_ID_COL));
        long repeatedIds = dupIds.count();
        return new DerivePipeline.IdScan(census, repeatedIds, repeatedIds == 0 ? null : dupIds);
    }

    /** Map side: one task's rows (h: long, p: boolean) to one chunk per bucket. */
    private static Iterator<Tuple2<Integer, Chunk>> chunks(Iterator<InternalRow> it, int buckets) {
        long[] present = new long[1 << 16];
        int n = 0;
        long rows = 0;
        long lo = 0;
        long hi = 0;
        while (it.hasNext()) {
            InternalRow r = it.next();
            long h = r.getLong(0);
            rows++;
            lo += h & 0xFFFFFFFFL;
            hi += h >>> 32;
            if (r.getBoolean(1)) {
                if (n == present.length) {
                    present = Arrays.copyOf(present, n * 2);
                }
                present[n++] = h;
            }
        }
        int[] size = new int[buckets];
        for (int i = 0; i < n; i++) {
            size[bucket(present[i], buckets)]++;
        }
        long[][] per = new long[buckets][];
        for (int b = 0; b < buckets; b++) {
            per[b] = new long[size[b]];
        }
        int[] at = new int[buckets];
        for (int i = 0; i < n; i++) {
            int b = bucket(present[i], buckets);
            per[b][at[b]++] = present[i];
        }
        List<Tuple2<Integer, Chunk>> out = new ArrayList<>();
        for (int b = 0; b < buckets; b++) {
            if (b == 0 || per[b].length > 0) {
                out.add(new Tuple2<>(b, b == 0 ? new Chunk(per[b], rows, lo, hi) : new Chunk(per[b], 0, 0, 0)));
            }
        }
        return out.iterator();
    }

    /** Reduce side: one bucket's chunks to its census sums and the hashes it saw more than once. */
    private static Iterator<BucketResult> repeats(Iterator<Tuple2<Integer, Chunk>> it) {
        BucketResult res = new BucketResult();
        List<long[]> parts = new ArrayList<>();
        int n = 0;
        while (it.hasNext()) {
            Chunk c = it.next()._2();
            res.rows += c.rows;
            res.hashLo += c.hashLo;
            res.hashHi += c.hashHi;
            parts.add(c.hashes);
            n += c.hashes.length;
        }
        long[] all = new long[n];
        int k = 0;
        for (long[] p : parts) {
            System.arraycopy(p, 0, all, k, p.length);
            k += p.length;
        }
        Arrays.sort(all);
        long[] rep = new long[16];
        int m = 0;
        for (int i = 1; i < n; i++) {
            if (all[i] == all[i - 1] && (m == 0 || rep[m - 1] != all[i])) {
                if (m == rep.length) {
                    rep = Arrays.copyOf(rep, m * 2);
                }
                rep[m++] = all[i];
            }
        }
        res.repeated = Arrays.copyOf(rep, m);
        return List.of(res).iterator();
    }
}
