package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;

/**
 * The progress display fed with synthetic events and a hand-driven clock: plain lines for a log, the in-place line
 * for a terminal. The terminal output is replayed through a minimal terminal model (a carriage return moves to the
 * start of the line, a line feed to the next line, characters overwrite: common practice of character terminals),
 * so the checks are on what a user would see, not on the escape bytes.
 */
class ProgressReporterTest {
    private static final long MS = 1_000_000L;
    private static final long S = 1_000 * MS;

    private final AtomicLong now = new AtomicLong(1_000 * S);
    private final ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    private final List<Integer> stepsTold = new ArrayList<>();

    private ProgressReporter reporter(ProgressReporter.Mode mode, int width) {
        return new ProgressReporter("derive", mode, new PrintStream(bytes, true, StandardCharsets.UTF_8), now::get,
                30 * S, width, stepsTold::add);
    }

    private String text() {
        return bytes.toString(StandardCharsets.UTF_8);
    }

    /** What a character terminal shows after the output: one string per screen line (trailing blanks removed). */
    private List<String> screen() {
        List<StringBuilder> lines = new ArrayList<>();
        lines.add(new StringBuilder());
        int col = 0;
        for (char c : text().toCharArray()) {
            StringBuilder line = lines.get(lines.size() - 1);
            if (c == '\r') {
                col = 0;
            } else if (c == '\n') {
                lines.add(new StringBuilder());
                col = 0;
            } else {
                if (col < line.length()) {
                    line.setCharAt(col, c);
                } else {
                    line.append(c);
                }
                col++;
            }
        }
        List<String> out = new ArrayList<>();
        for (StringBuilder l : lines) {
            out.add(l.toString().stripTrailing());
        }
        return out;
    }

    /** One stage of 4 tasks for the current step, 3 of them ending successfully with 250 records read each. */
    private void stageWithTasks(ProgressReporter r, int step, long stageKey) {
        r.stageSubmitted(r.tag(step), stageKey, 4);
        for (int i = 0; i < 3; i++) {
            r.taskEnded(stageKey, true, 250, 0);
        }
    }

    @Test
    void plainLinesOneStartAndOneEndPerStepInOrderWithDurationAndCounts() {
        ProgressReporter r = reporter(ProgressReporter.Mode.LINES, 80);
        r.step("open_inputs");
        now.addAndGet(1200 * MS);
        r.step("derive_and_write");
        stageWithTasks(r, 1, 7);
        r.taskEnded(7, true, 250, 1000);
        r.stageCompleted(7);
        now.addAndGet(2500 * MS);
        r.finish();
        r.close();
        assertEquals(List.of(
                "[derive 0:00] open_inputs started",
                "[derive 0:01] open_inputs done in 1.2 s",
                "[derive 0:01] derive_and_write started",
                "[derive 0:03] derive_and_write done in 2.5 s (4 tasks, 1,000 records read, 1,000 records written)",
                ""), List.of(text().split("\n", -1)));
        assertEquals(List.of(0, 1), stepsTold, "each step tagged for the listener, in order");
    }

    @Test
    void plainLinesInBetweenAtMostOneEveryIntervalWithTasksDoneOfTotal() {
        ProgressReporter r = reporter(ProgressReporter.Mode.LINES, 80);
        r.step("derive_and_write");
        stageWithTasks(r, 0, 1);
        for (int t = 0; t < 95; t++) { // ticks once a second for 95 s: lines due at 30, 60 and 90 s
            now.addAndGet(S);
            r.tick();
        }
        r.finish();
        List<String> lines = List.of(text().split("\n"));
        List<String> running = lines.stream().filter(l -> l.contains(" running for ")).collect(java.util.stream.Collectors.toList());
        assertEquals(List.of(
                "[derive 0:30] derive_and_write running for 30 s: 3/4 tasks, 750 records read",
                "[derive 1:00] derive_and_write running for 60 s: 3/4 tasks, 750 records read",
                "[derive 1:30] derive_and_write running for 90 s: 3/4 tasks, 750 records read"), running);
        assertEquals("[derive 1:35] derive_and_write done in 95.0 s (3/4 tasks, 750 records read)", lines.get(lines.size() - 1),
                "a step that ends with tasks missing says so");
        assertFalse(text().contains("\r"), "no carriage return in a log");
    }

    @Test
    void jobsOfAnotherRunAndFailedAttemptsAreNotCounted() {
        ProgressReporter r = reporter(ProgressReporter.Mode.LINES, 80);
        ProgressReporter other = reporter(ProgressReporter.Mode.LINES, 80);
        r.step("scan_ids");
        other.step("scan_ids");
        r.stageSubmitted(other.tag(0), 5, 100);   // the other run's stage
        r.taskEnded(5, true, 1_000_000, 0);
        r.stageSubmitted(null, 6, 100);           // a job with no tag at all
        r.stageSubmitted(r.tag(0), 8, 2);
        r.taskEnded(8, false, 99, 0);              // failed attempt, redone below
        r.taskEnded(8, true, 10, 0);
        r.taskEnded(8, true, 10, 0);
        assertNull(r.stepOf(other.tag(0)));
        assertNull(r.stepOf(r.tag(7)), "no such step");
        r.finish();
        assertTrue(text().contains("scan_ids done in 0.0 s (2 tasks, 20 records read)"), text());
    }

