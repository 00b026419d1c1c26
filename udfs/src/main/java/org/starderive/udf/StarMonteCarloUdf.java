package org.starderive.udf;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.api.java.UDF1;
import org.apache.spark.sql.expressions.UserDefinedFunction;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.MonteCarloDeriver;

/**
 * Spark binding of {@link MonteCarloDeriver}: input is the canonical struct ({@link StarColumns#INPUT_FIELDS}) plus a
 * last field {@code star_key} (a stable 64-bit hash of the star id); output the 16/50/84th percentile columns of
 * {@link #COLUMNS}. Deterministic: the draws depend only on (run seed, star key), so a retried or speculated task,
 * or another partitioning, gives the same numbers.
 */
public final class StarMonteCarloUdf implements UDF1<Row, Row> {
    private static final long serialVersionUID = 1L;
    public static final String STAR_KEY = "star_key";

    /** (quantity prefix, unit suffix, unit, UCD) of each Monte Carlo quantity, in {@link MonteCarloDeriver} order. */
    private static final String[][] Q = {
        {"dist", "pc", "pc", "pos.distance"},
        {"teff", "k", "K", "phys.temperature.effective"},
        {"lum", "lsun", "solLum", "phys.luminosity"},
        {"radius", "rsun", "solRad", "phys.size.radius"},
        {"mass", "msun", "solMass", "phys.mass"},
        {"logg", "cgs", "log(cm.s**-2)", "phys.gravity"},
        {"ang_diam", "mas", "mas", "phys.angSize"},
    };
    private static final String[] P = {"p16", "p50", "p84"};

    /** The percentile columns: {@code <quantity>_p16_<unit>}, {@code _p50_}, {@code _p84_}. */
    public static final List<DerivedColumn> COLUMNS;

    static {
        List<DerivedColumn> c = new ArrayList<>();
        for (String[] q : Q) {
            for (String p : P) {
                String ucd = (p.equals("p50") ? "stat.median;" : "stat.percentile;") + q[3];
                c.add(new DerivedColumn(q[0] + "_" + p + "_" + q[1], "double", q[2], ucd,
                        p.substring(1) + "th percentile of " + q[0] + " over the Monte Carlo draws"));
            }
        }
        COLUMNS = java.util.Collections.unmodifiableList(c);
    }

    private final DeriveSettings settings;
    private final int draws;
    private final long seed;
    private transient ThreadLocal<Work> work;

    private static final class Work {
        final MonteCarloDeriver mc;
        final StarInputReader reader = new StarInputReader();
        final double[][] out = new double[MonteCarloDeriver.NQ][3];

        Work(DeriveSettings s, int draws, long seed) { mc = new MonteCarloDeriver(s, draws, seed); }
    }

    public StarMonteCarloUdf(DeriveSettings settings, int draws, long seed) {
        new MonteCarloDeriver(settings, draws, seed); // validates draws now, on the driver
        this.settings = settings;
        this.draws = draws;
        this.seed = seed;
    }

    public static StructType struct() {
        List<StructField> f = new ArrayList<>();
        for (DerivedColumn c : COLUMNS) {
            f.add(DataTypes.createStructField(c.name(), DataTypes.DoubleType, true, DerivedSchema.metadata(c)));
        }
        return DataTypes.createStructType(f);
    }

    public static UserDefinedFunction function(DeriveSettings settings, int draws, long seed) {
        return functions.udf(new StarMonteCarloUdf(settings, draws, seed), struct());
    }

    private Work work() {
        if (work == null) {
            synchronized (this) {
                if (work == null) {
                    work = ThreadLocal.withInitial(() -> new Work(settings, draws, seed));
                }
            }
        }
        return work.get();
    }

    @Override
    public Row call(Row row) {
        Work w = work();
        int keyIndex = StarColumns.INPUT_FIELDS.size();
        long key = row.isNullAt(keyIndex) ? 0L : row.getLong(keyIndex);
        w.mc.percentiles(w.reader.read(row), key, w.out);
        Object[] v = new Object[COLUMNS.size()];
        int i = 0;
        for (double[] q : w.out) {
            for (double x : q) {
                v[i++] = Double.isNaN(x) ? null : x;
            }
        }
        return RowFactory.create(v);
    }
}
