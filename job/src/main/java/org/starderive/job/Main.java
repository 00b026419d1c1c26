package org.starderive.job;

import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * The {@code starderive} command line. {@code main} stays thin: parse, build the session, call the job, stop.
 * Exit codes: 0 success, 1 unexpected failure, 2 usage or configuration, 3 input dataset (also: an input file changed
 * while the run read it), 4 output location (also: another run holds the output, storage full or failing), 5 row conservation.
 */
@Command(name = "starderive", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        description = "Derived stellar parameters (distance, Teff, L, R, M, log g, angular diameter) with uncertainties and "
                + "quality flags for survey catalogues, as an Apache Spark batch job.",
        subcommands = {Main.Check.class, Main.Derive.class, Main.Export.class, Main.Sample.class, Main.Report.class, Main.Recovery.class, Main.Rewrite.class,
                CommandLine.HelpCommand.class})
public final class Main implements Runnable {

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    @Override
    public void run() {
        spec.commandLine().usage(spec.commandLine().getOut());
    }

    /** Version from the jar manifest. */
    static final class Version implements CommandLine.IVersionProvider {
        @Override
        public String[] getVersion() {
            return new String[] {"starderive " + RunManifest.version()};
        }
    }

    /** The options of derive, shared with check (which must accept exactly what derive accepts). */
    static class DeriveOptions {
        @Option(names = "--input", required = true, arity = "1..*", paramLabel = "PATH",
                description = "Input table(s): folders of (Hive-style partitioned) Parquet or CSV files, or FITS / VOTable files (see "
                        + "--input-format). With --photometry, "
                        + "the astrometry table.")
        List<String> input = new ArrayList<>();

        @Option(names = "--output", required = true, paramLabel = "PATH",
                description = "Output folder of the derived catalogue (manifest and data dictionary inside it).")
        String output;

        @Option(names = "--photometry", arity = "1..*", paramLabel = "PATH",
                description = "Photometry table to join to --input on the star id (full outer join, copy by copy).")
        List<String> photometry = new ArrayList<>();

        @Option(names = "--join-on", paramLabel = "COL",
                description = "Column holding the star id in both tables. Default: columns.star_id of the config, else star_id.")
        String joinOn;

        @Option(names = "--config", paramLabel = "FILE",
                description = "YAML file mapping the survey's columns and units and setting the physics. Default: canonical "
                        + "column names and default settings.")
        Path config;

        @Option(names = "--input-format", paramLabel = "FORMAT", defaultValue = "parquet",
                description = "parquet, csv (with a header line), fits or votable (FITS binary table or VOTable: one file, or a "
                        + "folder of files, read on the driver; at most input.fits_votable_max_rows rows per table, "
                        + "1000000 unless the config says). Default: ${DEFAULT-VALUE}.")
        String inputFormat;

        @Option(names = "--output-format", paramLabel = "FORMAT", defaultValue = "parquet",
                description = "parquet or csv (flag_names then '|'-separated). Default: ${DEFAULT-VALUE}.")
        String outputFormat;

        @Option(names = "--write-mode", paramLabel = "MODE", defaultValue = "fail",
                description = "fail (output must not exist), overwrite (replace it whole) or replace-partitions (replace only "
                        + "the partitions present in the input). Default: ${DEFAULT-VALUE}.")
        String writeMode;

        @Option(names = "--layout", paramLabel = "LAYOUT",
                description = "derived (the id, partition columns and derived columns: a table to join back on the id) or full "
                        + "(every input column too). Default: output.layout of the config, else derived.")
        String layout;

        @Option(names = "--columns", paramLabel = "GROUP",
                description = "all derived columns, or core (distance, Teff, L, R, M, density, log g, angular diameter with "
                        + "errors, class, regime and the flag mask). Default: output.columns of the config, else all.")
        String columns;

        @Option(names = "--uncertainty", paramLabel = "METHOD",
                description = "analytic (first order) or montecarlo (16/50/84th percentiles over draws, in addition). "
                        + "Default: uncertainty.method of the config, else analytic.")
        String uncertainty;

