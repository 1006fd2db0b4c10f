package org.stackwright.blocks;

import java.io.Serializable;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The result of the global step: what every block must use, fixed once for the whole volume.
 *
 * @param settings setting key to value, replacing the given value for every block, as a user would have typed it
 *     (e.g. background = 103.2, stop = fixed, iterations = 17)
 * @param numbers other whole-volume numbers a block needs that are no setting (e.g. the start value of the
 *     iterations, the volume's size)
 * @param record what the run record says about how they were found (numbers, words, lists, maps)
 */
public record Globals(Map<String, String> settings, Map<String, Double> numbers, Map<String, Object> record)
        implements Serializable {

    public Globals {
        settings = new LinkedHashMap<>(settings);
        numbers = new LinkedHashMap<>(numbers);
        record = new LinkedHashMap<>(record);
    }

    /** @return no global choices */
    public static Globals none() {
        return new Globals(Map.of(), Map.of(), Map.of());
    }

    /**
     * @return a number of {@link #numbers}
     * @throws IllegalStateException when it was not fixed
     */
    public double number(String key) {
        Double v = numbers.get(key);
        if (v == null) {
            throw new IllegalStateException("global number " + key + " was not fixed");
        }
        return v;
    }
}
