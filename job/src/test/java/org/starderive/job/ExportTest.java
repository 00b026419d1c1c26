package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import javax.xml.parsers.DocumentBuilderFactory;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.QualityFlag;
import org.starderive.testing.SharedSpark;
import org.starderive.udf.DerivedSchema;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;

/**
 * The export sub-command, checked by readers that are not ours:
 * <ul>
 *   <li>astropy (astropy.io.fits, astropy.io.votable, astropy.units), run as {@code /usr/bin/python3} with the
 *       script {@code export/read_with_astropy.py}: it opens the FITS and the VOTable export of a small derived
 *       catalogue; this test compares what astropy found with the Parquet catalogue (rows, values, units, UCDs,
 *       provenance). Skipped only where astropy is not installed ({@code .ci/run} installs it);</li>
 *   <li>the JDK's XML parser, reading the VOTable's TABLEDATA (IVOA VOTable 1.4 structure: RESOURCE/TABLE/FIELD,
 *       DATA/TABLEDATA/TR/TD) for the selection and refusal checks, which need no Python;</li>
 *   <li>nom-tam-fits (the HEASARC FITS library, not STIL) and the JDK's XML parser for the round trip of the demo
 *       (Kestrel) catalogue: every column and every row of both exports against the Parquet catalogue, with units
 *       and UCDs — the check that runs where astropy is not installed.</li>
 * </ul>
 */
class ExportTest {
    @TempDir
    static Path tmp;

    static Path catalog;
    static final SparkSession spark = SharedSpark.spark();
    static final ObjectMapper JSON = new ObjectMapper();

    @BeforeAll
    static void deriveSmallCatalogue() {
        Path in = tmp.resolve("in");
        catalog = tmp.resolve("catalog");
        TestCatalogs.writeParquet(spark, TestCatalogs.rows(60, 1000), in);
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", catalog.toString());
        assertEquals(0, r.exitCode, r.toString());
    }

    private static CliRunner export(Path out, String format, String... more) {
        List<String> a = new ArrayList<>(List.of("export", "--catalog", catalog.toString(), "--out", out.toString(),
                "--format", format));
        a.addAll(List.of(more));
        return CliRunner.run(a.toArray(new String[0]));
    }

    private static boolean astropyPresent() {
        try {
            Process p = new ProcessBuilder("/usr/bin/python3", "-c", "import astropy").redirectErrorStream(true).start();
            return p.waitFor(60, TimeUnit.SECONDS) && p.exitValue() == 0;
        } catch (IOException | InterruptedException e) {
            return false;
        }
    }

    private static JsonNode readWithAstropy(Path fits, Path vot, List<String> columns) throws Exception {
        Path script = tmp.resolve("read_with_astropy.py");
        try (var in = ExportTest.class.getResourceAsStream("/export/read_with_astropy.py")) {
            Files.write(script, in.readAllBytes());
        }
        List<String> cmd = new ArrayList<>(List.of("/usr/bin/python3", script.toString(), fits.toString(), vot.toString()));
        cmd.addAll(columns);
        Path stdout = tmp.resolve("astropy.out");
        Path stderr = tmp.resolve("astropy.err");
        Process p = new ProcessBuilder(cmd).redirectOutput(stdout.toFile()).redirectError(stderr.toFile()).start();
        assertTrue(p.waitFor(120, TimeUnit.SECONDS), "astropy reader timed out");
        assertEquals(0, p.exitValue(), "astropy reader failed:\n" + Files.readString(stderr));
        return JSON.readTree(Files.readString(stdout));
    }

    /** The catalogue's rows by star id, and its schema (with the unit/UCD/description metadata). */
    private static Map<Long, Row> catalogueById() {
        Map<Long, Row> m = new HashMap<>();
        for (Row r : spark.read().parquet(catalog.toString()).collectAsList()) {
            m.put(r.getLong(r.fieldIndex("star_id")), r);
        }
        return m;
    }