        @Option(names = "--draws", paramLabel = "N",
                description = "Monte Carlo draws per star. Default: uncertainty.draws of the config, else 128.")
        Integer draws;

        @Option(names = "--seed", paramLabel = "S",
                description = "Run seed of the Monte Carlo (a star's draws depend only on this and its id). "
                        + "Default: uncertainty.seed of the config, else 1.")
        Long seed;

        /** The request as parsed, with derive's checks of the command line values. */
        DeriveJob.Request request() {
            DeriveJob.Request req = new DeriveJob.Request();
            req.input = input;
            req.photometry = photometry;
            req.joinOn = joinOn;
            req.output = output;
            req.inputFormat = inputFormat;
            req.outputFormat = outputFormat;
            req.writeMode = OutputCommitter.Mode.parse(writeMode);
            if (!List.of("parquet", "csv", "fits", "votable").contains(inputFormat)) {
                throw JobException.config("Invalid --input-format: " + inputFormat + " (" + InputTable.FORMATS_RULE + ")");
            }
            return req;
        }

        /** The config file (or the defaults) with the command line's layout and uncertainty options applied. */
        JobConfig jobConfig() {
            JobConfig cfg = config == null ? JobConfig.defaults() : JobConfig.load(config);
            cfg.withLayout(layout, columns);
            if (uncertainty != null || draws != null || seed != null) {
                cfg.withUncertainty(uncertainty != null ? uncertainty : cfg.uncertaintyMethod(),
                        draws != null ? draws : cfg.draws(), seed != null ? seed : cfg.seed(), "--");
            }
            return cfg;
        }
    }

