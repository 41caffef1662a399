package dev.riskmin.diagnostics.metrics;

import dev.riskmin.diagnostics.Diagnostics;
import org.junit.jupiter.api.Test;

import java.io.File;
import java.io.IOException;
import java.net.URL;
import java.net.URLClassLoader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.TreeSet;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Micrometer is an optional dependency: only the metrics package may refer to it, and the rest of the
 * module must work in an application that does not have it. Checked twice: statically, in the
 * compiled classes' constant pools, and by running a fit inside a class loader built from this
 * module's classes and its non-optional dependencies only.
 */
class OptionalMicrometerTest {
    private static final byte[] MICROMETER = "io/micrometer/".getBytes(StandardCharsets.US_ASCII);
    private static final String METRICS = "dev/riskmin/diagnostics/metrics/";

    static Path mainClasses() throws Exception {
        return Path.of(Diagnostics.class.getProtectionDomain().getCodeSource().getLocation().toURI());
    }

    static List<Path> classFiles(Path root) throws IOException {
        try (Stream<Path> files = Files.walk(root)) {
            return files.filter(f -> f.toString().endsWith(".class")).sorted().toList();
        }
    }

    static boolean contains(byte[] haystack, byte[] needle) {
        outer:
        for (int i = 0; i + needle.length <= haystack.length; i++) {
            for (int k = 0; k < needle.length; k++) {
                if (haystack[i + k] != needle[k]) {
                    continue outer;
                }
            }
            return true;
        }
        return false;
    }

    @Test
    void onlyTheMetricsPackageRefersToMicrometer() throws Exception {
        // A class that uses another names it in its constant pool as a UTF-8 internal name
        // ("io/micrometer/..."), in a class entry or a descriptor (JVM specification, section 4.4).
        Path root = mainClasses();
        TreeSet<String> referring = new TreeSet<>();
        int scanned = 0;
        for (Path f : classFiles(root)) {
            scanned++;
            if (contains(Files.readAllBytes(f), MICROMETER)) {
                referring.add(root.relativize(f).toString().replace(File.separatorChar, '/'));
            }
        }
        assertTrue(scanned > 40, "scanned " + scanned + " classes under " + root.getFileName());
        assertTrue(referring.contains(METRICS + "MeterBridge.class"), "the scan finds the bridge: " + referring);
        for (String name : referring) {
            assertTrue(name.startsWith(METRICS), name + " refers to Micrometer outside " + METRICS);
        }
    }

    @Test
    void theRestOfTheModuleRunsWithoutMicrometerOnTheClassPath() throws Exception {
        List<URL> urls = new ArrayList<>();
        for (String entry : System.getProperty("java.class.path").split(File.pathSeparator)) {
            String name = entry.replace(File.separatorChar, '/');
            // This module's classes and what a user of it gets without asking: erm-core, commons-math3,
            // slf4j-api; plus erm-core's test jar and logback, which the fit below uses.
            boolean keep = name.contains("erm-diagnostics/target") || name.contains("erm-core")
                    || name.contains("commons-math3") || name.contains("slf4j-api") || name.contains("logback");
            if (keep) {
                assertFalse(name.contains("micrometer"), entry);
                urls.add(Path.of(entry).toUri().toURL());
            }
        }
        try (URLClassLoader loader = new URLClassLoader(urls.toArray(URL[]::new), ClassLoader.getPlatformClassLoader())) {
            // The control: this loader has no Micrometer, so the bridge cannot link.
            assertThrows(ClassNotFoundException.class, () -> loader.loadClass("io.micrometer.core.instrument.MeterRegistry"));
            assertThrows(NoClassDefFoundError.class, () -> Class.forName("dev.riskmin.diagnostics.metrics.MeterBridge",
                    true, loader).getMethods());
            // Every other class of the module loads, links and initializes.
            Path root = mainClasses();
            int loaded = 0;
            for (Path f : classFiles(root)) {
                String name = root.relativize(f).toString().replace(File.separatorChar, '/');
                if (!name.startsWith(METRICS)) {
                    Class<?> c = Class.forName(name.substring(0, name.length() - 6).replace('/', '.'), true, loader);
                    assertEquals(loader, c.getClassLoader(), name);
                    // Resolves the types of every signature and field; a body's references resolve
                    // only when it runs, which the constant-pool scan above covers.
                    c.getDeclaredMethods();
                    c.getDeclaredFields();
                    c.getDeclaredConstructors();
                    loaded++;
                }
            }
            assertTrue(loaded > 40, "loaded " + loaded);
            // And a fit with the standard diagnostics, a stopping test and the other sinks runs.
            Class<?> helper = Class.forName(WithoutMicrometer.class.getName(), true, loader);
            assertEquals(loader, helper.getClassLoader());
            String[] outcome = ((String) helper.getMethod("run").invoke(null)).split(" ");
            assertTrue(Long.parseLong(outcome[0]) > 0, "steps " + outcome[0]);
            assertTrue(Long.parseLong(outcome[1]) > 0, "events " + outcome[1]);
            assertTrue(Long.parseLong(outcome[2]) > 0 && Long.parseLong(outcome[3]) > 0, "traces written");
            assertEquals("0", outcome[4], "no monitor, subscriber or listener failed");
        }
    }
}
