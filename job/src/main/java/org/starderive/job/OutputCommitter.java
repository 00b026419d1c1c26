package org.starderive.job;

import java.io.IOException;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Writes go to a staging folder beside the output ({@code NAME.staging-RUNID}, same file system) and are moved
 * into place only after the whole output has been written and checked:
 * <ul>
 *   <li>{@code fail}: the output must not exist; the staging folder is renamed to it;</li>
 *   <li>{@code overwrite}: the old output is renamed aside ({@code .NAME.previous-RUNID}), the staging folder renamed
 *       into place, then the old one deleted. Should the process die between the two renames, the next run finds no
 *       output but a previous copy and restores it before doing anything else;</li>
 *   <li>{@code replace-partitions}: only the partition folders present in the new output are swapped the same way,
 *       one by one; every other partition is left untouched (same files, same bytes).</li>
 * </ul>
 * A run that fails or is killed before the commit leaves the output as it was (the staging folder is deleted on a
 * clean failure; after a kill it stays beside the output under its own name and is never read as the output). On object stores without atomic
 * rename (S3) the rename is a copy: the guarantee then holds only per file.
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

    private final FileSystem fs;
    private final Path output;
    private final Path staging;
    private final String runId;
    private final Mode mode;

    public OutputCommitter(Configuration conf, String output, String runId, Mode mode) {
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

    private Path previous(Path p) {
        return new Path(p.getParent(), "." + p.getName() + ".previous-" + runId);
    }

    /**
     * Checks made before anything is computed: output not inside any input (nor the reverse), the mode's rule on an
     * existing output, and that the staging folder can be created (writable location). Restores an output left aside
     * by a run that died mid-commit.
     */
    public void prepare(List<String> inputPaths, Configuration conf) {
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
        try {
            restoreInterruptedCommit();
            FileStatus[] stale = fs.globStatus(new Path(output.getParent(), output.getName() + ".staging-*"));
            if (stale != null) {
                for (FileStatus st : stale) {
                    LOG.warn("Stale staging folder {} from a run that was killed; it is not part of the output and can be deleted",
                            st.getPath());
                }
            }
            boolean exists = fs.exists(output);
            if (exists && mode == Mode.FAIL) {
                throw JobException.output("Output " + output + " already exists (rule: --write-mode fail never replaces; "
                        + "use overwrite or replace-partitions)");
            }
            if (exists && !fs.getFileStatus(output).isDirectory()) {
                throw JobException.output("Output " + output + " is a file (rule: the output is a folder)");
            }
            if (!fs.mkdirs(staging)) {
                throw JobException.output("Output " + output + ": cannot create " + staging + " (rule: the output's parent must be writable)");
            }
            fs.delete(staging, true); // Spark creates it again; we only proved we can
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": not writable (" + e.getMessage() + ")");
        }
    }

    private void restoreInterruptedCommit() throws IOException {
        if (fs.exists(output) || !fs.exists(output.getParent())) {
            return;
        }
        FileStatus[] aside = fs.globStatus(new Path(output.getParent(), "." + output.getName() + ".previous-*"));
        if (aside == null || aside.length == 0) {
            return;
        }
        FileStatus newest = java.util.Arrays.stream(aside).max(Comparator.comparingLong(FileStatus::getModificationTime)).get();
        if (!fs.rename(newest.getPath(), output)) {
            throw JobException.output("Output " + output + ": a previous run died during its commit and " + newest.getPath()
                    + " could not be restored");
        }
        LOG.warn("Restored {} from {} (a previous run died during its commit)", output, newest.getPath());
    }

    /** Moves the staged output into place according to the mode. Returns the partition folders replaced. */
    public List<String> commit(List<String> partitionColumns) {
        try {
            if (mode == Mode.REPLACE_PARTITIONS && fs.exists(output)) {
                return commitPartitions(partitionColumns.size());
            }
            Path aside = null;
            if (fs.exists(output)) {
                aside = previous(output);
                rename(output, aside);
            }
            rename(staging, output);
            if (aside != null) {
                fs.delete(aside, true);
            }
            return List.of();
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": commit failed (" + e.getMessage() + ")");
        }
    }

    private List<String> commitPartitions(int depth) throws IOException {
        List<Path> leaves = new ArrayList<>();
        collectLeaves(staging, depth, leaves);
        List<String> replaced = new ArrayList<>();
        String base = staging.toUri().getPath();
        for (Path leaf : leaves) {
            String rel = leaf.toUri().getPath().substring(base.length() + 1);
            Path target = new Path(output, rel);
            fs.mkdirs(target.getParent());
            Path aside = null;
            if (fs.exists(target)) {
                aside = previous(target);
                rename(target, aside);
            }
            rename(leaf, target);
            if (aside != null) {
                fs.delete(aside, true);
            }
            replaced.add(rel);
        }
        // top-level files (manifest, dictionary, _SUCCESS) replace the old ones
        for (FileStatus st : fs.listStatus(staging)) {
            if (st.isFile()) {
                Path target = new Path(output, st.getPath().getName());
                fs.delete(target, false);
                rename(st.getPath(), target);
            }
        }
        fs.delete(staging, true);
        return replaced;
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

    private void rename(Path from, Path to) throws IOException {
        if (!fs.rename(from, to)) {
            throw new IOException("rename " + from + " -> " + to + " refused");
        }
    }

    /** Removes the staging folder after a failure (best effort: the output itself was never touched). */
    public void abort() {
        try {
            fs.delete(staging, true);
        } catch (IOException e) {
            LOG.warn("Could not delete staging folder {}: {}", staging, e.getMessage());
        }
    }

    public void writeText(String name, String text) {
        try (org.apache.hadoop.fs.FSDataOutputStream o = fs.create(new Path(staging, name), true)) {
            o.write(text.getBytes(java.nio.charset.StandardCharsets.UTF_8));
        } catch (IOException e) {
            throw JobException.output("Output " + output + ": cannot write " + name + " (" + e.getMessage() + ")");
        }
    }
}
