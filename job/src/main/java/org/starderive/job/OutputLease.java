package org.starderive.job;

import java.io.IOException;
import java.io.OutputStream;
import java.net.InetAddress;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import org.apache.hadoop.fs.FSDataInputStream;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * One writer per output: a lease taken on the output before anything is written and held through the commit.
 *
 * <p><b>Files.</b> Beside the output (hidden, so no reader takes them for data): {@code .NAME.lease-GGGGGGGGGG}, one file
 * per generation G, holding the run id, host, process id, process start time and start time of the run that took it;
 * {@code .NAME.lease-G.released} once that run has ended (committed or failed).
 *
 * <p><b>Taking the lease.</b> The newest generation G decides. If it is neither released nor stale, the run refuses
 * (exit 4) naming the holder. Otherwise the run creates generation G+1 with an atomic create-if-absent — on the local
 * file system {@code O_CREAT|O_EXCL} ({@link Files#write} with {@code CREATE_NEW}), elsewhere Hadoop's
 * {@code create(path, overwrite=false)}, which the HDFS NameNode performs atomically. Of two runs racing for G+1 exactly
 * one succeeds; the other reads the winner and refuses naming it. A run that created a generation and then finds a newer
 * one (it was slower than a later run that had seen an older state) gives its own up and refuses too. Older generations
 * are deleted by the new holder.
 *
 * <p><b>Stale rule.</b> A lease is stale when (a) its host is this host and no process with its process id and start
 * time is alive there (a killed run: taken over at once), or (b) its file has not been renewed for
 * {@code output.lease_stale_after_s} seconds (default 120; another host's run that died, or lost its storage). The
 * holder renews it (sets the file's modification time) every 1/12 of that interval. Rule (b) assumes the hosts' clocks
 * agree to well within the interval.
 *
 * <p><b>Fencing.</b> A run paused longer than the stale interval (a long GC, a frozen VM) may find its lease taken over.
 * {@link #checkHeld()} — called by the committer before every step that changes the output — then stops it with exit 4
 * before it touches the output. The window between that check and one rename is not closed; it is milliseconds against
 * an interval of minutes.
 *
 * <p><b>Object stores</b> (S3, GCS) have no atomic create-if-absent through this API: there the lease detects runs that
 * overlap by more than a listing's delay but cannot rule out two runs started in the same instant. Run one writer per
 * output by scheduling there.
 */
public final class OutputLease implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(OutputLease.class);

    /** Default of {@code output.lease_stale_after_s}. */
    public static final double STALE_AFTER_S_DEFAULT = 120;
    private static final String RELEASED = ".released";

    private final FileSystem fs;
    private final Path output;
    private final Path file;
    private final long generation;
    private final String runId;
    private final ScheduledExecutorService heartbeat;
    private volatile String lost;
    private volatile boolean released;

    /** Who holds (or held) a lease, as written in its file. */
    static final class Holder {
        final Map<String, String> fields;
        final long renewedMillis;
        final long generation;
        final boolean released;

        Holder(Map<String, String> fields, long renewedMillis, long generation, boolean released) {
            this.fields = fields;
            this.renewedMillis = renewedMillis;
            this.generation = generation;
            this.released = released;
        }

        String get(String k) { return fields.getOrDefault(k, "?"); }

        String describe(long nowMillis) {
            return "run " + get("run_id") + " (host " + get("host") + ", pid " + get("pid") + ", started " + get("started_utc")
                    + ", lease renewed " + Math.max(0, (nowMillis - renewedMillis) / 1000) + " s ago)";
        }
    }

    private OutputLease(FileSystem fs, Path output, Path file, long generation, String runId, double staleAfterS) {
        this.fs = fs;
        this.output = output;
        this.file = file;
        this.generation = generation;
        this.runId = runId;
        long periodMs = Math.max(200, (long) (staleAfterS * 1000 / 12));
        this.heartbeat = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "starderive-lease-" + runId);
            t.setDaemon(true);
            return t;
        });
        heartbeat.scheduleAtFixedRate(this::renew, periodMs, periodMs, TimeUnit.MILLISECONDS);
    }

    public String runId() { return runId; }

    public long generation() { return generation; }

    Path file() { return file; }

    static String prefix(Path output) { return "." + output.getName() + ".lease-"; }

    static Path leaseFile(Path output, long generation) {
        return new Path(output.getParent(), prefix(output) + String.format(Locale.ROOT, "%010d", generation));
    }

    private static boolean local(FileSystem fs) { return "file".equals(fs.getScheme()); }

    /**
     * Takes the lease on {@code output} for run {@code runId}, or refuses with exit 4 naming the run that holds it.
     *
     * @param staleAfterS seconds without renewal after which a lease is stale (rule (b) above)
     */
    public static OutputLease acquire(FileSystem fs, Path output, String runId, double staleAfterS) {
        try {
            fs.mkdirs(output.getParent());
            for (int attempt = 0; attempt < 5; attempt++) {
                List<Long> gens = generations(fs, output);
                long newest = gens.isEmpty() ? 0 : gens.get(gens.size() - 1);
                Holder h = newest == 0 ? null : read(fs, output, newest);
                long now = System.currentTimeMillis();
                if (h != null && !h.released) {
                    Optional<String> staleWhy = staleReason(h, now, staleAfterS);
                    if (staleWhy.isEmpty()) {
                        if (attempt < 4 && changed(fs, output, newest)) {
                            continue; // released and replaced while we looked: look again
                        }
                        throw busy(output, h, now, staleAfterS);
                    }
                    LOG.warn("Output {}: taking over the lease of {}: {}", output, h.describe(now), staleWhy.get());
                }
                long mine = newest + 1;
                Path f = leaseFile(output, mine);
                if (!createExclusive(fs, f, content(runId))) {
                    continue; // another run took this generation first: look again (it is then the holder)
                }
                List<Long> after = generations(fs, output);
                long top = after.get(after.size() - 1);
                if (top != mine) {
                    // a run that saw a newer state got there first; ours was never the lease
                    markReleased(fs, f);
                    Holder winner = read(fs, output, top);
                    throw busy(output, winner, System.currentTimeMillis(), staleAfterS);
                }
                for (long g : after) {
                    if (g < mine) {
                        fs.delete(leaseFile(output, g), false);
                        fs.delete(new Path(leaseFile(output, g) + RELEASED), false);
                    }
                }
                LOG.debug("Output {}: lease generation {} taken by run {}", output, mine, runId);
                return new OutputLease(fs, output, f, mine, runId, staleAfterS);
            }
            List<Long> gens = generations(fs, output);
            Holder h = read(fs, output, gens.get(gens.size() - 1));
            throw busy(output, h, System.currentTimeMillis(), staleAfterS);
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot take the lease beside it (" + e.getMessage()
                    + ") (rule: the output's parent must be writable)");
        }
    }

    /**
     * What {@link #acquire} checks before it writes, without writing (the {@code check} sub-command): that the output's
     * parent can be made (its nearest existing ancestor is a folder this user may write) and that no live run holds the
     * lease. Refuses as acquire does (exit 4, the same rule); a lease free now may of course be taken before derive runs,
     * and for an unwritable parent the cause in parentheses is this method's own words, not the file system's.
     */
    public static void inspect(FileSystem fs, Path output, double staleAfterS) {
        try {
            Path p = output.getParent();
            while (p != null && !fs.exists(p)) {
                p = p.getParent();
            }
            if (p == null || !fs.getFileStatus(p).isDirectory()) {
                throw new IOException(p == null ? "no ancestor of it exists" : p + " is a file, not a folder");
            }
            fs.access(p, org.apache.hadoop.fs.permission.FsAction.WRITE);
            List<Long> gens = generations(fs, output);
            if (!gens.isEmpty()) {
                Holder h = read(fs, output, gens.get(gens.size() - 1));
                long now = System.currentTimeMillis();
                if (h != null && !h.released && staleReason(h, now, staleAfterS).isEmpty()) {
                    throw busy(output, h, now, staleAfterS);
                }
            }
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot take the lease beside it (" + e.getMessage()
                    + ") (rule: the output's parent must be writable)");
        }
    }

    /** True when generation {@code g} is no longer the newest or has been released since it was read. */
    private static boolean changed(FileSystem fs, Path output, long g) throws IOException {
        List<Long> gens = generations(fs, output);
        return gens.isEmpty() || gens.get(gens.size() - 1) != g || fs.exists(new Path(leaseFile(output, g) + RELEASED));
    }

    private static JobException busy(Path output, Holder h, long now, double staleAfterS) {
        return JobException.output("Output " + output + " is being written by " + h.describe(now)
                + " (rule: one run writes an output at a time; a lease is taken over only when its run's process is gone "
                + "from its host or it has not been renewed for " + fmt(staleAfterS) + " s, output.lease_stale_after_s)");
    }

    private static String fmt(double s) {
        return s == Math.rint(s) ? String.valueOf((long) s) : String.valueOf(s);
    }

    /** Why a lease that is not released may be taken over, or empty when it is live. */
    static Optional<String> staleReason(Holder h, long nowMillis, double staleAfterS) {
        long ageMs = nowMillis - h.renewedMillis;
        if (ageMs > staleAfterS * 1000) {
            return Optional.of("not renewed for " + ageMs / 1000 + " s (stale after " + fmt(staleAfterS) + " s)");
        }
        if (thisHost().equals(h.fields.get("host")) && !processAlive(h.fields.get("pid"), h.fields.get("pid_start"))) {
            return Optional.of("its process " + h.get("pid") + " is no longer running on " + h.get("host"));
        }
        return Optional.empty();
    }

    static boolean processAlive(String pid, String start) {
        long p;
        try {
            p = Long.parseLong(pid);
        } catch (NumberFormatException | NullPointerException e) {
            return true; // cannot tell: rule (b) decides
        }
        Optional<ProcessHandle> ph = ProcessHandle.of(p);
        if (ph.isEmpty() || !ph.get().isAlive()) {
            return false;
        }
        Optional<Instant> st = ph.get().info().startInstant();
        // a recycled process id belongs to a process started later
        return st.isEmpty() || start == null || start.isEmpty() || st.get().toString().equals(start);
    }

    private static String hostName;

    static synchronized String thisHost() {
        if (hostName == null) {
            String h = System.getenv("HOSTNAME");
            try {
                h = InetAddress.getLocalHost().getHostName();
            } catch (IOException e) {
                // keep the environment's name
            }
            hostName = h == null || h.isBlank() ? "unknown-host" : h;
        }
        return hostName;
    }

    private static String content(String runId) {
        ProcessHandle me = ProcessHandle.current();
        Map<String, String> m = new LinkedHashMap<>();
        m.put("run_id", runId);
        m.put("host", thisHost());
        m.put("pid", String.valueOf(me.pid()));
        m.put("pid_start", me.info().startInstant().map(Instant::toString).orElse(""));
        m.put("started_utc", Instant.now().toString());
        m.put("version", RunManifest.version());
        StringBuilder sb = new StringBuilder("# starderive output lease (see README, Reliability)\n");
        m.forEach((k, v) -> sb.append(k).append('=').append(v).append('\n'));
        return sb.toString();
    }

    /** Generations present beside the output, ascending. */
    static List<Long> generations(FileSystem fs, Path output) throws IOException {
        String pre = prefix(output);
        List<Long> g = new ArrayList<>();
        for (FileStatus st : fs.listStatus(output.getParent())) {
            String n = st.getPath().getName();
            if (n.startsWith(pre) && !n.endsWith(RELEASED) && !n.endsWith(".crc") && !n.contains(".tmp-")) {
                try {
                    g.add(Long.parseLong(n.substring(pre.length())));
                } catch (NumberFormatException e) {
                    // not ours
                }
            }
        }
        g.sort(null);
        return g;
    }

    static Holder read(FileSystem fs, Path output, long generation) throws IOException {
        Path f = leaseFile(output, generation);
        Map<String, String> fields = new LinkedHashMap<>();
        long renewed;
        try {
            renewed = fs.getFileStatus(f).getModificationTime();
            try (FSDataInputStream in = fs.open(f)) {
                String text = new String(in.readAllBytes(), StandardCharsets.UTF_8);
                for (String line : text.split("\n")) {
                    int eq = line.indexOf('=');
                    if (!line.startsWith("#") && eq > 0) {
                        fields.put(line.substring(0, eq), line.substring(eq + 1));
                    }
                }
            }
        } catch (java.io.FileNotFoundException e) {
            // removed meanwhile by a newer holder: treat as released
            return new Holder(fields, 0, generation, true);
        }
        boolean rel = fs.exists(new Path(f + RELEASED));
        return new Holder(fields, renewed, generation, rel);
    }

    /**
     * Atomic create-if-absent of a file with its whole content (a reader never sees it empty): the content is written
     * to a private temporary file first, then published under the name by an operation that fails when the name
     * exists — a hard link on the local file system, {@code FileContext.rename} without overwrite elsewhere (atomic on
     * HDFS). False when the file exists.
     */
    static boolean createExclusive(FileSystem fs, Path f, String text) throws IOException {
        byte[] b = text.getBytes(StandardCharsets.UTF_8);
        Path tmp = new Path(f.getParent(), f.getName() + ".tmp-" + java.util.UUID.randomUUID());
        if (local(fs)) {
            java.nio.file.Path target = java.nio.file.Paths.get(f.toUri().getPath());
            java.nio.file.Path t = java.nio.file.Paths.get(tmp.toUri().getPath());
            Files.write(t, b, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE);
            try {
                Files.createLink(target, t);
                return true;
            } catch (FileAlreadyExistsException e) {
                return false;
            } catch (UnsupportedOperationException | java.nio.file.FileSystemException e) {
                // no hard links here: O_EXCL create, then write (a reader may see it empty for an instant)
                try {
                    Files.write(target, b, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE);
                    return true;
                } catch (FileAlreadyExistsException e2) {
                    return false;
                }
            } finally {
                Files.deleteIfExists(t);
            }
        }
        try (OutputStream o = fs.create(tmp, false)) {
            o.write(b);
        }
        try {
            org.apache.hadoop.fs.FileContext.getFileContext(f.toUri(), fs.getConf())
                    .rename(tmp, f, org.apache.hadoop.fs.Options.Rename.NONE);
            return true;
        } catch (org.apache.hadoop.fs.FileAlreadyExistsException e) {
            return false;
        } finally {
            fs.delete(tmp, false);
        }
    }

    private static void markReleased(FileSystem fs, Path f) throws IOException {
        createExclusive(fs, new Path(f + RELEASED), "released_utc=" + Instant.now() + "\n");
    }

    private void renew() {
        if (released || lost != null) {
            return;
        }
        try {
            if (!fs.exists(file)) {
                lost = "the lease file " + file + " was removed (another run took the output over)";
                return;
            }
            fs.setTimes(file, System.currentTimeMillis(), -1);
        } catch (IOException | RuntimeException e) {
            LOG.warn("Output {}: lease renewal failed ({}); will retry", output, e.getMessage());
        }
    }

    /**
     * Stops the run with exit 4 unless this run still holds the newest generation of the lease. Called before every
     * step of the commit that changes the output.
     */
    public void checkHeld() {
        if (released) {
            throw new IllegalStateException("lease of " + output + " used after release");
        }
        String why = lost;
        if (why == null) {
            try {
                List<Long> gens = generations(fs, output);
                long top = gens.isEmpty() ? -1 : gens.get(gens.size() - 1);
                if (top != generation) {
                    why = top < 0 ? "the lease file was removed"
                            : "a newer lease was taken by " + read(fs, output, top).describe(System.currentTimeMillis());
                } else if (fs.exists(new Path(file + RELEASED))) {
                    why = "the lease was marked released by someone else";
                }
            } catch (IOException e) {
                why = "the lease cannot be read (" + e.getMessage() + ")";
            }
        }
        if (why != null) {
            lost = why;
            throw JobException.output("Output " + output + ": run " + runId + " lost its lease: " + why
                    + " (rule: a run paused longer than output.lease_stale_after_s may be taken over; it then stops without "
                    + "touching the output); nothing was committed by this run");
        }
    }

    /** Ends the lease: stops renewing and marks it released (best effort: a lease not marked goes stale anyway). */
    @Override
    public void close() {
        if (released) {
            return;
        }
        released = true;
        heartbeat.shutdownNow();
        try {
            markReleased(fs, file);
        } catch (IOException e) {
            try {
                // no marker: remove the lease itself (the next run then takes the same generation afresh)
                fs.delete(file, false);
                LOG.warn("Output {}: could not mark the lease released ({}); removed it instead", output, e.getMessage());
            } catch (IOException e2) {
                LOG.warn("Output {}: could not release the lease ({}); it will be taken over when stale", output, e2.getMessage());
            }
        }
    }

    /** How long ago (for logs and tests) the lease file was last renewed. */
    Duration age() throws IOException {
        return Duration.ofMillis(System.currentTimeMillis() - fs.getFileStatus(file).getModificationTime());
    }
}
