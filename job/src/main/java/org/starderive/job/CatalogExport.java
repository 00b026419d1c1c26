package org.starderive.job;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.Iterator;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.UUID;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.ArrayType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.Metadata;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.QualityFlag;
import org.starderive.udf.DerivedColumn;
import org.starderive.udf.DerivedSchema;
import org.starderive.udf.StarMonteCarloUdf;
import uk.ac.starlink.fits.CardFactory;
import uk.ac.starlink.fits.CardImage;
import uk.ac.starlink.fits.FitsTableWriter;
import uk.ac.starlink.table.ColumnInfo;
import uk.ac.starlink.table.DefaultValueInfo;
import uk.ac.starlink.table.DescribedValue;
import uk.ac.starlink.table.RowListStarTable;
import uk.ac.starlink.table.StarTable;
import uk.ac.starlink.table.StarTableWriter;
import uk.ac.starlink.votable.DataFormat;
import uk.ac.starlink.votable.VOTableVersion;
import uk.ac.starlink.votable.VOTableWriter;

/**
 * Writes a derived catalogue, or a selection of it, to one FITS binary table or one VOTable, for the astronomy
 * toolchain. The file is written by the Starlink Tables Infrastructure Library (STIL); this class only builds the
 * table: every column with its unit (VOUnits), UCD and description from the catalogue's column metadata, and the
 * provenance from the run manifest as table parameters (VOTable PARAMs; FITS header keywords, see {@link #FITS_KEYS}).
 *
 * <p>Order of work: every check that can refuse (catalogue complete, columns known, output free, selection within
 * {@code --max-rows}) runs before the first byte is written. The selection is then collected to the driver and written
 * to a temporary file beside the output ({@code .NAME.partial-UUID}), flushed to disk and renamed into place; a
 * failure deletes the temporary file, so there is never a half-written export under the output name, and an
 * existing file is replaced only with {@code --overwrite} (by one rename).
 */
public final class CatalogExport {
    private CatalogExport() {}

    /** Default of {@code --max-rows}: about 1 GB of driver memory for the widest (all-columns) selection. */
    public static final long DEFAULT_MAX_ROWS = 1_000_000L;

    /** The export formats. */
    public enum Format {
        FITS, VOTABLE;

        static Format parse(String s) {
            if (s == null) {
                throw JobException.config("Missing --format (must be fits or votable)");
            }
            switch (s.toLowerCase(Locale.ROOT)) {
                case "fits": return FITS;
                case "votable": return VOTABLE;
                default: throw JobException.config("Invalid --format: " + s + " (must be fits or votable)");
            }
        }
    }

    /** What to export. */
    public static final class Request {
        public String catalog;
        public Path out;
        public Format format;
        /** Rows with any of these flag bits set are left out; 0 keeps every row. */
        public long excludeFlags;
        /** "all", "core" or a comma-separated list of column names. */
        public String columns = "all";
        /** At most this many rows (in id order); null: no limit. */
        public Long limit;
        public long maxRows = DEFAULT_MAX_ROWS;
        public boolean overwrite;
    }

    /** What was written. */
    public static final class Result {
        public long rows;
        public int columns;
        public long bytes;
        public Path file;
    }

    /**
     * FITS header keywords of the provenance, each the counterpart of the VOTable PARAM of the same meaning (FITS
     * keywords have at most 8 characters). CREATOR is the keyword FITS files commonly use for the writing software.
     */
    static final Map<String, String> FITS_KEYS = Map.of(
            "export_software", "CREATOR",
            "derive_version", "SDVERSN",
            "run_id", "SDRUNID",
            "config_sha256", "SDCFGSHA",
            "exclude_flags_mask", "SDFLGEXC",
            "row_limit", "SDROWLIM",
            "teff_relations_count", "SDNTREL");

    /** Prefix of the numbered FITS keywords holding one colour-Teff relation id each (SDTREL1, SDTREL2 ...). */
    static final String FITS_RELATION_PREFIX = "SDTREL";

