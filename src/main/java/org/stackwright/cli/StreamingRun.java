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
import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;

/**
 * The command line's block path: when an operation can run in blocks and either {@code --block-size} is given, an
 * output names a folder of planes, or the whole stack would not fit the memory budget, its stacks are never
 * loaded. Inputs are read from the TIFF (or folder of planes) by random access as blocks need them; streamed
 * outputs are written block by block into a temporary file renamed at the end (a folder output gets one TIFF per
 * plane). Small inputs (a PSF) are read as usual, and the record and small outputs are written afterwards. Every
 * output's name is claimed before any work ({@link OutputClaim}; the streamed ones by their sinks), so two runs
 * cannot write the same file.
 */
public final class StreamingRun {

    /**
     * The files of a block run, opened and checked.
     *
     * @param blocks the operation's block side
     * @param inputs streamed inputs by key (close them)
     * @param streamed streamed output key to path
     * @param others the other outputs (record, pictures, small images) key to path
     * @param folders the streamed output keys that name a folder of planes
     */
    public record BlockFiles(BlockOperation blocks, Map<String, PlaneSource> inputs, Map<String, Path> streamed,
            Map<String, Path> others, java.util.Set<String> folders) {

        /** Closes the inputs. */
        public void close() {
            inputs.values().forEach(PlaneSource::close);
        }
    }

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

    /** @return true when an output option as typed names a folder of planes */
    static boolean isFolderOutput(String key, String typed) {
        return !key.equals("record") && BlockRun.isFolder(typed);
    }

    private static PlaneSource source(Path p, String key) {
        return Files.isDirectory(p) ? FolderPlaneSource.open(p, "--" + key) : TiffPlaneSource.open(p, "--" + key);
    }

    /**
     * Opens the files of a block run from command-line options: loads the small inputs into the values, opens the
     * streamed inputs for random access and checks every output path (none may be an input).
     *
     * @param values parsed settings; small input images are added to it
     * @throws IllegalArgumentException naming the option for a missing or unreadable file or a bad output path
     */
    public static BlockFiles open(Operation op, Values values, Map<String, String> raw, boolean overwrite) {
        BlockOperation b = ((Blockwise) op).blocks();
        String mainKey = b.streamedInputs().get(0);
        String mainPath = raw.get(mainKey);
        if (mainPath == null) {
            throw new IllegalArgumentException("--" + mainKey + " is required");
        }
        Map<String, PlaneSource> inputs = new LinkedHashMap<>();
        try {
            Path path = OutputPaths.parse("--" + mainKey, mainPath);
            inputs.put(mainKey, source(path, mainKey));
            Map<Path, String> inputPaths = new LinkedHashMap<>();
            inputPaths.put(path.toAbsolutePath().normalize(), mainKey);
            for (Param p : op.params()) {
                String v = raw.get(p.key());
                if (p.kind() != Param.Kind.IMAGE || v == null || p.key().equals(mainKey)) {
                    continue;
                }
                Path in = OutputPaths.parse("--" + p.key(), v);
                if (b.streamedInputs().contains(p.key())) {
                    inputs.put(p.key(), source(in, p.key()));
                } else if (!values.images().containsKey(p.key())) {
                    values.withImage(p.key(), TiffFiles.open(in, "--" + p.key()));
                }
                inputPaths.put(in, p.key());
            }
            Map<String, Path> others = new LinkedHashMap<>();
            for (Param p : op.params()) {
                String v = raw.get(p.key());
                if (p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) {
                    if (v == null) {
                        if (p.required()) {
                            throw new IllegalArgumentException("--" + p.key() + " is required: " + p.help());
                        }
                        continue;
                    }
                    Path out = OutputPaths.parse("--" + p.key(), v);
                    OutputPaths.checkName("--" + p.key(), out);
                    others.put(p.key(), out);
                }
            }
            java.util.Set<String> folders = new java.util.LinkedHashSet<>();
            for (String key : b.streamedOutputs(values).keySet()) {
                if (isFolderOutput(key, raw.get(key))) {
                    folders.add(key);
                }
            }
            OperationRunner.checkOutputs(others, inputPaths, overwrite, folders);
            Map<String, Path> streamed = new LinkedHashMap<>();
            for (String key : b.streamedOutputs(values).keySet()) {
                if (others.containsKey(key)) {
                    streamed.put(key, others.remove(key));
                }
            }
            return new BlockFiles(b, inputs, streamed, others, folders);
        } catch (RuntimeException e) {
            inputs.values().forEach(PlaneSource::close);
            throw e;
        }
    }

    /**
     * Runs in blocks when that is wanted.
     *
     * @return false when the operation should run in memory as usual (nothing was done)
     */
    boolean tryRun(Values values, Map<String, String> raw, int threads, boolean overwrite, CancelGuard guard) {
        if (!(op instanceof Blockwise bw) || !bw.blocks().applies(values)) {
            return false;
        }
        BlockOperation b = bw.blocks();
        String mainKey = b.streamedInputs().get(0);
        String mainPath = raw.get(mainKey);
        if (mainPath == null) {
            return false;
        }
        boolean given = BlockSettings.given(values);
        for (String key : b.streamedOutputs(values).keySet()) {
            String v = raw.get(key);
            given |= isFolderOutput(key, v);
        }
        if (!given) {
            // stream only what does not fit: look at the header (a kind random access cannot read is loaded as before)
            Path path = Paths.get(mainPath);
            try (PlaneSource main = source(path, mainKey)) {
                for (Param p : op.params()) {
                    String v = raw.get(p.key());
                    if (p.kind() == Param.Kind.IMAGE && v != null && !b.streamedInputs().contains(p.key())) {
                        values.withImage(p.key(), TiffFiles.open(Paths.get(v), "--" + p.key()));
                    }
                }
                long loaded = (long) main.width() * main.height() * main.depth() * main.bitDepth() / 8;
                if (BlockRun.fits(b, values, main, loaded)) {
                    return false;
                }
            } catch (IllegalArgumentException e) {
                return false;
            }
        }
        BlockFiles f = open(op, values, raw, overwrite);
        // the record and the small outputs are claimed as on the usual path; the streamed ones by their sinks
        java.util.List<OutputClaim> claims = new java.util.ArrayList<>();
        try {
            for (Map.Entry<String, Path> e : f.others().entrySet()) {
                claims.add(OutputClaim.take("--" + e.getKey(), OutputPaths.real(e.getValue())));
            }
            if (f.inputs().get(mainKey) instanceof FolderPlaneSource folder) {
                folder.checkAll();
                if (!folder.zStepKnown() && folder.depth() > 1) {
                    err.println("warning: --" + mainKey + ": the first plane gives no z step; taken equal to the pixel"
                            + " width (" + folder.voxel().x() + " um); give planes saved with their calibration");
                }
            }
            RunContext ctx = new RunContext(threads, new CliProgress(err), w -> err.println("warning: " + w),
                    guard::isCancelled);
            long t0 = System.nanoTime();
            Result result = BlockRun.toFiles(op, b, values, f.inputs(), f.streamed(), f.folders(), overwrite, ctx);
            err.print(CliProgress.CLEAR);
            result.record().putIfAbsent("seconds", (System.nanoTime() - t0) * 1e-9);
            if (!ctx.warnings().isEmpty()) {
                result.record().put("warnings", ctx.warnings());
            }
            runner.writeOutputs(result, f.others(), overwrite, guard);
            for (String line : result.report()) {
                runner.print(line);
            }
            return true;
        } finally {
            claims.forEach(OutputClaim::close);
            f.close();
        }
    }
}
