package org.stackwright.imagej;

import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.Map;
import java.util.Set;

import ij.ImagePlus;

/**
 * What a user chose for one run, as a door (dialog, macro, SciJava command) collected it, before it is checked:
 * the text of every setting (a number may be a comma list, one value per channel), the input images, which
 * optional output images to make and where to write output files.
 */
public final class DoorSettings {

    /** Key of the door's own switch that allows replacing existing output files (the CLI's --overwrite). */
    public static final String OVERWRITE = "overwrite";

    private final Map<String, String> text = new LinkedHashMap<>();
    private final Map<String, ImagePlus> images = new LinkedHashMap<>();
    private final Set<String> outputs = new LinkedHashSet<>();
    private final Map<String, String> files = new LinkedHashMap<>();
    private boolean overwrite;
    private boolean outputsAsked = true;

    /** @return key to value of every text-like setting given (numbers, words, choices, flags as true/false) */
    public Map<String, String> text() {
        return text;
    }

    /** @return key to input image, for the image settings given */
    public Map<String, ImagePlus> images() {
        return images;
    }

    /** @return keys of the output images to make (or, see {@link #outputsAsked}, to collect when made) */
    public Set<String> outputs() {
        return outputs;
    }

    /**
     * @return true (the default) when {@link #outputs} were asked for, so the operation makes them as for a path
     *     on the command line; false when they only list what to collect (a SciJava command has every output
     *     field and cannot ask for one; the operation then makes its required outputs and what its settings imply)
     */
    public boolean outputsAsked() {
        return outputsAsked;
    }

    public DoorSettings outputsAsked(boolean asked) {
        outputsAsked = asked;
        return this;
    }

    /** @return key to path of the output files (run records) to write */
    public Map<String, String> files() {
        return files;
    }

    public boolean overwrite() {
        return overwrite;
    }

    public DoorSettings overwrite(boolean on) {
        overwrite = on;
        return this;
    }
}
