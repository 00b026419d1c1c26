package org.starderive.udf;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.api.java.UDF1;
import org.apache.spark.sql.expressions.UserDefinedFunction;
import org.apache.spark.sql.functions;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.QualityFlag;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarResult;

/**
 * The Spark binding of {@link StarDeriver}: one deterministic UDF that takes a struct of the canonical input
 * columns ({@link StarColumns#INPUT_FIELDS}, all double, nullable) and returns the struct of derived columns
 * ({@link DerivedSchema}). A struct in and a struct out keeps us clear of the 10-argument limit of the typed Java
 * overloads and evaluates the chain once per row.
 *
 * <p>SQL NULL in a field means "absent" and is never unboxed: the physics core then sets the matching flag.
 * Each thread gets its own {@link StarDeriver} (it holds work arrays).
 */
public final class StarDeriveUdf implements UDF1<Row, Row> {
    private static final long serialVersionUID = 1L;
    public static final String NAME = "starderive_derive";
    private static final int NB = Band.COUNT;

    private final DeriveSettings settings;
    private transient ThreadLocal<Work> work;

    private static final class Work {
        final StarDeriver deriver;
        final StarInputReader reader = new StarInputReader();
        final StarResult out = new StarResult();
        /** Texts that depend only on a bit mask (relations used, flags), built once per mask: profiled at ~2 % of a
         *  derive run when built per row. Bounded, as a hostile input cannot make many masks but we do not rely on it. */
        final java.util.HashMap<Long, String> relationText = new java.util.HashMap<>();
        final java.util.HashMap<Long, String[]> flagNames = new java.util.HashMap<>();

        Work(DeriveSettings s) { deriver = new StarDeriver(s); }

        String relations(long mask) { return cached(relationText, mask, org.starderive.physics.TeffRelations::describe); }

        String[] flags(long mask) { return cached(flagNames, mask, QualityFlag::nameArray); }

        private static <T> T cached(java.util.HashMap<Long, T> cache, long mask, java.util.function.LongFunction<T> make) {
            T t = cache.get(mask);
            if (t == null && !cache.containsKey(mask)) {
                t = make.apply(mask);
                if (cache.size() < 65_536) {
                    cache.put(mask, t);
                }
            }
            return t;
        }
    }

    public StarDeriveUdf(DeriveSettings settings) {
        this.settings = settings;
    }

    private Work work() {
        if (work == null) {
            synchronized (this) {
                if (work == null) {
                    work = ThreadLocal.withInitial(() -> new Work(settings));
                }
            }
        }
        return work.get();
    }

    /** The UDF as a Spark function, marked deterministic (the default: the same row always gives the same result). */
    public static UserDefinedFunction function(DeriveSettings settings) {
        return functions.udf(new StarDeriveUdf(settings), DerivedSchema.struct());
    }

    /** Registers the UDF under {@link #NAME} for use from SQL. */
    public static void register(SparkSession spark, DeriveSettings settings) {
        spark.udf().register(NAME, new StarDeriveUdf(settings), DerivedSchema.struct());
    }

    /** The input struct built from columns that already carry the canonical names and double type. */
    public static Column inputStruct() {
        List<Column> cols = new ArrayList<>();
        for (String f : StarColumns.INPUT_FIELDS) {
            cols.add(functions.col(f).cast("double").as(f));
        }
        return functions.struct(cols.toArray(new Column[0]));
    }

    @Override
    public Row call(Row row) {
        Work w = work();
        StarResult o = w.deriver.derive(w.reader.read(row), w.out);
        return toRow(o, w.relations(o.teffRelations), w.flags(o.flags));
    }

    private static Double box(double v) {
        return Double.isNaN(v) ? null : v;
    }

    /** The result as a Row in {@link DerivedSchema} order. */
    public static Row toRow(StarResult o) {
        return toRow(o, o.teffFrom(), QualityFlag.nameArray(o.flags));
    }

    private static Row toRow(StarResult o, String teffFrom, String[] flagNames) {
        Object[] v = new Object[DerivedSchema.COLUMNS.size()];
        int i = 0;
        v[i++] = box(o.parallaxCorrMas);
        v[i++] = box(o.distPc);
        v[i++] = box(o.distLoPc);
        v[i++] = box(o.distHiPc);
        v[i++] = o.distMethod.label();
        v[i++] = box(o.distModulusMag);
        v[i++] = box(o.distModulusErrMag);
        v[i++] = box(o.ebvUsed);
        v[i++] = box(o.avMag);
        for (int b = 0; b < NB; b++) {
            v[i++] = box(o.absMag[b]);
            v[i++] = box(o.absMagErr[b]);
        }
        v[i++] = o.lumClass == null ? null : o.lumClass.label();
        v[i++] = o.regime == null ? null : o.regime.label();
        v[i++] = box(o.teffK);
        v[i++] = box(o.teffErrK);
        v[i++] = teffFrom;
        v[i++] = box(o.teffChi2);
        v[i++] = box(o.bcV);
        v[i++] = box(o.bcVErr);
        v[i++] = box(o.mbolMag);
        v[i++] = box(o.mbolErrMag);
        v[i++] = box(o.lumLsun);
        v[i++] = box(o.lumErrLsun);
        v[i++] = box(o.lumW);
        v[i++] = box(o.radiusRsun);
        v[i++] = box(o.radiusErrRsun);
        v[i++] = box(o.massMsun);
        v[i++] = box(o.massErrMsun);
        v[i++] = box(o.densityKgM3);
        v[i++] = box(o.densityErrKgM3);
        v[i++] = box(o.densitySun);
        v[i++] = box(o.loggCgs);
        v[i++] = box(o.loggErrCgs);
        v[i++] = box(o.angDiamMas);
        v[i++] = box(o.angDiamErrMas);
        v[i++] = box(o.angDiamSbrMas);
        v[i++] = o.flags;
        v[i++] = flagNames;
        if (i != v.length) {
            throw new IllegalStateException("Result row has " + i + " fields, schema " + v.length);
        }
        return RowFactory.create(v);
    }
}
