package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;
import org.starderive.udf.DerivedSchema;

/**
 * {@code derive --input-format fits|votable}: a FITS and a VOTable version of a small survey derive to the same
 * catalogue as its Parquet version, and bad files are refused as {@link DatasetErrorsTest} requires (exit code,
 * file, column, rule, no stack trace, the previous output untouched).
 */
class FitsVotableInputTest {
    @TempDir
    Path tmp;

    private final SparkSession spark = SharedSpark.spark();

    private static CliRunner derive(String... args) {
        return CliRunner.run(args);
    }

    /** Every row of a derived catalogue in id order: the id and every derived column. */
    private List<Row> derivedRows(Path out) {
        List<String> cols = new ArrayList<>(List.of("star_id"));
        cols.addAll(DerivedSchema.names());
        return spark.read().parquet(out.toString()).selectExpr(cols.toArray(new String[0])).orderBy("star_id").collectAsList();
    }

    /** The rows with every NaN replaced by null: what FITS and VOTable can say (NaN is their null of floating point). */
    static List<Row> nanAsNull(List<Row> rows) {
        List<Row> out = new ArrayList<>();
        for (Row r : rows) {
            Object[] v = new Object[r.length()];
            for (int k = 0; k < v.length; k++) {
                Object x = r.get(k);
                v[k] = x instanceof Double && ((Double) x).isNaN() ? null : x;
            }
            out.add(RowFactory.create(v));
        }
        return out;
    }

    private static boolean hasNaN(Row r) {
        for (int k = 0; k < r.length(); k++) {
            if (r.get(k) instanceof Double && ((Double) r.getDouble(k)).isNaN()) {
                return true;
            }
        }
        return false;
    }

    @Test
    void fitsAndVotableDeriveTheSameCatalogueAsParquet() {
        // 300 stars with the hostile rows of TestCatalogs (sentinel magnitude, null parallax, NaN magnitude, null E(B-V))
        List<Row> rows = TestCatalogs.rows(300, 1);
        Path parquet = tmp.resolve("survey.parquet");
        TestCatalogs.frame(spark, nanAsNull(rows)).coalesce(1).write().parquet(parquet.toString());
        Path parquetNaN = tmp.resolve("survey-nan.parquet");
        TestCatalogs.frame(spark, rows).coalesce(1).write().parquet(parquetNaN.toString());
        Path fits = tmp.resolve("survey.fits");
        Path vot = tmp.resolve("survey.vot");
        TestCatalogs.writeTableFile(rows, TestCatalogs.schema(), fits, "fits", TestCatalogs.canonicalUnits());
        TestCatalogs.writeTableFile(rows, TestCatalogs.schema(), vot, "votable", TestCatalogs.canonicalUnits());

        Map<String, List<Row>> got = new HashMap<>();
        Map<String, Path> inputs = Map.of("parquet", parquet, "parquet-nan", parquetNaN, "fits", fits, "votable", vot);
        for (Map.Entry<String, Path> e : inputs.entrySet()) {
            Path out = tmp.resolve("out-" + e.getKey());
            CliRunner r = derive("derive", "--input", e.getValue().toString(), "--input-format",
                    e.getKey().replace("-nan", ""), "--output", out.toString());
            assertEquals(0, r.exitCode, e.getKey() + ": " + r);
            assertTrue(r.out.contains("300 rows in, 300 rows out"), r.out);
            got.put(e.getKey(), derivedRows(out));
        }
        List<Row> ref = got.get("parquet");
        assertEquals(300, ref.size());
        // the comparison has something to compare: most stars get a distance and a Teff
        long withTeff = ref.stream().filter(x -> !x.isNullAt(x.fieldIndex("teff_k"))).count();
        assertTrue(withTeff > 150, "stars with a Teff: " + withTeff);
        // every value equal (Row.equals: floats exactly, NaN equal to NaN, null to null), row by row in id order
        for (String fmt : List.of("fits", "votable")) {
            List<Row> other = got.get(fmt);
            assertEquals(ref.size(), other.size(), fmt);
            for (int i = 0; i < ref.size(); i++) {
                assertEquals(ref.get(i), other.get(i), fmt + " row " + i);
            }
        }
        // Parquet keeps a NaN apart from null, FITS and VOTable cannot: a NaN magnitude is an invalid value there
        // (INPUT_INVALID), a missing one here; every other value is the same
        List<Row> withNaN = got.get("parquet-nan");
        long invalid = org.starderive.physics.QualityFlag.INPUT_INVALID.mask();
        int nanRows = 0;
        for (int i = 0; i < ref.size(); i++) {
            Row a = withNaN.get(i);
            Row b = got.get("fits").get(i);
            long fa = a.getLong(a.fieldIndex("flags"));
            long fb = b.getLong(b.fieldIndex("flags"));
            if (hasNaN(rows.get(i))) {
                nanRows++;
                assertEquals(fa, fb | invalid, "row " + i + ": INPUT_INVALID from the NaN");
                assertEquals(0, fb & invalid, "row " + i + ": no INPUT_INVALID from a null");
            } else {
                assertEquals(a, b, "row " + i);
            }
            for (String c : DerivedSchema.names()) {
                if (!c.equals("flags") && !c.equals("flag_names")) {
                    assertEquals(a.get(a.fieldIndex(c)), b.get(b.fieldIndex(c)), "row " + i + " " + c);
                }
            }
        }
        assertEquals(300 / 7 + (300 % 7 > 6 ? 1 : 0), nanRows);
    }

