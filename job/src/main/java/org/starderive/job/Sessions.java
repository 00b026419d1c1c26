package org.starderive.job;

import org.apache.spark.sql.SparkSession;

/**
 * Builds the SparkSession for a command: the master given with --master, else the one spark-submit set
 * (system property spark.master), else local[*]. A session this class creates is stopped at the end; one that
 * already existed in the JVM (tests, notebooks) is reused and left running.
 */
public final class Sessions {
    private Sessions() {}

    /** Work to do with a session. */
    public interface Work {
        int run(SparkSession spark);
    }

    public static int withSession(String master, String appName, Work work) {
        boolean existed = SparkSession.getDefaultSession().isDefined() || SparkSession.getActiveSession().isDefined();
        SparkSession.Builder b = SparkSession.builder().appName(appName);
        if (master != null) {
            b.master(master);
        } else if (System.getProperty("spark.master") == null) {
            b.master("local[*]");
        }
        b.config("spark.ui.showConsoleProgress", "true");
        b.config("spark.sql.session.timeZone", "UTC");
        SparkSession spark = b.getOrCreate();
        try {
            return work.run(spark);
        } finally {
            if (!existed) {
                spark.stop();
            }
        }
    }
}
