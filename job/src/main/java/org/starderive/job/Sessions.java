package org.starderive.job;

import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.spark.sql.SparkSession;

/**
 * Builds the SparkSession for a command: the master given with --master, else the one spark-submit set
 * (system property spark.master), else local[*]. A session this class creates is stopped at the end; one that
 * already existed in the JVM (tests, notebooks) is reused and left running.
 *
 * <p>The same builder runs under spark-submit (client and cluster mode: the driver is our {@code Main}) and in local
 * mode, so {@link #sessionConf} applies in both; a builder setting wins over spark-submit's {@code --conf} and
 * spark-defaults.conf. Each run gets one progress display ({@link ProgressReporter}), closed before the session is
 * stopped and before an error is reported.
 */
public final class Sessions {
    private Sessions() {}

    /** Spark's console stage bars; off unless --verbose (our own display shows the run's progress). */
    static final String SHOW_CONSOLE_PROGRESS = "spark.ui.showConsoleProgress";
    /** Time zone of Spark SQL timestamps: UTC whatever the machine's zone, so that runs agree across hosts. */
    static final String SESSION_TIME_ZONE = "spark.sql.session.timeZone";
    /**
     * Largest generated method (bytes of bytecode) Spark runs in whole-stage code generation; above it Spark runs that
     * part of the plan without (its operators one by one, their expressions still generated, in smaller methods).
     * HotSpot does not JIT-compile a method above 8000 bytes (-XX:+DontCompileHugeMethods, the default), and Spark's
     * own documentation of this setting recommends 8000 on HotSpot (its default, 65535, is the JVM's hard limit). The
     * derive stage (scan, input struct, the UDF, ~60 stored columns with their casts, the sort of partitionBy) makes
     * one such method: it ran interpreted, ~9 core-µs per star, more than all the physics (profile at 2·10⁶ stars,
     * docs/benchmarks.md).
     */
    static final String CODEGEN_HUGE_METHOD_LIMIT = "spark.sql.codegen.hugeMethodLimit";
    static final String HOTSPOT_HUGE_METHOD_LIMIT = "8000";

    /** Work to do with a session and the run's progress display. */
    public interface Work {
        int run(SparkSession spark, ProgressReporter progress);
    }

    /** How a command wants its session and display: --master, --verbose, --no-progress. */
    public static final class Options {
        final String master;
        final boolean verbose;
        final boolean noProgress;

        public Options(String master, boolean verbose, boolean noProgress) {
            this.master = master;
            this.verbose = verbose;
            this.noProgress = noProgress;
        }
    }

    /** The Spark settings every session of ours is built with. */
    static Map<String, String> sessionConf(boolean verbose) {
        Map<String, String> c = new LinkedHashMap<>();
        c.put(SHOW_CONSOLE_PROGRESS, Boolean.toString(verbose));
        c.put(SESSION_TIME_ZONE, "UTC");
        c.put(CODEGEN_HUGE_METHOD_LIMIT, HOTSPOT_HUGE_METHOD_LIMIT);
        return c;
    }

    /**
     * Whether standard input and output are a terminal. On Java 17 that is what {@code System.console() != null}
     * means; from Java 22 on a console may exist with the streams redirected, and {@code Console.isTerminal()}
     * (looked up by name, as it is not in Java 17) tells.
     */
    static boolean interactive() {
        java.io.Console c = System.console();
        if (c == null) {
            return false;
        }
        try {
            return (Boolean) java.io.Console.class.getMethod("isTerminal").invoke(c);
        } catch (NoSuchMethodException e) {
            return true;
        } catch (ReflectiveOperationException | RuntimeException e) {
            return false;
        }
    }

    /**
     * Runs {@code work} of sub-command {@code command} with a session and a progress display. The work finishes the
     * display before it prints its summary (so that the summary does not share a line with it); it is finished here
     * at the latest, and reported stopped (then closed) when the work throws, so that the error printed after it
     * stands on a line of its own.
     */
    public static int withSession(Options opts, String command, Work work) {
        boolean existed = SparkSession.getDefaultSession().isDefined() || SparkSession.getActiveSession().isDefined();
        SparkSession spark;
        if (existed) {
            // a session of the JVM's (tests, notebooks): its static settings cannot change (Spark warns if asked to),
            // only the runtime SQL ones are set
            spark = SparkSession.active();
            Map<String, String> conf = sessionConf(opts.verbose);
            spark.conf().set(SESSION_TIME_ZONE, conf.get(SESSION_TIME_ZONE));
            spark.conf().set(CODEGEN_HUGE_METHOD_LIMIT, conf.get(CODEGEN_HUGE_METHOD_LIMIT));
        } else {
            SparkSession.Builder b = SparkSession.builder().appName("starderive " + command);
            if (opts.master != null) {
                b.master(opts.master);
            } else if (System.getProperty("spark.master") == null) {
                b.master("local[*]");
            }
            sessionConf(opts.verbose).forEach(b::config);
            spark = b.getOrCreate();
        }
        ProgressReporter.Mode mode = ProgressReporter.chooseMode(opts.noProgress, opts.verbose, interactive(),
                System.getenv("TERM"));
        try {
            try (ProgressReporter progress = ProgressListener.open(spark.sparkContext(), command, mode)) {
                int rc = work.run(spark, progress);
                progress.finish();
                return rc;
            }
        } finally {
            if (!existed) {
                spark.stop();
            }
        }
    }
}
