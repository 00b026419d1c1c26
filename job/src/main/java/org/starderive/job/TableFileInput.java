package org.starderive.job;

import java.io.BufferedInputStream;
import java.io.EOFException;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import javax.xml.XMLConstants;
import javax.xml.parsers.SAXParser;
import javax.xml.parsers.SAXParserFactory;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.Band;
import org.starderive.udf.StarColumns;
import org.xml.sax.Attributes;
import org.xml.sax.SAXException;
import org.xml.sax.helpers.DefaultHandler;
import uk.ac.starlink.fits.FitsTableBuilder;
import uk.ac.starlink.table.ColumnInfo;
import uk.ac.starlink.table.StarTable;
import uk.ac.starlink.table.TableBuilder;
import uk.ac.starlink.table.TableSink;
import uk.ac.starlink.votable.VOTableBuilder;

/**
 * FITS and VOTable input tables ({@code --input-format fits|votable}), for catalogues that fit one machine: each file
 * is read on the driver by the Starlink Tables Infrastructure Library (STIL: its FITS binary/ASCII table reader, the
 * first table extension of the file; its VOTable reader, the first TABLE of the document, any serialisation), row by
 * row, into Spark rows; the Dataset is then distributed, so the rest of the pipeline is the same as for Parquet.
 * A gzip- or bzip2-compressed file ({@code .fits.gz} as archives serve them) is decompressed while it is read.
 *
 * <p>Rules, each a refusal (exit 3) naming the file, the column where there is one, and the rule, before anything
 * is written:
 * <ul>
 *   <li>size: at most {@link JobConfig#fitsVotableMaxRows()} rows per table (all its files together). A FITS
 *       header declares its row count, so a FITS file above the limit is refused before any row is read; a VOTable
 *       is refused at the first row past the limit (the rows are counted while the file is read).</li>
 *   <li>a file that is not complete: truncated FITS (fewer bytes than its header declares), a FITS or VOTable the
 *       library cannot read, an empty file;</li>
 *   <li>VOTable TABLEDATA: a cell of a numeric FIELD that is not a number ({@link #checkVotableCells}; STIL itself
 *       reads such a cell as null, silently, so the job checks the text first with the JDK's SAX parser);</li>
 *   <li>units: a column mapped to the parallax or its error, a magnitude or its error, E(B-V) or A_V, that carries
 *       a unit in the file, must carry the configured one ({@link #checkUnit}). A column without a unit is accepted;</li>
 *   <li>every file of one table has the same columns with the same types; no {@code key=value} partition folders.</li>
 * </ul>
 *
 * <p>Nulls: FITS integer columns with TNULL, VOTable {@code VALUES null} and empty cells, FITS blank strings come
 * as null from STIL; NaN in a floating-point column is the null value of both formats (FITS 4.0 section 5.3, VOTable
 * 1.4 section 6; section numbers from memory) and becomes null too, so that a FITS file and a Parquet file with
 * nulls give the same rows.
 */
final class TableFileInput {
    private TableFileInput() {}

    static final String FITS = "fits";
    static final String VOTABLE = "votable";

    /** The rows of one table, with the Spark schema and the row count. */
    static final class Result {
        final Dataset<Row> data;
        final long rows;

        Result(Dataset<Row> data, long rows) {
            this.data = data;
            this.rows = rows;
        }
    }

    /** Unit spellings accepted for each configured parallax unit and for magnitudes (compared without case). */
    static final Map<String, Set<String>> SPELLINGS = Map.of(
            "mas", Set.of("mas", "marcsec", "milliarcsec", "milliarcsecond", "milliarcseconds"),
            "arcsec", Set.of("arcsec", "arcsecond", "arcseconds", "asec"),
            "uas", Set.of("uas", "uarcsec", "\u00b5as", "\u03bcas", "\u00b5arcsec", "microarcsec", "microarcsecond",
                    "microarcseconds"),
            "mag", Set.of("mag", "mags", "magnitude", "magnitudes"));

    /** Stops the reading of a file at the first row past the limit. */
    private static final class TooManyRows extends RuntimeException {
        private static final long serialVersionUID = 1L;

        TooManyRows() { super(null, null, false, false); }
    }

