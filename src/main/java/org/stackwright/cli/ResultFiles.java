package org.stackwright.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.BooleanSupplier;

import ij.ImagePlus;

import org.stackwright.op.Json;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;

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
        List<Path> written = new ArrayList<>();
        for (Map.Entry<String, Path> e : outputs.entrySet()) {
            if (cancelled.getAsBoolean()) {
                throw new CancelledException(written.isEmpty() ? "cancelled; no output written"
                        : "cancelled; complete before the cancel: " + written + "; not written: the others");
            }
            Path path = e.getValue();
            Param p = op.params().stream().filter(q -> q.key().equals(e.getKey())).findFirst().orElseThrow();
            if (p.kind() == Param.Kind.OUTPUT_FILE) {
                try {
                    OutputFiles.writeText(Json.write(result.record()).getBytes(StandardCharsets.UTF_8), path, overwrite);
                    written.add(path);
                } catch (IOException ex) {
                    throw new UncheckedIOException("could not write " + path + ": " + ex.getMessage(), ex);
                }
                continue;
            }
            ImagePlus imp = result.images().get(e.getKey());
            if (imp == null) {
                err.println("note: " + op.name() + " made no " + e.getKey() + " for this input; " + path + " not written");
            } else if (path.getFileName().toString().toLowerCase(Locale.ROOT).endsWith(".png")) {
                OutputFiles.writePng(imp, path, overwrite);
                written.add(path);
            } else {
                TiffFiles.write(imp, path, overwrite);
                written.add(path);
            }
        }
    }
}
