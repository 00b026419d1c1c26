package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.QualityFlag;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarInput;
import org.starderive.physics.StarResult;
import org.starderive.testing.SharedSpark;
import org.starderive.udf.DerivedSchema;

class DeriveCommandTest {
    @TempDir
    Path tmp;

    private final SparkSession spark = SharedSpark.spark();

    private static StarInput toInput(Row r) {
        StarInput in = new StarInput();
        if (!r.isNullAt(2)) { in.hasParallax = true; in.parallaxMas = r.getDouble(2); }
        if (!r.isNullAt(3)) { in.hasParallaxErr = true; in.parallaxErrMas = r.getDouble(3); }
        Band[] bands = {Band.B, Band.V, Band.J, Band.KS};
        for (int k = 0; k < bands.length; k++) {
            int i = 4 + 2 * k;
            if (!r.isNullAt(i)) { in.hasMag[bands[k].ordinal()] = true; in.mag[bands[k].ordinal()] = r.getDouble(i); }
            if (!r.isNullAt(i + 1)) { in.hasMagErr[bands[k].ordinal()] = true; in.magErr[bands[k].ordinal()] = r.getDouble(i + 1); }
        }
        if (!r.isNullAt(12)) { in.hasEbv = true; in.ebv = r.getDouble(12); }
        if (!r.isNullAt(13)) { in.hasFeh = true; in.feh = r.getDouble(13); }
        return in;
    }

    private static Double box(double v) { return Double.isNaN(v) ? null : v; }

    private static Double f32(double v) { return Double.isNaN(v) ? null : (double) (float) v; }