    static Result read(SparkSession spark, String role, List<String> files, String format, JobConfig config) {
        Configuration conf = spark.sparkContext().hadoopConfiguration();
        long limit = config.fitsVotableMaxRows();
        StructType schema = null;
        String schemaFile = null;
        List<Row> rows = new ArrayList<>();
        for (String file : files) {
            long before = rows.size();
            if (format.equals(VOTABLE)) {
                checkVotableCells(conf, role, file, limit - before, limit);
            }
            StructType fileSchema = readOne(conf, role, file, format, config, limit, rows);
            if (schema == null) {
                schema = fileSchema;
                schemaFile = file;
            } else if (!schema.equals(fileSchema)) {
                throw JobException.input("Input " + role + ": columns differ between files " + schemaFile + " and " + file
                        + " (" + firstDifference(schema, fileSchema)
                        + ") (rule: every file of a table has the same columns and types)");
            }
        }
        JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
        int slices = (int) Math.max(1, Math.min(spark.sparkContext().defaultParallelism(), rows.size() / 1000 + 1));
        Dataset<Row> data = spark.createDataFrame(jsc.parallelize(rows, slices), schema);
        return new Result(data, rows.size());
    }

    private static String firstDifference(StructType a, StructType b) {
        for (StructField f : a.fields()) {
            if (!b.getFieldIndex(f.name()).isDefined()) {
                return "column '" + f.name() + "' only in the first";
            }
            DataType tb = b.apply(f.name()).dataType();
            if (!tb.equals(f.dataType())) {
                return "column '" + f.name() + "' is " + f.dataType().simpleString() + " in the first, " + tb.simpleString()
                        + " in the second";
            }
        }
        for (StructField f : b.fields()) {
            if (!a.getFieldIndex(f.name()).isDefined()) {
                return "column '" + f.name() + "' only in the second";
            }
        }
        return "column order differs";
    }

    private static InputStream open(Configuration conf, String role, String file) {
        Path p = new Path(file);
        try {
            FileSystem fs = p.getFileSystem(conf);
            // gzip, bzip2 and Unix compress are recognised by their first bytes and decompressed as they are read
            InputStream raw = new BufferedInputStream(fs.open(p), 1 << 16);
            return new BufferedInputStream(uk.ac.starlink.util.Compression.decompressStatic(raw), 1 << 16);
        } catch (IOException e) {
            throw JobException.input("Input " + role + " file " + file + ": cannot be opened (" + e.getMessage()
                    + ") (rule: every input file must be readable)");
        }
    }

    private static String what(String format) {
        return format.equals(FITS) ? "a complete FITS file with a table extension" : "a complete VOTable document with a TABLE";
    }

    /** Reads one file with STIL into {@code rows}; returns its Spark schema. */
    private static StructType readOne(Configuration conf, String role, String file, String format, JobConfig config,
                                      long limit, List<Row> rows) {
        TableBuilder builder = format.equals(FITS) ? new FitsTableBuilder() : new VOTableBuilder();
        long start = rows.size();
        final StructType[] schema = new StructType[1];
        final long[] declared = {-1};
        final Class<?>[][] classes = new Class<?>[1][];
        TableSink sink = new TableSink() {
            @Override
            public void acceptMetadata(StarTable meta) {
                int n = meta.getColumnCount();
                StructField[] fields = new StructField[n];
                classes[0] = new Class<?>[n];
                for (int i = 0; i < n; i++) {
                    ColumnInfo ci = meta.getColumnInfo(i);
                    classes[0][i] = ci.getContentClass();
                    fields[i] = new StructField(ci.getName(), sparkType(role, file, ci), true,
                            org.apache.spark.sql.types.Metadata.empty());
                    checkUnit(role, file, ci.getName(), ci.getUnitString(), config);
                }
                schema[0] = new StructType(fields);
                declared[0] = meta.getRowCount();
                if (declared[0] >= 0 && start + declared[0] > limit) {
                    throw tooMany(role, file, start + declared[0], limit, format);
                }
            }

            @Override
            public void acceptRow(Object[] row) {
                if (rows.size() >= limit) {
                    throw new TooManyRows();
                }
                Object[] v = new Object[row.length];
                for (int i = 0; i < row.length; i++) {
                    v[i] = sparkValue(row[i]);
                }
                rows.add(RowFactory.create(v));
            }

            @Override
            public void endRows() {
                // nothing to do: the caller checks the count
            }
        };
        try (InputStream in = open(conf, role, file)) {
            if (format.equals(FITS)) {
                checkFitsSignature(in, role, file);
            }
            builder.streamStarTable(in, sink, null);
        } catch (TooManyRows e) {
            throw tooMany(role, file, limit + 1, limit, format);
        } catch (JobException e) {
            throw e;
        } catch (EOFException e) {
            throw JobException.input("Input " + role + " file " + file + ": truncated, the file ends before its data does"
                    + (e.getMessage() == null ? "" : " (" + e.getMessage() + ")") + " (rule: every input file must be "
                    + what(format) + ")");
        } catch (IOException | RuntimeException e) {
            throw JobException.input("Input " + role + " file " + file + ": not readable as " + shown(format) + " ("
                    + (e.getMessage() == null ? (format.equals(VOTABLE) ? "no VOTable document with a TABLE found"
                    : e.getClass().getSimpleName()) : e.getMessage()) + ") (rule: every input file must be " + what(format) + ")");
        }
        if (schema[0] == null) {
            throw JobException.input("Input " + role + " file " + file + ": no table found (rule: every input file must be "
                    + what(format) + ")");
        }
        long read = rows.size() - start;
        if (declared[0] >= 0 && read != declared[0]) {
            throw JobException.input("Input " + role + " file " + file + ": truncated, " + read + " rows read of the "
                    + declared[0] + " its header declares (rule: every input file must be " + what(format) + ")");
        }
        return schema[0];
    }