    /** Parses --exclude-flags: a number (decimal or 0x hex) or a comma-separated list of flag names. */
    public static long parseFlagMask(String s) {
        if (s == null || s.isBlank()) {
            return 0;
        }
        String t = s.trim();
        try {
            if (t.startsWith("0x") || t.startsWith("0X")) {
                return Long.parseUnsignedLong(t.substring(2), 16);
            }
            if (Character.isDigit(t.charAt(0))) {
                return Long.parseLong(t);
            }
        } catch (NumberFormatException e) {
            throw JobException.config("Invalid --exclude-flags: " + s + " (a number, 0x hex, or flag names separated by commas)");
        }
        long mask = 0;
        for (String name : t.split(",")) {
            try {
                mask |= QualityFlag.valueOf(name.trim()).mask();
            } catch (IllegalArgumentException e) {
                throw JobException.config("Invalid --exclude-flags: unknown flag '" + name.trim()
                        + "' (rule: flag names as in the data dictionary, e.g. BC_UNRELIABLE)");
            }
        }
        return mask;
    }

    public static Result run(SparkSession spark, Request req) {
        return run(spark, req, ProgressReporter.off());
    }

    /** Runs the export, telling {@code progress} when each of its four steps starts. */
    public static Result run(SparkSession spark, Request req, ProgressReporter progress) {
        // 1. the output: a local file whose folder exists; refused now if it exists and --overwrite is not given
        progress.step("check_output");
        Path out = req.out.toAbsolutePath().normalize();
        Path dir = out.getParent();
        if (dir == null || !Files.isDirectory(dir)) {
            throw JobException.output("Output " + out + ": folder " + dir + " does not exist (rule: export writes one "
                    + "file into an existing folder)");
        }
        if (Files.isDirectory(out)) {
            throw JobException.output("Output " + out + " is a folder (rule: export writes one file)");
        }
        if (Files.exists(out) && !req.overwrite) {
            throw JobException.output("Output " + out + " already exists (rule: export never replaces a file unless "
                    + "--overwrite is given)");
        }
        if (req.limit != null && req.limit < 0) {
            throw JobException.config("Invalid --limit: " + req.limit + " (must be >= 0)");
        }
        if (req.maxRows < 0) {
            throw JobException.config("Invalid --max-rows: " + req.maxRows + " (must be >= 0)");
        }

        // 2. the catalogue: complete (manifest present), readable
        progress.step("open_catalog");
        JsonNode manifest = readManifest(spark, req.catalog);
        Dataset<Row> cat;
        try {
            cat = spark.read().parquet(req.catalog);
        } catch (Exception e) {
            throw JobException.input("Catalogue " + req.catalog + ": cannot be read as Parquet (" + firstLine(e) + ")");
        }

        // 3. the selection
        progress.step("count_selection");
        List<String> cols = selectColumns(cat.schema(), manifest, req);
        Dataset<Row> sel = cat;
        if (req.excludeFlags != 0) {
            if (!cat.schema().getFieldIndex("flags").isDefined()) {
                throw JobException.input("Catalogue " + req.catalog + ": no column 'flags' (rule: --exclude-flags needs the "
                        + "flag mask column of a derived catalogue)");
            }
            sel = sel.where(functions.coalesce(functions.col("flags"), functions.lit(0L))
                    .bitwiseAND(functions.lit(req.excludeFlags)).equalTo(0L));
        }
        String idColumn = cat.schema().fields()[0].name();
        List<Column> proj = new ArrayList<>();
        for (String c : cols) {
            proj.add(functions.col("`" + c + "`"));
        }
        sel = sel.select(proj.toArray(new Column[0]));
        if (req.limit != null) {
            // deterministic: the first N rows in the order of the id column (the catalogue's first column)
            sel = sel.orderBy(functions.col("`" + idColumn + "`")).limit((int) Math.min(Integer.MAX_VALUE, req.limit));
        }
        long rows = sel.count();
        if (rows > req.maxRows) {
            throw JobException.config("Selection of catalogue " + req.catalog + " has " + rows + " rows, more than --max-rows "
                    + req.maxRows + " (rule: an export is collected in the driver's memory; narrow it with "
                    + "--exclude-flags, --columns or --limit, or raise --max-rows if the driver has the memory). Nothing was written.");
        }

        // 4. the table, then the file
        progress.step("collect_and_write");
        StructType schema = sel.schema();
        StarTable table = toStarTable(sel, schema, rows);
        addProvenance(table, manifest, req);
        Result r = new Result();
        r.rows = rows;
        r.columns = schema.fields().length;
        r.file = out;
        r.bytes = writeAtomically(table, req, out);
        return r;
    }

