package org.stackwright.blocks;

import java.io.Serializable;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The result of the global step: settings fixed for every block (key to text value, as a user would have typed
 * them, e.g. background = 103.2, stop = fixed, iterations = 17), and what the run record says about how they were
 * found.
 *
 * @param settings setting key to value, replacing the given value for every block
 * @param record record entries (numbers, words, lists, maps)
 */
public record Globals(Map<String, String> settings, Map<String, Object> record) implements Serializable {

    public Globals {
        settings = new LinkedHashMap<>(settings);
        record = new LinkedHashMap<>(record);
    }

    /** @return no global choices */
    public static Globals none() {
        return new Globals(Map.of(), Map.of());
    }
}
