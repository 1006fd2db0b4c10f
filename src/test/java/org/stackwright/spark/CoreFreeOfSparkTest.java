package org.stackwright.spark;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;

/**
 * The core never depends on Spark: no compiled class outside {@code org.stackwright.spark} names a Spark or Scala
 * class (their names would be in its constant pool). The jars are checked by the build (pom, "jars-free-of-spark").
 */
class CoreFreeOfSparkTest {

    @Test
    void noCoreClassNamesSpark() throws IOException {
        Path classes = Path.of(System.getProperty("stackwright.build.dir", "target"), "classes");
        List<String> bad;
        try (Stream<Path> s = Files.walk(classes)) {
            bad = s.filter(p -> p.toString().endsWith(".class"))
                    .filter(p -> !classes.relativize(p).toString().replace('\\', '/').startsWith("org/stackwright/spark/"))
                    .filter(CoreFreeOfSparkTest::namesSpark)
                    .map(p -> classes.relativize(p).toString()).toList();
        }
        assertTrue(Files.isDirectory(classes.resolve("org/stackwright/blocks")), "classes not found in " + classes);
        assertTrue(bad.isEmpty(), "core classes that name Spark: " + bad);
    }

    private static boolean namesSpark(Path p) {
        try {
            String text = new String(Files.readAllBytes(p), StandardCharsets.ISO_8859_1);
            return text.contains("org/apache/spark") || text.contains("Lscala/");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
