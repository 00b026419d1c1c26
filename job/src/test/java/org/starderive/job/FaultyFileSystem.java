package org.starderive.job;

import java.io.IOException;
import java.io.OutputStream;
import java.net.URI;
import java.net.URISyntaxException;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.Consumer;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.DelegateToFileSystem;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileUtil;
import org.apache.hadoop.fs.Path;
import org.apache.hadoop.fs.RawLocalFileSystem;
import org.apache.hadoop.fs.permission.FsPermission;

/**
 * Test-only Hadoop file system {@code faulty:///PATH}: the local file system with storage faults switched on from a
 * test — a full disk after N bytes written under a staging folder, a refused rename, and rename done as object stores
 * do it (copy every file, then delete the source) with a callback after each copied file. Registered through the
 * Hadoop configuration ({@link #install}); the switches are static because Hadoop makes a new instance per use.
 */
public class FaultyFileSystem extends RawLocalFileSystem {
    static final String SCHEME = "faulty";
    private static final URI NAME = URI.create(SCHEME + ":///");

    /** Bytes that may still be written to files under a {@code .staging-} folder before "No space left on device". */
    static final AtomicLong stagingBytesLeft = new AtomicLong(Long.MAX_VALUE);
    /** Renames outside Spark's {@code _temporary} folders so far. */
    static final AtomicInteger renames = new AtomicInteger();
    /** The 1-based number of the rename (outside {@code _temporary}) that fails; 0 for none. */
    static volatile int failRename;
    /** Renames copy then delete. */
    static volatile boolean copyRename;
    /** Called after each file a copying rename has copied, with its target. */
    static volatile Consumer<Path> afterCopiedFile;

    static void reset() {
        stagingBytesLeft.set(Long.MAX_VALUE);
        renames.set(0);
        failRename = 0;
        copyRename = false;
        afterCopiedFile = null;
    }

    static void install(Configuration conf) {
        conf.set("fs." + SCHEME + ".impl", FaultyFileSystem.class.getName());
        conf.set("fs." + SCHEME + ".impl.disable.cache", "true");
        conf.set("fs.AbstractFileSystem." + SCHEME + ".impl", Afs.class.getName());
    }

    static void uninstall(Configuration conf) {
        conf.unset("fs." + SCHEME + ".impl");
        conf.unset("fs." + SCHEME + ".impl.disable.cache");
        conf.unset("fs.AbstractFileSystem." + SCHEME + ".impl");
        reset();
    }

    /** {@code faulty:} URI of a local path. */
    static String uri(java.nio.file.Path p) {
        return SCHEME + "://" + p.toAbsolutePath();
    }

    @Override
    public URI getUri() { return NAME; }

    @Override
    public String getScheme() { return SCHEME; }

    // every create and append of RawLocalFileSystem opens its stream through these two
    @Override
    protected OutputStream createOutputStream(Path f, boolean append) throws IOException {
        return wrap(f, super.createOutputStream(f, append));
    }

    @Override
    protected OutputStream createOutputStreamWithMode(Path f, boolean append, FsPermission permission) throws IOException {
        return wrap(f, super.createOutputStreamWithMode(f, append, permission));
    }

    private OutputStream wrap(Path f, OutputStream inner) {
        if (!f.toString().contains(".staging-")) {
            return inner;
        }
        OutputStream counting = new OutputStream() {
            private void spend(long n) throws IOException {
                if (stagingBytesLeft.addAndGet(-n) < 0) {
                    throw new IOException("No space left on device");
                }
            }

            @Override
            public void write(int b) throws IOException {
                spend(1);
                inner.write(b);
            }

            @Override
            public void write(byte[] b, int off, int len) throws IOException {
                spend(len);
                inner.write(b, off, len);
            }

            @Override
            public void flush() throws IOException { inner.flush(); }

            @Override
            public void close() throws IOException { inner.close(); }
        };
        return counting;
    }

    @Override
    public boolean rename(Path src, Path dst) throws IOException {
        if (src.toString().contains("/_temporary") || dst.toString().contains("/_temporary")) {
            return super.rename(src, dst);
        }
        int n = renames.incrementAndGet();
        if (n == failRename) {
            throw new IOException("injected rename failure: " + src + " -> " + dst);
        }
        if (!copyRename) {
            return super.rename(src, dst);
        }
        copyTree(src, dst);
        return delete(src, true);
    }

    private void copyTree(Path src, Path dst) throws IOException {
        FileStatus st = getFileStatus(src);
        if (st.isDirectory()) {
            mkdirs(dst);
            for (FileStatus c : listStatus(src)) {
                copyTree(c.getPath(), new Path(dst, c.getPath().getName()));
            }
        } else {
            FileUtil.copy(this, src, this, dst, false, true, getConf());
            Consumer<Path> h = afterCopiedFile;
            if (h != null) {
                h.accept(dst);
            }
        }
    }

    /** The same, for {@link org.apache.hadoop.fs.FileContext}. */
    public static class Afs extends DelegateToFileSystem {
        public Afs(URI uri, Configuration conf) throws IOException, URISyntaxException {
            super(uri, new FaultyFileSystem(), conf, SCHEME, false);
        }
    }
}
