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
 * Exit codes: 0 success, 1 unexpected failure, 2 usage or configuration, 3 input dataset, 4 output location,
 * 5 row conservation.
 */
@Command(name = "starderive", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        description = "Derived stellar parameters (distance, Teff, L, R, M, log g, angular diameter) with uncertainties and "
                + "quality flags for survey catalogues, as an Apache Spark batch job.",
        subcommands = {Main.Derive.class, CommandLine.HelpCommand.class})
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

    @Command(name = "derive", mixinStandardHelpOptions = true, sortOptions = false,
            description = "Derive the stellar parameters of every row of a catalogue and write the derived catalogue.")
    static final class Derive implements Callable<Integer> {
        @CommandLine.Spec
        CommandLine.Model.CommandSpec spec;

        @Option(names = "--input", required = true, arity = "1..*", paramLabel = "PATH",
                description = "Input table(s): folders of (Hive-style partitioned) Parquet or CSV files. With --photometry, "
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
                description = "parquet or csv (with a header line). Default: ${DEFAULT-VALUE}.")
        String inputFormat;

        @Option(names = "--output-format", paramLabel = "FORMAT", defaultValue = "parquet",
                description = "parquet or csv (flag_names then '|'-separated). Default: ${DEFAULT-VALUE}.")
        String outputFormat;

        @Option(names = "--write-mode", paramLabel = "MODE", defaultValue = "fail",
                description = "fail (output must not exist), overwrite (replace it whole) or replace-partitions (replace only "
                        + "the partitions present in the input). Default: ${DEFAULT-VALUE}.")
        String writeMode;

        @CommandLine.Mixin
        SparkOptionsMixin spark = new SparkOptionsMixin();

        @Override
        public Integer call() {
            DeriveJob.Request req = new DeriveJob.Request();
            req.input = input;
            req.photometry = photometry;
            req.joinOn = joinOn;
            req.output = output;
            req.inputFormat = inputFormat;
            req.outputFormat = outputFormat;
            req.writeMode = OutputCommitter.Mode.parse(writeMode);
            if (!inputFormat.equals("parquet") && !inputFormat.equals("csv")) {
                throw JobException.config("Invalid --input-format: " + inputFormat + " (must be parquet or csv)");
            }
            JobConfig cfg = config == null ? JobConfig.defaults() : JobConfig.load(config);
            return Sessions.withSession(spark.master, "starderive derive", session -> {
                DeriveJob.Summary s = DeriveJob.run(session, req, cfg);
                PrintWriter out = spec.commandLine().getOut();
                out.print(s.render());
                out.flush();
                return 0;
            });
        }
    }

    /** --master as a mixin so that every Spark sub-command has it. */
    public static class SparkOptionsMixin {
        @Option(names = "--master", paramLabel = "URL",
                description = "Spark master, e.g. local[4] or spark://host:7077. Default: the one spark-submit sets, "
                        + "otherwise local[*].")
        String master;
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
