package org.stackwright.testing;

import java.util.List;

/**
 * The operation names fixed by the issues, which every door (plugins.config, SciJava commands) lists already.
 * While the operations are built on separate branches, a door entry whose operation is not registered yet is
 * tolerated when its name is in {@link #NAMES}; after the merge set {@link #STRICT} to true so that every entry
 * must have its operation.
 */
public final class ExpectedOperations {

    /** Every operation name the issues fix. */
    public static final List<String> NAMES = List.of("simulate", "psf", "psf-from-beads", "measure-psf", "psf-refine",
            "deconvolve", "find-defects", "seam-mask", "inpaint", "residuals", "compare", "interval-profile",
            "camera-noise");

    /** Turn on after the merge: then a door entry without a registered operation fails the tests. */
    public static final boolean STRICT = true;

    private ExpectedOperations() {
    }

    /** @return true when a door may list this name although the operation is not registered */
    public static boolean tolerated(String name) {
        return !STRICT && NAMES.contains(name);
    }
}
