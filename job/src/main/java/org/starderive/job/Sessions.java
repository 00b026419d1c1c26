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
            spark.conf().set(SESSION_TIME_ZONE, sessionConf(opts.verbose).get(SESSION_TIME_ZONE));
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
