package org.starderive.job;

import static org.apache.spark.sql.functions.coalesce;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.greatest;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.not;
import static org.apache.spark.sql.functions.shiftrightunsigned;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.when;
import static org.apache.spark.sql.functions.xxhash64;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.DataType;
import org.starderive.physics.QualityFlag;

/**
 * The multiset of star ids of a table, summarised so that two tables can be compared without collecting them:
 * the row count and the sums of the low and high 32 bits of the 64-bit xxHash of each id (sums of non-negative
 * 32-bit values: no overflow below 2·10⁹ rows). Equal multisets give equal summaries; a lost, added or changed row
 * changes the summary except with probability about 2⁻⁶⁴. Rows without an id (null, empty or blank text:
 * {@link DerivePipeline#idMissing}) count too, all under the hash of null ({@link #key}): such a row has no identity
 * to keep, and a CSV output would not keep it — Spark writes an empty text as {@code ""}, trims a blank one to it,
 * and reads {@code ""} back as null.
 */
public final class RowCensus {
    public final long rows;
    public final long hashLo;
    public final long hashHi;

    public RowCensus(long rows, long hashLo, long hashHi) {
        this.rows = rows;
        this.hashLo = hashLo;
        this.hashHi = hashHi;
    }

    /** The id as the census hashes it: a missing id ({@link DerivePipeline#idMissing}) as null, any other as it is. */
    static Column key(Column id, DataType idType) {
        return when(DerivePipeline.idMissing(id, idType), lit(null).cast(idType)).otherwise(id);
    }

    static Column lo(Column id) { return xxhash64(id).bitwiseAND(lit(0xFFFFFFFFL)); }

    static Column hi(Column id) { return shiftrightunsigned(xxhash64(id), 32); }

    static List<Column> aggregates(Column id) {
        List<Column> a = new ArrayList<>();
        a.add(count(lit(1)));
        a.add(coalesce(sum(lo(id)), lit(0L)));
        a.add(coalesce(sum(hi(id)), lit(0L)));
        return a;
    }

    /**
     * Census the join policy must produce from two tables: max(k, j) copies of an id held k times in one and j
     * times in the other; a missing id ({@link DerivePipeline#idMissing}) matches nothing, so its k rows in one table
     * and j rows in the other give k + j rows.
     */
    public static RowCensus expectedJoin(Dataset<Row> a, Dataset<Row> p, String idColumn) {
        Dataset<Row> ca = a.groupBy(col(idColumn)).agg(count(lit(1)).as("na"));
        Dataset<Row> cp = p.groupBy(col(idColumn)).agg(count(lit(1)).as("np"));
        // as in DerivePipeline.join: equalTo (null meets nothing) and no blank text id meets another; the groups of a
        // missing id then come out unmatched, one per table, each with its own count
        Column match = ca.col(idColumn).equalTo(cp.col(idColumn))
                .and(not(DerivePipeline.idMissing(ca.col(idColumn), a.schema().apply(idColumn).dataType())));
        Dataset<Row> j = ca.join(cp, match, "full_outer")
                .select(key(coalesce(ca.col(idColumn), cp.col(idColumn)), a.schema().apply(idColumn).dataType()).as("id"),
                        greatest(coalesce(col("na"), lit(0L)), coalesce(col("np"), lit(0L))).as("n"));
        Row r = j.agg(coalesce(sum(col("n")), lit(0L)),
                coalesce(sum(col("n").multiply(lo(col("id")))), lit(0L)),
                coalesce(sum(col("n").multiply(hi(col("id")))), lit(0L))).first();
        return new RowCensus(r.getLong(0), r.getLong(1), r.getLong(2));
    }

    /** Census of the written output plus the number of rows carrying each flag, in one pass. */
    public static Map.Entry<RowCensus, Map<String, Long>> ofOutput(Dataset<Row> out, String idColumn) {
        List<Column> a = aggregates(key(col(idColumn), out.schema().apply(idColumn).dataType()));
        QualityFlag[] flags = QualityFlag.values();
        for (QualityFlag f : flags) {
            a.add(coalesce(sum(when(col("flags").bitwiseAND(lit(f.mask())).notEqual(0), 1L).otherwise(0L)), lit(0L)));
        }
        Row r = out.agg(a.get(0), a.subList(1, a.size()).toArray(new Column[0])).first();
        Map<String, Long> perFlag = new LinkedHashMap<>();
        for (int i = 0; i < flags.length; i++) {
            perFlag.put(flags[i].name(), r.getLong(3 + i));
        }
        return Map.entry(new RowCensus(r.getLong(0), r.getLong(1), r.getLong(2)), perFlag);
    }

    public boolean sameAs(RowCensus o) {
        return rows == o.rows && hashLo == o.hashLo && hashHi == o.hashHi;
    }

    @Override
    public String toString() {
        return rows + " rows, id hash " + Long.toHexString(hashHi) + ":" + Long.toHexString(hashLo);
    }
}
