package org.starderive.job;

import java.io.PrintStream;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import org.apache.spark.SparkContext;
import org.apache.spark.scheduler.SparkListener;
import org.apache.spark.scheduler.SparkListenerStageCompleted;
import org.apache.spark.scheduler.SparkListenerStageSubmitted;
import org.apache.spark.scheduler.SparkListenerTaskEnd;
import org.apache.spark.scheduler.StageInfo;

/**
 * Feeds a {@link ProgressReporter} from Spark's listener bus: stage submitted (tasks to do), task end (done, and its
 * records read and written), stage completed. Work per event is a map lookup and a few atomic additions, never per
 * row; the display itself is drawn by a timer thread, so the listener bus is never held up by output.
 *
 * <p>Why a listener and not Spark's status tracker: the tracker gives task counts but not the records read and
 * written, and a poll sees only stages still active, so a short stage between two polls would not be counted. A
 * job is tied to the step that submitted it through a local property of the submitting thread
 * ({@value #STEP_PROPERTY}), which Spark copies into every stage's properties: jobs of another run sharing the
 * SparkContext (tests, notebooks) are not counted, and a task end arriving late is still counted in its own step.
 * The listener is removed when the display closes, so a shared SparkContext does not keep it.
 */
public final class ProgressListener extends SparkListener {
    /** Local property naming the display and step a job belongs to. */
    static final String STEP_PROPERTY = "starderive.progress.step";

    private static final AtomicInteger ATTACHED = new AtomicInteger();

    private final ProgressReporter reporter;

    private ProgressListener(ProgressReporter reporter) {
        this.reporter = reporter;
    }

    /** Listeners of this class attached to a SparkContext now (tests check that a run leaves none behind). */
    static int attached() {
        return ATTACHED.get();
    }

    /**
     * Opens the display of one run of {@code command} on {@code sc}: attaches a listener and starts the redraw timer,
     * unless the mode is {@link ProgressReporter.Mode#OFF}. Close the result when the run ends.
     */
    static ProgressReporter open(SparkContext sc, String command, ProgressReporter.Mode mode) {
        if (mode == ProgressReporter.Mode.OFF) {
            return ProgressReporter.off();
        }
        PrintStream out = mode == ProgressReporter.Mode.TERMINAL ? System.out : System.err;
        ProgressReporter[] self = new ProgressReporter[1];
        ProgressReporter r = new ProgressReporter(command, mode, out, System::nanoTime,
                TimeUnit.SECONDS.toNanos(ProgressReporter.LINES_EVERY_S), terminalWidth(),
                i -> sc.setLocalProperty(STEP_PROPERTY, self[0].tag(i)));
        self[0] = r;
        ProgressListener l = new ProgressListener(r);
        sc.addSparkListener(l);
        ATTACHED.incrementAndGet();
        ScheduledExecutorService timer = Executors.newSingleThreadScheduledExecutor(task -> {
            Thread t = new Thread(task, "starderive-progress");
            t.setDaemon(true);
            return t;
        });
        long period = mode == ProgressReporter.Mode.TERMINAL ? ProgressReporter.TERMINAL_REDRAW_MS : 1000;
        timer.scheduleAtFixedRate(r::tick, period, period, TimeUnit.MILLISECONDS);
        r.onClose(() -> {
            timer.shutdownNow();
            sc.removeSparkListener(l);
            ATTACHED.decrementAndGet();
            sc.setLocalProperty(STEP_PROPERTY, null);
        });
        return r;
    }

    /** Width of the terminal from COLUMNS (set by most shells when exported), else 80. */
    private static int terminalWidth() {
        try {
            int c = Integer.parseInt(System.getenv().getOrDefault("COLUMNS", "80").trim());
            return c >= 20 ? c : 80;
        } catch (NumberFormatException e) {
            return 80;
        }
    }

    private static long key(int stageId, int attempt) {
        return ((long) stageId << 32) | (attempt & 0xffffffffL);
    }

    @Override
    public void onStageSubmitted(SparkListenerStageSubmitted e) {
        StageInfo s = e.stageInfo();
        String tag = e.properties() == null ? null : e.properties().getProperty(STEP_PROPERTY);
        reporter.stageSubmitted(tag, key(s.stageId(), s.attemptNumber()), s.numTasks());
    }

    @Override
    public void onStageCompleted(SparkListenerStageCompleted e) {
        reporter.stageCompleted(key(e.stageInfo().stageId(), e.stageInfo().attemptNumber()));
    }

    @Override
    public void onTaskEnd(SparkListenerTaskEnd e) {
        boolean ok = e.reason() instanceof org.apache.spark.Success$;
        long read = 0;
        long written = 0;
        if (ok && e.taskMetrics() != null) {
            read = e.taskMetrics().inputMetrics().recordsRead();
            written = e.taskMetrics().outputMetrics().recordsWritten();
        }
        reporter.taskEnded(key(e.stageId(), e.stageAttemptId()), ok, read, written);
    }
}
