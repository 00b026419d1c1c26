package org.starderive.udf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.QualityFlag;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarInput;
import org.starderive.physics.StarResult;
import org.starderive.testing.SharedSpark;

class StarDeriveUdfTest {

    private static StructType inputSchema() {
        List<StructField> f = new ArrayList<>();
        f.add(DataTypes.createStructField("star_id", DataTypes.LongType, false));
        for (String n : StarColumns.INPUT_FIELDS) {
            f.add(DataTypes.createStructField(n, DataTypes.DoubleType, true));
        }
        return DataTypes.createStructType(f);
    }

    /** Rows: a Sun at 10 pc, a star with every value null, a row of hostile values, a low-SNR K dwarf. */
    private static List<Object[]> rows() {
        int n = StarColumns.INPUT_FIELDS.size();
        List<Object[]> rows = new ArrayList<>();
        Object[] sun = new Object[n + 1];
        sun[0] = 1L;
        sun[1] = 100.0;
        sun[2] = 0.01;
        set(sun, Band.V, 4.81, 0.01);
        set(sun, Band.B, 5.463, 0.01);
        set(sun, Band.KS, 3.266, 0.01);
        rows.add(sun);
        Object[] empty = new Object[n + 1];
        empty[0] = 2L;
        rows.add(empty);
        Object[] hostile = new Object[n + 1];
        hostile[0] = 3L;
        for (int i = 1; i <= n; i++) {
            hostile[i] = i % 3 == 0 ? Double.NaN : (i % 3 == 1 ? Double.NEGATIVE_INFINITY : 99.99);
        }
        rows.add(hostile);
        Object[] faint = new Object[n + 1];
        faint[0] = 4L;
        faint[1] = 0.8;
        faint[2] = 0.4; // ϖ/σ = 2: a posterior distance because the test lowers distance_snr_min to 0
        set(faint, Band.BP, 17.3, 0.02);
        set(faint, Band.RP, 16.2, 0.02);
        set(faint, Band.G, 16.8, 0.01);
        faint[n - 1] = -0.4; // feh
        rows.add(faint);
        return rows;
    }

    private static void set(Object[] row, Band b, double mag, double err) {
        int i = 1 + StarColumns.INPUT_FIELDS.indexOf(StarColumns.mag(b));
        row[i] = mag;
        row[i + 1] = err;
    }

    private static StarInput toInput(Object[] row) {
        StarInput in = new StarInput();
        List<String> f = StarColumns.INPUT_FIELDS;
        for (int k = 0; k < f.size(); k++) {
            Object v = row[k + 1];
            if (v == null) {
                continue;
            }
            double d = (Double) v;
            String name = f.get(k);
            if (name.equals(StarColumns.PARALLAX_MAS)) { in.hasParallax = true; in.parallaxMas = d; }
            else if (name.equals(StarColumns.PARALLAX_ERR_MAS)) { in.hasParallaxErr = true; in.parallaxErrMas = d; }
            else if (name.equals(StarColumns.EBV)) { in.hasEbv = true; in.ebv = d; }
            else if (name.equals(StarColumns.EBV_ERR)) { in.hasEbvErr = true; in.ebvErr = d; }
            else if (name.equals(StarColumns.FEH)) { in.hasFeh = true; in.feh = d; }
            else if (name.equals(StarColumns.FEH_ERR)) { in.hasFehErr = true; in.fehErr = d; }
            else {
                for (Band b : Band.values()) {
                    if (name.equals(StarColumns.mag(b))) { in.hasMag[b.ordinal()] = true; in.mag[b.ordinal()] = d; }
                    if (name.equals(StarColumns.magErr(b))) { in.hasMagErr[b.ordinal()] = true; in.magErr[b.ordinal()] = d; }
                }
            }
        }
        return in;
    }

    @Test
    void udfOverADataFrameEqualsThePhysicsCoreRowByRow() {
        SparkSession spark = SharedSpark.spark();
        // every star a distance (distance_snr_min 0), so that the posterior path runs through Spark too
        DeriveSettings settings = DeriveSettings.builder().distanceSnrMin(0).build();
        List<Row> input = new ArrayList<>();
        for (Object[] r : rows()) {
            input.add(RowFactory.create(r));
        }
        Dataset<Row> df = spark.createDataFrame(input, inputSchema()).repartition(2);
        Dataset<Row> actual = df.select(functions.col("star_id"), StarDeriveUdf.function(settings).apply(StarDeriveUdf.inputStruct()).as("d"))
                .select("star_id", "d.*").orderBy("star_id");

        // expected: the physics core called directly, outside Spark
        StarDeriver deriver = new StarDeriver(settings);
        List<Row> expectedRows = new ArrayList<>();
        for (Object[] r : rows()) {
            StarResult res = deriver.derive(toInput(r), new StarResult());
            Row d = StarDeriveUdf.toRow(res);
            Object[] v = new Object[d.length() + 1];
            v[0] = r[0];
            for (int i = 0; i < d.length(); i++) {
                v[i + 1] = d.get(i);
            }
            expectedRows.add(RowFactory.create(v));
        }
        StructType expectedSchema = new StructType().add("star_id", DataTypes.LongType, false);
        for (StructField f : DerivedSchema.struct().fields()) {
            expectedSchema = expectedSchema.add(f);
        }
        Dataset<Row> expected = spark.createDataFrame(expectedRows, expectedSchema).orderBy("star_id");
        SharedSpark.suite().assertDataFrameApproximateEquals(expected, actual, 1e-12);

        List<Row> got = actual.collectAsList();
        assertEquals(4, got.size());
        // the Sun: values present; the empty row: nulls plus flags, no exception
        Row sun = got.get(0);
        assertEquals(5772, sun.getDouble(sun.fieldIndex("teff_k")), 60);
        Row empty = got.get(1);
        assertNull(empty.get(empty.fieldIndex("teff_k")));
        assertNull(empty.get(empty.fieldIndex("dist_pc")));
        long flags = empty.getLong(empty.fieldIndex("flags"));
        assertTrue(QualityFlag.PARALLAX_MISSING.isSet(flags) && QualityFlag.PHOTOMETRY_MISSING.isSet(flags));
        assertTrue(empty.getList(empty.fieldIndex("flag_names")).contains("PARALLAX_MISSING"));
        Row hostile = got.get(2);
        assertTrue(QualityFlag.INPUT_INVALID.isSet(hostile.getLong(hostile.fieldIndex("flags"))));
        Row faint = got.get(3);
        assertEquals("edsd_median", faint.getString(faint.fieldIndex("dist_method")));
        assertTrue(QualityFlag.PARALLAX_LOW_SNR.isSet(faint.getLong(faint.fieldIndex("flags"))));
    }

    @Test
    void resultSchemaCarriesUnitAndUcdMetadata() {
        StructType s = DerivedSchema.struct();
        StructField teff = s.apply("teff_k");
        assertEquals("K", teff.metadata().getString(DerivedSchema.META_UNIT));
        assertEquals("phys.temperature.effective", teff.metadata().getString(DerivedSchema.META_UCD));
        assertEquals(DerivedSchema.COLUMNS.size(), s.fields().length);
        for (StructField f : s.fields()) {
            assertTrue(f.metadata().contains(DerivedSchema.META_DESCRIPTION), f.name());
        }
    }
}