    static JsonNode readManifest(SparkSession spark, String catalog) {
        org.apache.hadoop.fs.Path p = new org.apache.hadoop.fs.Path(catalog, RunManifest.FILE_NAME);
        try {
            org.apache.hadoop.fs.FileSystem fs = p.getFileSystem(spark.sparkContext().hadoopConfiguration());
            if (!fs.exists(new org.apache.hadoop.fs.Path(catalog))) {
                throw JobException.input("Catalogue " + catalog + ": does not exist");
            }
            if (!fs.exists(p)) {
                throw JobException.input("Catalogue " + catalog + ": no " + RunManifest.FILE_NAME + " (rule: export reads a "
                        + "complete catalogue written by derive; a folder without its manifest is not one, or is in the middle "
                        + "of a commit)");
            }
            try (java.io.InputStream in = fs.open(p)) {
                return new ObjectMapper().readTree(in);
            }
        } catch (IOException e) {
            throw JobException.input("Catalogue " + catalog + ": manifest " + p + " cannot be read (" + e.getMessage() + ")");
        }
    }

    static List<String> selectColumns(StructType schema, JsonNode manifest, Request req) {
        List<String> all = List.of(schema.fieldNames());
        String spec = req.columns == null ? "all" : req.columns.trim();
        if (spec.equals("all")) {
            return all;
        }
        Set<String> chosen = new LinkedHashSet<>();
        if (spec.equals("core")) {
            // the id (first column), the partition columns, then the core derived columns present, in catalogue order
            chosen.add(all.get(0));
            for (JsonNode pc : manifest.path("partition_columns")) {
                if (all.contains(pc.asText())) {
                    chosen.add(pc.asText());
                }
            }
            for (String c : all) {
                if (DerivedSchema.CORE.contains(c)) {
                    chosen.add(c);
                }
            }
            return new ArrayList<>(chosen);
        }
        for (String c : spec.split(",")) {
            String n = c.trim();
            if (n.isEmpty()) {
                continue;
            }
            if (!all.contains(n)) {
                throw JobException.config("Invalid --columns: catalogue " + req.catalog + " has no column '" + n
                        + "' (rule: all, core, or names of the catalogue's columns separated by commas)");
            }
            chosen.add(n);
        }
        if (chosen.isEmpty()) {
            throw JobException.config("Invalid --columns: '" + req.columns + "' names no column");
        }
        return new ArrayList<>(chosen);
    }

    /** The Java class STIL writes for a Spark type; array&lt;string&gt; becomes one '|'-joined string. */
    static Class<?> javaClass(StructField f) {
        DataType t = f.dataType();
        if (t.equals(DataTypes.FloatType)) return Float.class;
        if (t.equals(DataTypes.DoubleType)) return Double.class;
        if (t.equals(DataTypes.LongType)) return Long.class;
        if (t.equals(DataTypes.IntegerType)) return Integer.class;
        if (t.equals(DataTypes.ShortType) || t.equals(DataTypes.ByteType)) return Short.class;
        if (t.equals(DataTypes.BooleanType)) return Boolean.class;
        if (t.equals(DataTypes.StringType)) return String.class;
        if (t instanceof ArrayType && ((ArrayType) t).elementType().equals(DataTypes.StringType)) return String.class;
        throw JobException.config("Column '" + f.name() + "' has type " + t.simpleString() + ", which export does not "
                + "write (rule: numbers, booleans, strings and string arrays; leave it out with --columns)");
    }

