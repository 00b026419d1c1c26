package org.starderive.job;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileContext;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Options;
import org.apache.hadoop.fs.Path;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Writes go to a staging folder beside the output ({@code NAME.staging-RUNID}, same file system) and are moved into
 * place only after the whole output has been written and checked, while the run holds the output's
 * {@link OutputLease}:
 * <ul>
 *   <li>{@code fail}: the output must not exist — checked when the run starts and again at the commit;</li>
 *   <li>{@code overwrite}: the old output is moved aside ({@code .NAME.previous-RUNID}), the staged one moved in;</li>
 *   <li>{@code replace-partitions}: only the partition folders present in the new output are swapped the same way, one
 *       by one (the old ones go to {@code .NAME.previous-RUNID/KEY=VALUE}); every other partition is left untouched
 *       (same files, same bytes).</li>
 * </ul>
 *
 * <p><b>Journal.</b> Before the first move the commit writes its plan — every move and folder creation, in order — to
 * {@code .NAME.commit-RUNID.json} beside the output; deleting that journal after the last move is the commit point.
 * A run that dies during the commit leaves its journal; the next run (holding the lease) undoes the plan's steps in
 * reverse, partition by partition, so the output is the previous one again before it does anything else. A commit
 * that fails in-process (a refused rename, a lost lease) is undone the same way at once.
 *
 * <p><b>The manifest is moved last.</b> The old output's manifest is moved aside first and the new one moved in last,
 * so on every file system an output folder that holds {@code _starderive_manifest.json} is complete (the previous one
 * or the new one), and one without it is in the middle of a commit. Moves use {@link FileContext#rename} without the
 * overwrite option: they refuse an existing target instead of replacing it, or (for folders on the local file system)
 * nesting the source inside it.
 *
 * <p><b>Object stores</b> (S3, GCS) rename by copy then delete: a reader during the commit may see the output partly
 * moved (never with the new manifest before the last data file); the journal still lets the next run put the previous
 * output back after a crash.
 */
public final class OutputCommitter {
    private static final Logger LOG = LoggerFactory.getLogger(OutputCommitter.class);

    /** How the output path is treated. */
    public enum Mode {
        FAIL, OVERWRITE, REPLACE_PARTITIONS;

        public static Mode parse(String s) {
            switch (s) {
                case "fail": return FAIL;
                case "overwrite": return OVERWRITE;
                case "replace-partitions": return REPLACE_PARTITIONS;
                default: throw JobException.config("Invalid --write-mode: " + s + " (must be fail, overwrite or replace-partitions)");
            }
        }

        public String label() { return name().toLowerCase(Locale.ROOT).replace('_', '-'); }
    }

    /** Name of the manifest, moved last. */
    static final String MANIFEST = RunManifest.FILE_NAME;

    private final Configuration conf;
    private final FileSystem fs;
    private final Path output;
    private final Path staging;
    private final String runId;
    private final Mode mode;
    private OutputLease lease;
    private FileContext fileContext;
    private double leaseSeconds;

    public OutputCommitter(Configuration conf, String output, String runId, Mode mode) {
        this.conf = conf;
        try {
            Path p = new Path(output);
            this.fs = p.getFileSystem(conf);
            this.output = fs.makeQualified(p);
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": file system not reachable (" + e.getMessage() + ")");
        }
        this.runId = runId;
        this.mode = mode;
        if (this.output.getParent() == null) {
            throw JobException.output("Output " + output + ": must not be a file-system root");
        }
        // not hidden: Spark's readers skip paths that start with '.' or '_', and the job reads the staging folder back
        this.staging = new Path(this.output.getParent(), this.output.getName() + ".staging-" + runId);
    }

    public Path output() { return output; }

    public Path staging() { return staging; }

    FileSystem fileSystem() { return fs; }

    private Path aside() { return new Path(output.getParent(), "." + output.getName() + ".previous-" + runId); }

    private Path manifestAside(String which) {
        return new Path(output.getParent(), "." + output.getName() + ".manifest-" + runId + "-" + which);
    }

    private Path journal() { return journalOf(runId); }

    private Path journalOf(String run) {
        return new Path(output.getParent(), "." + output.getName() + ".commit-" + run + ".json");
    }

    /** The empty file that records that step {@code i} of run {@code run}'s commit is done. */
    private Path stepDone(String run, int i) {
        return new Path(output.getParent(), "." + output.getName() + ".commit-" + run + ".step-" + String.format(Locale.ROOT, "%06d", i));
    }

    /** Number of steps of run {@code run}'s plan recorded done, counted from the first. */
    private int stepsDone(String run, int planSize) throws IOException {
        int c = 0;
        while (c < planSize && fs.exists(stepDone(run, c))) {
            c++;
        }
        return c;
    }

    /**
     * Takes the output's lease (refusing with exit 4 when another run holds it), then makes the checks that come
     * before anything is computed: output not inside any input (nor the reverse), the mode's rule on an existing
     * output, and that the staging folder can be created (writable location). Undoes a commit that a killed run left
     * half done, and removes what completed commits left aside.
     */
    public void prepare(List<String> inputPaths, Configuration conf, double leaseStaleAfterS) {
        checkPlacement(inputPaths, conf);
        long tl = System.nanoTime();
        lease = OutputLease.acquire(fs, output, runId, leaseStaleAfterS);
        leaseSeconds = (System.nanoTime() - tl) / 1e9;
        try {
            recover();
            FileStatus[] stale = fs.globStatus(new Path(output.getParent(), output.getName() + ".staging-*"));
            if (stale != null) {
                for (FileStatus st : stale) {
                    // under the lease no other run writes this output: a staging folder is a dead run's
                    fs.delete(st.getPath(), true);
                    LOG.warn("Removed staging folder {} left by a run that was killed", st.getPath());
                }
            }
            checkExisting();
            if (!fs.mkdirs(staging)) {
                throw JobException.output("Output " + output + ": cannot create " + staging + " (rule: the output's parent must be writable)");
            }
            fs.delete(staging, true); // Spark creates it again; we only proved we can
        } catch (IOException e) {
            throw notWritable(e);
        }
    }

    /**
     * The checks of {@link #prepare} that only read, in its order, for a run that must not write ({@code check}): the
     * output's placement against the inputs, the lease ({@link OutputLease#inspect}: a writable parent, no live holder),
     * the mode's rule on an existing output. Takes no lease, creates no staging folder and undoes nothing; returns what
     * {@link #prepare} would do first that can change the outcome — a commit left half done by a killed run, which
     * derive undoes before the existing-output check — or null.
     */
    public String inspect(List<String> inputPaths, Configuration conf, double leaseStaleAfterS) {
        checkPlacement(inputPaths, conf);
        OutputLease.inspect(fs, output, leaseStaleAfterS);
        try {
            String pending = pendingRecovery();
            checkExisting();
            return pending;
        } catch (IOException e) {
            throw notWritable(e);
        }
    }

    /** What a killed run left for {@link #recover} to undo, described, or null. Reads only. */
    private String pendingRecovery() throws IOException {
        FileStatus[] journals = fs.globStatus(new Path(output.getParent(), "." + output.getName() + ".commit-*.json"));
        if (journals != null && journals.length > 0) {
            return journals.length + " commit journal(s) of killed runs beside the output (" + journals[0].getPath().getName()
                    + "): derive undoes them first";
        }
        if (!fs.exists(output) && fs.exists(output.getParent())) {
            FileStatus[] aside = fs.globStatus(new Path(output.getParent(), "." + output.getName() + ".previous-*"));
            if (aside != null && aside.length > 0) {
                return "an output moved aside by a killed run (" + aside[0].getPath().getName()
                        + "): derive moves it back first, and then the output exists";
            }
        }
        return null;
    }

    /** The mode's rule on an existing output, and that an existing output is a folder. */
    private void checkExisting() throws IOException {
        boolean exists = fs.exists(output);
        if (exists && mode == Mode.FAIL) {
            throw JobException.output("Output " + output + " already exists (rule: --write-mode fail never replaces; "
                    + "use overwrite or replace-partitions)");
        }
        if (exists && !fs.getFileStatus(output).isDirectory()) {
            throw JobException.output("Output " + output + " is a file (rule: the output is a folder)");
        }
    }

    private JobException notWritable(IOException e) {
        return JobException.output("Output " + output + ": not writable (" + e.getMessage() + ")");
    }

    /** The output outside every input, and no input inside the output. Reads only. */
    private void checkPlacement(List<String> inputPaths, Configuration conf) {
        String out = output.toUri().getPath();
        for (String in : inputPaths) {
            String ip;
            try {
                Path p = new Path(in);
                ip = p.getFileSystem(conf).makeQualified(p).toUri().getPath();
            } catch (IOException e) {
                throw JobException.input("Input " + in + ": cannot be resolved (" + e.getMessage() + ")");
            }
            if (out.equals(ip) || out.startsWith(ip + "/")) {
                throw JobException.output("Output " + output + " is inside input " + in
                        + " (rule: the output must be outside every input path)");
            }
            if (ip.startsWith(out + "/")) {
                throw JobException.output("Input " + in + " is inside output " + output
                        + " (rule: the output must not contain an input path)");
            }
        }
    }

    /** Seconds it took to take the lease. */
    public double leaseSeconds() { return leaseSeconds; }

    /** Holds the lease of this committer's run (for tests and for the job's own checks). */
    public OutputLease lease() { return lease; }

    /**
     * Undoes every commit journal left beside the output (runs killed mid-commit), newest last, then deletes what
     * completed commits left aside. Runs under the lease, so no other commit is in progress.
     */
    private void recover() throws IOException {
        FileStatus[] journals = fs.globStatus(new Path(output.getParent(), "." + output.getName() + ".commit-*.json"));
        if (journals != null && journals.length > 0) {
            Arrays.sort(journals, Comparator.comparing(st -> st.getPath().getName()));
            for (int i = journals.length - 1; i >= 0; i--) {
                Path j = journals[i].getPath();
                String n = j.getName();
                String run = n.substring(("." + output.getName() + ".commit-").length(), n.length() - ".json".length());
                List<CommitStep> plan = CommitStep.parse(readText(j), j);
                undo(plan, stepsDone(run, plan.size()), true);
                fs.delete(j, false);
                LOG.warn("Output {}: undid the commit journalled in {} (its run died during the commit); the previous output is back",
                        output, j);
            }
        }
        if (!fs.exists(output) && fs.exists(output.getParent())) {
            // an output folder moved aside with no journal: left by a version of the job before journals
            FileStatus[] aside = fs.globStatus(new Path(output.getParent(), "." + output.getName() + ".previous-*"));
            if (aside != null && aside.length > 0) {
                FileStatus newest = Arrays.stream(aside).max(Comparator.comparingLong(FileStatus::getModificationTime)).get();
                fileContext().rename(newest.getPath(), output, Options.Rename.NONE);
                LOG.warn("Restored {} from {} (a previous run died during its commit)", output, newest.getPath());
            }
        }
        for (String pattern : List.of(".previous-*", ".manifest-*", ".commit-*.json.tmp", ".commit-*.step-*")) {
            FileStatus[] left = fs.globStatus(new Path(output.getParent(), "." + output.getName() + pattern));
            if (left != null) {
                for (FileStatus st : left) {
                    fs.delete(st.getPath(), true);
                    LOG.info("Output {}: removed {} left by a completed commit", output, st.getPath());
                }
            }
        }
    }

    /** Partition folders of the staged output, relative to it ({@code tile=3}, {@code a=1/b=2}), in name order. */
    public List<String> stagedPartitions(int depth) {
        try {
            List<Path> leaves = new ArrayList<>();
            collectLeaves(staging, depth, leaves);
            String base = staging.toUri().getPath();
            List<String> rel = new ArrayList<>();
            for (Path leaf : leaves) {
                rel.add(leaf.toUri().getPath().substring(base.length() + 1));
            }
            rel.sort(null);
            return rel;
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot list " + staging + " (" + e.getMessage() + ")");
        }
    }

    /** The previous output's manifest text, or null (none, or no output yet). Read under the lease. */
    public String previousManifest() {
        Path m = new Path(output, MANIFEST);
        try {
            return fs.exists(m) ? readText(m) : null;
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot read its manifest " + m + " (" + e.getMessage() + ")");
        }
    }

    /**
     * Moves the staged output into place according to the mode (see the class comment). Returns the partition
     * folders replaced (replace-partitions only).
     */
    public List<String> commit(List<String> partitionColumns) {
        lease.checkHeld();
        List<CommitStep> plan = new ArrayList<>();
        List<String> replaced = new ArrayList<>();
        try {
            boolean exists = fs.exists(output);
            if (exists && mode == Mode.FAIL) {
                throw JobException.output("Output " + output + " appeared while this run was writing it (rule: --write-mode "
                        + "fail never replaces an output); nothing was committed");
            }
            if (mode == Mode.REPLACE_PARTITIONS && exists) {
                replaced = planPartitions(partitionColumns.size(), plan);
            } else {
                if (exists) {
                    if (fs.exists(new Path(output, MANIFEST))) {
                        plan.add(CommitStep.move(new Path(output, MANIFEST), manifestAside("old")));
                    }
                    plan.add(CommitStep.move(output, aside()));
                }
                plan.add(CommitStep.move(new Path(staging, MANIFEST), manifestAside("new")));
                plan.add(CommitStep.move(staging, output));
                plan.add(CommitStep.move(manifestAside("new"), new Path(output, MANIFEST)));
            }
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot plan the commit (" + e.getMessage() + "); nothing was committed");
        }
        writeJournal(plan);
        int done = 0;
        boolean begun = false;
        try {
            for (CommitStep s : plan) {
                lease.checkHeld();
                TestHooks.beforeCommitStep(done, s.describe());
                begun = true;
                apply(s);
                fs.create(stepDone(runId, done), true).close();
                begun = false;
                done++;
            }
        } catch (RuntimeException | IOException e) {
            String why = e.getMessage();
            // a move refused because its target exists never began: its target is not ours to remove
            boolean partly = begun && !(e instanceof org.apache.hadoop.fs.FileAlreadyExistsException);
            try {
                undo(plan, done, partly);
                fs.delete(journal(), false);
                deleteStepMarks(plan.size());
            } catch (IOException | RuntimeException u) {
                throw JobException.output("Output " + output + ": commit failed at step " + (done + 1) + " of " + plan.size() + " ("
                        + why + ") and could not be undone (" + u.getMessage() + "); the journal " + journal()
                        + " stays, and the next run on this output puts the previous output back");
            }
            if (e instanceof JobException) {
                throw (JobException) e;
            }
            throw JobException.output("Output " + output + ": commit failed at step " + (done + 1) + " of " + plan.size()
                    + ", " + plan.get(done).describe() + " (" + why + "); undone: the previous output is intact");
        }
        try {
            fs.delete(journal(), false); // the commit point
            deleteStepMarks(plan.size());
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": committed, but the journal " + journal() + " could not be removed ("
                    + e.getMessage() + "); remove it by hand or the next run will undo this commit");
        }
        try {
            fs.delete(aside(), true);
            fs.delete(manifestAside("old"), false);
            fs.delete(staging, true);
        } catch (IOException e) {
            LOG.warn("Output {}: committed; could not remove what was left aside ({}); the next run removes it", output, e.getMessage());
        }
        return replaced;
    }

    private List<String> planPartitions(int depth, List<CommitStep> plan) throws IOException {
        List<String> rels = stagedPartitions(depth);
        if (fs.exists(new Path(output, MANIFEST))) {
            plan.add(CommitStep.move(new Path(output, MANIFEST), manifestAside("old")));
        }
        java.util.Set<Path> made = new java.util.HashSet<>();
        for (String rel : rels) {
            Path target = new Path(output, rel);
            Path leaf = new Path(staging, rel);
            mkdirSteps(target.getParent(), made, plan);
            if (fs.exists(target)) {
                Path old = new Path(aside(), rel);
                mkdirSteps(old.getParent(), made, plan);
                plan.add(CommitStep.move(target, old));
            }
            plan.add(CommitStep.move(leaf, target));
        }
        // other top-level files (data dictionary, _SUCCESS) replace the old ones; the manifest comes last
        for (FileStatus st : fs.listStatus(staging)) {
            String n = st.getPath().getName();
            if (st.isFile() && !n.equals(MANIFEST) && !n.endsWith(".crc")) {
                Path target = new Path(output, n);
                if (fs.exists(target)) {
                    mkdirSteps(aside(), made, plan);
                    plan.add(CommitStep.move(target, new Path(aside(), n)));
                }
                plan.add(CommitStep.move(st.getPath(), target));
            }
        }
        plan.add(CommitStep.move(new Path(staging, MANIFEST), new Path(output, MANIFEST)));
        return rels;
    }

    /** Adds a mkdir step for each missing folder from the top down. */
    private void mkdirSteps(Path dir, java.util.Set<Path> made, List<CommitStep> plan) throws IOException {
        if (made.contains(dir) || fs.exists(dir)) {
            return;
        }
        mkdirSteps(dir.getParent(), made, plan);
        made.add(dir);
        plan.add(CommitStep.mkdir(dir));
    }

    private void collectLeaves(Path dir, int depth, List<Path> out) throws IOException {
        if (depth == 0) {
            out.add(dir);
            return;
        }
        for (FileStatus st : fs.listStatus(dir)) {
            String n = st.getPath().getName();
            if (st.isDirectory() && !n.startsWith(".") && !n.startsWith("_") && n.contains("=")) {
                collectLeaves(st.getPath(), depth - 1, out);
            }
        }
    }

    /** One FileContext for all moves of this run (a commit of many partitions makes two moves per partition). */
    private FileContext fileContext() throws IOException {
        if (fileContext == null) {
            fileContext = FileContext.getFileContext(output.toUri(), conf);
        }
        return fileContext;
    }

    private void apply(CommitStep s) throws IOException {
        if (s.op == CommitStep.Op.MKDIR) {
            if (!fs.mkdirs(s.to)) {
                throw new IOException("cannot create folder " + s.to);
            }
            return;
        }
        // refuses an existing target (no replacing, no nesting a folder inside it)
        fileContext().rename(s.from, s.to, Options.Rename.NONE);
    }

    private void deleteStepMarks(int planSize) throws IOException {
        for (int i = 0; i < planSize; i++) {
            fs.delete(stepDone(runId, i), false);
        }
    }

    /**
     * Undoes a plan of which the first {@code done} steps are recorded done. CommitStep {@code done} itself may have begun
     * ({@code mayHaveBegun}): at its turn its target did not exist, so a target with the source gone means the move
     * happened, and a target beside the source means a copying move died half way (the copy is removed). Then the
     * done steps are reversed, newest first; folders the plan created are removed when empty.
     */
    private void undo(List<CommitStep> plan, int done, boolean mayHaveBegun) throws IOException {
        if (mayHaveBegun && done < plan.size()) {
            CommitStep s = plan.get(done);
            if (s.op == CommitStep.Op.MKDIR) {
                removeIfEmpty(s.to);
            } else if (fs.exists(s.to)) {
                if (fs.exists(s.from)) {
                    fs.delete(s.to, true);
                } else {
                    moveBack(s);
                }
            }
        }
        for (int i = Math.min(done, plan.size()) - 1; i >= 0; i--) {
            CommitStep s = plan.get(i);
            if (s.op == CommitStep.Op.MKDIR) {
                removeIfEmpty(s.to);
            } else if (fs.exists(s.to)) {
                if (fs.exists(s.from)) {
                    // a copying move back that died half way in an earlier recovery: the source is the copy
                    fs.delete(s.from, true);
                }
                moveBack(s);
            }
        }
    }

    private void moveBack(CommitStep s) throws IOException {
        fs.mkdirs(s.from.getParent());
        fileContext().rename(s.to, s.from, Options.Rename.NONE);
    }

    private void removeIfEmpty(Path dir) throws IOException {
        if (fs.exists(dir) && fs.listStatus(dir).length == 0) {
            fs.delete(dir, false);
        }
    }

    private void writeJournal(List<CommitStep> plan) {
        Path tmp = new Path(journal() + ".tmp");
        try {
            try (org.apache.hadoop.fs.FSDataOutputStream o = fs.create(tmp, true)) {
                o.write(CommitStep.render(runId, mode, plan).getBytes(StandardCharsets.UTF_8));
            }
            fileContext().rename(tmp, journal(), Options.Rename.NONE);
        } catch (IOException e) {
            try {
                fs.delete(tmp, false);
            } catch (IOException ignored) {
                // the next run removes it
            }
            throw JobException.output("Output " + output + ": cannot write the commit journal " + journal() + " ("
                    + e.getMessage() + "); nothing was committed");
        }
    }

    private String readText(Path p) throws IOException {
        try (org.apache.hadoop.fs.FSDataInputStream in = fs.open(p)) {
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
    }

    /** Removes the staging folder after a failure (best effort: the output itself was never touched). */
    public void abort() {
        try {
            fs.delete(staging, true);
            fs.delete(manifestAside("new"), false);
        } catch (IOException e) {
            LOG.warn("Could not delete staging folder {}: {}", staging, e.getMessage());
        }
    }

    /** Ends the run's hold on the output (after commit or abort). */
    public void release() {
        if (lease != null) {
            lease.close();
        }
    }

    public void writeText(String name, String text) {
        try (org.apache.hadoop.fs.FSDataOutputStream o = fs.create(new Path(staging, name), true)) {
            o.write(text.getBytes(StandardCharsets.UTF_8));
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot write " + name + " (" + e.getMessage() + ")");
        }
    }
}
