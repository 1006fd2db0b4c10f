package org.stackwright.inspect;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.model.CalibrationFrames;
import org.stackwright.model.CameraEstimate;
import org.stackwright.model.ImageNoiseFit;
import org.stackwright.op.InputChecks;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code camera-noise}: the camera's gain, read noise and offset as {@code deconvolve} finds them when they are not
 * given: from dark frames (offset, read noise), flat frames (gain) or the image itself (photon transfer over its
 * smooth parts, {@link ImageNoiseFit}), with standard errors and, optionally, the photon-transfer plot. Thin door
 * over {@link CameraEstimate}.
 */
public final class CameraNoiseOperation implements Operation {

    @Override
    public String name() {
        return "camera-noise";
    }

    @Override
    public String summary() {
        return "estimate the camera's gain, read noise and offset from the image, dark frames or flat frames";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "raw camera data (ADU; not offset-subtracted)"),
                Param.image("dark", false, "dark frames (no light, several planes): offset and read noise"),
                Param.image("flat", false, "flat frames (even light, runs of 2 or more frames per level): gain"),
                Param.number("offset", null, -1e9, 1e9, "ADU", "camera offset when known; without it and without"
                        + " dark frames the image gives only offset - read noise^2 / gain"),
                Param.image("mask", false, "pixels to leave out: nonzero = dead, saturated, seam"),
                Param.outputImage("plot", false, "the photon-transfer plot: noise variance against mean level (PNG)"),
                Param.outputFile("record", "run record (JSON): values, sources, standard errors, binned levels"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus in = v.image("input");
        Volume data = InputChecks.oneVolume("input", in);
        InputChecks.Scan scan = InputChecks.check("input", data, ctx);
        byte[] mask = null;
        if (v.image("mask") != null) {
            mask = MaskChecks.check("mask", ImagePlusAdapter.toVolume(v.image("mask")), data, ctx);
        }
        mask = MaskChecks.union(mask, scan.nonFiniteMask());
        Volume dark = frames(v, "dark", data);
        Volume flat = frames(v, "flat", data);
        double offset = v.given("offset") ? v.number("offset") : Double.NaN;
        ctx.progress(0, "camera noise");
        CameraEstimate e = CameraEstimate.of(InputChecks.finiteCopy(data, scan), mask,
                new CameraEstimate.Given(Double.NaN, offset, Double.NaN, dark, flat), "dark", "flat");
        e.warnTo(ctx::warn);
        Result r = new Result();
        r.record("operation", name());
        r.record("settings", v.effective());
        e.record().forEach(r::record);
        r.line(line("gain", e.gain(), "ADU/e-"));
        r.line(line("read noise", e.readNoise(), "ADU"));
        r.line(line("offset", e.offset(), "ADU"));
        ImageNoiseFit fit = e.imageFit();
        if (fit != null && fit.usable()) {
            double[][] levels = fit.levels().stream()
                    .map(l -> new double[] {l.level(), l.variance(), l.standardError()}).toArray(double[][]::new);
            r.record("photon_transfer_levels", levels);
            r.record("photon_transfer_slope", fit.slope());
            r.record("photon_transfer_intercept", fit.intercept());
            r.line(String.format(Locale.ROOT, "image: %.0f%% of it smooth enough to measure the noise (%d blocks, %d"
                    + " levels from %.4g to %.4g ADU); for an EM camera the gain is the EM gain times the excess-noise"
                    + " factor (about 2)", 100 * fit.smoothShare(), fit.smoothBlocks(), levels.length,
                    levels[0][0], levels[levels.length - 1][0]));
            // always made (cheap); each door keeps it when asked for
            ImagePlus plot = InspectPlots.photonTransfer(levels, fit.slope(), fit.intercept()).getImagePlus();
            plot.setTitle(in.getTitle() + "-photon-transfer");
            r.image("plot", plot);
        } else if (v.given("plot")) {
            ctx.warn("plot: not made, because the camera values were not measured in the image");
        }
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("gain", e.gain().value());
        row.put("gain_se", e.gain().standardError());
        row.put("read_noise_adu", e.readNoise().value());
        row.put("read_noise_se", e.readNoise().standardError());
        row.put("offset_adu", e.offset().value());
        row.put("offset_se", e.offset().standardError());
        r.row(row);
        return r;
    }

    private static String line(String what, CameraEstimate.Found f, String unit) {
        String se = f.source().equals(CameraEstimate.GIVEN) || f.source().equals(CameraEstimate.ASSUMED) ? ""
                : String.format(Locale.ROOT, " +- %.3g", f.standardError());
        return String.format(Locale.ROOT, "%s: %.5g%s %s (%s)", what, f.value(), se, unit, f.source());
    }

    /** Reads calibration frames (the first channel), with the image's plane size. */
    private static Volume frames(Values v, String key, Volume data) {
        ImagePlus imp = v.image(key);
        return imp == null ? null : CalibrationFrames.requireSamePlanes(key, ImagePlusAdapter.toVolume(imp), data);
    }
}