    @Test
    void terminalLineRedrawnInPlaceAtMostFourTimesASecondThenClearedWhenTheRunEnds() {
        ProgressReporter r = reporter(ProgressReporter.Mode.TERMINAL, 100);
        r.step("open_inputs");
        r.tick();
        now.addAndGet(1500 * MS);
        r.step("scan_ids");
        stageWithTasks(r, 1, 3);
        int draws = 0;
        for (int t = 0; t < 40; t++) { // 40 ticks 50 ms apart: 2 s
            now.addAndGet(50 * MS);
            int before = text().length();
            r.tick();
            draws += text().length() > before ? 1 : 0;
        }
        assertTrue(draws <= 8, "at most 4 redraws a second over 2 s: " + draws);
        assertTrue(draws >= 2, "the elapsed time moves: " + draws);
        assertFalse(text().contains("\n"), "one line, never a new one: " + text());
        List<String> shown = screen();
        assertEquals(1, shown.size(), shown.toString());
        assertEquals("[derive 0:03] scan_ids 2 s, 3/4 tasks, 750 records read", shown.get(0));
        assertTrue(text().endsWith("\r"), "the cursor waits at the start of the line, so a warning printed now "
                + "starts at the left edge");
        r.finish();
        r.close();
        assertEquals(List.of(""), screen(), "cleared when the run ends: the summary starts on an empty line");
        int len = text().length();
        r.tick();
        assertEquals(len, text().length(), "nothing drawn after the end");
    }

    @Test
    void terminalLineBecomesAStoppedLineWhenTheRunFails() {
        ProgressReporter r = reporter(ProgressReporter.Mode.TERMINAL, 100);
        r.step("check_output");
        now.addAndGet(300 * MS);
        r.tick();
        r.step("open_inputs");
        now.addAndGet(700 * MS);
        r.tick();
        r.close(); // the error path: closed without finish()
        assertEquals(List.of("[derive 0:01] open_inputs stopped after 0.7 s", ""), screen());
        assertTrue(text().endsWith("\n"), "the error message that follows starts on a line of its own");
    }

    @Test
    void plainLinesSayWhichStepStoppedWhenTheRunFails() {
        ProgressReporter r = reporter(ProgressReporter.Mode.LINES, 80);
        r.step("check_output");
        now.addAndGet(100 * MS);
        r.close();
        r.close(); // closing twice changes nothing
        assertEquals("[derive 0:00] check_output started\n[derive 0:00] check_output stopped after 0.1 s\n", text());
    }

    @Test
    void theInPlaceLineIsCutToTheTerminalWidthSoThatItNeverWraps() {
        ProgressReporter r = reporter(ProgressReporter.Mode.TERMINAL, 40);
        r.step("derive_and_write");
        r.stageSubmitted(r.tag(0), 1, 1_000_000);
        r.taskEnded(1, true, 123_456_789, 0);
        r.tick();
        String shown = screen().get(0);
        assertEquals(39, shown.length(), shown);
        assertTrue(shown.endsWith("..."), shown);
    }

    @Test
    void offShowsNothing() {
        ProgressReporter r = ProgressReporter.off();
        r.step("open_inputs");
        r.tick();
        r.finish();
        r.close();
        assertEquals(ProgressReporter.Mode.OFF, r.mode());
    }

    @Test
    void modeIsTheInPlaceLineOnlyOnAnInteractiveTerminalWithoutVerbose() {
        // common practice: carriage-return progress only on an interactive, non-dumb terminal; logs get plain lines
        assertEquals(ProgressReporter.Mode.TERMINAL, ProgressReporter.chooseMode(false, false, true, "xterm-256color"));
        assertEquals(ProgressReporter.Mode.TERMINAL, ProgressReporter.chooseMode(false, false, true, null));
        assertEquals(ProgressReporter.Mode.LINES, ProgressReporter.chooseMode(false, false, false, "xterm"), "redirected");
        assertEquals(ProgressReporter.Mode.LINES, ProgressReporter.chooseMode(false, false, true, "dumb"));
        assertEquals(ProgressReporter.Mode.LINES, ProgressReporter.chooseMode(false, true, true, "xterm"),
                "--verbose: Spark's logs and bars would draw over an in-place line");
        assertEquals(ProgressReporter.Mode.OFF, ProgressReporter.chooseMode(true, false, true, "xterm"));
        assertEquals(ProgressReporter.Mode.OFF, ProgressReporter.chooseMode(true, true, false, null));
    }

    @Test
    void elapsedClock() {
        // arithmetic: 3,725 s = 1 h 2 min 5 s
        assertEquals("0:00", ProgressReporter.clock(999 * MS));
        assertEquals("1:05", ProgressReporter.clock(65 * S));
        assertEquals("59:59", ProgressReporter.clock(3599 * S));
        assertEquals("1:02:05", ProgressReporter.clock(3725 * S));
        assertEquals("12.3 s", ProgressReporter.seconds(12_345 * MS, 1));
    }
}
