package org.stackwright.psf;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.HashMap;
import java.util.Map;

/** Reads src/test/resources/reference/psf-optics-values.txt (made by tools/reference/psf_optics_values.py). */
final class ReferenceValues {

    private static final Map<String, Double> VALUES = load();

    private ReferenceValues() {
    }

    static double get(String key) {
        Double v = VALUES.get(key);
        if (v == null) {
            throw new IllegalStateException("no reference value " + key);
        }
        return v;
    }

    private static Map<String, Double> load() {
        Map<String, Double> m = new HashMap<>();
        try (InputStream in = ReferenceValues.class.getResourceAsStream("/reference/psf-optics-values.txt")) {
            for (String line : new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n")) {
                if (line.isBlank() || line.startsWith("#")) {
                    continue;
                }
                String[] kv = line.split("=");
                m.put(kv[0].trim(), Double.parseDouble(kv[1].trim()));
            }
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
        return m;
    }
}
