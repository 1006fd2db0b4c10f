package org.stackwright.testing;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;

/** Reads reference files from src/test/resources/reference/ (made by the scripts in tools/reference/). */
public final class ReferenceFiles {

    private ReferenceFiles() {
    }

    /** @return the little-endian float32 values of a .raw reference file, checked to hold n values */
    public static float[] floats(String path, int n) {
        byte[] bytes = bytes(path);
        if (bytes.length != 4L * n) {
            throw new IllegalStateException(path + " holds " + bytes.length + " bytes, expected " + 4L * n);
        }
        float[] f = new float[n];
        ByteBuffer.wrap(bytes).order(ByteOrder.LITTLE_ENDIAN).asFloatBuffer().get(f);
        return f;
    }

    /** @return the non-empty lines of a text reference file that do not start with '#', split at white space */
    public static List<String[]> table(String path) {
        List<String[]> rows = new ArrayList<>();
        for (String line : new String(bytes(path), StandardCharsets.UTF_8).split("\n")) {
            String t = line.trim();
            if (!t.isEmpty() && !t.startsWith("#")) {
                rows.add(t.split("\\s+"));
            }
        }
        return rows;
    }

    private static byte[] bytes(String path) {
        String resource = "/reference/" + path;
        try (InputStream in = ReferenceFiles.class.getResourceAsStream(resource)) {
            if (in == null) {
                throw new IllegalStateException("missing reference file " + resource
                        + " (regenerate with tools/reference/)");
            }
            return in.readAllBytes();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