    private static boolean astropyPresent() {
        try {
            Process p = new ProcessBuilder("/usr/bin/python3", "-c", "import astropy").redirectErrorStream(true).start();
            return p.waitFor(60, java.util.concurrent.TimeUnit.SECONDS) && p.exitValue() == 0;
        } catch (IOException | InterruptedException e) {
            return false;
        }
    }

    @Test
    void filesWrittenByAstropyDeriveTheSameCatalogueAsParquet() throws Exception {
        org.junit.jupiter.api.Assumptions.assumeTrue(astropyPresent(), "astropy is not installed for /usr/bin/python3 "
                + "(Debian package python3-astropy; .ci/run installs it): the files of another writer are not tried");
        // another writer's conventions: astropy writes masked integers with TNULL, masked floats as NaN (FITS) and
        // empty cells (VOTable), and its own FIELD datatypes (long for every integer column)
        List<Row> rows = TestCatalogs.rows(120, 1);
        StringBuilder csv = new StringBuilder(String.join(",", TestCatalogs.schema().fieldNames())).append('\n');
        for (Row r : rows) {
            for (int k = 0; k < r.length(); k++) {
                Object x = r.get(k);
                csv.append(k > 0 ? "," : "").append(x == null ? "" : x instanceof Double && ((Double) x).isNaN() ? "nan" : x);
            }
            csv.append('\n');
        }
        Path in = Files.writeString(tmp.resolve("survey.csv"), csv.toString());
        Path script = tmp.resolve("write_with_astropy.py");
        try (var s = FitsVotableInputTest.class.getResourceAsStream("/input/write_with_astropy.py")) {
            Files.write(script, s.readAllBytes());
        }
        Path fits = tmp.resolve("astropy.fits");
        Path vot = tmp.resolve("astropy.vot");
        List<String> cmd = new ArrayList<>(List.of("/usr/bin/python3", script.toString(), in.toString(), fits.toString(),
                vot.toString()));
        TestCatalogs.canonicalUnits().forEach((c, u) -> cmd.add(c + "=" + u));
        Path err = tmp.resolve("astropy.err");
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(err.toFile()).start();
        assertTrue(p.waitFor(120, java.util.concurrent.TimeUnit.SECONDS), "astropy writer timed out");
        assertEquals(0, p.exitValue(), "astropy writer failed:\n" + Files.readString(err));

        Path parquet = tmp.resolve("survey.parquet");
        TestCatalogs.frame(spark, nanAsNull(rows)).coalesce(1).write().parquet(parquet.toString());
        Path outP = tmp.resolve("out-parquet");
        assertEquals(0, derive("derive", "--input", parquet.toString(), "--output", outP.toString()).exitCode);
        List<Row> ref = derivedRows(outP);
        for (Map.Entry<String, Path> e : Map.of("fits", fits, "votable", vot).entrySet()) {
            Path out = tmp.resolve("out-astropy-" + e.getKey());
            CliRunner r = derive("derive", "--input", e.getValue().toString(), "--input-format", e.getKey(),
                    "--output", out.toString());
            assertEquals(0, r.exitCode, e.getKey() + ": " + r);
            assertEquals(ref, derivedRows(out), e.getKey() + " written by astropy");
        }
    }