    /** Unit, UCD and description: the column's Spark metadata, else the derived column table, else none. */
    static ColumnInfo columnInfo(StructField f, boolean isId) {
        Metadata m = f.metadata();
        DerivedColumn d = DerivedSchema.byName(f.name());
        if (d == null) {
            d = StarMonteCarloUdf.COLUMNS.stream().filter(c -> c.name().equals(f.name())).findFirst().orElse(null);
        }
        String unit = meta(m, DerivedSchema.META_UNIT, d == null ? "" : d.unit());
        String ucd = meta(m, DerivedSchema.META_UCD, d == null ? (isId ? "meta.id;meta.main" : "") : d.ucd());
        String desc = meta(m, DerivedSchema.META_DESCRIPTION, d == null ? (isId ? "star id" : "") : d.description());
        if (f.dataType() instanceof ArrayType) {
            desc = desc + " ('|'-separated)";
        }
        ColumnInfo ci = new ColumnInfo(f.name(), javaClass(f), desc.isEmpty() ? null : desc);
        if (!unit.isEmpty()) {
            ci.setUnitString(unit);
        }
        if (!ucd.isEmpty()) {
            ci.setUCD(ucd);
        }
        return ci;
    }

    private static String meta(Metadata m, String key, String fallback) {
        return m.contains(key) ? m.getString(key) : fallback;
    }

    static StarTable toStarTable(Dataset<Row> sel, StructType schema, long rows) {
        StructField[] fs = schema.fields();
        ColumnInfo[] infos = new ColumnInfo[fs.length];
        for (int i = 0; i < fs.length; i++) {
            infos[i] = columnInfo(fs[i], i == 0);
        }
        RowListStarTable t = new RowListStarTable(infos);
        t.setName("starderive_catalogue");
        Iterator<Row> it = sel.toLocalIterator();
        while (it.hasNext()) {
            Row r = it.next();
            Object[] v = new Object[fs.length];
            for (int i = 0; i < fs.length; i++) {
                if (r.isNullAt(i)) {
                    continue;
                }
                DataType dt = fs[i].dataType();
                if (dt instanceof ArrayType) {
                    List<Object> parts = r.getList(i);
                    StringBuilder sb = new StringBuilder();
                    for (Object p : parts) {
                        if (sb.length() > 0) {
                            sb.append('|');
                        }
                        sb.append(p);
                    }
                    v[i] = sb.toString();
                } else if (dt.equals(DataTypes.ByteType)) {
                    v[i] = (short) r.getByte(i);
                } else {
                    v[i] = r.get(i);
                }
            }
            t.addRow(v);
        }
        if (t.getRowCount() != rows) {
            // the catalogue changed between the count and the read (a derive replaced it): refuse, write nothing
            throw JobException.input("Catalogue changed while it was exported: " + rows + " rows counted, " + t.getRowCount()
                    + " read (rule: export a catalogue no run is replacing). Nothing was written.");
        }
        return t;
    }

