package org.starderive.job;

import static org.apache.spark.sql.functions.col;

import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import org.apache.hadoop.conf.Configuration;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The derivation job, as named steps: check the output location, open and check the inputs, build the derived
 * catalogue, write it to staging, read it back to prove every input row is there exactly once, write the manifest
 * and data dictionary, commit. Any failure before the commit leaves the output as it was.
 */
public final class DeriveJob {
    private static final Logger LOG = LoggerFactory.getLogger(DeriveJob.class);

    /** What to do: the command line's options, parsed. */
    public static final class Request {
        public List<String> input = new ArrayList<>();
        public List<String> photometry = new ArrayList<>();
        public String joinOn;
        public String output;
        public String inputFormat = "parquet";
        public String outputFormat = "parquet";
        public OutputCommitter.Mode writeMode = OutputCommitter.Mode.FAIL;
    }

    /** What happened: the summary printed at the end and returned to callers. */
    public static final class Summary {
        public long rowsIn;
        public long rowsOut;
        public String output;
        public double seconds;
        public Map<String, Long> rowsPerFlag = new LinkedHashMap<>();
        public List<String> partitionsReplaced = new ArrayList<>();
        public String runId;

        public String render() {
            StringBuilder sb = new StringBuilder();
            sb.append(String.format("starderive derive: %,d rows in, %,d rows out, %.1f s%n", rowsIn, rowsOut, seconds));
            sb.append("output: ").append(output).append('\n');
            if (!partitionsReplaced.isEmpty()) {
                sb.append("partitions replaced: ").append(partitionsReplaced).append('\n');
            }
            sb.append("rows per flag:\n");
            rowsPerFlag.forEach((k, v) -> {
                if (v > 0) {
                    sb.append(String.format("  %-22s %,d%n", k, v));
                }
            });
            return sb.toString();
        }
    }

    private DeriveJob() {}

