package org.starderive.job;

import static org.apache.spark.sql.functions.col;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import org.apache.hadoop.conf.Configuration;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.Band;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarResult;
import org.starderive.physics.TeffRelation;
import org.starderive.physics.TeffRelations;
import org.starderive.udf.StarColumns;
import org.starderive.udf.StarInputReader;

/**
 * What a derive run would do, found without writing anything (the {@code check} sub-command). It goes through derive's
 * own start-up steps — {@link DeriveJob#checkRequest}, {@link OutputCommitter#inspect} (the output checks of
 * {@link OutputCommitter#prepare} that only read: no lease, no staging folder), {@link DeriveJob#openInputs} (listings,
 * every Parquet footer, partition folders, the id column) and {@link DerivePipeline#derive} on a sample — so a problem
 * derive would refuse stops check with the same exception: the same message and exit code, the first one only.
 *
 * <p><b>Sample.</b> The first {@code sampleRows} rows of each input table in Spark's file order (deterministic for the
 * same files), collected to the driver. Derive's pipeline (join or duplicate marking, column mapping, UDF, layout) runs
 * on it; the physics core ({@link StarDeriver}, the kernel of derive's UDF) runs on the same canonical inputs in the
 * driver to count the regime, Teff relations and radius and mass routes of each sampled star.
 *
 * <p><b>Bytes per star.</b> The derived sample (without the partition columns, which become folder names) is written
 * twice with derive's Parquet settings to a temporary folder under {@code java.io.tmpdir} — every other row, then all
 * of it, one file each — and the estimate is the difference of the two sizes over the difference of the row counts, so a
 * file's fixed part (footer, page headers) is not charged to the stars; that fixed part is reported per output file.
 * The estimate holds for stars like the sampled ones: a sample from one sky region or one end of a sorted table can be
 * off for the whole survey (more or fewer null columns), and larger row groups compress a little better.
 */
public final class DeriveCheck {
    private DeriveCheck() {}

    /** The report: ordered sections of named values, rendered as text or JSON. */
    public static final class Report {
        final Map<String, Object> sections = new LinkedHashMap<>();
        /** Output columns as a real derive's output reads back: name → Spark SQL type. */
        public final Map<String, String> outputColumns = new LinkedHashMap<>();
        public double bytesPerStar = Double.NaN;
        public double bytesPerFile = Double.NaN;
        public long sampledRows;

        Map<String, Object> section(String name) {
            @SuppressWarnings("unchecked")
            Map<String, Object> m = (Map<String, Object>) sections.computeIfAbsent(name, k -> new LinkedHashMap<String, Object>());
            return m;
        }

        public String json() {
            try {
                return new com.fasterxml.jackson.databind.ObjectMapper().writerWithDefaultPrettyPrinter()
                        .writeValueAsString(sections) + "\n";
            } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
                throw new IllegalStateException(e);
            }
        }

        public String render() {
            StringBuilder sb = new StringBuilder("starderive check: derive would run (nothing was written)\n");
            sections.forEach((name, body) -> {
                sb.append('\n').append(name).append(":\n");
                render(sb, body, "  ");
            });
            return sb.toString();
        }

        private static void render(StringBuilder sb, Object body, String indent) {
            if (body instanceof Map) {
                for (Map.Entry<?, ?> e : ((Map<?, ?>) body).entrySet()) {
                    Object v = e.getValue();
                    if (v instanceof Map || (v instanceof List && !((List<?>) v).isEmpty() && !(((List<?>) v).get(0) instanceof String))) {
                        sb.append(indent).append(e.getKey()).append(":\n");
                        render(sb, v, indent + "  ");
                    } else {
                        sb.append(indent).append(String.format("%-26s %s%n", e.getKey(), v instanceof List
                                ? String.join(", ", castStrings((List<?>) v)) : String.valueOf(v)));
                    }
                }
            } else if (body instanceof List) {
                for (Object o : (List<?>) body) {
                    sb.append(indent).append("- ").append(o).append('\n');
                }
            } else {
                sb.append(indent).append(body).append('\n');
            }
        }

