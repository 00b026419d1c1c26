package org.starderive.job;

import java.io.PrintStream;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.UUID;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.IntConsumer;
import java.util.function.LongSupplier;

/**
 * The one progress display of a run: the current step, tasks done / total of the Spark stages the step started,
 * records read and written as the successful tasks' metrics count them (rows, for a run's tables; a cached RDD counts
 * its elements), and the elapsed time. No Spark import: {@link ProgressListener}
 * feeds it Spark's events, tests feed it synthetic ones.
 *
 * <p>Two ways to show it (chosen by {@link #chooseMode}):
 * <ul>
 *   <li>{@link Mode#TERMINAL}: one line on the terminal (standard output, which {@code System.console()} vouches for),
 *       redrawn in place with a carriage return at most {@link #TERMINAL_REDRAW_MS} apart, cleared when the run
 *       ends, replaced by a "stopped" line when it fails. The cursor is left at the start of the line, so that a
 *       warning printed meanwhile starts at the left edge instead of after the progress text.</li>
 *   <li>{@link Mode#LINES}: plain lines on standard error (a log, a pipe, a cluster's driver log): one when a step
 *       starts, one when it ends with its duration and counts, and in between at most one every
 *       {@link #LINES_EVERY_S} seconds.</li>
 * </ul>
 * Standard output keeps the run's summary only, so that it can be piped or redirected on its own.
 */
public final class ProgressReporter implements AutoCloseable {
    /** Where and how the display is shown. */
    public enum Mode { TERMINAL, LINES, OFF }

    /** Least time between two redraws of the in-place line: at most four a second. */
    static final long TERMINAL_REDRAW_MS = 250;
    /** Seconds between two "still running" lines of one step in plain-line mode (a log line every half minute). */
    static final long LINES_EVERY_S = 30;
    /** Longest wait at the end of a step for the task-end events of its stages (Spark delivers them asynchronously). */
    static final long SETTLE_MS = 250;

    private final String command;
    private final Mode mode;
    private final PrintStream out;
    private final LongSupplier nanoClock;
    private final long linesEveryNanos;
    private final int width;
    private final IntConsumer onStep;
    private final String token = UUID.randomUUID().toString().substring(0, 8);
    private final long startNanos;
    private final List<Step> steps = new CopyOnWriteArrayList<>();
    private final Map<Long, Step> stages = new ConcurrentHashMap<>();
    private final List<Runnable> onClose = new ArrayList<>();

    private volatile Step current;
    private boolean ended;
    private boolean closed;
    private long lastDrawNanos = Long.MIN_VALUE;
    private long lastLineNanos;
    private String lastDrawn = "";

    /** Counters of one step; written by the listener thread, read by the display. */
    static final class Step {
        final int index;
        final String name;
        final long startNanos;
        final AtomicLong tasksTotal = new AtomicLong();
        final AtomicLong tasksDone = new AtomicLong();
        final AtomicLong recordsRead = new AtomicLong();
        final AtomicLong recordsWritten = new AtomicLong();
        final AtomicInteger openStages = new AtomicInteger();

        Step(int index, String name, long startNanos) {
            this.index = index;
            this.name = name;
            this.startNanos = startNanos;
        }
    }

    /**
     * @param command         the sub-command, shown at the start of every line
     * @param out             the stream to show it on (standard output for the terminal, standard error for lines)
     * @param nanoClock       System::nanoTime, or a test clock
     * @param linesEveryNanos least time between two "still running" lines of a step (plain-line mode)
     * @param width           terminal width in characters (the in-place line is cut to width - 1 so it never wraps)
     * @param onStep          told the index of each new step (the Spark binding tags the step's jobs with it)
     */
    ProgressReporter(String command, Mode mode, PrintStream out, LongSupplier nanoClock, long linesEveryNanos, int width,
                     IntConsumer onStep) {
        this.command = command;
        this.mode = mode;
        this.out = out;
        this.nanoClock = nanoClock;
        this.linesEveryNanos = linesEveryNanos;
        this.width = width;
        this.onStep = onStep;
        this.startNanos = nanoClock.getAsLong();
    }

    /** A display that shows nothing and counts nothing (--no-progress, or work run outside the command line). */
    public static ProgressReporter off() {
        return new ProgressReporter("", Mode.OFF, null, System::nanoTime, 0, 80, i -> { });
    }

