package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/** The physics core must not depend on Spark (module rule in DEVELOPERS.md). */
class PhysicsPackageIsSparkFreeTest {

    @Test
    void noSparkImportInPhysicsSources() throws Exception {
        // the module folder from where this class was compiled to (udfs/target/test-classes), so that the test does
        // not depend on the working directory
        Path module = Path.of(PhysicsPackageIsSparkFreeTest.class.getProtectionDomain().getCodeSource().getLocation().toURI())
                .getParent().getParent();
        Path dir = module.resolve(Path.of("src", "main", "java", "org", "starderive", "physics"));
        assertTrue(Files.isDirectory(dir), "no physics sources at " + dir);
        // the package names are assembled so that this file does not itself contain them
        String spark = "org.apache." + "spark";
        String scala = "scala" + ".";
        List<Path> offenders;
        try (Stream<Path> files = Files.list(dir)) {
            offenders = files.filter(p -> p.toString().endsWith(".java")).filter(p -> {
                try {
                    String s = Files.readString(p);
                    return s.contains(spark) || s.contains(scala);
                } catch (IOException e) {
                    throw new RuntimeException(e);
                }
            }).collect(Collectors.toList());
        }
        assertTrue(offenders.isEmpty(), "Spark leaked into the physics package: " + offenders);
    }

    @Test
    void physicsClassesLoadWithoutSparkReferences() {
        // Every physics class referenced here must link without Spark types in its signatures.
        for (Class<?> c : new Class<?>[] {StarDeriver.class, StarInput.class, StarResult.class, DeriveSettings.class}) {
            for (java.lang.reflect.Method m : c.getDeclaredMethods()) {
                for (Class<?> p : m.getParameterTypes()) {
                    assertTrue(!p.getName().startsWith("org.apache." + "spark"), c + "." + m.getName());
                }
                assertTrue(!m.getReturnType().getName().startsWith("org.apache." + "spark"), c + "." + m.getName());
            }
        }
    }
}
