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

        /** Every input path, astrometry (or the one table) first. */
        public List<String> allInputs() {
            List<String> all = new ArrayList<>(input);
            all.addAll(photometry);
            return all;
        }
    }

    /** The checks of the request alone, before any file is looked at (derive's and check's first refusals). */
    static void checkRequest(Request req) {
        if (req.input.isEmpty()) {
            throw JobException.config("Missing --input (at least one input path)");
        }
        if (req.output == null) {
            throw JobException.config("Missing --output");
        }
        if (!req.outputFormat.equals("parquet") && !req.outputFormat.equals("csv")) {
            throw JobException.config("Invalid --output-format: " + req.outputFormat + " (must be parquet or csv)");
        }
    }

    /**
     * The input table(s) opened and checked (paths, files, footers, partition folders, the id column), with the pipeline
     * that derives them: everything derive checks about its inputs before it reads a row. Writes nothing; derive calls
     * it holding the output's lease, check without.
     */
    static final class Inputs {
        final String idColumn;
        final DerivePipeline pipeline;
        final InputTable astro;
        /** Null with one table. */
        final InputTable phot;
        final List<String> partitionColumns;

        private Inputs(String idColumn, DerivePipeline pipeline, InputTable astro, InputTable phot) {
            this.idColumn = idColumn;
            this.pipeline = pipeline;
            this.astro = astro;
            this.phot = phot;
            this.partitionColumns = astro.partitionColumns();
        }

        boolean twoTables() { return phot != null; }

        List<InputTable> tables() { return phot == null ? List.of(astro) : List.of(astro, phot); }

        /** The table's name in messages. */
        String tableName() { return twoTables() ? "astrometry+photometry" : astro.role() + " " + astro.paths(); }
    }

    static Inputs openInputs(SparkSession spark, Request req, JobConfig config) {
        String idColumn = req.joinOn != null ? req.joinOn : config.idColumn();
        DerivePipeline pipeline = new DerivePipeline(config, idColumn);
        boolean twoTables = !req.photometry.isEmpty();
        InputTable astro = InputTable.open(spark, twoTables ? "astrometry" : "table", req.input, req.inputFormat, config);
        InputTable phot = twoTables ? InputTable.open(spark, "photometry", req.photometry, req.inputFormat, config) : null;
        if (req.writeMode == OutputCommitter.Mode.REPLACE_PARTITIONS && astro.partitionColumns().isEmpty()) {
            throw JobException.config("Invalid --write-mode replace-partitions: input " + req.input
                    + " has no key=value partition folders (rule: replace-partitions needs a partitioned input)");
        }
        if (twoTables) {
            String aName = astro.role() + " " + astro.paths();
            if (!astro.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + aName + ": missing column '" + idColumn + "' (rule: the star id to join on must exist in both tables)");
            }
            if (!phot.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + phot.role() + " " + phot.paths() + ": missing column '" + idColumn
                        + "' (rule: the star id to join on must exist in both tables)");
            }
        } else {
            String name = astro.role() + " " + astro.paths();
            if (!astro.data().schema().getFieldIndex(idColumn).isDefined()) {
                throw JobException.input("Input " + name + ": missing column '" + idColumn
                        + "' (rule: the star id column must exist; set columns.star_id in the config)");
            }
        }
        return new Inputs(idColumn, pipeline, astro, phot);
    }

    /** An input without rows is refused (rows: the number derive would read). */
    static void requireRows(Request req, long rows) {
        if (rows == 0) {
            throw JobException.input("Input " + req.input + ": the table has no rows (rule: the input must not be empty)");
        }
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
        /** Seconds of the commit itself (after the manifest was written, so not in it). */
        public double commitSeconds;

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
        return run(spark, req, config, ProgressReporter.off());
    }

    /**
     * Runs the job, telling {@code progress} when each step starts: the steps are those timed in the manifest's
     * {@code seconds} ({@code take_lease} is part of {@code check_output}), then {@code commit}.
     */
    public static Summary run(SparkSession spark, Request req, JobConfig config, ProgressReporter progress) {
        long t0 = System.nanoTime();
        Map<String, Double> seconds = new LinkedHashMap<>();
        String runId = Instant.now().toString().replaceAll("[^0-9]", "").substring(0, 14) + "-" + UUID.randomUUID().toString().substring(0, 8);
        checkRequest(req);
        Configuration hconf = spark.sparkContext().hadoopConfiguration();
        OutputCommitter committer = new OutputCommitter(hconf, req.output, runId, req.writeMode);
        try {
            progress.step("check_output");
            committer.prepare(req.allInputs(), hconf, config.leaseStaleAfterS());
            seconds.put("take_lease", committer.leaseSeconds());
            seconds.put("check_output", (System.nanoTime() - t0) / 1e9);
            // the run's Spark jobs in one group, so that after a failure their last tasks can be waited for
            spark.sparkContext().setJobGroup("starderive-" + runId, "starderive derive " + runId, true);
            return runHoldingLease(spark, req, config, committer, runId, t0, seconds, progress);
        } finally {
            spark.sparkContext().clearJobGroup();
            committer.release();
        }
    }

    /**
     * After a failed Spark job its other tasks are killed asynchronously and may still write into the staging folder
     * for a moment: wait (at most 60 s) until no task of this run's jobs is running, so that removing the staging
     * folder is final.
     */
    private static void awaitTasksEnded(SparkSession spark, String runId) {
        org.apache.spark.SparkStatusTracker st = spark.sparkContext().statusTracker();
        String group = "starderive-" + runId;
        spark.sparkContext().cancelJobGroup(group);
        long deadline = System.nanoTime() + 60_000_000_000L;
        while (System.nanoTime() < deadline) {
            boolean running = false;
            for (int job : st.getJobIdsForGroup(group)) {
                scala.Option<org.apache.spark.SparkJobInfo> ji = st.getJobInfo(job);
                if (ji.isDefined()) {
                    for (int stage : ji.get().stageIds()) {
                        scala.Option<org.apache.spark.SparkStageInfo> si = st.getStageInfo(stage);
                        if (si.isDefined() && si.get().numActiveTasks() > 0) {
                            running = true;
                        }
                    }
                }
            }
            if (!running) {
                return;
            }
            try {
                Thread.sleep(100);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return;
            }
        }
        LOG.warn("Tasks of run {} still running after 60 s; the staging folder may need removing by hand", runId);
    }

    private static Summary runHoldingLease(SparkSession spark, Request req, JobConfig config, OutputCommitter committer,
                                           String runId, long t0, Map<String, Double> seconds,
                                           ProgressReporter progress) {
        Configuration hconf = spark.sparkContext().hadoopConfiguration();

        progress.step("open_inputs");
        Inputs inputs = openInputs(spark, req, config);
        seconds.put("open_inputs", (System.nanoTime() - t0) / 1e9);
        String idColumn = inputs.idColumn;
        DerivePipeline pipeline = inputs.pipeline;
        boolean twoTables = inputs.twoTables();
        InputTable astro = inputs.astro;
        InputTable phot = inputs.phot;
        List<String> partitionColumns = inputs.partitionColumns;

        Dataset<Row> joined;
        RowCensus expected;
        Map<String, Object> facts = new LinkedHashMap<>();
        facts.put("run_id", runId);
        facts.put("started_utc", Instant.now().toString());
        if (twoTables) {
            progress.step("check_inputs");
            joined = pipeline.join(astro, phot);
            expected = RowCensus.expectedJoin(astro.data(), phot.data(), idColumn);
            facts.put("join_policy", "full outer join on " + idColumn + ", copy by copy: max(k, j) rows for an id held k and j times;"
                    + " a null, empty or blank id matches nothing (one row each, ID_MISSING)");
        } else {
            progress.step("scan_ids");
            long ts = System.nanoTime();
            DerivePipeline.IdScan scan = pipeline.scanIds(astro.data(), inputs.tableName());
            seconds.put("scan_ids", (System.nanoTime() - ts) / 1e9);
            progress.step("check_inputs");
            joined = pipeline.markDuplicates(astro.data(), scan);
            expected = scan.census;
        }
        requireRows(req, expected.rows);
        String tableName = inputs.tableName();
        Dataset<Row> derived = pipeline.derive(joined, tableName, partitionColumns);
        DataType idType = derived.schema().apply(idColumn).dataType();
        seconds.put("check_inputs", (System.nanoTime() - t0) / 1e9);

        progress.step("derive_and_write");
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

            progress.step("verify_rows");
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
            LOG.debug("Row conservation holds: {}", got.getKey());

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
                m.put("file_list", RunManifest.fileList(t));
                tables.add(m);
            }
            facts.put("input_tables", tables);
            facts.put("input_rows", expected.rows);
            facts.put("input_files", twoTables ? astro.fileCount() + phot.fileCount() : astro.fileCount());
            facts.put("output_rows", s.rowsOut);
            facts.put("partition_columns", partitionColumns);
            facts.put("finished_utc", Instant.now().toString());
            // the inputs must still be the files the run read; checked last, just before the manifest and the commit
            TestHooks.runBeforeInputRecheck();
            progress.step("recheck_inputs");
            long t3 = System.nanoTime();
            for (InputTable t : twoTables ? List.of(astro, phot) : List.of(astro)) {
                t.recheck(hconf);
            }
            seconds.put("recheck_inputs", (System.nanoTime() - t3) / 1e9);
            seconds.put("total_before_commit", (System.nanoTime() - t0) / 1e9);
            progress.step("commit");
            facts.put("history", history(req, committer, facts, partitionColumns, s.rowsOut));
            committer.writeText(DataDictionary.FILE_NAME, DataDictionary.render(derived.schema(), idColumn));
            committer.writeText(RunManifest.FILE_NAME, RunManifest.render(req, config, facts, s.rowsPerFlag, seconds));
            long tc = System.nanoTime();
            s.partitionsReplaced = committer.commit(partitionColumns);
            s.commitSeconds = (System.nanoTime() - tc) / 1e9;
            LOG.info("Committed {} in {} s (lease taken in {} s)", committer.output(), s.commitSeconds, committer.leaseSeconds());
            s.seconds = (System.nanoTime() - t0) / 1e9;
            return s;
        } catch (Exception e) { // Spark's own exceptions are checked ones, thrown from Scala undeclared
            awaitTasksEnded(spark, runId);
            committer.abort();
            throw storageFailure(e, committer);
        }
    }

    /** Rethrows {@code e} as it is (checked or not), for the compiler a RuntimeException. */
    @SuppressWarnings("unchecked")
    private static <T extends Exception> T unchanged(Exception e) throws T {
        throw (T) e;
    }

    /**
     * A full disk, or a failed write of the staged output, as a plain output error (exit 4) naming the path; any other
     * failure unchanged. "No space" may also come from Spark's local folders (shuffle, spill): the message says so.
     */
    static RuntimeException storageFailure(Exception e, OutputCommitter committer) {
        if (e instanceof JobException) {
            return (JobException) e;
        }
        java.io.IOException io = null;
        StringBuilder chain = new StringBuilder();
        for (Throwable t = e; t != null && t.getCause() != t; t = t.getCause()) {
            chain.append(t.getMessage()).append('\n');
            if (t instanceof java.io.IOException) {
                io = (java.io.IOException) t;
            }
        }
        if (io == null) {
            return DeriveJob.<RuntimeException>unchanged(e);
        }
        String m = String.valueOf(io.getMessage());
        String l = m.toLowerCase(java.util.Locale.ROOT);
        boolean noSpace = l.contains("no space") || l.contains("quota");
        boolean writing = chain.indexOf(committer.staging().toUri().getPath()) >= 0 || chain.indexOf("TASK_WRITE_FAILED") >= 0;
        if (!noSpace && !writing) {
            return DeriveJob.<RuntimeException>unchanged(e);
        }
        String what = noSpace ? "no space left on a disk the run writes to (the output's file system, or Spark's local "
                + "folders for shuffle and spill)" : "write failed";
        return new JobException(JobException.Kind.OUTPUT, "Output " + committer.output() + ": " + what
                + (writing ? " while writing " + committer.staging() : "") + " (" + m
                + "); nothing was committed and the previous output is intact", e);
    }

    /**
     * The output's history, one entry per run that wrote it: with replace-partitions the previous manifest's entries
     * (or, for a manifest from before histories, one entry made from its run) plus this run's with the partitions it
     * replaced; otherwise this run's alone (the whole output is new).
     */
    static List<Map<String, Object>> history(Request req, OutputCommitter committer, Map<String, Object> facts,
                                             List<String> partitionColumns, long rowsOut) {
        List<Map<String, Object>> h = new ArrayList<>();
        boolean partial = req.writeMode == OutputCommitter.Mode.REPLACE_PARTITIONS;
        if (partial) {
            String prev = committer.previousManifest();
            if (prev != null) {
                try {
                    com.fasterxml.jackson.databind.JsonNode root = new com.fasterxml.jackson.databind.ObjectMapper().readTree(prev);
                    com.fasterxml.jackson.databind.JsonNode old = root.get("history");
                    com.fasterxml.jackson.databind.ObjectMapper m = new com.fasterxml.jackson.databind.ObjectMapper();
                    if (old != null && old.isArray()) {
                        for (com.fasterxml.jackson.databind.JsonNode e : old) {
                            h.add(m.convertValue(e, new com.fasterxml.jackson.core.type.TypeReference<Map<String, Object>>() {}));
                        }
                    } else {
                        Map<String, Object> e = new LinkedHashMap<>();
                        e.put("run_id", root.path("run_id").asText(null));
                        e.put("started_utc", root.path("started_utc").asText(null));
                        e.put("finished_utc", root.path("finished_utc").asText(null));
                        e.put("write_mode", root.path("request").path("write_mode").asText(null));
                        e.put("partitions_written", "all");
                        h.add(e);
                    }
                } catch (java.io.IOException e) {
                    throw JobException.output("Output " + committer.output() + ": its manifest cannot be read as JSON ("
                            + e.getMessage() + ") (rule: replace-partitions extends the output's history)");
                }
            }
        }
        Map<String, Object> mine = new LinkedHashMap<>();
        mine.put("run_id", facts.get("run_id"));
        mine.put("started_utc", facts.get("started_utc"));
        mine.put("finished_utc", facts.get("finished_utc"));
        mine.put("write_mode", req.writeMode.label());
        mine.put("input", req.input);
        mine.put("output_rows", rowsOut);
        mine.put("partitions_written", partitionColumns.isEmpty() ? List.of()
                : committer.stagedPartitions(partitionColumns.size()));
        h.add(mine);
        return h;
    }
}