    public static Summary run(SparkSession spark, Request req, JobConfig config) {
        long t0 = System.nanoTime();
        Map<String, Double> seconds = new LinkedHashMap<>();
        String runId = Instant.now().toString().replaceAll("[^0-9]", "").substring(0, 14) + "-" + UUID.randomUUID().toString().substring(0, 8);
        if (req.input.isEmpty()) {
            throw JobException.config("Missing --input (at least one input path)");
        }
        if (req.output == null) {
            throw JobException.config("Missing --output");
        }
        if (!req.outputFormat.equals("parquet") && !req.outputFormat.equals("csv")) {
            throw JobException.config("Invalid --output-format: " + req.outputFormat + " (must be parquet or csv)");
        }
        Configuration hconf = spark.sparkContext().hadoopConfiguration();
        OutputCommitter committer = new OutputCommitter(hconf, req.output, runId, req.writeMode);
        List<String> allInputs = new ArrayList<>(req.input);
        allInputs.addAll(req.photometry);
        committer.prepare(allInputs, hconf);

        String idColumn = req.joinOn != null ? req.joinOn : config.idColumn();
        DerivePipeline pipeline = new DerivePipeline(config, idColumn);
        boolean twoTables = !req.photometry.isEmpty();
        InputTable astro = InputTable.open(spark, twoTables ? "astrometry" : "table", req.input, req.inputFormat);
        InputTable phot = twoTables ? InputTable.open(spark, "photometry", req.photometry, req.inputFormat) : null;
        seconds.put("open_inputs", (System.nanoTime() - t0) / 1e9);
        List<String> partitionColumns = astro.partitionColumns();
        if (req.writeMode == OutputCommitter.Mode.REPLACE_PARTITIONS && partitionColumns.isEmpty()) {
            throw JobException.config("Invalid --write-mode replace-partitions: input " + req.input
                    + " has no key=value partition folders (rule: replace-partitions needs a partitioned input)");
        }

        Dataset<Row> joined;
        RowCensus expected;
        Map<String, Object> facts = new LinkedHashMap<>();
        facts.put("run_id", runId);
        facts.put("started_utc", Instant.now().toString());
        if (twoTables) {
            String aName = astro.role() + " " + astro.paths();
            if (!astro.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + aName + ": missing column '" + idColumn + "' (rule: the star id to join on must exist in both tables)");
            }
            if (!phot.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + phot.role() + " " + phot.paths() + ": missing column '" + idColumn
                        + "' (rule: the star id to join on must exist in both tables)");
            }
            joined = pipeline.join(astro, phot);
            expected = RowCensus.expectedJoin(astro.data(), phot.data(), idColumn);
            facts.put("join_policy", "full outer join on " + idColumn + ", copy by copy: max(k, j) rows for an id held k and j times;"
                    + " a null, empty or blank id matches nothing (one row each, ID_MISSING)");
        } else {
            String name = astro.role() + " " + astro.paths();
            if (!astro.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + name + ": missing column '" + idColumn
                        + "' (rule: the star id column must exist; set columns.star_id in the config)");
            }
            long ts = System.nanoTime();
            DerivePipeline.IdScan scan = pipeline.scanIds(astro.data(), name);
            seconds.put("scan_ids", (System.nanoTime() - ts) / 1e9);
            joined = pipeline.markDuplicates(astro.data(), scan);
            expected = scan.census;
        }
        if (expected.rows == 0) {
            throw JobException.input("Input " + req.input + ": the table has no rows (rule: the input must not be empty)");
        }
        String tableName = twoTables ? "astrometry+photometry" : astro.role() + " " + astro.paths();
        Dataset<Row> derived = pipeline.derive(joined, tableName);
        DataType idType = derived.schema().apply(idColumn).dataType();
        seconds.put("check_inputs", (System.nanoTime() - t0) / 1e9);

        long t1 = System.nanoTime();
        String staging = committer.staging().toString();
        try {
            Dataset<Row> toWrite = req.outputFormat.equals("csv") ? DerivePipeline.forCsv(derived) : derived;
            org.apache.spark.sql.DataFrameWriter<Row> w = toWrite.write().mode(SaveMode.ErrorIfExists);
            if (!partitionColumns.isEmpty()) {
                w = w.partitionBy(partitionColumns.toArray(new String[0]));
            }
            if (req.outputFormat.equals("csv")) {
                w.option("header", "true").csv(staging);
            } else {
                w = ParquetWriteOptions.apply(w, toWrite.schema(), config.compression());
                w.parquet(staging);
            }
            seconds.put("derive_and_write", (System.nanoTime() - t1) / 1e9);

            long t2 = System.nanoTime();
            Dataset<Row> back = req.outputFormat.equals("csv")
                    ? spark.read().option("header", "true").option("inferSchema", "false").csv(staging)
                        .withColumn(idColumn, col(idColumn).cast(idType)).withColumn("flags", col("flags").cast("long"))
                    : spark.read().parquet(staging);
            Map.Entry<RowCensus, Map<String, Long>> got = RowCensus.ofOutput(back, idColumn);
            seconds.put("verify_rows", (System.nanoTime() - t2) / 1e9);
            if (!got.getKey().sameAs(expected)) {
                throw new JobException(JobException.Kind.CONSERVATION, "Row conservation failed: input " + expected
                        + ", output " + got.getKey() + " (rule: every input row appears in the output exactly once); nothing was committed");
            }
            LOG.info("Row conservation holds: {}", got.getKey());

            Summary s = new Summary();
            s.runId = runId;
            s.rowsIn = expected.rows;
            s.rowsOut = got.getKey().rows;
            s.rowsPerFlag = got.getValue();
            s.output = committer.output().toString();
            List<Map<String, Object>> tables = new ArrayList<>();
            for (InputTable t : twoTables ? List.of(astro, phot) : List.of(astro)) {
                Map<String, Object> m = new LinkedHashMap<>();
                m.put("role", t.role());
                m.put("paths", t.paths());
                m.put("format", t.format());
                m.put("files", t.fileCount());
                m.put("rows", t.rowsFromFooters() >= 0 ? t.rowsFromFooters() : null);
                m.put("partition_columns", t.partitionColumns());
                tables.add(m);
            }
            facts.put("input_tables", tables);
            facts.put("input_rows", expected.rows);
            facts.put("input_files", twoTables ? astro.fileCount() + phot.fileCount() : astro.fileCount());
            facts.put("output_rows", s.rowsOut);
            facts.put("partition_columns", partitionColumns);
            facts.put("finished_utc", Instant.now().toString());
            seconds.put("total_before_commit", (System.nanoTime() - t0) / 1e9);
            committer.writeText(DataDictionary.FILE_NAME, DataDictionary.render(derived.schema(), idColumn));
            committer.writeText(RunManifest.FILE_NAME, RunManifest.render(req, config, facts, s.rowsPerFlag, seconds));
            s.partitionsReplaced = committer.commit(partitionColumns);
            s.seconds = (System.nanoTime() - t0) / 1e9;
            return s;
        } catch (RuntimeException e) {
            committer.abort();
            throw e;
        }
    }
}