    @Test
    void astropyReadsFitsAndVotableWithUnitsUcdsValuesAndProvenance() throws Exception {
        assumeTrue(astropyPresent(), "astropy is not installed for /usr/bin/python3 (Debian package python3-astropy; "
                + ".ci/run installs it): the check by an independent reader is skipped");
        Path fits = tmp.resolve("all.fits");
        Path vot = tmp.resolve("all.vot");
        CliRunner rf = export(fits, "fits");
        assertEquals(0, rf.exitCode, rf.toString());
        CliRunner rv = export(vot, "votable");
        assertEquals(0, rv.exitCode, rv.toString());

        List<String> valueColumns = List.of("star_id", "tile", "parallax_corr_mas", "dist_pc", "teff_k", "lum_lsun",
                "logg_cgs", "density_kg_m3", "flags", "flag_names", "regime");
        JsonNode got = readWithAstropy(fits, vot, valueColumns);
        Map<Long, Row> cat = catalogueById();
        StructType schema = spark.read().parquet(catalog.toString()).schema();
        JsonNode manifest = JSON.readTree(catalog.resolve(RunManifest.FILE_NAME).toFile());

        for (String fmt : List.of("fits", "votable")) {
            JsonNode f = got.get(fmt);
            assertEquals(cat.size(), f.get("rows").asInt(), fmt + " rows");
            // every column with the unit and UCD of the catalogue's metadata; units parsed by astropy
            for (StructField sf : schema.fields()) {
                JsonNode c = f.get("columns").get(sf.name());
                assertNotNull(c, fmt + " has column " + sf.name());
                String unit = sf.metadata().contains(DerivedSchema.META_UNIT) ? sf.metadata().getString(DerivedSchema.META_UNIT) : "";
                JsonNode u = c.get("unit");
                if (unit.isEmpty()) {
                    assertTrue(u.get("parsed").isNull() && u.get("error").isNull(), fmt + " " + sf.name() + " has no unit: " + u);
                } else if (unit.startsWith("log(")) {
                    // a VOUnits function of a unit: astropy 5.2 parses no function units (neither in FITS nor VOUnits
                    // syntax); the string must reach the reader unchanged
                    assertTrue(u.get("parsed").isNull() ? unit.equals(u.get("written").asText()) : true,
                            fmt + " " + sf.name() + " unit kept: " + u);
                } else {
                    assertFalse(u.get("parsed").isNull(), fmt + " " + sf.name() + " unit '" + unit + "' parsed by astropy: " + u);
                }
                if (sf.metadata().contains(DerivedSchema.META_UCD)) {
                    assertEquals(sf.metadata().getString(DerivedSchema.META_UCD), c.get("ucd").asText(), fmt + " " + sf.name() + " UCD");
                    String desc = sf.metadata().getString(DerivedSchema.META_DESCRIPTION)
                            + (sf.name().equals("flag_names") ? " ('|'-separated)" : "");
                    String gotDesc = c.get("description").asText();
                    // a FITS card holds 68 characters of a string value: a longer description is cut there
                    assertTrue(fmt.equals("fits") ? desc.startsWith(gotDesc) && gotDesc.length() >= Math.min(desc.length(), 60)
                            : desc.equals(gotDesc), fmt + " " + sf.name() + " description: " + gotDesc);
                }
            }
            assertEquals("meta.id;meta.main", f.get("columns").get("star_id").get("ucd").asText());
            // 32-bit floats stay 32-bit floats, the flag mask a 64-bit integer
            if (fmt.equals("fits")) {
                assertEquals("E", f.get("columns").get("teff_k").get("tform").asText());
                assertEquals("D", f.get("columns").get("parallax_corr_mas").get("tform").asText());
                assertEquals("K", f.get("columns").get("flags").get("tform").asText());
            } else {
                assertEquals("float", f.get("columns").get("teff_k").get("datatype").asText());
                assertEquals("double", f.get("columns").get("parallax_corr_mas").get("datatype").asText());
                assertEquals("long", f.get("columns").get("flags").get("datatype").asText());
            }
            // values equal the Parquet catalogue's, row by row (nulls as nulls, floats to the bit)
            JsonNode v = f.get("values");
            for (int i = 0; i < cat.size(); i++) {
                long id = v.get("star_id").get(i).asLong();
                Row r = cat.get(id);
                assertNotNull(r, fmt + " id " + id);
                for (String col : valueColumns) {
                    JsonNode x = v.get(col).get(i);
                    int k = r.fieldIndex(col);
                    String where = fmt + " id " + id + " " + col;
                    if (r.isNullAt(k)) {
                        assertTrue(x.isNull() || (col.equals("regime") && x.asText().isEmpty()), where + ": null expected, got " + x);
                    } else if (col.equals("flag_names")) {
                        // FITS has no null string: an empty list is an empty (blank) field, which astropy masks
                        String joined = String.join("|", r.<String>getList(k));
                        assertEquals(joined, x.isNull() && fmt.equals("fits") ? "" : x.asText(), where);
                    } else if (r.get(k) instanceof Float) {
                        assertEquals(r.getFloat(k), (float) x.asDouble(), 0f, where);
                    } else if (r.get(k) instanceof Double) {
                        assertEquals(r.getDouble(k), x.asDouble(), 0.0, where);
                    } else if (r.get(k) instanceof String) {
                        assertEquals(r.getString(k), x.asText(), where);
                    } else {
                        assertEquals(((Number) r.get(k)).longValue(), x.asLong(), where);
                    }
                }
            }
        }
        // provenance: run id and relations as the manifest has them, a SHA-256 of the config
        List<String> relations = new ArrayList<>();
        manifest.path("methods").path("colour_teff_relations").forEach(n -> relations.add(n.path("id").asText()));
        assertFalse(relations.isEmpty());
        JsonNode vp = got.get("votable").get("provenance");
        JsonNode fp = got.get("fits").get("provenance");
        assertEquals(manifest.get("run_id").asText(), vp.get("run_id").asText());
        assertEquals(manifest.get("run_id").asText(), fp.get("SDRUNID").asText());
        assertTrue(vp.get("config_sha256").asText().matches("[0-9a-f]{64}"), vp.toString());
        assertEquals(vp.get("config_sha256").asText(), fp.get("SDCFGSHA").asText());
        assertEquals(String.join(",", relations), vp.get("teff_relations").asText());
        List<String> fitsRelations = new ArrayList<>();
        for (int i = 1; i <= fp.get("SDNTREL").asInt(); i++) {
            fitsRelations.add(fp.get("SDTREL" + i).asText());
        }
        assertEquals(relations, fitsRelations);
        assertEquals(manifest.get("version").asText(), vp.get("derive_version").asText());
        assertEquals(manifest.get("version").asText(), fp.get("SDVERSN").asText());
        assertTrue(fp.get("CREATOR").asText().startsWith("starderive "), fp.toString());
    }