    /** SHA-256 of the manifest's config object, written as compact JSON with keys sorted at every level (Jackson). */
    static String configDigest(JsonNode manifest) {
        try {
            ObjectMapper m = new ObjectMapper().enable(SerializationFeature.ORDER_MAP_ENTRIES_BY_KEYS);
            Object tree = m.convertValue(manifest.path("config"), Object.class);
            byte[] json = m.writeValueAsString(tree).getBytes(StandardCharsets.UTF_8);
            return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(json));
        } catch (IOException | NoSuchAlgorithmException e) {
            throw new IllegalStateException("config digest", e);
        }
    }

    /** The colour-Teff relations the run used (ids from the manifest). */
    static List<String> relations(JsonNode manifest) {
        List<String> ids = new ArrayList<>();
        for (JsonNode r : manifest.path("methods").path("colour_teff_relations")) {
            ids.add(r.path("id").asText());
        }
        return ids;
    }

    static void addProvenance(StarTable t, JsonNode manifest, Request req) {
        param(t, "export_software", "software that wrote this file", "starderive " + RunManifest.version());
        param(t, "derive_version", "starderive version that derived the catalogue", manifest.path("version").asText(""));
        param(t, "run_id", "run id of the derive run (run manifest " + RunManifest.FILE_NAME + ")",
                manifest.path("run_id").asText(""));
        param(t, "config_sha256", "SHA-256 of the run's configuration (the manifest's config object as compact JSON, keys "
                + "sorted)", configDigest(manifest));
        List<String> rel = relations(manifest);
        param(t, "teff_relations", "colour-Teff relations the run used (ids, comma-separated; citations in the manifest)",
                String.join(",", rel));
        t.setParameter(new DescribedValue(new DefaultValueInfo("teff_relations_count", Integer.class,
                "number of colour-Teff relations the run used"), rel.size()));
        t.setParameter(new DescribedValue(new DefaultValueInfo("exclude_flags_mask", Long.class,
                "rows with any of these quality flag bits were left out (0: none)"), req.excludeFlags));
        if (req.limit != null) {
            t.setParameter(new DescribedValue(new DefaultValueInfo("row_limit", Long.class,
                    "at most this many rows, the first in id order"), req.limit));
        }
    }

    private static void param(StarTable t, String name, String description, String value) {
        DefaultValueInfo info = new DefaultValueInfo(name, String.class, description);
        t.setParameter(new DescribedValue(info, value));
    }

    /**
     * STIL's FITS writer puts column metadata into the header but not table parameters; these cards carry them, one
     * keyword per parameter ({@link #FITS_KEYS}), the relation list one relation per numbered keyword so that no value
     * is longer than a FITS card holds.
     */
    static final class ProvenanceFitsWriter extends FitsTableWriter {
        private final List<CardImage> cards = new ArrayList<>();

        ProvenanceFitsWriter(StarTable t) {
            CardFactory cf = CardFactory.STRICT;
            for (Object o : t.getParameters()) {
                DescribedValue dv = (DescribedValue) o;
                String name = dv.getInfo().getName();
                String key = FITS_KEYS.get(name);
                Object v = dv.getValue();
                String comment = name;
                if (key == null) {
                    continue;
                }
                if (v instanceof Number) {
                    cards.add(cf.createIntegerCard(key, ((Number) v).longValue(), comment));
                } else {
                    cards.add(cf.createStringCard(key, String.valueOf(v), comment));
                }
            }
            Object rel = t.getParameterByName("teff_relations").getValue();
            int i = 1;
            for (String id : String.valueOf(rel).split(",")) {
                if (!id.isEmpty()) {
                    cards.add(cf.createStringCard(FITS_RELATION_PREFIX + i, id, "colour-Teff relation " + i));
                    i++;
                }
            }
        }

        @Override
        protected List<CardImage> getMetadataCards() {
            List<CardImage> all = new ArrayList<>(super.getMetadataCards());
            all.addAll(cards);
            return all;
        }
    }

    static StarTableWriter writer(Format f, StarTable t) {
        if (f == Format.FITS) {
            return new ProvenanceFitsWriter(t);
        }
        // TABLEDATA: the encoding every VOTable reader supports, and readable as text
        return new VOTableWriter(DataFormat.TABLEDATA, true, VOTableVersion.V14);
    }

    /** Writes to .NAME.partial-UUID beside the output, forces it to disk, renames it into place. Returns the size. */
    static long writeAtomically(StarTable table, Request req, Path out) {
        Path tmp = out.resolveSibling("." + out.getFileName() + ".partial-" + UUID.randomUUID());
        boolean done = false;
        try {
            try (OutputStream os = new BufferedOutputStream(Files.newOutputStream(tmp, StandardOpenOption.CREATE_NEW,
                    StandardOpenOption.WRITE), 1 << 16)) {
                writer(req.format, table).writeStarTable(table, os);
            }
            try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.WRITE)) {
                ch.force(true);
            }
            TestHooks.beforeExportRename(tmp);
            long size = Files.size(tmp);
            if (req.overwrite) {
                Files.move(tmp, out, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            } else {
                Files.move(tmp, out);
            }
            done = true;
            return size;
        } catch (FileAlreadyExistsException e) {
            throw JobException.output("Output " + out + " appeared while the export was written (rule: export never "
                    + "replaces a file unless --overwrite is given). Nothing was written.");
        } catch (IOException | java.io.UncheckedIOException e) {
            throw JobException.output("Output " + out + ": cannot be written (" + e + "). Nothing was written.");
        } finally {
            if (!done) {
                try {
                    Files.deleteIfExists(tmp);
                } catch (IOException ignored) {
                    // best effort: the partial file has a dot name and never the output's name
                }
            }
        }
    }

    private static String firstLine(Throwable e) {
        String m = String.valueOf(e.getMessage());
        int nl = m.indexOf('\n');
        return nl < 0 ? m : m.substring(0, nl);
    }
}
