package org.stackwright.op;

import java.util.List;

/**
 * One operation of the suite (simulate, psf, deconvolve, inpaint, ...), defined once and reached through three
 * doors: the command line, an ImageJ 1.x plugin with a recordable dialog, and a SciJava command. The door parses
 * its own input into {@link Values} (checked against {@link #params()}), supplies the input images, calls
 * {@link #run}, and writes or shows the {@link Result}. The operation itself knows no door.
 */
public interface Operation {

    /** @return the command-line name, e.g. "deconvolve" */
    String name();

    /** @return one line saying what it does */
    String summary();

    /** @return the settings, in the order dialogs show them */
    List<Param> params();

    /**
     * Runs the operation. Input images are never modified.
     *
     * @param values checked settings with the input images
     * @param context threads, progress, cancel and warnings
     * @return the outputs, keyed by their OUTPUT_IMAGE / OUTPUT_FILE parameter keys
     * @throws IllegalArgumentException for bad input, with a message naming the setting
     * @throws org.stackwright.parallel.CancelledException when cancelled
     */
    Result run(Values values, RunContext context);
}
