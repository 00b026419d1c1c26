package org.starderive.report;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.floor;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.log10;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.when;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.starderive.job.JobException;
import org.starderive.physics.QualityFlag;

/**
 * QA report of any derived catalogue: rows per flag, per partition, distributions of the main parameters and a
 * density-shaded HR diagram, as PNGs tied together by {@code index.md} and {@code index.html}; {@code report.json}
 * holds the numbers. Every figure is a Spark aggregate (binning on the executors); only bin counts reach the driver.
 */
public final class QaReport {
    private QaReport() {}

    /** A histogram's definition: column, transform, range, bin width. */
    static final class Hist {
        final String name;
        final String label;
        final Column value;
        final double lo;
        final double hi;
        final double width;

        Hist(String name, String label, Column value, double lo, double hi, double width) {
            this.name = name;
            this.label = label;
            this.value = value;
            this.lo = lo;
            this.hi = hi;
            this.width = width;
        }
    }

    static final double HR_LOGT_LO = 3.4;
    static final double HR_LOGT_HI = 4.3;
    static final double HR_DX = 0.005;
    static final double HR_LOGL_LO = -3.5;
    static final double HR_LOGL_HI = 5.0;
    static final double HR_DY = 0.05;

    /** Result of a report run: what tests and the command line print. */
    public static final class Result {
        public long rows;
        public Map<String, Long> rowsPerFlag = new LinkedHashMap<>();
        public Map<String, Long> rowsPerPartition = new LinkedHashMap<>();
        public long hrStars;
        public long hrTrustedStars;
        public List<String> files = new ArrayList<>();
    }

    public static Result run(SparkSession spark, String catalog, String outDir) throws IOException {
        Dataset<Row> d;
        try {
            d = spark.read().parquet(catalog);
        } catch (Exception e) {
            throw JobException.input("Catalogue " + catalog + ": cannot be read as Parquet (" + e.getMessage()
                    + ") (rule: report reads a derived catalogue written by derive)");
        }
        for (String c : List.of("flags", "teff_k", "lum_lsun", "radius_rsun", "dist_pc", "mass_msun", "logg_cgs")) {
            if (!d.schema().getFieldIndex(c).isDefined()) {
                throw JobException.input("Catalogue " + catalog + ": missing column '" + c
                        + "' (rule: report reads a derived catalogue written by derive)");
            }
        }
        Path out = Path.of(outDir);
        Files.createDirectories(out);
        Result res = new Result();

        // rows and rows per flag: one pass
        QualityFlag[] flags = QualityFlag.values();
        List<Column> aggs = new ArrayList<>();
        for (QualityFlag f : flags) {
            aggs.add(sum(when(col("flags").bitwiseAND(lit(f.mask())).notEqual(0), 1L).otherwise(0L)));
        }
        Row r = d.agg(count(lit(1)), aggs.toArray(new Column[0])).first();
        res.rows = r.getLong(0);
        for (int i = 0; i < flags.length; i++) {
            res.rowsPerFlag.put(flags[i].name(), r.isNullAt(i + 1) ? 0L : r.getLong(i + 1));
        }

        // per partition
        List<String> partCols = partitionColumns(catalog, spark);
        if (!partCols.isEmpty()) {
            Column[] pc = partCols.stream().map(org.apache.spark.sql.functions::col).toArray(Column[]::new);
            for (Row p : d.groupBy(pc).count().orderBy(pc).collectAsList()) {
                StringBuilder k = new StringBuilder();
                for (int i = 0; i < partCols.size(); i++) {
                    k.append(i == 0 ? "" : "/").append(partCols.get(i)).append('=').append(p.get(i));
                }
                res.rowsPerPartition.put(k.toString(), p.getLong(partCols.size()));
            }
        }

        // distributions
        List<Hist> hists = List.of(
                new Hist("teff", "Teff [K]", col("teff_k"), 2000, 12000, 100),
                new Hist("luminosity", "log10 L / L_sun", log10(col("lum_lsun")), -4, 5, 0.1),
                new Hist("radius", "log10 R / R_sun", log10(col("radius_rsun")), -1.5, 3, 0.05),
                new Hist("distance", "log10 d / pc", log10(col("dist_pc")), 0, 5, 0.05),
                new Hist("mass", "M / M_sun (main sequence)", col("mass_msun"), 0, 10, 0.1),
                new Hist("logg", "log g [cgs]", col("logg_cgs"), 0, 6, 0.1));
        ObjectNode histJson = new ObjectMapper().createObjectNode();
        for (Hist h : hists) {
            int nb = (int) Math.round((h.hi - h.lo) / h.width);
            Column bin = floor(h.value.minus(h.lo).divide(h.width)).cast("int");
            List<Row> rows = d.select(bin.as("b")).filter(col("b").geq(0).and(col("b").lt(nb)))
                    .groupBy("b").count().collectAsList();
            long[] counts = new long[nb];
            double[] lo = new double[nb];
            for (int i = 0; i < nb; i++) {
                lo[i] = h.lo + i * h.width;
            }
            for (Row b : rows) {
                counts[b.getInt(0)] = b.getLong(1);
            }
            File png = out.resolve("hist_" + h.name + ".png").toFile();
            Charts.histogram(png, h.label, h.label, lo, h.width, counts);
            res.files.add(png.getName());
            ArrayNode a = histJson.putArray(h.name);
            for (long c : counts) {
                a.add(c);
            }
        }

        // HR diagrams: all stars with Teff and L, and only those with no flag that says "do not trust"
        res.hrStars = hrDiagram(d, out.resolve("hr_diagram.png").toFile(), "HR diagram, %,d stars with Teff and L");
        res.hrTrustedStars = hrDiagram(d.filter(col("flags").bitwiseAND(lit(UNTRUSTED)).equalTo(0)),
                out.resolve("hr_diagram_trusted.png").toFile(), "HR diagram, %,d stars without warning flags");
        res.files.add(0, "hr_diagram_trusted.png");
        res.files.add(0, "hr_diagram.png");

        writeJson(out.resolve("report.json"), res, catalog, histJson);
        String md = markdown(res, catalog);
        Files.writeString(out.resolve("index.md"), md, StandardCharsets.UTF_8);
        Files.writeString(out.resolve("index.html"), Html.fromReportMarkdown(md, "starderive QA report"), StandardCharsets.UTF_8);
        res.files.add("report.json");
        res.files.add("index.md");
        res.files.add("index.html");
        return res;
    }