    /**
     * The mode for a run: nothing with --no-progress; the in-place line when standard input and output are a terminal
     * (that is what {@code System.console() != null} means), the terminal is not a dumb one and Spark's own logs and
     * progress bar are not asked for (--verbose, which would draw over it); plain lines otherwise.
     */
    static Mode chooseMode(boolean noProgress, boolean verbose, boolean console, String term) {
        if (noProgress) {
            return Mode.OFF;
        }
        return console && !verbose && !"dumb".equals(term) ? Mode.TERMINAL : Mode.LINES;
    }

    Mode mode() { return mode; }

    /** Value of the Spark job property that ties a job to a step of this display; see {@link #stepOf}. */
    String tag(int stepIndex) {
        return token + "/" + stepIndex;
    }

    /** The step a job property names, or null if the job is not this display's (another run in the same JVM). */
    Step stepOf(String tag) {
        if (tag == null || !tag.startsWith(token + "/")) {
            return null;
        }
        try {
            int i = Integer.parseInt(tag.substring(token.length() + 1));
            return i >= 0 && i < steps.size() ? steps.get(i) : null;
        } catch (NumberFormatException e) {
            return null;
        }
    }

    /** Runs when the display closes (the Spark binding removes its listener and stops its timer here). */
    void onClose(Runnable r) {
        onClose.add(r);
    }

    /** Ends the current step (if any) and starts the named one. Called on the thread that submits the step's jobs. */
    public void step(String name) {
        if (mode == Mode.OFF) {
            return;
        }
        Step prev = current;
        if (prev != null) {
            settle(prev);
        }
        synchronized (this) {
            if (ended) {
                return;
            }
            long now = nanoClock.getAsLong();
            if (prev != null) {
                endLine(prev, now, true);
            }
            Step s = new Step(steps.size(), name, now);
            steps.add(s);
            current = s;
            lastLineNanos = now;
            if (mode == Mode.LINES) {
                println(prefix(now) + name + " started");
            }
        }
        onStep.accept(steps.size() - 1);
    }

    // ---- events (from the listener thread) ----

    /** A stage of the step tagged {@code tag} was submitted with {@code tasks} tasks (each attempt of a stage counts). */
    void stageSubmitted(String tag, long stageKey, int tasks) {
        Step s = stepOf(tag);
        if (s != null) {
            stages.put(stageKey, s);
            s.tasksTotal.addAndGet(tasks);
            s.openStages.incrementAndGet();
        }
    }

    /** A stage ended (completed or failed). */
    void stageCompleted(long stageKey) {
        Step s = stages.remove(stageKey);
        if (s != null) {
            s.openStages.decrementAndGet();
        }
    }

    /** A task ended; only successful tasks count as done, and only their records (a failed attempt is redone). */
    void taskEnded(long stageKey, boolean success, long recordsRead, long recordsWritten) {
        Step s = stages.get(stageKey);
        if (s != null && success) {
            s.tasksDone.incrementAndGet();
            s.recordsRead.addAndGet(Math.max(0, recordsRead));
            s.recordsWritten.addAndGet(Math.max(0, recordsWritten));
        }
    }

    // ---- display ----

    /** Called by the timer: redraws the in-place line, or prints a "still running" line when one is due. */
    public synchronized void tick() {
        Step s = current;
        if (ended || s == null || mode == Mode.OFF) {
            return;
        }
        long now = nanoClock.getAsLong();
        if (mode == Mode.TERMINAL) {
            if (lastDrawNanos != Long.MIN_VALUE && now - lastDrawNanos < TERMINAL_REDRAW_MS * 1_000_000L) {
                return;
            }
            String text = prefix(now) + s.name + " " + seconds(now - s.startNanos, 0);
            String c = counts(s, false);
            draw(c.isEmpty() ? text : text + ", " + c);
            lastDrawNanos = now;
        } else if (now - lastLineNanos >= linesEveryNanos) {
            String c = counts(s, false);
            println(prefix(now) + s.name + " running for " + seconds(now - s.startNanos, 0) + (c.isEmpty() ? "" : ": " + c));
            lastLineNanos = now;
        }
    }