        private static List<String> castStrings(List<?> l) {
            List<String> s = new ArrayList<>();
            for (Object o : l) {
                s.add(String.valueOf(o));
            }
            return s;
        }
    }

    /** Runs derive's checks and the sample; throws derive's {@link JobException} at the first problem derive would refuse. */
    public static Report run(SparkSession spark, DeriveJob.Request req, JobConfig config, int sampleRows) {
        Report r = new Report();
        DeriveJob.checkRequest(req);
        Configuration hconf = spark.sparkContext().hadoopConfiguration();
        OutputCommitter committer = new OutputCommitter(hconf, req.output, "check", req.writeMode);
        String pending = committer.inspect(req.allInputs(), hconf, config.leaseStaleAfterS());
        Map<String, Object> out = r.section("output");
        out.put("path", committer.output().toString());
        out.put("format", req.outputFormat);
        out.put("write_mode", req.writeMode.label());
        out.put("layout", config.layout() + ", columns " + config.columnGroup() + (config.float32() ? ", float32" : "")
                + ", uncertainty " + config.uncertaintyMethod() + (config.monteCarlo() ? " (" + config.draws() + " draws)" : ""));
        if (pending != null) {
            out.put("note", pending);
        }

        DeriveJob.Inputs inputs = DeriveJob.openInputs(spark, req, config);
        String idColumn = inputs.idColumn;
        Map<String, Object> tables = r.section("inputs");
        Map<InputTable, Dataset<Row>> samples = new LinkedHashMap<>();
        long footerRows = 0;
        boolean footersKnown = true;
        for (InputTable t : inputs.tables()) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("paths", t.paths());
            m.put("format", t.format());
            m.put("files", t.fileCount());
            m.put("rows (footers)", t.rowsFromFooters() >= 0 ? String.format("%,d", t.rowsFromFooters()) : "unknown (CSV)");
            m.put("partition columns", t.partitionColumns().isEmpty() ? "none" : String.join(", ", t.partitionColumns()));
            m.put("bands", bandsIn(t.data().schema(), config));
            Dataset<Row> sample = localSample(spark, t.data(), sampleRows);
            samples.put(t, sample);
            m.put("sampled rows", sample.count());
            tables.put(t.role(), m);
            if (t.rowsFromFooters() >= 0) {
                footerRows += t.rowsFromFooters();
            } else {
                footersKnown = false;
            }
        }
        long sampled = 0;
        for (Dataset<Row> s : samples.values()) {
            sampled += s.count();
        }
        // derive refuses a table without rows: with footers the count is known; otherwise an empty first sample means
        // an empty table
        DeriveJob.requireRows(req, footersKnown ? footerRows : sampled);

        DerivePipeline pipeline = inputs.pipeline;
        Dataset<Row> joined;
        if (inputs.twoTables()) {
            Dataset<Row> a = samples.get(inputs.astro);
            Dataset<Row> p = samples.get(inputs.phot);
            joined = pipeline.join(a, inputs.astro.role(), inputs.astro.paths(), p, inputs.phot.role(), inputs.phot.paths());
            r.section("join").putAll(overlap(a, p, idColumn));
        } else {
            Dataset<Row> s = samples.get(inputs.astro);
            joined = pipeline.markDuplicates(s, pipeline.scanIds(s, inputs.tableName()));
        }
        // derive's own mapping and checks (missing or non-numeric columns, R_V with Gaia bands, name collisions)
        Dataset<Row> derived = pipeline.derive(joined, inputs.tableName(), inputs.partitionColumns);
        Map<String, Column> canonical = pipeline.canonicalInputs(joined.schema(), inputs.tableName());
        Map<String, Object> mapping = r.section("column mapping (canonical input <- survey column, in the canonical unit)");
        mapping.put(StarColumns.STAR_ID, idColumn + " (as is)");
        canonical.forEach((name, c) -> {
            String e = c.toString();
            if (!e.equals("CAST(NULL AS DOUBLE)")) {
                mapping.put(name, e + unitNote(name, config));
            }
        });
        List<String> absent = new ArrayList<>();
        canonical.forEach((name, c) -> {
            if (c.toString().equals("CAST(NULL AS DOUBLE)")) {
                absent.add(name);
            }
        });
        mapping.put("not mapped (absent)", absent.isEmpty() ? List.of("none") : absent);

        Dataset<Row> toWrite = req.outputFormat.equals("csv") ? DerivePipeline.forCsv(derived) : derived;
        List<Row> derivedRows = toWrite.collectAsList();
        Dataset<Row> derivedLocal = spark.createDataFrame(derivedRows, toWrite.schema());
        r.sampledRows = derivedRows.size();
        physics(r, joined, canonical, config);
        if (inputs.twoTables()) {
            r.section(r.sections.keySet().stream().filter(k -> k.startsWith("physics")).findFirst().orElseThrow())
                    .put("note", "rows of one table's sample without a partner in the other's lack that table's columns: "
                            + "they count as stars without photometry or parallax here");
        }

        for (StructField f : toWrite.schema().fields()) {
            if (!inputs.partitionColumns.contains(f.name())) {
                r.outputColumns.put(f.name(), f.dataType().simpleString());
            }
        }
        for (String pc : inputs.partitionColumns) {
            r.outputColumns.put(pc, toWrite.schema().apply(pc).dataType().simpleString());
        }
        Map<String, Object> cols = r.section("output columns");
        cols.put("count", r.outputColumns.size());
        List<String> list = new ArrayList<>();
        r.outputColumns.forEach((n, t) -> list.add(n + " " + t));
        cols.put("columns", list);
        cols.put("partition folders", inputs.partitionColumns.isEmpty() ? List.of("none") : inputs.partitionColumns);

        measureBytes(r, derivedLocal, inputs.partitionColumns, req.outputFormat, config.compression());
        Map<String, Object> size = r.section("size");
        size.put("bytes per star", Double.isNaN(r.bytesPerStar) ? "unknown (fewer than 2 derived sample rows)"
                : String.format("%.0f (estimate from the %,d derived sample rows; fixed part %.0f bytes per output file)",
                        r.bytesPerStar, r.sampledRows, r.bytesPerFile));
        if (!Double.isNaN(r.bytesPerStar)) {
            size.put("estimate_bytes_per_star", Math.round(r.bytesPerStar * 10) / 10.0);
            size.put("estimate_fixed_bytes_per_file", Math.round(r.bytesPerFile));
        }
        if (footersKnown && !Double.isNaN(r.bytesPerStar)) {
            String rows = inputs.twoTables()
                    ? String.format("%,d to %,d rows (joined: at least the larger table, at most both)",
                            Math.max(inputs.astro.rowsFromFooters(), inputs.phot.rowsFromFooters()), footerRows)
                    : String.format("%,d rows", footerRows);
            size.put("output rows", rows);
            size.put("output data", String.format("about %s for %,d rows, plus the fixed part per file",
                    human(r.bytesPerStar * (inputs.twoTables() ? Math.max(inputs.astro.rowsFromFooters(),
                            inputs.phot.rowsFromFooters()) : footerRows)),
                    inputs.twoTables() ? Math.max(inputs.astro.rowsFromFooters(), inputs.phot.rowsFromFooters()) : footerRows));
        }
        return r;
    }

    /** The first {@code n} rows of a table, collected to the driver (read once: the same rows for every later step). */
    static Dataset<Row> localSample(SparkSession spark, Dataset<Row> data, int n) {
        List<Row> rows = data.limit(n).collectAsList();
        return spark.createDataFrame(rows, data.schema());
    }

    /** The bands whose magnitude column (as the config maps it) the table holds. */
    private static List<String> bandsIn(StructType schema, JobConfig config) {
        List<String> found = new ArrayList<>();
        for (Band b : Band.values()) {
            String magCol = config.explicitBands().isEmpty() ? StarColumns.mag(b)
                    : config.explicitBands().containsKey(b) ? config.explicitBands().get(b).magColumn : null;
            if (magCol != null && schema.getFieldIndex(magCol).isDefined()) {
                found.add(b.label() + " (" + magCol + ")");
            }
        }
        return found.isEmpty() ? List.of("none") : found;
    }

    private static String unitNote(String canonical, JobConfig config) {
        if (canonical.startsWith("parallax")) {
            return "  [" + config.parallaxUnit().name().toLowerCase(java.util.Locale.ROOT) + " -> mas]";
        }
        return "";
    }

    /** Ids of the astrometry sample found in the photometry sample and back (distinct ids, missing ids left out). */
    private static Map<String, Object> overlap(Dataset<Row> a, Dataset<Row> p, String idColumn) {
        Set<Object> ia = ids(a, idColumn);
        Set<Object> ip = ids(p, idColumn);
        Set<Object> both = new HashSet<>(ia);
        both.retainAll(ip);
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("key", idColumn);
        m.put("sample overlap", String.format("%,d of %,d astrometry ids are in the photometry sample, %,d of %,d the other way",
                both.size(), ia.size(), both.size(), ip.size()));
        m.put("note", "both samples are the tables' first rows: a low overlap may only mean the tables are ordered "
                + "differently; unmatched rows are kept by the full outer join (one side's columns null)");
        return m;
    }

    private static Set<Object> ids(Dataset<Row> d, String idColumn) {
        Set<Object> s = new HashSet<>();
        for (Row row : d.select(col(idColumn)).collectAsList()) {
            Object v = row.get(0);
            if (v != null && !(v instanceof String && ((String) v).isBlank())) {
                s.add(v);
            }
        }
        return s;
    }

    /** The physics core on the sample's canonical inputs: regimes, Teff relations, radius and mass routes. */
    private static void physics(Report r, Dataset<Row> joined, Map<String, Column> canonical, JobConfig config) {
        List<Column> fields = new ArrayList<>();
        for (String f : StarColumns.INPUT_FIELDS) {
            fields.add(canonical.get(f).as(f));
        }
        List<Row> rows = joined.select(org.apache.spark.sql.functions.struct(fields.toArray(new Column[0]))).collectAsList();
        StarDeriver deriver = new StarDeriver(config.settings());
        StarInputReader reader = new StarInputReader();
        StarResult res = new StarResult();
        Map<String, Long> regimes = new TreeMap<>();
        Map<String, Long> relations = new LinkedHashMap<>();
        for (TeffRelation t : TeffRelations.all()) {
            relations.put(t.id(), 0L);
        }
        Map<String, Long> radius = new LinkedHashMap<>();
        Map<String, Long> mass = new LinkedHashMap<>();
        long noDistance = 0;
        for (Row row : rows) {
            deriver.derive(reader.read(row.getStruct(0)), res);
            regimes.merge(res.regime == null ? "none (no Teff)" : res.regime.label(), 1L, Long::sum);
            for (int i = 0; i < TeffRelations.all().size(); i++) {
                if ((res.teffRelations & (1L << i)) != 0) {
                    relations.merge(TeffRelations.all().get(i).id(), 1L, Long::sum);
                }
            }
            radius.merge(route(res.radiusRsun, res.radiusMksWeight, "M_Ks (Mann et al. 2015)",
                    "L from BC_V, Stefan-Boltzmann"), 1L, Long::sum);
            mass.merge(route(res.massMsun, res.massMksWeight, "M_Ks (Mann et al. 2019)",
                    "L (Eker et al. 2018)"), 1L, Long::sum);
            if (Double.isNaN(res.distPc)) {
                noDistance++;
            }
        }
        Map<String, Object> ph = r.section("physics on the sample (" + rows.size() + " rows, the kernel of derive's UDF)");
        ph.put("regime of teff_k", counts(regimes, rows.size()));
        Map<String, Object> rel = new LinkedHashMap<>();
        Set<Band> mapped = mappedBands(canonical);
        for (TeffRelation t : TeffRelations.all()) {
            boolean can = mapped.contains(t.blue()) && mapped.contains(t.red())
                    && (t.aux() != TeffRelation.Aux.JH || (mapped.contains(Band.J) && mapped.contains(Band.H)));
            if (can) {
                rel.put(t.id() + " (" + t.colourName() + ", " + t.regime().label() + ")",
                        String.format("%,d sampled stars", relations.get(t.id())));
            }
        }
        ph.put("Teff relations whose bands are mapped (stars using each)", rel.isEmpty() ? Map.of("none", "no relation's bands are mapped") : rel);
        ph.put("radius route", counts(radius, rows.size()));
        ph.put("mass route", counts(mass, rows.size()));
        ph.put("no distance", String.format("%,d of %,d", noDistance, rows.size()));
    }

    private static String route(double value, double mksWeight, String mks, String other) {
        if (Double.isNaN(value)) {
            return "none";
        }
        if (mksWeight >= 1) {
            return mks;
        }
        if (mksWeight > 0) {
            return "blend of both";
        }
        return other;
    }

    private static Map<String, Object> counts(Map<String, Long> m, long total) {
        Map<String, Object> out = new LinkedHashMap<>();
        m.forEach((k, v) -> out.put(k, String.format("%,d (%.0f %%)", v, total > 0 ? 100.0 * v / total : 0)));
        return out;
    }

    private static Set<Band> mappedBands(Map<String, Column> canonical) {
        Set<Band> s = new HashSet<>();
        for (Band b : Band.values()) {
            Column c = canonical.get(StarColumns.mag(b));
            if (c != null && !c.toString().equals("CAST(NULL AS DOUBLE)")) {
                s.add(b);
            }
        }
        return s;
    }

    /**
     * Writes every other row and then all of the derived sample with derive's writer settings to a temporary folder
     * (java.io.tmpdir on the default file system: the local disk in local mode; removed afterwards) and takes the
     * slope: bytes per star, and the fixed part per file.
     */
    static void measureBytes(Report r, Dataset<Row> derived, List<String> partitionColumns, String format, String compression) {
        long n = r.sampledRows;
        if (n < 2) {
            return;
        }
        Dataset<Row> d = derived.drop(partitionColumns.toArray(new String[0]));
        // every other row: the same mix of stars as the whole sample (the first half would be one end of the id order)
        List<Row> all = d.collectAsList();
        List<Row> even = new ArrayList<>();
        for (int i = 0; i < all.size(); i += 2) {
            even.add(all.get(i));
        }
        long half = even.size();
        Configuration conf = derived.sparkSession().sparkContext().hadoopConfiguration();
        org.apache.hadoop.fs.Path tmp = new org.apache.hadoop.fs.Path(System.getProperty("java.io.tmpdir"),
                "starderive-check-" + java.util.UUID.randomUUID());
        org.apache.hadoop.fs.FileSystem fs;
        try {
            fs = tmp.getFileSystem(conf);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        try {
            long bHalf = writtenBytes(d.sparkSession().createDataFrame(even, d.schema()), fs, new org.apache.hadoop.fs.Path(tmp, "half"), format, compression);
            long bAll = writtenBytes(d, fs, new org.apache.hadoop.fs.Path(tmp, "all"), format, compression);
            r.bytesPerStar = (double) (bAll - bHalf) / (n - half);
            r.bytesPerFile = bAll - r.bytesPerStar * n;
        } finally {
            try {
                fs.delete(tmp, true);
            } catch (IOException e) {
                // a temporary folder left behind is harmless
            }
        }
    }

    private static long writtenBytes(Dataset<Row> d, org.apache.hadoop.fs.FileSystem fs, org.apache.hadoop.fs.Path dir,
                                     String format, String compression) {
        String target = fs.makeQualified(dir).toString();
        org.apache.spark.sql.DataFrameWriter<Row> w = d.coalesce(1).write().mode(SaveMode.ErrorIfExists);
        if (format.equals("csv")) {
            w.option("header", "true").csv(target);
        } else {
            ParquetWriteOptions.apply(w, d.schema(), compression).parquet(target);
        }
        try {
            long bytes = 0;
            org.apache.hadoop.fs.RemoteIterator<org.apache.hadoop.fs.LocatedFileStatus> it = fs.listFiles(dir, true);
            while (it.hasNext()) {
                org.apache.hadoop.fs.LocatedFileStatus st = it.next();
                String name = st.getPath().getName();
                if (!name.startsWith(".") && !name.startsWith("_")) {
                    bytes += st.getLen();
                }
            }
            return bytes;
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static String human(double bytes) {
        String[] u = {"B", "KB", "MB", "GB", "TB", "PB"};
        int i = 0;
        while (bytes >= 1000 && i < u.length - 1) {
            bytes /= 1000;
            i++;
        }
        return String.format("%.1f %s", bytes, u[i]);
    }
}