    /**
     * Flags after which a star's L or Teff must not be trusted: left out of the "trusted" HR diagram. ID_MISSING is
     * not one: such a row is never paired with another, so its numbers come from its own columns; what it lacks is a
     * way back to its source.
     */
    static final long UNTRUSTED = QualityFlag.PARALLAX_LOW_SNR.mask() | QualityFlag.PARALLAX_NONPOSITIVE.mask()
            | QualityFlag.INPUT_INVALID.mask() | QualityFlag.MAGNITUDE_SENTINEL.mask() | QualityFlag.COLOUR_OUT_OF_RANGE.mask()
            | QualityFlag.TEFF_EXTRAPOLATED.mask() | QualityFlag.TEFF_COLOURS_DISAGREE.mask() | QualityFlag.BC_UNRELIABLE.mask()
            | QualityFlag.DUPLICATE_ID.mask();

    /** Bins log Teff and log L on the executors and draws the density map; returns the stars drawn. */
    private static long hrDiagram(Dataset<Row> d, File png, String titleFormat) throws IOException {
        Column ix = floor(log10(col("teff_k")).minus(HR_LOGT_LO).divide(HR_DX)).cast("int");
        Column iy = floor(log10(col("lum_lsun")).minus(HR_LOGL_LO).divide(HR_DY)).cast("int");
        int nx = (int) Math.round((HR_LOGT_HI - HR_LOGT_LO) / HR_DX);
        int ny = (int) Math.round((HR_LOGL_HI - HR_LOGL_LO) / HR_DY);
        List<Row> cellRows = d.filter(col("teff_k").isNotNull().and(col("lum_lsun").gt(0)))
                .select(ix.as("ix"), iy.as("iy"))
                .filter(col("ix").between(0, nx - 1).and(col("iy").between(0, ny - 1)))
                .groupBy("ix", "iy").count().collectAsList();
        List<double[]> cells = new ArrayList<>();
        long stars = 0;
        for (Row c : cellRows) {
            cells.add(new double[] {HR_LOGT_LO + c.getInt(0) * HR_DX, HR_LOGL_LO + c.getInt(1) * HR_DY, c.getLong(2)});
            stars += c.getLong(2);
        }
        Charts.hrDiagram(png, String.format(titleFormat, stars), cells, HR_DX, HR_DY);
        return stars;
    }

