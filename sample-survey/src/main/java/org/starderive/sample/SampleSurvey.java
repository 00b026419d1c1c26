package org.starderive.sample;

import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import org.apache.spark.api.java.function.MapPartitionsFunction;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Encoders;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.Band;

/**
 * Writes the synthetic Kestrel survey ({@link ForwardModel}) as three Parquet tables partitioned by sky tile:
 * {@code astrometry/} (star_id, tile, l_deg, b_deg, parallax, E(B−V)), {@code photometry/} (ten bands and [Fe/H]) and
 * {@code truth/} (every true parameter and the defect injected). Generation runs in Spark over an id range, so large
 * sizes are parallel; every star depends only on (seed, id).
 */
public final class SampleSurvey {
    private SampleSurvey() {}

    public static final String ASTROMETRY = "astrometry";
    public static final String PHOTOMETRY = "photometry";
    public static final String TRUTH = "truth";

    public static StructType wideSchema() {
        StructType s = new StructType()
                .add("star_id", DataTypes.LongType, false)
                .add("tile", DataTypes.IntegerType, false)
                .add("l_deg", DataTypes.DoubleType, false)
                .add("b_deg", DataTypes.DoubleType, false)
                .add("parallax_mas", DataTypes.DoubleType, true)
                .add("parallax_err_mas", DataTypes.DoubleType, true)
                .add("ebv", DataTypes.DoubleType, true)
                .add("ebv_err", DataTypes.DoubleType, true);
        for (Band b : Band.values()) {
            s = s.add("mag_" + b.suffix(), DataTypes.DoubleType, true).add("mag_" + b.suffix() + "_err", DataTypes.DoubleType, true);
        }
        return s.add("feh", DataTypes.DoubleType, true)
                .add("feh_err", DataTypes.DoubleType, true)
                .add("true_class", DataTypes.StringType, false)
                .add("true_mass_msun", DataTypes.DoubleType, false)
                .add("true_teff_k", DataTypes.DoubleType, false)
                .add("true_lum_lsun", DataTypes.DoubleType, false)
                .add("true_radius_rsun", DataTypes.DoubleType, false)
                .add("true_logg_cgs", DataTypes.DoubleType, false)
                .add("true_feh", DataTypes.DoubleType, false)
                .add("true_dist_pc", DataTypes.DoubleType, false)
                .add("true_parallax_mas", DataTypes.DoubleType, false)
                .add("true_ebv", DataTypes.DoubleType, false)
                .add("true_regime", DataTypes.StringType, false)
                .add("defect", DataTypes.StringType, true);
    }

    static Row toRow(ForwardModel.Star s) {
        List<Object> v = new ArrayList<>();
        v.add(s.id);
        v.add(s.tile);
        v.add(s.lDeg);
        v.add(s.bDeg);
        v.add(s.parallaxMas);
        v.add(s.parallaxErrMas);
        v.add(s.ebvObs);
        v.add(s.ebvErr);
        for (int i = 0; i < Band.COUNT; i++) {
            v.add(s.missing[i] ? null : s.mag[i]);
            v.add(s.missing[i] ? null : s.magErr[i]);
        }
        v.add(Double.isNaN(s.fehObs) ? null : s.fehObs);
        v.add(Double.isNaN(s.fehErr) ? null : s.fehErr);
        v.add(s.kind.name().toLowerCase());
        v.add(s.massMsun);
        v.add(s.teffK);
        v.add(s.lumLsun);
        v.add(s.radiusRsun);
        v.add(s.loggCgs);
        v.add(s.feh);
        v.add(s.distPc);
        v.add(s.parallaxTrueMas);
        v.add(s.ebvTrue);
        v.add(s.regime);
        v.add(s.defect);
        return RowFactory.create(v.toArray());
    }

    /** All stars as one wide table (truth and observation), computed lazily. */
    public static Dataset<Row> stars(SparkSession spark, long n, long seed, int partitions) {
        MapPartitionsFunction<Long, Row> gen = (Iterator<Long> ids) -> {
            ForwardModel model = new ForwardModel(seed);
            ForwardModel.Star star = new ForwardModel.Star();
            return new Iterator<Row>() {
                @Override
                public boolean hasNext() { return ids.hasNext(); }

                @Override
                public Row next() { return toRow(model.generate(ids.next(), star)); }
            };
        };
        return spark.range(0, n, 1, partitions).as(Encoders.LONG()).mapPartitions(gen, Encoders.row(wideSchema()));
    }

    public static List<String> astrometryColumns() {
        return List.of("star_id", "tile", "l_deg", "b_deg", "parallax_mas", "parallax_err_mas", "ebv", "ebv_err");
    }

    public static List<String> photometryColumns() {
        List<String> c = new ArrayList<>(List.of("star_id", "tile"));
        for (Band b : Band.values()) {
            c.add("mag_" + b.suffix());
            c.add("mag_" + b.suffix() + "_err");
        }
        c.add("feh");
        c.add("feh_err");
        return c;
    }

    public static List<String> truthColumns() {
        List<String> c = new ArrayList<>(List.of("star_id", "tile"));
        for (String f : wideSchema().fieldNames()) {
            if (f.startsWith("true_") || f.equals("defect")) {
                c.add(f);
            }
        }
        return c;
    }

    /** Writes the three tables under {@code out}; returns nothing, the tables are regenerated per write (deterministic). */
    public static void write(SparkSession spark, long n, long seed, String out, int partitions, SaveMode mode) {
        Dataset<Row> stars = stars(spark, n, seed, partitions);
        write(stars.selectExpr(astrometryColumns().toArray(new String[0])), out + "/" + ASTROMETRY, mode);
        write(stars.selectExpr(photometryColumns().toArray(new String[0])), out + "/" + PHOTOMETRY, mode);
        write(stars.selectExpr(truthColumns().toArray(new String[0])), out + "/" + TRUTH, mode);
    }

    /** One table {@code stars/} with astrometry and photometry columns, plus {@code truth/}. */
    public static void writeSingle(SparkSession spark, long n, long seed, String out, int partitions, SaveMode mode) {
        Dataset<Row> stars = stars(spark, n, seed, partitions);
        List<String> cols = new ArrayList<>(astrometryColumns());
        for (String c : photometryColumns()) {
            if (!cols.contains(c)) {
                cols.add(c);
            }
        }
        write(stars.selectExpr(cols.toArray(new String[0])), out + "/stars", mode);
        write(stars.selectExpr(truthColumns().toArray(new String[0])), out + "/" + TRUTH, mode);
    }

    private static void write(Dataset<Row> d, String path, SaveMode mode) {
        d.write().mode(mode).partitionBy("tile").parquet(path);
    }
}