    private static String shown(String format) {
        return format.equals(FITS) ? "FITS" : "VOTable";
    }

    /** FITS signature (FITS 4.0 section 4.4.1.1, section number from memory): a file begins with {@code SIMPLE  =}. */
    private static final byte[] FITS_START = "SIMPLE  =".getBytes(java.nio.charset.StandardCharsets.US_ASCII);

    /**
     * Refuses a file that is empty or does not begin as a FITS file, so that the message says so (the library's own
     * error for such a file is an end-of-file one that would read as a truncation). Only the first 9 bytes are read;
     * the stream is reset for the library.
     */
    private static void checkFitsSignature(InputStream in, String role, String file) throws IOException {
        in.mark(FITS_START.length);
        byte[] head = in.readNBytes(FITS_START.length);
        in.reset();
        if (head.length == 0) {
            throw JobException.input("Input " + role + " file " + file + ": empty file, 0 bytes (rule: every input file must be "
                    + what(FITS) + ")");
        }
        if (!java.util.Arrays.equals(head, FITS_START)) {
            throw JobException.input("Input " + role + " file " + file + ": not a FITS file, it does not begin with 'SIMPLE  =' "
                    + "(rule: every input file must be " + what(FITS) + ", whose first header card is SIMPLE)");
        }
    }

    private static JobException tooMany(String role, String file, long rows, long limit, String format) {
        return JobException.input("Input " + role + " file " + file + ": " + (rows > limit ? "more than " + limit : rows)
                + " rows in the table (rule: a " + shown(format) + " input table is read into the driver's "
                + "memory, at most input.fits_votable_max_rows = " + limit + " rows; convert it to Parquet, or raise the "
                + "limit if the driver has the memory). Nothing was written.");
    }

    /** The Spark type of a STIL column class; arrays become Spark arrays. */
    static DataType sparkType(String role, String file, ColumnInfo ci) {
        Class<?> c = ci.getContentClass();
        DataType scalar = scalarType(c);
        if (scalar != null) {
            return scalar;
        }
        if (c.isArray() && scalarType(boxed(c.getComponentType())) != null) {
            return DataTypes.createArrayType(scalarType(boxed(c.getComponentType())), true);
        }
        throw JobException.input("Input " + role + " file " + file + ": column '" + ci.getName() + "' holds "
                + c.getSimpleName() + " values (rule: numbers, booleans, text and arrays of them)");
    }

    private static DataType scalarType(Class<?> c) {
        if (c == Double.class) return DataTypes.DoubleType;
        if (c == Float.class) return DataTypes.FloatType;
        if (c == Long.class) return DataTypes.LongType;
        if (c == Integer.class) return DataTypes.IntegerType;
        if (c == Short.class) return DataTypes.ShortType;
        if (c == Byte.class) return DataTypes.ByteType;
        if (c == Boolean.class) return DataTypes.BooleanType;
        if (c == String.class || c == Character.class) return DataTypes.StringType;
        return null;
    }

    private static Class<?> boxed(Class<?> c) {
        if (c == double.class) return Double.class;
        if (c == float.class) return Float.class;
        if (c == long.class) return Long.class;
        if (c == int.class) return Integer.class;
        if (c == short.class) return Short.class;
        if (c == byte.class) return Byte.class;
        if (c == boolean.class) return Boolean.class;
        if (c == char.class) return Character.class;
        return c;
    }