    /** The text value of a FITS header keyword, or null when absent. */
    private static String card(nom.tam.fits.Header h, String key) {
        return h.containsKey(key) ? h.getStringValue(key) : null;
    }

    @Test
    void demoCatalogueRoundTripReadByNomTamFitsAndTheJdkXmlParser() throws Exception {
        // the demo: the synthetic Kestrel survey with its config, derived in the default layout
        Path survey = tmp.resolve("kestrel");
        org.starderive.sample.SampleSurvey.writeSingle(spark, 400, 7, survey.toString(), 1,
                org.apache.spark.sql.SaveMode.ErrorIfExists);
        Path demo = tmp.resolve("kestrel-derived");
        CliRunner d = CliRunner.run("derive", "--input", survey.resolve("stars").toString(), "--output", demo.toString(),
                "--config", ProjectFiles.path("sample-survey", "config", "kestrel.yaml").toString());
        assertEquals(0, d.exitCode, d.toString());
        Path fits = tmp.resolve("kestrel.fits");
        Path vot = tmp.resolve("kestrel.vot");
        for (Map.Entry<Path, String> e : Map.of(fits, "fits", vot, "votable").entrySet()) {
            CliRunner r = CliRunner.run("export", "--catalog", demo.toString(), "--out", e.getKey().toString(),
                    "--format", e.getValue());
            assertEquals(0, r.exitCode, r.toString());
        }
        StructType schema = spark.read().parquet(demo.toString()).schema();
        String id = schema.fields()[0].name();
        Map<Long, Row> cat = new HashMap<>();
        for (Row r : spark.read().parquet(demo.toString()).collectAsList()) {
            cat.put(r.getLong(0), r);
        }
        assertEquals(400, cat.size());
        int compared = 0;

        // FITS, read by nom-tam-fits: HDU 1 is the binary table (FITS 4.0 section 7.3); TTYPEn, TUNITn, TUCDn, TNULLn
        try (nom.tam.fits.Fits f = new nom.tam.fits.Fits(fits.toFile())) {
            nom.tam.fits.BinaryTableHDU h = (nom.tam.fits.BinaryTableHDU) f.getHDU(1);
            nom.tam.fits.Header hdr = h.getHeader();
            nom.tam.fits.BinaryTable t = h.getData();
            assertEquals(cat.size(), h.getNRows(), "fits rows");
            assertEquals(schema.size(), h.getNCols(), "fits columns");
            int idCol = h.findColumn(id);
            java.util.Set<Long> seen = new java.util.HashSet<>();
            for (StructField sf : schema.fields()) {
                int c = h.findColumn(sf.name());
                assertTrue(c >= 0, "fits column " + sf.name());
                int n = c + 1;
                String unit = sf.metadata().contains(DerivedSchema.META_UNIT) ? sf.metadata().getString(DerivedSchema.META_UNIT) : null;
                assertEquals(unit == null || unit.isEmpty() ? null : unit, card(hdr, "TUNIT" + n), "fits unit " + sf.name());
                if (sf.metadata().contains(DerivedSchema.META_UCD)) {
                    assertEquals(sf.metadata().getString(DerivedSchema.META_UCD), card(hdr, "TUCD" + n), "fits UCD " + sf.name());
                }
            }
            assertEquals("meta.id;meta.main", card(hdr, "TUCD" + (idCol + 1)));
            for (int i = 0; i < h.getNRows(); i++) {
                long starId = ((Number) t.get(i, idCol)).longValue();
                assertTrue(seen.add(starId), "fits id once: " + starId);
                Row r = cat.get(starId);
                assertNotNull(r, "fits id " + starId);
                for (int k = 0; k < schema.size(); k++) {
                    StructField sf = schema.fields()[k];
                    int c = h.findColumn(sf.name());
                    Object x = t.get(i, c);
                    String where = "fits id " + starId + " " + sf.name();
                    if (x != null && x.getClass().isArray()) {
                        x = java.lang.reflect.Array.getLength(x) == 0 ? null : java.lang.reflect.Array.get(x, 0);
                    }
                    if (r.isNullAt(k)) {
                        if (x instanceof Double || x instanceof Float) {
                            assertTrue(Double.isNaN(((Number) x).doubleValue()), where + ": NaN for null, got " + x);
                        } else if (x instanceof Number) {
                            assertEquals(Long.parseLong(card(hdr, "TNULL" + (c + 1)).trim()), ((Number) x).longValue(),
                                    where + ": TNULL for null");
                        } else {
                            assertTrue(x == null || String.valueOf(x).isBlank(), where + ": blank for null, got " + x);
                        }
                    } else if (r.get(k) instanceof Float) {
                        assertEquals(r.getFloat(k), ((Number) x).floatValue(), 0f, where);
                    } else if (r.get(k) instanceof Double) {
                        assertEquals(r.getDouble(k), ((Number) x).doubleValue(), 0.0, where);
                    } else if (r.get(k) instanceof Number) {
                        assertEquals(((Number) r.get(k)).longValue(), ((Number) x).longValue(), where);
                    } else if (r.get(k) instanceof Boolean) {
                        assertEquals(r.getBoolean(k), x, where);
                    } else if (sf.dataType() instanceof org.apache.spark.sql.types.ArrayType) {
                        String joined = String.join("|", r.<String>getList(k));
                        assertEquals(joined, x == null ? "" : String.valueOf(x).trim(), where);
                    } else {
                        assertEquals(r.getString(k), String.valueOf(x).trim(), where);
                    }
                    compared++;
                }
            }
        }

        // VOTable, read by the JDK's XML parser: FIELD unit and ucd, one TD per cell (IVOA VOTable 1.4)
        Document doc = DocumentBuilderFactory.newInstance().newDocumentBuilder().parse(vot.toFile());
        NodeList fieldNodes = doc.getElementsByTagName("FIELD");
        assertEquals(schema.size(), fieldNodes.getLength(), "votable columns");
        Map<String, Element> fields = new HashMap<>();
        List<String> order = new ArrayList<>();
        for (int i = 0; i < fieldNodes.getLength(); i++) {
            Element e = (Element) fieldNodes.item(i);
            fields.put(e.getAttribute("name"), e);
            order.add(e.getAttribute("name"));
        }
        for (StructField sf : schema.fields()) {
            Element e = fields.get(sf.name());
            assertNotNull(e, "votable column " + sf.name());
            String unit = sf.metadata().contains(DerivedSchema.META_UNIT) ? sf.metadata().getString(DerivedSchema.META_UNIT) : "";
            assertEquals(unit, e.getAttribute("unit"), "votable unit " + sf.name());
            if (sf.metadata().contains(DerivedSchema.META_UCD)) {
                assertEquals(sf.metadata().getString(DerivedSchema.META_UCD), e.getAttribute("ucd"), "votable UCD " + sf.name());
            }
        }
        List<String> ignored = new ArrayList<>();
        List<List<String>> rows = votableRows(vot, ignored);
        assertEquals(cat.size(), rows.size(), "votable rows");
        java.util.Set<Long> seenV = new java.util.HashSet<>();
        for (List<String> tds : rows) {
            long starId = Long.parseLong(tds.get(order.indexOf(id)).trim());
            assertTrue(seenV.add(starId), "votable id once: " + starId);
            Row r = cat.get(starId);
            assertNotNull(r, "votable id " + starId);
            for (int k = 0; k < schema.size(); k++) {
                StructField sf = schema.fields()[k];
                Element fe = fields.get(sf.name());
                String td = tds.get(order.indexOf(sf.name())).trim();
                String where = "votable id " + starId + " " + sf.name();
                if (r.isNullAt(k)) {
                    NodeList values = fe.getElementsByTagName("VALUES");
                    String nullValue = values.getLength() > 0 ? ((Element) values.item(0)).getAttribute("null") : "";
                    assertTrue(td.isEmpty() || td.equals("NaN") || td.equals(nullValue), where + ": null as '" + td + "'");
                } else if (r.get(k) instanceof Float) {
                    assertEquals(r.getFloat(k), Float.parseFloat(td), 0f, where);
                } else if (r.get(k) instanceof Double) {
                    assertEquals(r.getDouble(k), Double.parseDouble(td), 0.0, where);
                } else if (r.get(k) instanceof Number) {
                    assertEquals(((Number) r.get(k)).longValue(), Long.parseLong(td), where);
                } else if (r.get(k) instanceof Boolean) {
                    assertEquals(r.getBoolean(k) ? "T" : "F", td.substring(0, 1).toUpperCase(), where);
                } else if (sf.dataType() instanceof org.apache.spark.sql.types.ArrayType) {
                    assertEquals(String.join("|", r.<String>getList(k)), td, where);
                } else {
                    assertEquals(r.getString(k), td, where);
                }
                compared++;
            }
        }
        assertEquals(2 * 400 * schema.size(), compared, "every cell of both files compared");
    }