    @Command(name = "derive", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Derive the stellar parameters of every row of a catalogue and write the derived catalogue.")
    static final class Derive implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @CommandLine.Mixin
        DeriveOptions options = new DeriveOptions();

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            DeriveJob.Request req = options.request();
            JobConfig cfg = options.jobConfig();
            return Sessions.withSession(spark.options(), "derive", (session, progress) -> {
                DeriveJob.Summary s = DeriveJob.run(session, req, cfg, progress);
                progress.finish();
                PrintWriter out = spec.commandLine().getOut();
                out.print(s.render());
                out.flush();
                return 0;
            });
        }
    }

    @Command(name = "check", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Check a derive run before spending cluster hours on it, writing nothing: takes derive's options, "
                    + "reads only the inputs' listings, Parquet footers and a small sample, and reports the column mapping and "
                    + "units, the bands per table, the Teff relations and radius and mass routes the sampled stars would get, "
                    + "the join key's overlap in the sample, the output columns and an estimate of bytes per star. Exits with "
                    + "derive's exit code and message at the first problem derive would refuse, 0 when derive would run.")
    static final class Check implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @CommandLine.Mixin
        DeriveOptions options = new DeriveOptions();

        @Option(names = "--sample-rows", paramLabel = "N", defaultValue = "2000",
                description = "Rows read from each input table (the first N in Spark's file order: deterministic for the "
                        + "same files) and run through the physics core. Default: ${DEFAULT-VALUE}.")
        int sampleRows;

        @Option(names = "--json", description = "The report as one JSON object instead of text.")
        boolean json;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            if (!(sampleRows >= 1 && sampleRows <= 1_000_000)) {
                throw JobException.config("Invalid --sample-rows: " + sampleRows
                        + " (must be 1 to 1,000,000: the sample is collected in the driver's memory)");
            }
            DeriveJob.Request req = options.request();
            JobConfig cfg = options.jobConfig();
            return Sessions.withSession(spark.options(), "check", (session, progress) -> {
                progress.step("read_schemas_and_sample");
                DeriveCheck.Report r = DeriveCheck.run(session, req, cfg, sampleRows);
                progress.finish();
                PrintWriter out = spec.commandLine().getOut();
                out.print(json ? r.json() : r.render());
                out.flush();
                return 0;
            });
        }
    }

    @Command(name = "export", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Write a derived catalogue, or a selection of it, to one FITS binary table or one VOTable, each "
                    + "column with its unit (IVOA VOUnits), UCD and description, the run's provenance as table parameters. "
                    + "The selection is collected in the driver's memory: refused above --max-rows, before anything is written.")
    static final class Export implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--catalog", required = true, paramLabel = "DIR", description = "Derived catalogue (output of derive).")
        String catalog;

        @Option(names = "--out", required = true, paramLabel = "FILE",
                description = "File to write (on the driver's local file system; its folder must exist).")
        Path out;

        @Option(names = "--format", required = true, paramLabel = "FORMAT", description = "fits (binary table) or votable.")
        String format;

        @Option(names = "--exclude-flags", paramLabel = "MASK",
                description = "Leave out rows with any of these quality flags: a bit mask (decimal or 0x hex) or flag names "
                        + "separated by commas. Default: keep every row.")
        String excludeFlags;

        @Option(names = "--columns", paramLabel = "COLS", defaultValue = "all",
                description = "all, core (id, partition columns, main parameters with errors and the flag mask) or column "
                        + "names separated by commas. Default: ${DEFAULT-VALUE}.")
        String columns;

        @Option(names = "--limit", paramLabel = "N", description = "At most N rows, the first in the order of the id column.")
        Long limit;

        @Option(names = "--max-rows", paramLabel = "N", defaultValue = "1000000",
                description = "Refuse (exit 2) a selection of more rows than this. Default: ${DEFAULT-VALUE}.")
        long maxRows;

        @Option(names = "--overwrite", description = "Replace the file if it exists. Default: refuse (exit 4).")
        boolean overwrite;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            CatalogExport.Request req = new CatalogExport.Request();
            req.catalog = catalog;
            req.out = out;
            req.format = CatalogExport.Format.parse(format);
            req.excludeFlags = CatalogExport.parseFlagMask(excludeFlags);
            req.columns = columns;
            req.limit = limit;
            req.maxRows = maxRows;
            req.overwrite = overwrite;
            return Sessions.withSession(spark.options(), "export", (session, progress) -> {
                long t0 = System.nanoTime();
                CatalogExport.Result r = CatalogExport.run(session, req, progress);
                progress.finish();
                PrintWriter w = spec.commandLine().getOut();
                w.printf("starderive export: %,d rows, %d columns, %s, %,d bytes, %.1f s%n", r.rows, r.columns,
                        req.format.name().toLowerCase(java.util.Locale.ROOT), r.bytes, (System.nanoTime() - t0) / 1e9);
                w.println("file: " + r.file);
                w.flush();
                return 0;
            });
        }
    }

    @Command(name = "sample", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Generate the synthetic Kestrel survey (a fictional survey: astrometry, photometry and truth "
                    + "tables, Parquet partitioned by sky tile), deterministically from a seed.")
    static final class Sample implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--stars", required = true, paramLabel = "N", description = "Number of stars (exact).")
        long stars;

        @Option(names = "--seed", defaultValue = "1", paramLabel = "S", description = "Random seed. Default: ${DEFAULT-VALUE}.")
        long seed;

        @Option(names = "--out", required = true, paramLabel = "DIR", description = "Folder for astrometry/, photometry/ and truth/.")
        String out;

        @Option(names = "--partitions", paramLabel = "P",
                description = "Spark partitions for generation. Default: one per 250,000 stars, at least 2.")
        Integer partitions;

        @Option(names = "--overwrite", description = "Replace the tables if they exist. Default: refuse.")
        boolean overwrite;

        @Option(names = "--single-table",
                description = "Write astrometry and photometry as one table stars/ (plus truth/) instead of two.")
        boolean singleTable;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            if (!(stars > 0)) {
                throw JobException.config("Invalid --stars: " + stars + " (must be > 0)");
            }
            int p = partitions != null ? partitions : (int) Math.max(2, Math.min(10_000, stars / 250_000));
            if (p < 1) {
                throw JobException.config("Invalid --partitions: " + p + " (must be >= 1)");
            }
            return Sessions.withSession(spark.options(), "sample", (session, progress) -> {
                long t0 = System.nanoTime();
                progress.step("check_output");
                if (!overwrite) {
                    for (String t : singleTable ? List.of("stars", "truth") : List.of("astrometry", "photometry", "truth")) {
                        try {
                            org.apache.hadoop.fs.Path tp = new org.apache.hadoop.fs.Path(out, t);
                            if (tp.getFileSystem(session.sparkContext().hadoopConfiguration()).exists(tp)) {
                                throw JobException.output("Output " + tp + " already exists (rule: sample never replaces "
                                        + "tables unless --overwrite is given)");
                            }
                        } catch (java.io.IOException e) {
                            throw JobException.output("Output " + out + ": not reachable (" + e.getMessage() + ")");
                        }
                    }
                }
                progress.step("generate_and_write");
                org.apache.spark.sql.SaveMode mode = overwrite ? org.apache.spark.sql.SaveMode.Overwrite
                        : org.apache.spark.sql.SaveMode.ErrorIfExists;
                if (singleTable) {
                    org.starderive.sample.SampleSurvey.writeSingle(session, stars, seed, out, p, mode);
                } else {
                    org.starderive.sample.SampleSurvey.write(session, stars, seed, out, p, mode);
                }
                progress.finish();
                double sec = (System.nanoTime() - t0) / 1e9;
                PrintWriter w = spec.commandLine().getOut();
                w.printf("starderive sample: %,d stars (seed %d) in %.1f s (%,.0f stars/s)%n", stars, seed, sec, stars / sec);
                if (singleTable) {
                    w.println("stars:      " + out + "/stars");
                } else {
                    w.println("astrometry: " + out + "/astrometry");
                    w.println("photometry: " + out + "/photometry");
                }
                w.println("truth:      " + out + "/truth");
                w.flush();
                return 0;
            });
        }
    }

    @Command(name = "report", mixinStandardHelpOptions = true, sortOptions = false,
            description = "QA report of a derived catalogue: rows per flag and per partition, distributions, and a "
                    + "density-shaded HR diagram (PNG), tied together in index.md / index.html.")
    static final class Report implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--catalog", required = true, paramLabel = "DIR", description = "Derived catalogue (output of derive).")
        String catalog;

        @Option(names = "--out", required = true, paramLabel = "DIR", description = "Folder for the report.")
        String out;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            return Sessions.withSession(spark.options(), "report", (session, progress) -> {
                long t0 = System.nanoTime();
                progress.step("compute_and_write");
                org.starderive.report.QaReport.Result r = writingReport(out,
                        () -> org.starderive.report.QaReport.run(session, catalog, out));
                progress.finish();
                PrintWriter w = spec.commandLine().getOut();
                w.printf("starderive report: %,d rows, %,d in the HR diagram, %.1f s%n", r.rows, r.hrStars,
                        (System.nanoTime() - t0) / 1e9);
                w.println("report: " + out + "/index.html");
                w.flush();
                return 0;
            });
        }
    }

    @Command(name = "recovery", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Injection-recovery report: a catalogue derived from the synthetic survey against its truth "
                    + "table (bias, scatter, 68 %% coverage per parallax-significance bin and class; flag diagnostics).")
    static final class Recovery implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--derived", required = true, paramLabel = "DIR", description = "Derived catalogue of the synthetic survey.")
        String derived;

        @Option(names = "--truth", required = true, paramLabel = "DIR", description = "truth/ table written by sample.")
        String truth;

        @Option(names = "--out", required = true, paramLabel = "DIR", description = "Folder for the report.")
        String out;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            return Sessions.withSession(spark.options(), "recovery", (session, progress) -> {
                progress.step("compute_and_write");
                org.starderive.report.RecoveryReport.Result r = writingReport(out,
                        () -> org.starderive.report.RecoveryReport.run(session, derived, truth, out));
                progress.finish();
                PrintWriter w = spec.commandLine().getOut();
                w.printf("starderive recovery: %,d stars%n", r.stars);
                r.clean.forEach((q, s) -> w.printf("  %-7s n=%d bias %+.2f%% scatter %.2f%% coverage %.3f%n", q, s.n,
                        100 * s.bias, 100 * s.scatter, s.coverage));
                w.println("report: " + out + "/index.html");
                w.flush();
                return 0;
            });
        }
    }

    @Command(name = "rewrite", hidden = true, mixinStandardHelpOptions = true,
            description = "Benchmark helper: read a Parquet table and write it again with the same partitioning, "
                    + "compression and writer settings as derive (the I/O floor of a derive run).")
    static final class Rewrite implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--input", required = true, paramLabel = "PATH")
        String input;

        @Option(names = "--output", required = true, paramLabel = "PATH")
        String output;

        @Option(names = "--partition-by", split = ",", paramLabel = "COL")
        List<String> partitionBy = new ArrayList<>();

        @Option(names = "--compression", defaultValue = "snappy", paramLabel = "CODEC")
        String compression;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            return Sessions.withSession(spark.options(), "rewrite", (session, progress) -> {
                long t0 = System.nanoTime();
                progress.step("rewrite");
                org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> in = session.read().parquet(input);
                org.apache.spark.sql.DataFrameWriter<org.apache.spark.sql.Row> w = ParquetWriteOptions.apply(
                        in.write().mode(org.apache.spark.sql.SaveMode.ErrorIfExists), in.schema(), compression);
                if (!partitionBy.isEmpty()) {
                    w = w.partitionBy(partitionBy.toArray(new String[0]));
                }
                w.parquet(output);
                progress.finish();
                PrintWriter o = spec.commandLine().getOut();
                o.printf("starderive rewrite: %.1f s%n", (System.nanoTime() - t0) / 1e9);
                o.flush();
                return 0;
            });
        }
    }

    /** Work that writes a report folder. */
    interface ReportWork<T> {
        T run() throws java.io.IOException;
    }

    /** Runs report work; an I/O failure of the report folder becomes an output error (exit 4) naming the folder. */
    static <T> T writingReport(String out, ReportWork<T> work) {
        try {
            return work.run();
        } catch (java.io.IOException e) {
            throw JobException.output("Report " + out + ": cannot be written (" + e.getMessage() + ")");
        }
    }

    /** --master, --verbose and --no-progress as a mixin so that every Spark sub-command has them. */
    public static class SparkOptionsMixin {
        @Option(names = "--master", paramLabel = "URL",
                description = "Spark master, e.g. local[4] or spark://host:7077. Default: the one spark-submit sets, "
                        + "otherwise local[*].")
        String master;

        boolean verbose;

        @Option(names = "--no-progress",
                description = "No progress display (by default: one line updated in place on a terminal, otherwise a "
                        + "line when each step starts and ends).")
        boolean noProgress;

        @Option(names = "--verbose",
                description = "Spark's and Hadoop's own log lines and Spark's stage progress bars too (by default only "
                        + "starderive's lines, its progress display and warnings a user can act on are shown).")
        void setVerbose(boolean verbose) {
            this.verbose = verbose;
            if (verbose) {
                org.apache.logging.log4j.core.config.Configurator.setAllLevels(
                        org.apache.logging.log4j.LogManager.ROOT_LOGGER_NAME, org.apache.logging.log4j.Level.INFO);
            }
        }

        Sessions.Options options() {
            return new Sessions.Options(master, verbose, noProgress);
        }
    }

    /** Runs the command line and returns the exit code (tests call this; main exits with it). */
    public static int execute(String... args) {
        CommandLine cl = new CommandLine(new Main());
        cl.setExecutionExceptionHandler((ex, cmd, parsed) -> {
            if (ex instanceof JobException) {
                cmd.getErr().println("starderive: " + ex.getMessage());
                cmd.getErr().flush();
                return ((JobException) ex).kind().exitCode();
            }
            cmd.getErr().println("starderive: unexpected failure: " + ex);
            ex.printStackTrace(cmd.getErr());
            cmd.getErr().flush();
            return 1;
        });
        cl.setParameterExceptionHandler((ex, a) -> {
            ex.getCommandLine().getErr().println("starderive: " + ex.getMessage());
            ex.getCommandLine().usage(ex.getCommandLine().getErr());
            return 2;
        });
        return cl.execute(args);
    }

    public static void main(String[] args) {
        System.exit(execute(args));
    }
}