    private static String readString(Path p) {
        try {
            return Files.readString(p);
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    @Test
    void partitionedParquetEndToEnd() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        List<Row> rows = TestCatalogs.rows(60, 1000);
        TestCatalogs.writeParquet(spark, rows, in);

        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());
        assertTrue(r.out.contains("60 rows in, 60 rows out"), r.out);

        // partition layout kept
        List<String> parts;
        try (Stream<Path> s = Files.list(out)) {
            parts = s.map(p -> p.getFileName().toString()).filter(n -> n.startsWith("tile=")).sorted().collect(Collectors.toList());
        }
        assertEquals(List.of("tile=0", "tile=1", "tile=2"), parts);
        assertTrue(Files.exists(out.resolve(RunManifest.FILE_NAME)));
        assertTrue(Files.exists(out.resolve(DataDictionary.FILE_NAME)));
        try (Stream<Path> s = Files.list(tmp)) {
            assertEquals(0, s.filter(p -> p.getFileName().toString().contains(".staging-")).count(), "no staging left");
        }

        // values equal the physics core's for the same rows (spark-testing-base comparison)
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        List<Row> expected = new ArrayList<>();
        for (Row row : rows) {
            StarResult res = d.derive(toInput(row), new StarResult());
            // stored as 32-bit floats (output.float32, the default): the core's doubles rounded once
            expected.add(RowFactory.create(row.getLong(0), f32(res.distPc), f32(res.teffK), f32(res.lumLsun),
                    f32(res.radiusRsun), f32(res.massMsun), res.flags));
        }
        StructType es = new StructType().add("star_id", DataTypes.LongType).add("dist_pc", DataTypes.DoubleType)
                .add("teff_k", DataTypes.DoubleType).add("lum_lsun", DataTypes.DoubleType).add("radius_rsun", DataTypes.DoubleType)
                .add("mass_msun", DataTypes.DoubleType).add("flags", DataTypes.LongType);
        Dataset<Row> exp = spark.createDataFrame(expected, es).orderBy("star_id");
        // same columns, schema without the unit metadata (checked separately below)
        Dataset<Row> got = spark.createDataFrame(spark.read().parquet(out.toString())
                .selectExpr("star_id", "CAST(dist_pc AS DOUBLE)", "CAST(teff_k AS DOUBLE)", "CAST(lum_lsun AS DOUBLE)",
                        "CAST(radius_rsun AS DOUBLE)", "CAST(mass_msun AS DOUBLE)", "flags").javaRDD(), es)
                .orderBy("star_id");
        SharedSpark.suite().assertDataFrameApproximateEquals(exp, got, 0.0);

        // the default layout: the id, the partition column and the derived columns, nothing else of the input
        List<String> outCols = List.of(spark.read().parquet(out.toString()).columns());
        List<String> wanted = new ArrayList<>(List.of("star_id"));
        wanted.addAll(DerivedSchema.names());
        wanted.add("tile");
        assertEquals(wanted, outCols);

        // units metadata survives in the Parquet schema (read back by Spark)
        StructType back = spark.read().parquet(out.toString()).schema();
        assertEquals("K", back.apply("teff_k").metadata().getString("unit"));
        assertEquals("pos.distance", back.apply("dist_pc").metadata().getString("ucd"));

        // independent reader: DuckDB
        String glob = out.toString() + "/**/*.parquet";
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement()) {
            ResultSet rs = st.executeQuery("SELECT count(*), count(DISTINCT star_id) FROM read_parquet('" + glob + "', hive_partitioning = true)");
            rs.next();
            assertEquals(60, rs.getLong(1));
            assertEquals(60, rs.getLong(2));
            rs = st.executeQuery("DESCRIBE SELECT * FROM read_parquet('" + glob + "', hive_partitioning = true)");
            Map<String, String> types = new HashMap<>();
            while (rs.next()) {
                types.put(rs.getString(1), rs.getString(2));
            }
            assertEquals("FLOAT", types.get("teff_k"));
            assertEquals("DOUBLE", types.get("parallax_corr_mas"), "a parallax keeps 64 bits");
            assertEquals("BIGINT", types.get("flags"));
            assertEquals("VARCHAR[]", types.get("flag_names"));
            assertTrue(types.containsKey("tile"));
            rs = st.executeQuery("SELECT decode(value) FROM parquet_kv_metadata('" + glob + "') "
                    + "WHERE decode(key) = 'org.apache.spark.sql.parquet.row.metadata' LIMIT 1");
            assertTrue(rs.next(), "Spark schema with metadata in the Parquet footer");
            String meta = rs.getString(1);
            assertTrue(meta.contains("\"ucd\":\"phys.temperature.effective\"") && meta.contains("\"unit\":\"K\""), meta);
            // every flag the job reported is what DuckDB counts
            rs = st.executeQuery("SELECT count(*) FROM read_parquet('" + glob + "') WHERE flags & "
                    + QualityFlag.MAGNITUDE_SENTINEL.mask() + " <> 0");
            rs.next();
            long sentinels = rs.getLong(1);
            assertTrue(r.out.contains(String.format("MAGNITUDE_SENTINEL     %,d", sentinels)), r.out);
        }
        // the manifest names the relations used and the counts
        String manifest = Files.readString(out.resolve(RunManifest.FILE_NAME));
        assertTrue(manifest.contains("\"output_rows\" : 60") && manifest.contains("Casagrande et al. 2010"), manifest);
        com.fasterxml.jackson.databind.JsonNode m = new com.fasterxml.jackson.databind.ObjectMapper().readTree(manifest);
        assertEquals(60, m.get("input_tables").get(0).get("rows").asLong());
        assertEquals(60, m.get("rows_per_flag").size() > 0 ? m.get("output_rows").asLong() : -1);
        assertTrue(m.get("config").get("physics_resolved").get("prior_length_kpc").asDouble() > 0);
    }

    @Test
    void csvInAndOut() throws Exception {
        Path in = tmp.resolve("in.csv");
        Path out = tmp.resolve("out");
        TestCatalogs.frame(spark, TestCatalogs.rows(20, 1)).coalesce(1).write().option("header", "true").csv(in.toString());
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--input-format", "csv",
                "--output", out.toString(), "--output-format", "csv");
        assertEquals(0, r.exitCode, r.toString());
        Dataset<Row> back = spark.read().option("header", "true").csv(out.toString());
        assertEquals(20, back.count());
        assertEquals(20, back.select("star_id").distinct().count());
        assertTrue(List.of(back.columns()).contains("teff_k"));
    }

    @Test
    void duplicatesAreKeptAndFlagged() {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        List<Row> rows = new ArrayList<>(TestCatalogs.rows(10, 1));
        rows.add(rows.get(2)); // exact duplicate row
        rows.add(TestCatalogs.rows(10, 1).get(4)); // same id again
        TestCatalogs.writeParquet(spark, rows, in);
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());
        Dataset<Row> back = spark.read().parquet(out.toString());
        assertEquals(12, back.count());
        long dupRows = back.filter("flags & " + QualityFlag.DUPLICATE_ID.mask() + " <> 0").count();
        assertEquals(4, dupRows);
        assertTrue(back.filter("array_contains(flag_names, 'DUPLICATE_ID')").count() == 4);
    }

    @Test
    void joinKeepsIdsFromEitherSideAndPairsRepeatsCopyByCopy() {
        StructType as = new StructType().add("star_id", DataTypes.LongType).add("parallax_mas", DataTypes.DoubleType)
                .add("parallax_err_mas", DataTypes.DoubleType);
        StructType ps = new StructType().add("star_id", DataTypes.LongType).add("mag_v", DataTypes.DoubleType)
                .add("mag_v_err", DataTypes.DoubleType).add("mag_ks", DataTypes.DoubleType).add("mag_ks_err", DataTypes.DoubleType);
        List<Row> a = List.of(RowFactory.create(1L, 10.0, 0.1), RowFactory.create(2L, 5.0, 0.1), // 2: astrometry only
                RowFactory.create(4L, 8.0, 0.1), RowFactory.create(4L, 8.1, 0.1), RowFactory.create(4L, 8.2, 0.1)); // 4 three times
        List<Row> p = List.of(RowFactory.create(1L, 9.8, 0.01, 8.3, 0.02), RowFactory.create(3L, 12.0, 0.01, 10.5, 0.02), // 3: photometry only
                RowFactory.create(4L, 11.0, 0.01, 9.5, 0.02), RowFactory.create(4L, 11.1, 0.01, 9.6, 0.02));
        Path ain = tmp.resolve("astro");
        Path pin = tmp.resolve("phot");
        Path out = tmp.resolve("out");
        spark.createDataFrame(a, as).write().parquet(ain.toString());
        spark.createDataFrame(p, ps).write().parquet(pin.toString());
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", ain.toString(), "--photometry", pin.toString(),
                "--join-on", "star_id", "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());
        Dataset<Row> back = spark.read().parquet(out.toString());
        // 1 once, 2 once (no photometry), 3 once (no parallax), 4 max(3, 2) = 3 times
        Map<Long, Long> counts = new HashMap<>();
        for (Row row : back.groupBy("star_id").count().collectAsList()) {
            counts.put(row.getLong(0), row.getLong(1));
        }
        assertEquals(Map.of(1L, 1L, 2L, 1L, 3L, 1L, 4L, 3L), counts);
        Row three = back.filter("star_id = 3").first();
        assertTrue(QualityFlag.PARALLAX_MISSING.isSet(three.getLong(three.fieldIndex("flags"))));
        Row two = back.filter("star_id = 2").first();
        assertTrue(QualityFlag.PHOTOMETRY_MISSING.isSet(two.getLong(two.fieldIndex("flags"))));
        assertEquals(3, back.filter("star_id = 4 AND flags & " + QualityFlag.DUPLICATE_ID.mask() + " <> 0").count());
        // every astrometry row is there exactly once: parallaxes of id 4 are 8.0, 8.1, 8.2
        assertEquals(List.of(8.0, 8.1, 8.2), back.filter("star_id = 4").orderBy("parallax_mas").select("parallax_mas")
                .collectAsList().stream().map(x -> x.getDouble(0)).collect(Collectors.toList()));
        assertEquals(2, back.filter("star_id = 4 AND mag_v IS NOT NULL").count());
    }

    /** The test's own rule for a missing id (null, or text that is empty or white space only). */
    private static boolean missingId(Object id) {
        return id == null || (id instanceof String
                && ((String) id).chars().allMatch(ch -> Character.isWhitespace(ch) || Character.isSpaceChar(ch)));
    }

    /** The summary's line for a flag: "  NAME  count". */
    private static String summaryLine(QualityFlag f, long rows) {
        return String.format("  %-22s %,d%n", f.name(), rows);
    }

    /**
     * One table, rows whose id is null, empty or blank (spaces, a tab, a no-break space) among real ids, one of them
     * repeated. Every row comes out once; the missing ids are ID_MISSING and never DUPLICATE_ID, however many rows
     * share a null or a blank; the repeated real id is still DUPLICATE_ID. An empty or blank text id counts as no id:
     * common practice (no published source), as Java's String.isBlank.
     */
    @Test
    void rowsWithoutIdInOneTableAreKeptOnceAndFlaggedIdMissing() {
        List<Row> rows = TestCatalogs.rows(12, 0);
        List<String> ids = Arrays.asList("s0", "s1", null, null, "", "", "   ", "\t", "\u00a0", "s9", "s9", "s11");
        Path in = tmp.resolve("in");
        TestCatalogs.frameWithIds(spark, rows, ids, DataTypes.StringType).repartition(2).write().partitionBy("tile")
                .parquet(in.toString());
        Path out = tmp.resolve("out");
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());
        assertTrue(r.out.contains("12 rows in, 12 rows out"), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.ID_MISSING, 7)), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.DUPLICATE_ID, 2)), r.out);

        // row i is known by its parallax error (0.02 + 0.001 i, TestCatalogs): each must come out exactly once
        Dataset<Row> back = spark.read().parquet(out.toString());
        Map<Double, List<Row>> byErr = back.select("parallax_err_mas", "star_id", "flags", "flag_names").collectAsList()
                .stream().collect(Collectors.groupingBy(x -> x.getDouble(0)));
        assertEquals(12, byErr.size());
        for (int i = 0; i < rows.size(); i++) {
            List<Row> got = byErr.get(rows.get(i).getDouble(3));
            assertEquals(1, got.size(), "row " + i + " once");
            Row g = got.get(0);
            assertEquals(ids.get(i), g.isNullAt(1) ? null : g.getString(1), "id passed through unchanged");
            long f = g.getLong(2);
            assertEquals(missingId(ids.get(i)), QualityFlag.ID_MISSING.isSet(f), "row " + i + " " + QualityFlag.names(f));
            assertEquals(i == 9 || i == 10, QualityFlag.DUPLICATE_ID.isSet(f), "row " + i + " " + QualityFlag.names(f));
            // the names are those of the bits, in bit order (ID_MISSING, the highest bit, last)
            assertEquals(QualityFlag.names(f), g.getList(3));
        }
        // the manifest counts them too
        String manifest = readString(out.resolve(RunManifest.FILE_NAME));
        assertTrue(manifest.contains("\"ID_MISSING\" : 7"), manifest);

        // CSV output: Spark writes "" for an empty or blank text (it trims) and reads "" back as null; the row check
        // before the commit must still find every row (the census hashes every missing id as null)
        Path csv = tmp.resolve("out-csv");
        CliRunner rc = CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--output", csv.toString(), "--output-format", "csv");
        assertEquals(0, rc.exitCode, rc.toString());
        assertTrue(rc.out.contains(summaryLine(QualityFlag.ID_MISSING, 7)), rc.out);
        Dataset<Row> csvBack = spark.read().option("header", "true").csv(csv.toString());
        assertEquals(12, csvBack.count());
        assertEquals(7, csvBack.filter("flag_names LIKE '%ID_MISSING'").count());
    }

    /** A numeric id can only be missing by being null: same rules as for text ids. */
    @Test
    void nullNumericIdsInOneTableAreFlaggedIdMissingNotDuplicate() {
        List<Row> rows = TestCatalogs.rows(6, 0);
        List<Long> ids = Arrays.asList(0L, null, 2L, null, null, 5L);
        Path in = tmp.resolve("in");
        TestCatalogs.frameWithIds(spark, rows, ids, DataTypes.LongType).write().parquet(in.toString());
        Path out = tmp.resolve("out");
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());
        assertTrue(r.out.contains("6 rows in, 6 rows out"), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.ID_MISSING, 3)), r.out);
        assertFalse(r.out.contains("DUPLICATE_ID"), r.out);
        Dataset<Row> back = spark.read().parquet(out.toString());
        assertEquals(3, back.filter("star_id IS NULL AND flags & " + QualityFlag.ID_MISSING.mask() + " <> 0").count());
        assertEquals(0, back.filter("star_id IS NOT NULL AND flags & " + QualityFlag.ID_MISSING.mask() + " <> 0").count());
        assertEquals(3, back.filter("array_contains(flag_names, 'ID_MISSING')").count());
    }

    /** The astrometry table (id, parallax 10 + i) and the photometry table (id, V 10 + i/10, Ks) of a join test. */
    private CliRunner joinWithIds(DataType idType, List<?> astroIds, List<?> photIds, Path out) {
        StructType as = new StructType().add("star_id", idType).add("parallax_mas", DataTypes.DoubleType)
                .add("parallax_err_mas", DataTypes.DoubleType);
        StructType ps = new StructType().add("star_id", idType).add("mag_v", DataTypes.DoubleType)
                .add("mag_v_err", DataTypes.DoubleType).add("mag_ks", DataTypes.DoubleType).add("mag_ks_err", DataTypes.DoubleType);
        List<Row> a = new ArrayList<>();
        for (int i = 0; i < astroIds.size(); i++) {
            a.add(RowFactory.create(astroIds.get(i), 10.0 + i, 0.1));
        }
        List<Row> p = new ArrayList<>();
        for (int i = 0; i < photIds.size(); i++) {
            p.add(RowFactory.create(photIds.get(i), 10.0 + 0.1 * i, 0.01, 8.5 + 0.1 * i, 0.02));
        }
        Path ain = out.resolveSibling(out.getFileName() + "-astro");
        Path pin = out.resolveSibling(out.getFileName() + "-phot");
        spark.createDataFrame(a, as).repartition(2).write().parquet(ain.toString());
        spark.createDataFrame(p, ps).repartition(2).write().parquet(pin.toString());
        return CliRunner.run("derive", "--layout", "full", "--input", ain.toString(), "--photometry", pin.toString(), "--join-on", "star_id",
                "--output", out.toString());
    }

    /**
     * Checks a join: every astrometry row and every photometry row comes out exactly once; a row with a missing id is
     * alone (the other table's columns null), keeps its id as it was and is ID_MISSING, not DUPLICATE_ID; a real id
     * held k and j times gives max(k, j) rows, none ID_MISSING.
     */
    private void assertMissingIdsStandAlone(List<?> astroIds, List<?> photIds, Path out) {
        List<Row> back = spark.read().parquet(out.toString())
                .select("star_id", "parallax_mas", "parallax_err_mas", "mag_v", "mag_ks", "flags").collectAsList();
        long missingRows = astroIds.stream().filter(DeriveCommandTest::missingId).count()
                + photIds.stream().filter(DeriveCommandTest::missingId).count();
        long paired = astroIds.stream().filter(x -> !missingId(x)).distinct()
                .mapToLong(x -> Math.min(Collections.frequency(astroIds, x), Collections.frequency(photIds, x))).sum();
        assertEquals(astroIds.size() + photIds.size() - paired, back.size(), "rows out");
        for (int i = 0; i < astroIds.size(); i++) {
            double plx = 10.0 + i;
            List<Row> got = back.stream().filter(x -> !x.isNullAt(1) && x.getDouble(1) == plx).collect(Collectors.toList());
            assertEquals(1, got.size(), "astrometry row " + i + " once");
            Row g = got.get(0);
            long f = g.getLong(5);
            assertEquals(astroIds.get(i), g.get(0), "astrometry row " + i + ": id as it was");
            if (missingId(astroIds.get(i))) {
                assertTrue(QualityFlag.ID_MISSING.isSet(f), "astrometry row " + i + " " + QualityFlag.names(f));
                assertFalse(QualityFlag.DUPLICATE_ID.isSet(f), "astrometry row " + i);
                assertTrue(g.isNullAt(3) && g.isNullAt(4), "astrometry row " + i + " paired with photometry: " + g);
            } else {
                assertFalse(QualityFlag.ID_MISSING.isSet(f), "astrometry row " + i);
            }
        }
        for (int i = 0; i < photIds.size(); i++) {
            double v = 10.0 + 0.1 * i;
            List<Row> got = back.stream().filter(x -> !x.isNullAt(3) && x.getDouble(3) == v).collect(Collectors.toList());
            assertEquals(1, got.size(), "photometry row " + i + " once");
            Row g = got.get(0);
            long f = g.getLong(5);
            assertEquals(photIds.get(i), g.get(0), "photometry row " + i + ": id as it was");
            if (missingId(photIds.get(i))) {
                assertTrue(QualityFlag.ID_MISSING.isSet(f), "photometry row " + i + " " + QualityFlag.names(f));
                assertFalse(QualityFlag.DUPLICATE_ID.isSet(f), "photometry row " + i);
                assertTrue(g.isNullAt(1) && g.isNullAt(2), "photometry row " + i + " paired with astrometry: " + g);
                assertTrue(QualityFlag.PARALLAX_MISSING.isSet(f), "photometry row " + i + " " + QualityFlag.names(f));
            } else {
                assertFalse(QualityFlag.ID_MISSING.isSet(f), "photometry row " + i);
            }
        }
        assertEquals(missingRows, back.stream().filter(x -> QualityFlag.ID_MISSING.isSet(x.getLong(5))).count());
    }

    /**
     * Two tables with text ids missing on one side only (blank in astrometry, tab in photometry) and on both (null
     * and empty in each): no missing id meets another, each row stays alone and is ID_MISSING. Before, nulls paired
     * with nulls and empties with empties, merging unrelated stars.
     */
    @Test
    void joinNeverPairsMissingTextIds() {
        List<String> a = Arrays.asList("1", "2", null, null, "", "   ");
        List<String> p = Arrays.asList("1", "3", null, "", "", "\t");
        Path out = tmp.resolve("out");
        CliRunner r = joinWithIds(DataTypes.StringType, a, p, out);
        assertEquals(0, r.exitCode, r.toString());
        // 1 paired, 2 and 3 alone, 4 + 4 rows without id
        assertTrue(r.out.contains("11 rows in, 11 rows out"), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.ID_MISSING, 8)), r.out);
        assertFalse(r.out.contains("DUPLICATE_ID"), r.out);
        assertMissingIdsStandAlone(a, p, out);
    }

    /** The same with numeric ids (null the only missing one), missing on both sides; and on one side only. */
    @Test
    void joinNeverPairsNullNumericIds() {
        List<Long> a = Arrays.asList(1L, null, null, 4L, 4L);
        List<Long> p = Arrays.asList(null, 1L, 4L);
        Path out = tmp.resolve("out");
        CliRunner r = joinWithIds(DataTypes.LongType, a, p, out);
        assertEquals(0, r.exitCode, r.toString());
        // 1 paired, 4 twice (copy by copy, DUPLICATE_ID), 3 rows without id
        assertTrue(r.out.contains("6 rows in, 6 rows out"), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.ID_MISSING, 3)), r.out);
        assertTrue(r.out.contains(summaryLine(QualityFlag.DUPLICATE_ID, 2)), r.out);
        Dataset<Row> back = spark.read().parquet(out.toString());
        assertEquals(2, back.filter("star_id = 4 AND flags & " + QualityFlag.DUPLICATE_ID.mask() + " <> 0").count());
        assertEquals(1, back.filter("star_id = 4 AND mag_v IS NOT NULL").count());
        assertMissingIdsStandAlone(a, p, out);
        // nulls on the astrometry side only
        List<Long> a1 = Arrays.asList(1L, null, null);
        List<Long> p1 = Arrays.asList(1L, 2L);
        Path out1 = tmp.resolve("out1");
        CliRunner r1 = joinWithIds(DataTypes.LongType, a1, p1, out1);
        assertEquals(0, r1.exitCode, r1.toString());
        assertTrue(r1.out.contains(summaryLine(QualityFlag.ID_MISSING, 2)), r1.out);
        assertMissingIdsStandAlone(a1, p1, out1);
    }

    @Test
    void replacePartitionsLeavesOtherPartitionsByteIdentical() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(30, 1), in);
        assertEquals(0, CliRunner.run("derive", "--layout", "full", "--input", in.toString(), "--output", out.toString()).exitCode);
        Map<String, String> before = TestCatalogs.treeHash(out);

        // reprocess tile 1 only, with changed data
        Path in1 = tmp.resolve("in1");
        List<Row> tile1 = TestCatalogs.rows(30, 1).stream().filter(x -> x.getInt(1) == 1).map(x -> {
            Object[] v = new Object[x.length()];
            for (int i = 0; i < v.length; i++) {
                v[i] = x.get(i);
            }
            v[13] = -1.0; // new [Fe/H]
            return RowFactory.create(v);
        }).collect(Collectors.toList());
        TestCatalogs.writeParquet(spark, tile1, in1);
        CliRunner r = CliRunner.run("derive", "--layout", "full", "--input", in1.toString(), "--output", out.toString(), "--write-mode", "replace-partitions");
        assertEquals(0, r.exitCode, r.toString());
        assertTrue(r.out.contains("partitions replaced: [tile=1]"), r.out);
        Map<String, String> after = TestCatalogs.treeHash(out);
        for (String f : before.keySet()) {
            if (f.startsWith("tile=0/") || f.startsWith("tile=2/")) {
                assertEquals(before.get(f), after.get(f), f + " changed");
            }
        }
        assertFalse(after.keySet().stream().filter(f -> f.startsWith("tile=1/")).anyMatch(before::containsKey),
                "tile=1 files were replaced");
        assertEquals(30, spark.read().parquet(out.toString()).count());
        assertEquals(10, spark.read().parquet(out.toString()).filter("tile = 1 AND feh = -1.0").count());
    }

    @Test
    void overwriteReplacesWholeAndRunsAreDeterministic() throws Exception {
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(25, 1), in);
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", out.toString()).exitCode);
        List<Row> first = spark.read().parquet(out.toString()).drop("flag_names").orderBy("star_id").collectAsList();
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString(), "--write-mode", "overwrite");
        assertEquals(0, r.exitCode, r.toString());
        List<Row> second = spark.read().parquet(out.toString()).drop("flag_names").orderBy("star_id").collectAsList();
        assertEquals(first, second, "same input and config give the same output");
    }

    /** Layouts and column groups (README, Output): what each writes, and that the data dictionary follows. */
    @Test
    void layoutsAndColumnGroupsWriteWhatTheySay() throws Exception {
        Path in = tmp.resolve("in");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(12, 1), in);

        Path core = tmp.resolve("core");
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", core.toString(), "--columns", "core").exitCode);
        java.util.Set<String> expected = new java.util.TreeSet<>(DerivedSchema.CORE);
        expected.add("star_id");
        expected.add("tile");
        assertEquals(expected, new java.util.TreeSet<>(List.of(spark.read().parquet(core.toString()).columns())));
        String dict = Files.readString(core.resolve(DataDictionary.FILE_NAME));
        assertTrue(dict.contains("| `teff_k` | float | K |") && !dict.contains("`abs_mag_v`"), dict);
        assertTrue(dict.contains("## Why 32-bit floats") && dict.contains("| `teff_k` | errors >= 20 K"), dict);

        Path full = tmp.resolve("full");
        Path cfg = Files.writeString(tmp.resolve("f64.yaml"), "output: {float32: false}\n");
        assertEquals(0, CliRunner.run("derive", "--input", in.toString(), "--output", full.toString(), "--layout", "full",
                "--config", cfg.toString()).exitCode);
        StructType fs = spark.read().parquet(full.toString()).schema();
        for (String c : TestCatalogs.schema().fieldNames()) {
            assertTrue(fs.getFieldIndex(c).isDefined(), "input column " + c + " passed through");
        }
        assertEquals(DataTypes.DoubleType, fs.apply("teff_k").dataType(), "float32: false keeps 64 bits");
        assertTrue(!Files.readString(full.resolve(DataDictionary.FILE_NAME)).contains("## Why 32-bit floats"));

        CliRunner bad = CliRunner.run("derive", "--input", in.toString(), "--output", tmp.resolve("x").toString(), "--layout", "wide");
        assertEquals(2, bad.exitCode, bad.toString());
        assertTrue(bad.err.contains("--layout: wide (must be derived or full)"), bad.err);
    }
}