    /** The VOTable read with the JDK's XML parser: FIELD names and the TD texts of each TR. */
    private static List<List<String>> votableRows(Path vot, List<String> fieldsOut) throws Exception {
        Document d = DocumentBuilderFactory.newInstance().newDocumentBuilder().parse(vot.toFile());
        NodeList fields = d.getElementsByTagName("FIELD");
        for (int i = 0; i < fields.getLength(); i++) {
            fieldsOut.add(((Element) fields.item(i)).getAttribute("name"));
        }
        List<List<String>> rows = new ArrayList<>();
        NodeList trs = d.getElementsByTagName("TR");
        for (int i = 0; i < trs.getLength(); i++) {
            NodeList tds = ((Element) trs.item(i)).getElementsByTagName("TD");
            List<String> row = new ArrayList<>();
            for (int j = 0; j < tds.getLength(); j++) {
                row.add(tds.item(j).getTextContent());
            }
            rows.add(row);
        }
        return rows;
    }

    @Test
    void selectionByFlagsColumnsAndLimit() throws Exception {
        // two flags that some rows have and others not (one read of the flag column)
        List<Long> allFlags = new ArrayList<>();
        spark.read().parquet(catalog.toString()).select("flags").collectAsList().forEach(x -> allFlags.add(x.getLong(0)));
        List<QualityFlag> some = new ArrayList<>();
        for (QualityFlag q : QualityFlag.values()) {
            long n = allFlags.stream().filter(q::isSet).count();
            if (n > 0 && n < 30 && some.size() < 2) {
                some.add(q);
            }
        }
        assertEquals(2, some.size(), "the test catalogue has rows with and without two flags");
        long mask = some.get(0).mask() | some.get(1).mask();
        long expected = spark.read().parquet(catalog.toString()).where("(flags & " + mask + ") = 0").count();
        assertTrue(expected > 0 && expected < 60, "rows of both kinds: " + expected);

        Path vot = tmp.resolve("core.vot");
        CliRunner r = export(vot, "votable", "--columns", "core", "--exclude-flags", some.get(0).name() + "," + some.get(1).name());
        assertEquals(0, r.exitCode, r.toString());
        List<String> fields = new ArrayList<>();
        List<List<String>> rows = votableRows(vot, fields);
        assertEquals(expected, rows.size());
        List<String> core = new ArrayList<>(List.of("star_id", "tile"));
        for (String n : DerivedSchema.names()) {
            if (DerivedSchema.CORE.contains(n)) {
                core.add(n);
            }
        }
        assertEquals(core.stream().sorted().toList(), fields.stream().sorted().toList());
        int flagsAt = fields.indexOf("flags");
        for (List<String> row : rows) {
            assertEquals(0, Long.parseLong(row.get(flagsAt)) & mask, "excluded flags absent: " + row);
        }

        // the same mask as a number; a row limit takes the first rows in id order
        Path lim = tmp.resolve("limit.vot");
        CliRunner r2 = export(lim, "votable", "--columns", "star_id,teff_k", "--exclude-flags", Long.toString(mask),
                "--limit", "5");
        assertEquals(0, r2.exitCode, r2.toString());
        List<String> f2 = new ArrayList<>();
        List<List<String>> rows2 = votableRows(lim, f2);
        assertEquals(List.of("star_id", "teff_k"), f2);
        List<String> firstIds = new ArrayList<>();
        spark.read().parquet(catalog.toString()).where("(flags & " + mask + ") = 0").orderBy("star_id").limit(5)
                .collectAsList().forEach(x -> firstIds.add(Long.toString(x.getLong(x.fieldIndex("star_id")))));
        assertEquals(firstIds, rows2.stream().map(x -> x.get(0)).toList());
    }

