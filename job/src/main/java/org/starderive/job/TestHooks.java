package org.starderive.job;

import org.apache.spark.TaskContext;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.api.java.UDF1;
import org.apache.spark.sql.expressions.UserDefinedFunction;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;

/**
 * Test-only fault injection, never set in production:
 * <ul>
 *   <li>off unless the Spark configuration sets {@value #FAIL_FIRST_ATTEMPT} to true: the first attempt of the task
 *       that processes partition 0 then throws, so Spark must retry it. Used to prove that a retried task writes the
 *       same numbers;</li>
 *   <li>{@link #beforeInputRecheck}: run by the job after the output is written and checked, just before it lists
 *       the inputs again; a test sets it to change an input file between the read and the commit.</li>
 * </ul>
 */
public final class TestHooks {
    private TestHooks() {}

    public static final String FAIL_FIRST_ATTEMPT = "spark.starderive.test.failFirstAttempt";

    /**
     * Run just before the input re-check, when set. Package-private: only tests (same package) set it, and they reset
     * it to null in a finally block. Never set in production, where it stays null.
     */
    static volatile Runnable beforeInputRecheck;

    static void runBeforeInputRecheck() {
        Runnable r = beforeInputRecheck;
        if (r != null) {
            r.run();
        }
    }

    static Dataset<Row> maybeFailFirstAttempt(Dataset<Row> d) {
        SparkSession spark = d.sparkSession();
        if (!Boolean.parseBoolean(spark.conf().get(FAIL_FIRST_ATTEMPT, "false"))) {
            return d;
        }
        UDF1<Long, Boolean> gate = x -> {
            TaskContext tc = TaskContext.get();
            if (tc != null && tc.partitionId() == 0 && tc.attemptNumber() == 0) {
                throw new IllegalStateException("injected failure (" + FAIL_FIRST_ATTEMPT + "): first attempt of partition 0");
            }
            return true;
        };
        UserDefinedFunction f = functions.udf(gate, DataTypes.BooleanType).asNondeterministic();
        return d.filter(f.apply(functions.lit(1L)));
    }

    /** Test-only: called before each step of a commit with its index and description; null in production. */
    static volatile java.util.function.BiConsumer<Integer, String> commitStepHook;

    static void beforeCommitStep(int index, String step) {
        java.util.function.BiConsumer<Integer, String> h = commitStepHook;
        if (h != null) {
            h.accept(index, step);
        }
    }

    /**
     * Test-only: run by export after the temporary file is complete, just before the rename into place; a test makes
     * it throw to prove that a failed export leaves no file and the previous one untouched. Null in production.
     */
    static volatile java.util.function.Consumer<java.nio.file.Path> beforeExportRename;

    static void beforeExportRename(java.nio.file.Path tmp) throws java.io.IOException {
        java.util.function.Consumer<java.nio.file.Path> h = beforeExportRename;
        if (h != null) {
            h.accept(tmp);
        }
    }
}
