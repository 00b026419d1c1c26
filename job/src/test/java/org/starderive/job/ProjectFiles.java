package org.starderive.job;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URISyntaxException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

/**
 * Files of the repository (README, docs, configs, goldens, sources) for tests, found the same way whatever the working
 * directory: Maven started at the repository root or in a module, an IDE, a test JVM without a forked working
 * directory. The root is the directory whose {@code pom.xml} lists the module {@code job}, found by walking up from
 * the working directory, then from the {@code basedir} system property (set by Surefire), then from where this class
 * was loaded.
 *
 * <p>It lives in this module's own test sources, not in the {@code udfs} test-jar: run from the {@code job} folder,
 * Maven takes that test-jar from the local repository, which may be older than the source.
 */
public final class ProjectFiles {
    private ProjectFiles() {}

    private static final String ROOT_MARKER = "<module>job</module>";
    private static Path root;

    /** The repository root (absolute). */
    public static synchronized Path root() {
        if (root == null) {
            List<Path> starts = new ArrayList<>();
            starts.add(Path.of(System.getProperty("user.dir")));
            String basedir = System.getProperty("basedir");
            if (basedir != null && !basedir.isBlank()) {
                starts.add(Path.of(basedir));
            }
            try {
                starts.add(Path.of(ProjectFiles.class.getProtectionDomain().getCodeSource().getLocation().toURI()));
            } catch (URISyntaxException | NullPointerException | SecurityException e) {
                // no usable class location: the other starting points decide
            }
            for (Path start : starts) {
                for (Path d = start.toAbsolutePath().normalize(); d != null; d = d.getParent()) {
                    if (isRoot(d)) {
                        root = d;
                        return root;
                    }
                }
            }
            throw new IllegalStateException("No repository root (a pom.xml with " + ROOT_MARKER + ") above any of " + starts);
        }
        return root;
    }

    /** A file or folder of the repository by its path segments from the root, e.g. {@code path("docs", "x.md")}. */
    public static Path path(String first, String... more) {
        return root().resolve(Path.of(first, more));
    }

    private static boolean isRoot(Path dir) {
        Path pom = dir.resolve("pom.xml");
        if (!Files.isRegularFile(pom)) {
            return false;
        }
        try {
            return Files.readString(pom).contains(ROOT_MARKER);
        } catch (IOException e) {
            throw new UncheckedIOException("Cannot read " + pom, e);
        }
    }
}
