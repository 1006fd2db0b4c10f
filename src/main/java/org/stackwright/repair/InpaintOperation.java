package org.stackwright.repair;

import java.util.List;
import java.util.Locale;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ByteProcessor;
import ij.process.FloatProcessor;

import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockRun;
import org.stackwright.blocks.BlockSettings;
import org.stackwright.blocks.Blockwise;
import org.stackwright.op.InputChecks;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code inpaint}: fills the pixels of a mask (dead pixels, seams, holes) from the trusted ones ({@link
 * Inpainting}). Each channel and time point is its own problem; the mask (one plane or one per slice) applies to
 * all. Writes the repaired 32-bit image and, on request, the 8-bit mask of the filled pixels, which are
 * estimates and must be excluded from measurements.
 */
public final class InpaintOperation implements Operation, Blockwise {

    private final InpaintBlocks blocks = new InpaintBlocks();

    @Override
    public BlockOperation blocks() {
        return blocks;
    }

    @Override
    public String name() {
        return "inpaint";
    }

    @Override
    public String summary() {
        return "fill masked pixels (defects, seams, holes) from their surroundings; filled pixels are estimates";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the image or stack to repair"),
                Param.image("mask", true, "8-bit mask, nonzero = fill; one plane or one per slice"),
                Param.choice("method", "harmonic", List.of("harmonic", "biharmonic", "total-variation", "median"),
                        "harmonic: dead pixels and thin seams; biharmonic: smoother, larger holes; total-variation: "
                        + "keeps edges; median: fast, isolated pixels"),
                Param.choice("mode", "slices", List.of("slices", "volume"),
                        "stacks: fill each slice alone, or as one volume weighted by the calibrated z step"),
                Param.integer("iterations", null, 1, 10_000_000, "largest number of solver iterations "
                        + "(default 20000 for harmonic and biharmonic, 3000 for total-variation)"),
                Param.number("tolerance", null, 1e-12, 0.5, "", "solver stopping tolerance (default 1e-7 relative "
                        + "residual; total-variation 1e-5 of the data range per iteration)"),
                Param.outputImage("output", true, "the repaired image, 32-bit (TIFF)"),
                Param.outputImage("filled-output", false, "8-bit mask of the filled pixels, 255 = estimated (TIFF)"),
                BlockSettings.blockSize(),
                BlockSettings.memory(),
                Param.outputFile("record", "run record (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus input = v.image("input");
        if (input.getNChannels() == 1 && input.getNFrames() == 1 && BlockRun.wanted(blocks, v)) {
            return BlockRun.inMemory(this, blocks, v, ctx);
        }
        ImagePlus maskImp = v.image("mask");
        Inpainting.Method method = Inpainting.Method.of(v.choice("method"));
        Inpainting.Mode mode = Inpainting.Mode.of(v.choice("mode"));
        Inpainting.Settings defaults = Inpainting.Settings.of(method, mode);
        Inpainting.Settings s = new Inpainting.Settings(method, mode,
                v.given("tolerance") ? v.number("tolerance") : defaults.tolerance(),
                v.given("iterations") ? v.integer("iterations") : defaults.maxIterations());
        if (maskImp.getNChannels() > 1 || maskImp.getNFrames() > 1) {
            throw new IllegalArgumentException("mask has " + maskImp.getNChannels() + " channels and "
                    + maskImp.getNFrames() + " time points; give one plane or one plane per slice");
        }
        Volume mask = ImagePlusAdapter.toVolume(maskImp);
        int nc = input.getNChannels();
        int nz = input.getNSlices();
        int nt = input.getNFrames();
        int w = input.getWidth();
        int h = input.getHeight();
        // the output planes of every part, plus per part its volume, the repaired copy and the solver's vectors
        long part = (long) w * h * nz;
        MemoryCheck.require("inpaint of " + w + "x" + h + "x" + nz + (nc * nt > 1 ? " (" + nc * nt + " parts)" : ""),
                MemoryCheck.floats(part * nc * nt, 2) + MemoryCheck.floats(part, 12));
        MaskChecks.check("mask", mask, ImagePlusAdapter.toVolume(input, 1, 1), ctx);
        ImageStack out = new ImageStack(w, h);
        ImageStack filled = new ImageStack(w, h);
        int plane = w * h;
        int total = 0;
        int maxIt = 0;
        boolean converged = true;
        java.util.Set<String> notes = new java.util.LinkedHashSet<>();
        FloatProcessor[] outPlanes = new FloatProcessor[nc * nz * nt];
        ByteProcessor[] maskPlanes = new ByteProcessor[nc * nz * nt];
        try (Workers workers = new Workers(ctx.threads())) {
            for (int t = 1; t <= nt; t++) {
                for (int c = 1; c <= nc; c++) {
                    ctx.checkCancelled();
                    ctx.progress(((t - 1) * nc + c - 1) / (double) (nc * nt), "filling channel " + c + ", time point " + t);
                    Volume vol = ImagePlusAdapter.toVolume(input, c, t);
                    InputChecks.check("input", vol, ctx);
                    Inpainting.Outcome o = Inpainting.run(vol, mask, s, workers);
                    total += o.filledCount();
                    maxIt = Math.max(maxIt, o.iterations());
                    converged &= o.converged();
                    notes.addAll(o.notes());
                    for (int z = 0; z < nz; z++) {
                        float[] px = new float[plane];
                        System.arraycopy(o.filled().data(), z * plane, px, 0, plane);
                        byte[] mk = new byte[plane];
                        System.arraycopy(o.filledMask(), z * plane, mk, 0, plane);
                        int index = input.getStackIndex(c, z + 1, t) - 1;
                        outPlanes[index] = new FloatProcessor(w, h, px);
                        maskPlanes[index] = new ByteProcessor(w, h, mk);
                    }
                }
            }
        }
        for (int i = 0; i < outPlanes.length; i++) {
            out.addSlice(outPlanes[i]);
            filled.addSlice(maskPlanes[i]);
        }
        notes.forEach(ctx::warn);
        ImagePlus result = new ImagePlus(input.getTitle() + "-inpaint", out);
        result.setDimensions(nc, nz, nt);
        result.setCalibration(input.getCalibration().copy());
        ImagePlus filledImp = new ImagePlus(input.getTitle() + "-inpaint-filled", filled);
        filledImp.setDimensions(nc, nz, nt);
        filledImp.setCalibration(input.getCalibration().copy());
        ctx.progress(1, "done");
        Result r = new Result();
        r.image("output", result);
        r.image("filled-output", filledImp);
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("filled_pixels", total);
        r.record("iterations", maxIt);
        r.record("converged", converged);
        r.line(String.format(Locale.ROOT, "filled %d pixels by %s (%s); these are estimates: exclude them from "
                + "measurements (filled-output gives their mask)", total, method.word(),
                nz > 1 ? (mode == Inpainting.Mode.VOLUME ? "as one volume" : "slice by slice") : "2D"));
        return r;
    }
}