    private static List<String> leftovers() throws IOException {
        try (Stream<Path> s = Files.list(tmp)) {
            return s.map(p -> p.getFileName().toString()).filter(n -> n.contains(".partial-")).toList();
        }
    }

    @Test
    void refusalsWriteNothingAndKeepTheExistingFile() throws Exception {
        // a selection above --max-rows: exit 2 before anything is written
        Path big = tmp.resolve("big.fits");
        CliRunner r = export(big, "fits", "--max-rows", "10");
        assertEquals(2, r.exitCode, r.toString());
        assertTrue(r.err.contains("60 rows, more than --max-rows 10"), r.err);
        assertFalse(r.err.contains("\tat "), "no stack trace: " + r.err);
        // the progress display names the step that refused, then the refusal follows on a line of its own
        assertTrue(r.err.matches("(?s).*\\[export [0-9:]+\\] check_output started\n.*\\] open_catalog started\n.*"
                + "\\] count_selection stopped after [^\n]*\nstarderive: Selection .*"), r.err);
        assertFalse(Files.exists(big));

        // an unknown column: exit 2 naming it
        CliRunner bad = export(big, "fits", "--columns", "star_id,teff_kelvin");
        assertEquals(2, bad.exitCode, bad.toString());
        assertTrue(bad.err.contains("'teff_kelvin'"), bad.err);

        // not a derived catalogue (no manifest): exit 3 naming the file
        Path notCat = tmp.resolve("in");
        CliRunner nc = CliRunner.run("export", "--catalog", notCat.toString(), "--out", big.toString(), "--format", "fits");
        assertEquals(3, nc.exitCode, nc.toString());
        assertTrue(nc.err.contains(RunManifest.FILE_NAME), nc.err);

        // an existing file is kept unless --overwrite
        Path out = tmp.resolve("kept.fits");
        byte[] before = "previous export".getBytes(StandardCharsets.UTF_8);
        Files.write(out, before);
        CliRunner ex = export(out, "fits");
        assertEquals(4, ex.exitCode, ex.toString());
        assertArrayEquals(before, Files.readAllBytes(out));

        // a failure after the table is written but before the rename: exit 4, old file intact, no partial file left
        TestHooks.beforeExportRename = p -> {
            throw new java.io.UncheckedIOException(new IOException("injected: disk gone before the rename"));
        };
        try {
            CliRunner failed = export(out, "fits", "--overwrite");
            assertEquals(4, failed.exitCode, failed.toString());
            assertTrue(failed.err.contains("Nothing was written"), failed.err);
        } finally {
            TestHooks.beforeExportRename = null;
        }
        assertArrayEquals(before, Files.readAllBytes(out));
        assertEquals(List.of(), leftovers());

        // --overwrite replaces it with a FITS file (FITS 4.0: the primary header starts with SIMPLE = T)
        CliRunner ok = export(out, "fits", "--overwrite");
        assertEquals(0, ok.exitCode, ok.toString());
        byte[] head = java.util.Arrays.copyOf(Files.readAllBytes(out), 30);
        assertEquals("SIMPLE  =                    T", new String(head, StandardCharsets.US_ASCII));
        assertEquals(0, Files.size(out) % 2880, "FITS files are whole 2880-byte blocks");
        assertEquals(List.of(), leftovers());
    }
}
