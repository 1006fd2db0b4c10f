package org.stackwright.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.Json;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.RunFailedException;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;

/**
 * The output files of one command-line run, from the check before the work to the last byte: every output is
 * resolved to its real path (links followed), refused when it is an input (also through a link or a hard link),
 * when two outputs name one file, or when its folder or name cannot take it; then each is claimed
 * ({@link OutputClaim}), so that a second run writing the same file at the same time is refused, and written
 * completely or not at all after the work. Closing releases the claims.
 */
final class RunOutputs implements AutoCloseable {

    private final Operation op;
    private final Map<String, Path> targets;
    private final boolean overwrite;
    private final List<OutputClaim> claims = new ArrayList<>();

    private RunOutputs(Operation op, Map<String, Path> targets, boolean overwrite) {
        this.op = op;
        this.targets = targets;
        this.overwrite = overwrite;
    }

    /**
     * Checks and claims the outputs before any work.
     *
     * @param outputs output key to the path as given
     * @param inputs input key to the path as given
     * @throws IllegalArgumentException naming the option for every refusal
     */
    static RunOutputs claim(Operation op, Map<String, Path> outputs, Map<String, Path> inputs, boolean overwrite) {
        Map<String, Path> targets = new LinkedHashMap<>();
        Map<Path, String> seen = new LinkedHashMap<>();
        for (Map.Entry<String, Path> e : outputs.entrySet()) {
            Path real = OutputPaths.real(e.getValue());
            for (Map.Entry<String, Path> in : inputs.entrySet()) {
                if (OutputPaths.sameFile(real, in.getValue())) {
                    throw new IllegalArgumentException("--" + e.getKey() + " " + e.getValue() + " is the same file as --"
                            + in.getKey() + (real.equals(e.getValue().toAbsolutePath().normalize()) ? ""
                                    : " (it leads to " + real + ")")
                            + "; the input is never overwritten: choose another output name");
                }
            }
            String other = seen.put(real, e.getKey());
            if (other != null) {
                throw new IllegalArgumentException("--" + e.getKey() + " and --" + other + " name the same file " + e.getValue());
            }
            try {
                TiffFiles.checkWritable(real, overwrite);
            } catch (IllegalArgumentException ex) {
                throw new IllegalArgumentException("--" + e.getKey() + ": " + ex.getMessage());
            }
            targets.put(e.getKey(), real);
        }
        RunOutputs r = new RunOutputs(op, targets, overwrite);
        try {
            for (Map.Entry<String, Path> t : targets.entrySet()) {
                r.claims.add(OutputClaim.take("--" + t.getKey(), t.getValue()));
            }
        } catch (RuntimeException e) {
            r.close();
            throw e;
        }
        return r;
    }

    /**
     * Writes each output: TIFF, PNG (by its ending) or the JSON record, each complete or not at all.
     *
     * @param images the images the run made, by output key
     * @param record the run record
     * @param err where notes go (an output the run did not make)
     * @param cancelled checked before each file
     * @throws RunFailedException when a file cannot be written (the others already written stay complete)
     */
    void write(Map<String, ImagePlus> images, Map<String, Object> record, PrintStream err,
            java.util.function.BooleanSupplier cancelled) {
        writeEach(op, targets, overwrite, images, record, err, cancelled);
    }

    /**
     * Writes each output as {@link #write} does, to paths checked before (also by the block path,
     * {@link ResultFiles}).
     *
     * @param targets output key to path
     */
    static void writeEach(Operation op, Map<String, Path> targets, boolean overwrite, Map<String, ImagePlus> images,
            Map<String, Object> record, PrintStream err, java.util.function.BooleanSupplier cancelled) {
        List<Path> written = new ArrayList<>();
        for (Map.Entry<String, Path> e : targets.entrySet()) {
            if (cancelled.getAsBoolean()) {
                throw new CancelledException(written.isEmpty() ? "cancelled; no output written"
                        : "cancelled; complete before the cancel: " + written + "; not written: the others");
            }
            Path path = e.getValue();
            Param p = op.params().stream().filter(q -> q.key().equals(e.getKey())).findFirst().orElseThrow();
            try {
                if (p.kind() == Param.Kind.OUTPUT_FILE) {
                    OutputFiles.writeText(Json.write(record).getBytes(StandardCharsets.UTF_8), path, overwrite);
                } else if (images.get(e.getKey()) == null) {
                    err.println("note: " + op.name() + " made no " + e.getKey() + " for this input; " + path + " not written");
                    continue;
                } else if (path.getFileName().toString().toLowerCase(Locale.ROOT).endsWith(".png")) {
                    OutputFiles.writePng(images.get(e.getKey()), path, overwrite);
                } else {
                    TiffFiles.write(images.get(e.getKey()), path, overwrite);
                }
                written.add(path);
            } catch (IOException | UncheckedIOException | IllegalArgumentException ex) {
                String m = ex instanceof UncheckedIOException u ? u.getMessage() : ex.getMessage();
                throw new RunFailedException("--" + e.getKey() + ": " + m + (written.isEmpty() ? "; no output written"
                        : "; complete before it: " + written), ex);
            }
        }
    }

    /** Releases the claims. */
    @Override
    public void close() {
        for (OutputClaim c : claims) {
            c.close();
        }
        claims.clear();
    }
}
