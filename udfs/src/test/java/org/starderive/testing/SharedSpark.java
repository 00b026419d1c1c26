package org.starderive.testing;

import com.holdenkarau.spark.testing.JavaDataFrameSuiteBase;
import org.apache.spark.SparkConf;
import org.apache.spark.sql.SparkSession;

/**
 * The one SparkSession of a test JVM (local[2] with one task retry, no UI, no Hive), created on first use through spark-testing-base's
 * {@link JavaDataFrameSuiteBase} so that its DataFrame comparisons are available to JUnit 5 tests, and stopped when
 * the JVM exits.
 */
public final class SharedSpark {
    private SharedSpark() {}

    /** spark-testing-base suite configured for this project. */
    public static final class Suite extends JavaDataFrameSuiteBase {
        @Override
        public boolean enableHiveSupport() {
            return false;
        }

        @Override
        public SparkConf conf() {
            return new SparkConf()
                    // local[2, 2]: two threads and one retry, so that a test can make a task fail once
                    .setMaster("local[2,2]")
                    .setAppName("starderive-tests")
                    .set("spark.ui.enabled", "false")
                    .set("spark.driver.host", "localhost")
                    .set("spark.sql.shuffle.partitions", "4")
                    .set("spark.sql.session.timeZone", "UTC")
                    .set("spark.ui.showConsoleProgress", "false");
        }
    }

    private static Suite suite;

    public static synchronized Suite suite() {
        if (suite == null) {
            Suite s = new Suite();
            s.runBefore();
            suite = s;
            Runtime.getRuntime().addShutdownHook(new Thread(JavaDataFrameSuiteBase::runAfterClass));
        }
        return suite;
    }

    public static SparkSession spark() {
        return suite().spark();
    }
}
