package org.stackwright.cli;

import java.io.PrintStream;
import java.nio.file.Path;
import java.util.Map;
import java.util.function.BooleanSupplier;

import org.stackwright.op.Operation;
import org.stackwright.op.Result;

/**
 * Writes what a run made to the files the options named: images as TIFF (PNG when the name ends in .png), the
 * record as JSON, each completely or not at all. Used by the command line and the cluster runner.
 */
public final class ResultFiles {

    private ResultFiles() {
    }

    /**
     * @param outputs output key to path; a key the result has no image for gets a note on err
     * @param cancelled checked before each file; a cancel stops with a message naming what was written
     */
    public static void write(Operation op, Result result, Map<String, Path> outputs, boolean overwrite,
            BooleanSupplier cancelled, PrintStream err) {
        RunOutputs.writeEach(op, outputs, overwrite, result.images(), result.record(), err, cancelled);
    }
}