    /** A STIL cell as Spark wants it: NaN as null (also inside arrays), characters as text, arrays as Scala lists. */
    static Object sparkValue(Object x) {
        if (x == null) {
            return null;
        }
        if (x instanceof Double) {
            return ((Double) x).isNaN() ? null : x;
        }
        if (x instanceof Float) {
            return ((Float) x).isNaN() ? null : x;
        }
        if (x instanceof Character) {
            return x.toString();
        }
        if (x.getClass().isArray()) {
            int n = java.lang.reflect.Array.getLength(x);
            List<Object> l = new ArrayList<>(n);
            for (int i = 0; i < n; i++) {
                Object e = java.lang.reflect.Array.get(x, i);
                if (e instanceof Double && ((Double) e).isNaN() || e instanceof Float && ((Float) e).isNaN()) {
                    e = null;
                }
                l.add(e instanceof Character ? e.toString() : e);
            }
            // a Scala Seq: what a Spark Row holds for an array column (a java.util.List is refused by the encoder)
            return scala.collection.JavaConverters.asScalaBuffer(l).toList();
        }
        return x;
    }

    /**
     * The unit each mapped column must carry if it carries one: the parallax and its error in the configured
     * {@code columns.parallax_unit}; magnitudes, their errors, E(B-V), its error and A_V in mag.
     */
    static Map<String, String> expectedUnits(JobConfig config) {
        Map<String, String> m = new LinkedHashMap<>();
        String plx = config.parallaxUnit().name().toLowerCase(Locale.ROOT);
        m.put(config.parallaxColumn(), plx);
        m.put(config.parallaxErrColumn(), plx);
        if (!config.explicitBands().isEmpty()) {
            for (JobConfig.BandMapping bm : config.explicitBands().values()) {
                m.putIfAbsent(bm.magColumn, "mag");
                if (bm.err.isColumn()) {
                    m.putIfAbsent(bm.err.column(), "mag");
                }
            }
        } else {
            for (Band b : Band.values()) {
                m.putIfAbsent(StarColumns.mag(b), "mag");
                m.putIfAbsent(StarColumns.magErr(b), "mag");
            }
        }
        m.putIfAbsent(config.ebv().isColumn() ? config.ebv().column() : StarColumns.EBV, "mag");
        m.putIfAbsent(config.ebvErr().isColumn() ? config.ebvErr().column() : StarColumns.EBV_ERR, "mag");
        if (config.av().isColumn()) {
            m.putIfAbsent(config.av().column(), "mag");
        }
        return m;
    }

    /** A unit found in the file on a mapped column must be one of the spellings of the expected unit. */
    static void checkUnit(String role, String file, String column, String unitFound, JobConfig config) {
        if (unitFound == null || unitFound.isBlank()) {
            return;
        }
        String expected = expectedUnits(config).get(column);
        if (expected == null) {
            return;
        }
        String u = unitFound.trim().toLowerCase(Locale.ROOT);
        if (SPELLINGS.get(expected).contains(u)) {
            return;
        }
        String key = expected.equals("mag") ? "" : " (columns.parallax_unit)";
        throw JobException.input("Input " + role + " file " + file + ": column '" + column + "' has unit '" + unitFound
                + "', expected " + expected + key + " (rule: a unit given in the file must be the configured unit; "
                + "accepted spellings: " + String.join(", ", new java.util.TreeSet<>(SPELLINGS.get(expected)))
                + (expected.equals("mag") ? "" : "; for a parallax in another unit set columns.parallax_unit") + ")");
    }