    @Test
    void twoTablesFitsAndVotableJoinAsParquetDoes() {
        // astrometry as FITS and photometry as VOTable, joined on the id: the same catalogue as the one-table Parquet
        List<Row> rows = nanAsNull(TestCatalogs.rows(40, 1));
        Path parquet = tmp.resolve("all.parquet");
        TestCatalogs.frame(spark, rows).coalesce(1).write().parquet(parquet.toString());
        org.apache.spark.sql.types.StructType s = TestCatalogs.schema();
        List<String> astroCols = List.of("star_id", "tile", "parallax_mas", "parallax_err_mas");
        org.apache.spark.sql.types.StructType astroSchema = new org.apache.spark.sql.types.StructType();
        org.apache.spark.sql.types.StructType photSchema = new org.apache.spark.sql.types.StructType();
        for (org.apache.spark.sql.types.StructField f : s.fields()) {
            if (astroCols.contains(f.name())) {
                astroSchema = astroSchema.add(f);
            }
            if (!astroCols.contains(f.name()) || f.name().equals("star_id")) {
                photSchema = photSchema.add(f);
            }
        }
        List<Row> astro = new ArrayList<>();
        List<Row> phot = new ArrayList<>();
        for (Row r : rows) {
            astro.add(RowFactory.create(r.get(0), r.get(1), r.get(2), r.get(3)));
            Object[] p = new Object[photSchema.size()];
            p[0] = r.get(0);
            for (int k = 1; k < p.length; k++) {
                p[k] = r.get(k + 3);
            }
            phot.add(RowFactory.create(p));
        }
        Path fits = tmp.resolve("astrometry.fits");
        Path vot = tmp.resolve("photometry.vot");
        TestCatalogs.writeTableFile(astro, astroSchema, fits, "fits", TestCatalogs.canonicalUnits());
        // the photometry file in a folder of its own: a folder of files is one table
        Path photDir = tmp.resolve("phot");
        try {
            Files.createDirectories(photDir);
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
        TestCatalogs.writeTableFile(phot, photSchema, photDir.resolve(vot.getFileName()), "votable", TestCatalogs.canonicalUnits());

        Path outP = tmp.resolve("out-parquet");
        Path outF = tmp.resolve("out-two");
        assertEquals(0, derive("derive", "--input", parquet.toString(), "--output", outP.toString()).exitCode);
        CliRunner r = derive("derive", "--input", fits.toString(), "--photometry", photDir.toString(), "--input-format", "fits",
                "--output", outF.toString());
        // one --input-format for both tables: the VOTable folder is refused as FITS, naming the file
        assertEquals(3, r.exitCode, r.toString());
        assertTrue(r.err.contains("photometry.vot") && r.err.contains("FITS"), r.err);
        // both as the same format: FITS astrometry (gzip-compressed, as archives serve FITS) and FITS photometry as a
        // folder of two files, the photometry without units (accepted)
        Path fitsGz = tmp.resolve("astrometry.fits.gz");
        try (java.io.OutputStream o = new java.util.zip.GZIPOutputStream(Files.newOutputStream(fitsGz))) {
            o.write(Files.readAllBytes(fits));
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
        Path photFits = tmp.resolve("phot-fits");
        try {
            Files.createDirectories(photFits);
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
        TestCatalogs.writeTableFile(phot.subList(0, 25), photSchema, photFits.resolve("part-1.fits"), "fits", Map.of());
        TestCatalogs.writeTableFile(phot.subList(25, phot.size()), photSchema, photFits.resolve("part-2.fits"), "fits", Map.of());
        CliRunner ok = derive("derive", "--input", fitsGz.toString(), "--photometry", photFits.toString(), "--input-format",
                "fits", "--output", outF.toString());
        assertEquals(0, ok.exitCode, ok.toString());
        assertEquals(derivedRows(outP), derivedRows(outF));
    }

    @Test
    void otherColumnTypesPassThroughInTheFullLayout() throws IOException {
        // 32-bit floats, 16-bit integers, booleans, text and a fixed-size array column (FITS 3D, VOTable arraysize 3)
        uk.ac.starlink.table.ColumnInfo[] ci = {
            new uk.ac.starlink.table.ColumnInfo("star_id", Long.class, null),
            new uk.ac.starlink.table.ColumnInfo("parallax_mas", Float.class, null),
            new uk.ac.starlink.table.ColumnInfo("parallax_err_mas", Float.class, null),
            new uk.ac.starlink.table.ColumnInfo("mag_v", Double.class, null),
            new uk.ac.starlink.table.ColumnInfo("mag_v_err", Double.class, null),
            new uk.ac.starlink.table.ColumnInfo("mag_ks", Double.class, null),
            new uk.ac.starlink.table.ColumnInfo("mag_ks_err", Double.class, null),
            new uk.ac.starlink.table.ColumnInfo("flux_aper", double[].class, null),
            new uk.ac.starlink.table.ColumnInfo("note", String.class, null),
            new uk.ac.starlink.table.ColumnInfo("good", Boolean.class, null),
            new uk.ac.starlink.table.ColumnInfo("field_no", Short.class, null)};
        ci[7].setShape(new int[] {3});
        uk.ac.starlink.table.RowListStarTable t = new uk.ac.starlink.table.RowListStarTable(ci);
        for (int i = 0; i < 10; i++) {
            double v = 8 + 0.1 * i;
            t.addRow(new Object[] {(long) i, 10f + i, 0.05f, v, 0.01, v - 1.544, 0.02,
                new double[] {i, i + 0.5, i == 3 ? Double.NaN : i + 0.25}, i == 4 ? null : "star " + i, i % 2 == 0,
                (short) (100 + i)});
        }
        for (String fmt : List.of("fits", "votable")) {
            Path f = tmp.resolve("types." + fmt);
            try (java.io.OutputStream os = Files.newOutputStream(f)) {
                (fmt.equals("fits") ? new uk.ac.starlink.fits.FitsTableWriter()
                        : new uk.ac.starlink.votable.VOTableWriter(uk.ac.starlink.votable.DataFormat.TABLEDATA, true))
                        .writeStarTable(t, os);
            }
            Path out = tmp.resolve("out-types-" + fmt);
            CliRunner r = derive("derive", "--input", f.toString(), "--input-format", fmt, "--layout", "full",
                    "--output", out.toString());
            assertEquals(0, r.exitCode, fmt + ": " + r);
            List<Row> got = spark.read().parquet(out.toString()).orderBy("star_id").collectAsList();
            assertEquals(10, got.size(), fmt);
            for (int i = 0; i < 10; i++) {
                Row g = got.get(i);
                String where = fmt + " row " + i;
                assertEquals(10f + i, g.getFloat(g.fieldIndex("parallax_mas")), 0f, where);
                List<Object> flux = g.getList(g.fieldIndex("flux_aper"));
                assertEquals(java.util.Arrays.asList((double) i, i + 0.5, i == 3 ? null : i + 0.25), flux, where);
                assertEquals(i == 4 ? null : "star " + i, g.get(g.fieldIndex("note")), where);
                assertEquals(i % 2 == 0, g.getBoolean(g.fieldIndex("good")), where);
                assertEquals(100 + i, ((Number) g.get(g.fieldIndex("field_no"))).intValue(), where);
                assertTrue(!g.isNullAt(g.fieldIndex("dist_pc")), where + ": a distance derived");
            }
        }
    }

    // ---- refusals: exit 3 (dataset), file, column, rule; the previous output untouched ----

    /** A committed output from good data, to show that a refused run leaves it as it was. */
    private Path previousOutput() {
        Path good = tmp.resolve("good.parquet");
        TestCatalogs.frame(spark, TestCatalogs.rows(12, 1)).coalesce(1).write().parquet(good.toString());
        Path out = tmp.resolve("out");
        assertEquals(0, derive("derive", "--input", good.toString(), "--output", out.toString()).exitCode);
        return out;
    }

    private static CliRunner refused(int exit, Path out, List<String> mustMention, Path in, String format, String... more) {
        List<String> a = new ArrayList<>(List.of("derive", "--input", in.toString(), "--input-format", format,
                "--output", out.toString(), "--write-mode", "overwrite"));
        a.addAll(List.of(more));
        CliRunner r = DatasetErrorsTest.expectFailure(exit, out, mustMention, a.toArray(new String[0]));
        assertTrue(!r.err.contains("\tat ") && !r.err.contains("Exception in"), "no stack trace: " + r.err);
        return r;
    }

    private Path smallFile(String name, String format, Map<String, String> units) {
        Path f = tmp.resolve(name);
        TestCatalogs.writeTableFile(TestCatalogs.rows(12, 1), TestCatalogs.schema(), f, format, units);
        return f;
    }

    @Test
    void truncatedFits() throws IOException {
        Path out = previousOutput();
        Path f = smallFile("cut.fits", "fits", TestCatalogs.canonicalUnits());
        byte[] b = Files.readAllBytes(f);
        // FITS 4.0 section 3.1: a file is whole 2880-byte blocks; cut inside the data block
        assertEquals(0, b.length % 2880);
        Files.write(f, java.util.Arrays.copyOf(b, b.length - 2000));
        refused(3, out, List.of(f.toString(), "truncated"), f, "fits");
        // and a FITS file that ends inside its header
        Files.write(f, java.util.Arrays.copyOf(b, 1000));
        refused(3, out, List.of(f.toString(), "truncated"), f, "fits");
    }

    @Test
    void votableWithTextInANumericCell() throws IOException {
        Path out = previousOutput();
        List<Row> rows = new ArrayList<>(TestCatalogs.rows(12, 1));
        Object[] v = new Object[rows.get(2).length()];
        for (int k = 0; k < v.length; k++) {
            v[k] = rows.get(2).get(k);
        }
        v[2] = 123.25; // parallax_mas of the third row: a value to find in the written text
        rows.set(2, RowFactory.create(v));
        Path f = tmp.resolve("text.vot");
        TestCatalogs.writeTableFile(rows, TestCatalogs.schema(), f, "votable", TestCatalogs.canonicalUnits());
        String xml = Files.readString(f, StandardCharsets.UTF_8);
        assertTrue(xml.contains("<TD>123.25</TD>"), "STIL writes the value as it is");
        Files.writeString(f, xml.replace("<TD>123.25</TD>", "<TD>12.3 mas</TD>"), StandardCharsets.UTF_8);
        refused(3, out, List.of(f.toString(), "'parallax_mas'", "row 3", "12.3 mas", "double"), f, "votable");
    }

    @Test
    void parallaxOrMagnitudeInAnotherUnit() {
        Path out = previousOutput();
        Map<String, String> arcsec = TestCatalogs.canonicalUnits();
        arcsec.put("parallax_mas", "arcsec");
        Path f = smallFile("arcsec.fits", "fits", arcsec);
        refused(3, out, List.of(f.toString(), "'parallax_mas'", "'arcsec'", "expected mas", "columns.parallax_unit"), f, "fits");

        Map<String, String> jansky = TestCatalogs.canonicalUnits();
        jansky.put("mag_v_err", "Jy");
        Path v = smallFile("jansky.vot", "votable", jansky);
        refused(3, out, List.of(v.toString(), "'mag_v_err'", "'Jy'", "expected mag"), v, "votable");
    }

    @Test
    void emptyTable() {
        Path out = previousOutput();
        Path f = tmp.resolve("empty.fits");
        TestCatalogs.writeTableFile(List.of(), TestCatalogs.schema(), f, "fits", TestCatalogs.canonicalUnits());
        refused(3, out, List.of(f.toString(), "no rows"), f, "fits");
        Path v = tmp.resolve("empty.vot");
        TestCatalogs.writeTableFile(List.of(), TestCatalogs.schema(), v, "votable", TestCatalogs.canonicalUnits());
        refused(3, out, List.of(v.toString(), "no rows"), v, "votable");
    }

    @Test
    void garbageAndWrongFormat() throws IOException {
        Path out = previousOutput();
        Path g = Files.writeString(tmp.resolve("notes.fits"), "star_id,parallax_mas\n1,2.5\n".repeat(200));
        refused(3, out, List.of(g.toString(), "not a FITS file"), g, "fits");
        refused(3, out, List.of(g.toString(), "not readable as VOTable"), g, "votable");
        // a FITS file given as VOTable
        Path f = smallFile("real.fits", "fits", TestCatalogs.canonicalUnits());
        refused(3, out, List.of(f.toString(), "not readable as VOTable"), f, "votable");
        // a zero-byte file
        Path empty = Files.createFile(tmp.resolve("zero.fits"));
        refused(3, out, List.of(empty.toString(), "empty file"), empty, "fits");
        // two files of one table with different columns
        Path dir = Files.createDirectories(tmp.resolve("mixed"));
        TestCatalogs.writeTableFile(TestCatalogs.rows(4, 1), TestCatalogs.schema(), dir.resolve("a.fits"), "fits", Map.of());
        TestCatalogs.writeTableFile(new ArrayList<>(), new org.apache.spark.sql.types.StructType()
                .add("star_id", org.apache.spark.sql.types.DataTypes.LongType), dir.resolve("b.fits"), "fits", Map.of());
        refused(3, out, List.of("a.fits", "b.fits", "columns differ"), dir, "fits");
    }

    @Test
    void aboveTheRowLimitIsRefusedWithTheWayOut() throws IOException {
        Path out = previousOutput();
        Path cfg = Files.writeString(tmp.resolve("small-driver.yaml"), "input:\n  fits_votable_max_rows: 10\n");
        Path f = smallFile("twelve.fits", "fits", TestCatalogs.canonicalUnits());
        refused(3, out, List.of(f.toString(), "more than 10", "input.fits_votable_max_rows", "Parquet"), f, "fits",
                "--config", cfg.toString());
        Path v = smallFile("twelve.vot", "votable", TestCatalogs.canonicalUnits());
        refused(3, out, List.of(v.toString(), "more than 10", "input.fits_votable_max_rows", "Parquet"), v, "votable",
                "--config", cfg.toString());
        Files.writeString(cfg, "input:\n  fits_votable_max_rows: 0\n");
        refused(2, out, List.of("input.fits_votable_max_rows"), f, "fits", "--config", cfg.toString());
    }
}