    /** The run succeeded: ends the current step and takes the in-place line away (the summary follows). */
    public void finish() {
        Step s = current;
        if (s != null) {
            settle(s);
        }
        synchronized (this) {
            if (ended || mode == Mode.OFF) {
                ended = true;
                return;
            }
            ended = true;
            if (s != null) {
                endLine(s, nanoClock.getAsLong(), true);
            }
            if (mode == Mode.TERMINAL) {
                clear();
            }
        }
    }

    /** The run failed: the current step is reported stopped (the in-place line becomes that line), before the error. */
    public synchronized void fail() {
        if (ended || mode == Mode.OFF) {
            ended = true;
            return;
        }
        ended = true;
        Step s = current;
        if (s == null) {
            if (mode == Mode.TERMINAL) {
                clear();
            }
            return;
        }
        endLine(s, nanoClock.getAsLong(), false);
    }

    /** Stops the timer and detaches from Spark; a display not finished by then is reported as failed. */
    @Override
    public void close() {
        synchronized (this) {
            if (closed) {
                return;
            }
            closed = true;
        }
        fail();
        for (Runnable r : onClose) {
            r.run();
        }
    }

    private void endLine(Step s, long now, boolean done) {
        String c = counts(s, true);
        String text = prefix(now) + s.name + (done ? " done in " : " stopped after ") + seconds(now - s.startNanos, 1)
                + (c.isEmpty() ? "" : " (" + c + ")");
        if (mode == Mode.LINES) {
            println(text);
        } else if (!done) {
            String line = fit(text);
            out.print("\r" + line + pad(lastDrawn.length() - line.length()) + "\n");
            out.flush();
            lastDrawn = "";
        }
    }

    /** Waits (at most {@link #SETTLE_MS}) until the task-end events of the step's stages have all arrived. */
    private void settle(Step s) {
        long deadline = System.nanoTime() + SETTLE_MS * 1_000_000L;
        while (s.openStages.get() > 0 && System.nanoTime() < deadline) {
            try {
                Thread.sleep(5);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return;
            }
        }
    }

    private void draw(String text) {
        String line = fit(text);
        if (line.equals(lastDrawn)) {
            return;
        }
        out.print("\r" + line + pad(lastDrawn.length() - line.length()) + "\r");
        out.flush();
        lastDrawn = line;
    }

    private void clear() {
        if (!lastDrawn.isEmpty()) {
            out.print("\r" + pad(lastDrawn.length()) + "\r");
            out.flush();
            lastDrawn = "";
        }
    }

    private void println(String line) {
        out.println(line);
        out.flush();
    }

    private String fit(String text) {
        int max = Math.max(20, width - 1);
        return text.length() <= max ? text : text.substring(0, max - 3) + "...";
    }

    private static String pad(int n) {
        return n > 0 ? " ".repeat(n) : "";
    }

    private String prefix(long now) {
        return "[" + command + " " + clock(now - startNanos) + "] ";
    }

    /** Tasks done / total, records read, records written: the parts that are known, comma separated. */
    static String counts(Step s, boolean end) {
        List<String> parts = new ArrayList<>();
        long total = s.tasksTotal.get();
        long done = s.tasksDone.get();
        if (total > 0) {
            parts.add(end && done == total ? String.format(Locale.ROOT, "%,d tasks", done)
                    : String.format(Locale.ROOT, "%,d/%,d tasks", done, total));
        }
        if (s.recordsRead.get() > 0) {
            parts.add(String.format(Locale.ROOT, "%,d records read", s.recordsRead.get()));
        }
        if (s.recordsWritten.get() > 0) {
            parts.add(String.format(Locale.ROOT, "%,d records written", s.recordsWritten.get()));
        }
        return String.join(", ", parts);
    }

    /** Elapsed time as m:ss, or h:mm:ss from an hour on. */
    static String clock(long nanos) {
        long s = Math.max(0, nanos) / 1_000_000_000L;
        return s >= 3600 ? String.format(Locale.ROOT, "%d:%02d:%02d", s / 3600, s / 60 % 60, s % 60)
                : String.format(Locale.ROOT, "%d:%02d", s / 60, s % 60);
    }

    /** A duration in seconds with the given decimals. */
    static String seconds(long nanos, int decimals) {
        return String.format(Locale.ROOT, "%." + decimals + "f s", Math.max(0, nanos) / 1e9);
    }
}