    /** Partition columns from the key=value folders directly under the catalogue. */
    static List<String> partitionColumns(String catalog, SparkSession spark) throws IOException {
        org.apache.hadoop.fs.Path p = new org.apache.hadoop.fs.Path(catalog);
        org.apache.hadoop.fs.FileSystem fs = p.getFileSystem(spark.sparkContext().hadoopConfiguration());
        List<String> cols = new ArrayList<>();
        org.apache.hadoop.fs.Path cur = p;
        while (true) {
            org.apache.hadoop.fs.Path next = null;
            for (org.apache.hadoop.fs.FileStatus st : fs.listStatus(cur)) {
                String n = st.getPath().getName();
                if (st.isDirectory() && n.contains("=") && !n.startsWith(".") && !n.startsWith("_")) {
                    cols.add(n.substring(0, n.indexOf('=')));
                    next = st.getPath();
                    break;
                }
            }
            if (next == null) {
                return cols;
            }
            cur = next;
        }
    }

    private static void writeJson(Path file, Result res, String catalog, ObjectNode hists) throws IOException {
        ObjectMapper m = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);
        ObjectNode n = m.createObjectNode();
        n.put("catalog", catalog);
        n.put("rows", res.rows);
        n.set("rows_per_flag", m.valueToTree(res.rowsPerFlag));
        n.set("rows_per_partition", m.valueToTree(res.rowsPerPartition));
        n.put("hr_diagram_stars", res.hrStars);
        n.put("hr_diagram_trusted_stars", res.hrTrustedStars);
        n.set("histograms", hists);
        Files.writeString(file, m.writeValueAsString(n) + "\n", StandardCharsets.UTF_8);
    }

    private static String markdown(Result res, String catalog) {
        StringBuilder sb = new StringBuilder();
        sb.append("# QA report\n\n");
        sb.append(String.format("Catalogue `%s`: **%,d rows**; %,d stars have both Teff and L and appear in the HR diagram.%n%n",
                catalog, res.rows, res.hrStars));
        sb.append("![HR diagram](hr_diagram.png)\n\n");
        sb.append(String.format("The same for the %,d stars with none of the flags that say a number must not be trusted "
                + "(low-significance or non-positive parallax, invalid or sentinel input, colour out of range, extrapolated "
                + "or disagreeing Teff, unreliable BC, duplicate id):%n%n", res.hrTrustedStars));
        sb.append("![HR diagram, trusted stars](hr_diagram_trusted.png)\n\n");
        sb.append("## Rows per flag\n\n| bit | flag | rows | share |\n|---|---|---|---|\n");
        for (QualityFlag f : QualityFlag.values()) {
            long c = res.rowsPerFlag.get(f.name());
            sb.append(String.format("| %d | `%s` | %,d | %.2f %% |%n", f.bit(), f.name(), c, res.rows == 0 ? 0 : 100.0 * c / res.rows));
        }
        if (!res.rowsPerPartition.isEmpty()) {
            sb.append("\n## Rows per partition\n\n| partition | rows |\n|---|---|\n");
            res.rowsPerPartition.forEach((k, v) -> sb.append(String.format("| %s | %,d |%n", k, v)));
        }
        sb.append("\n## Distributions\n\n");
        for (String f : res.files) {
            if (f.startsWith("hist_")) {
                sb.append("![").append(f).append("](").append(f).append(")\n\n");
            }
        }
        sb.append("Numbers behind every figure: `report.json`.\n");
        return sb.toString();
    }
}