    /**
     * VOTable TABLEDATA cells of numeric FIELDs (IVOA VOTable 1.4 section 6: integers in decimal or 0x hex, floats
     * with NaN, +Inf, -Inf; an empty cell or the VALUES null value is null; array cells separated by white space)
     * must be numbers. STIL reads a cell that is not as null without a word, which would turn "abc" in a parallax
     * column into a missing parallax: so the text is checked first, here, by the JDK's SAX parser. Also stops at the
     * first row past {@code rowsLeft} (the size limit). Only the first TABLE (the one STIL reads) is checked; BINARY
     * and FITS serialisations hold numbers by construction.
     */
    static void checkVotableCells(Configuration conf, String role, String file, long rowsLeft, long limit) {
        final class Field {
            final String name;
            final String datatype;
            final boolean array;
            String nullValue;

            Field(String name, String datatype, boolean array) {
                this.name = name;
                this.datatype = datatype;
                this.array = array;
            }
        }
        final class Stop extends SAXException {
            private static final long serialVersionUID = 1L;
            final boolean rowsExceeded;

            Stop(boolean rowsExceeded) {
                this.rowsExceeded = rowsExceeded;
            }
        }
        List<Field> fields = new ArrayList<>();
        DefaultHandler h = new DefaultHandler() {
            int tables;
            boolean inTable;
            boolean inTd;
            int col;
            long row;
            final StringBuilder text = new StringBuilder();

            @Override
            public void startElement(String uri, String local, String qName, Attributes a) throws SAXException {
                String n = local.isEmpty() ? qName : local;
                switch (n) {
                    case "TABLE":
                        tables++;
                        inTable = tables == 1;
                        break;
                    case "FIELD":
                        if (inTable) {
                            String as = a.getValue("arraysize");
                            fields.add(new Field(a.getValue("name"), String.valueOf(a.getValue("datatype")),
                                    as != null && !as.equals("1")));
                        }
                        break;
                    case "VALUES":
                        if (inTable && !fields.isEmpty() && a.getValue("null") != null) {
                            fields.get(fields.size() - 1).nullValue = a.getValue("null").trim();
                        }
                        break;
                    case "TR":
                        if (inTable) {
                            col = 0;
                            row++;
                            if (row > rowsLeft) {
                                throw new Stop(true);
                            }
                        }
                        break;
                    case "TD":
                        if (inTable) {
                            inTd = true;
                            text.setLength(0);
                        }
                        break;
                    default:
                        break;
                }
            }

            @Override
            public void characters(char[] ch, int start, int length) {
                if (inTd) {
                    text.append(ch, start, length);
                }
            }

            @Override
            public void endElement(String uri, String local, String qName) throws SAXException {
                String n = local.isEmpty() ? qName : local;
                if (n.equals("TD") && inTable) {
                    inTd = false;
                    if (col < fields.size()) {
                        Field f = fields.get(col);
                        String bad = badNumber(f.datatype, f.array, f.nullValue, text.toString());
                        if (bad != null) {
                            throw JobException.input("Input " + role + " file " + file + ": column '" + f.name + "' row "
                                    + row + " holds '" + shorten(bad) + "', not a number (rule: a cell of a " + f.datatype
                                    + " FIELD holds a number, NaN or +Inf/-Inf for floats, or is empty for null)");
                        }
                    }
                    col++;
                } else if (n.equals("TABLE") && inTable) {
                    throw new Stop(false);
                }
            }
        };
        try (InputStream in = open(conf, role, file)) {
            SAXParserFactory f = SAXParserFactory.newInstance();
            f.setNamespaceAware(true);
            f.setFeature(XMLConstants.FEATURE_SECURE_PROCESSING, true);
            f.setFeature("http://xml.org/sax/features/external-general-entities", false);
            f.setFeature("http://xml.org/sax/features/external-parameter-entities", false);
            f.setFeature("http://apache.org/xml/features/nonvalidating/load-external-dtd", false);
            SAXParser p = f.newSAXParser();
            p.parse(in, h);
        } catch (Stop e) {
            if (e.rowsExceeded) {
                throw tooMany(role, file, limit + 1, limit, VOTABLE);
            }
        } catch (JobException e) {
            throw e;
        } catch (Exception e) {
            // not XML, or broken XML: STIL's reader gives the refusal with its own words
        }
    }

    private static String shorten(String s) {
        String t = s.trim();
        return t.length() > 40 ? t.substring(0, 40) + "..." : t;
    }

    private static final Set<String> INTEGER_TYPES = Set.of("unsignedByte", "short", "int", "long");
    private static final Set<String> FLOAT_TYPES = Set.of("float", "double");

    /** The first token of a cell that is not a number of the FIELD's type, or null when the cell is fine. */
    static String badNumber(String datatype, boolean array, String nullValue, String cell) {
        boolean integer = INTEGER_TYPES.contains(datatype);
        if (!integer && !FLOAT_TYPES.contains(datatype)) {
            return null;
        }
        String t = cell.trim();
        if (t.isEmpty() || t.equals(nullValue)) {
            return null;
        }
        for (String tok : array ? t.split("\\s+") : new String[] {t}) {
            if (tok.equals(nullValue) || (integer ? isInteger(tok) : isFloat(tok))) {
                continue;
            }
            return array ? tok : t;
        }
        return null;
    }

    private static boolean isInteger(String s) {
        try {
            if (s.startsWith("0x") || s.startsWith("0X")) {
                Long.parseUnsignedLong(s.substring(2), 16);
            } else {
                Long.parseLong(s.startsWith("+") ? s.substring(1) : s);
            }
            return true;
        } catch (NumberFormatException e) {
            return false;
        }
    }

    private static boolean isFloat(String s) {
        switch (s) {
            case "NaN": case "+Inf": case "-Inf": case "Inf": case "Infinity": case "+Infinity": case "-Infinity":
                return true;
            default:
                break;
        }
        // plain decimal or exponent notation only (Java's parser would also take hex floats and a d/f suffix)
        return s.matches("[+-]?(\\d+\\.?\\d*|\\.\\d+)([eE][+-]?\\d+)?");
    }
}
