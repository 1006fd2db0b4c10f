package org.stackwright.cli;

import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockRun;
import org.stackwright.blocks.BlockSettings;
import org.stackwright.blocks.Blockwise;
import org.stackwright.blocks.FolderPlaneSource;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.blocks.TiffPlaneSource;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.TiffFiles;

/**
 * The command line's block path: when an operation can run in blocks and either {@code --block-size} is given or
 * the whole stack would not fit the memory budget, its stacks are never loaded. Inputs are read from the TIFF (or
 * folder of planes) by random access as blocks need them; streamed outputs are written block by block into a
 * temporary file renamed at the end (a folder output gets one TIFF per plane). Small inputs (a PSF, dark frames)
 * are read as usual, and the record and small outputs are written by {@link OperationRunner} afterwards.
 */
final class StreamingRun {

    private final OperationRunner runner;
    private final Operation op;
    private final PrintStream err;

    StreamingRun(OperationRunner runner, Operation op, PrintStream err) {
        this.runner = runner;
        this.op = op;
        this.err = err;
    }

    /** @return true when the main input is a folder that stands for one stack (block-size given), not a batch */
    static boolean isPlaneFolder(Operation op, Map<String, String> raw, String mainKey) {
        String v = raw.get(mainKey);
        String bs = raw.get(BlockSettings.BLOCK_SIZE);
        return op instanceof Blockwise && v != null && Files.isDirectory(Paths.get(v)) && bs != null
                && !bs.isBlank() && !bs.trim().equalsIgnoreCase("auto");
    }

    /** @return true when an output option names a folder of planes */
    static boolean isFolderOutput(String key, Path p) {
        return !key.equals("record") && BlockRun.isFolder(p);
    }

    /**
     * Runs in blocks when that is wanted.
     *
     * @return false when the operation should run in memory as usual (nothing was done)
     */
    boolean tryRun(Values values, Map<String, String> raw, int threads, boolean overwrite, CancelGuard guard) {
        if (!(op instanceof Blockwise bw)) {
            return false;
        }
        BlockOperation b = bw.blocks();
        if (!b.applies(values)) {
            return false;
        }
        String mainKey = b.streamedInputs().get(0);
        String mainPath = raw.get(mainKey);
        if (mainPath == null) {
            return false;
        }
        boolean given = BlockSettings.given(values);
        for (String key : b.streamedOutputs(values).keySet()) {
            String v = raw.get(key);
            given |= v != null && BlockRun.isFolder(Paths.get(v));
        }
        Path path = Paths.get(mainPath);
        PlaneSource main;
        try {
            main = Files.isDirectory(path) ? FolderPlaneSource.open(path, "--" + mainKey)
                    : TiffPlaneSource.open(path, "--" + mainKey);
        } catch (IllegalArgumentException e) {
            if (given) {
                throw e;
            }
            return false; // a kind ImageJ reads but random access cannot (compressed): load it as before
        }
        Map<String, PlaneSource> inputs = new LinkedHashMap<>();
        inputs.put(mainKey, main);
        try {
            Map<Path, String> inputPaths = new LinkedHashMap<>();
            inputPaths.put(path.toAbsolutePath().normalize(), mainKey);
            for (Param p : op.params()) {
                String v = raw.get(p.key());
                if (p.kind() == Param.Kind.IMAGE && v != null && !b.streamedInputs().contains(p.key())) {
                    values.withImage(p.key(), TiffFiles.open(Paths.get(v), "--" + p.key()));
                    inputPaths.put(Paths.get(v).toAbsolutePath().normalize(), p.key());
                }
            }
            long loaded = (long) main.width() * main.height() * main.depth() * main.bitDepth() / 8;
            if (!given && BlockRun.fits(b, values, main, loaded)) {
                return false;
            }
            if (main instanceof FolderPlaneSource f) {
                f.checkAll();
                if (!f.zStepKnown() && main.depth() > 1) {
                    err.println("warning: --" + mainKey + ": the first plane gives no z step; taken equal to the pixel"
                            + " width (" + main.voxel().x() + " um); give planes saved with their calibration");
                }
            }
            for (String key : b.streamedInputs()) {
                String v = raw.get(key);
                if (key.equals(mainKey) || v == null) {
                    continue;
                }
                Path p = Paths.get(v);
                inputs.put(key, Files.isDirectory(p) ? FolderPlaneSource.open(p, "--" + key) : TiffPlaneSource.open(p, "--" + key));
                inputPaths.put(p.toAbsolutePath().normalize(), key);
            }
            Map<String, Path> outputs = new LinkedHashMap<>();
            Map<String, Path> streamed = new LinkedHashMap<>();
            for (Param p : op.params()) {
                String v = raw.get(p.key());
                if (p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) {
                    if (v == null) {
                        if (p.required()) {
                            throw new IllegalArgumentException("--" + p.key() + " is required: " + p.help());
                        }
                        continue;
                    }
                    outputs.put(p.key(), Paths.get(v));
                }
            }
            OperationRunner.checkOutputs(outputs, inputPaths, overwrite);
            for (String key : b.streamedOutputs(values).keySet()) {
                if (outputs.containsKey(key)) {
                    streamed.put(key, outputs.remove(key));
                }
            }
            outputs.values().forEach(guard::watch);
            streamed.values().forEach(guard::watch);
            RunContext ctx = new RunContext(threads, new CliProgress(err), w -> err.println("warning: " + w),
                    guard::isCancelled);
            long t0 = System.nanoTime();
            Result result = BlockRun.toFiles(op, b, values, inputs, streamed, overwrite, ctx);
            err.print(CliProgress.CLEAR);
            result.record().putIfAbsent("seconds", (System.nanoTime() - t0) * 1e-9);
            if (!ctx.warnings().isEmpty()) {
                result.record().put("warnings", ctx.warnings());
            }
            runner.writeOutputs(result, outputs, overwrite, guard);
            for (String line : result.report()) {
                runner.print(line);
            }
            return true;
        } finally {
            inputs.values().forEach(PlaneSource::close);
        }
    }
}
