package org.starderive.launcher;

import java.io.File;
import java.lang.reflect.Method;
import java.net.URL;
import java.net.URLClassLoader;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Entry point of the local-mode jar ({@code java -jar starderive-job-VERSION-local.jar}): puts this jar and every
 * jar of the {@code lib/} folder beside it (Spark included) on one class loader and runs the command line.
 * The jar's manifest carries the {@code Add-Opens} list Spark needs on Java 17, so no JVM flags are required.
 */
public final class LocalLauncher {
    private LocalLauncher() {}

    public static void main(String[] args) throws Exception {
        Path self = Paths.get(LocalLauncher.class.getProtectionDomain().getCodeSource().getLocation().toURI());
        File lib = self.getParent().resolve("lib").toFile();
        File[] jars = lib.listFiles((d, n) -> n.endsWith(".jar"));
        if (jars == null || jars.length == 0) {
            System.err.println("starderive: no lib/ folder beside " + self + " (build with: mvn -DskipTests package)");
            System.exit(1);
        }
        Arrays.sort(jars);
        List<URL> urls = new ArrayList<>();
        urls.add(self.toUri().toURL());
        for (File j : jars) {
            urls.add(j.toURI().toURL());
        }
        URLClassLoader loader = new URLClassLoader("starderive", urls.toArray(new URL[0]), ClassLoader.getPlatformClassLoader());
        Thread.currentThread().setContextClassLoader(loader);
        Method main = loader.loadClass("org.starderive.job.Main").getMethod("main", String[].class);
        main.invoke(null, (Object) args);
    }
}
