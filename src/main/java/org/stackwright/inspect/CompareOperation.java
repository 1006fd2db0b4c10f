package org.stackwright.inspect;

import java.util.List;
import java.util.Locale;

import ij.ImagePlus;

import org.stackwright.op.InputChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/** {@code compare}: rates an image against a reference with NRMSE, PSNR, SSIM and Pearson correlation. */
public final class CompareOperation implements Operation {

    @Override
    public String name() {
        return "compare";
    }

    @Override
    public String summary() {
        return "rate an image against a reference: NRMSE, PSNR, SSIM and Pearson correlation";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("reference", true, "the reference (ground truth or a reference acquisition)"),
                Param.image("input", true, "the image to rate, same size as the reference"),
                Param.number("data-range", null, Double.MIN_VALUE, Double.MAX_VALUE, "",
                        "data range L for PSNR and SSIM [default: the reference's max - min]"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus refImp = v.image("reference");
        ImagePlus imgImp = v.image("input");
        if (refImp.getWidth() != imgImp.getWidth() || refImp.getHeight() != imgImp.getHeight()
                || refImp.getNSlices() != imgImp.getNSlices()) {
            throw new IllegalArgumentException("input is " + imgImp.getWidth() + "x" + imgImp.getHeight() + "x"
                    + imgImp.getNSlices() + " but reference is " + refImp.getWidth() + "x" + refImp.getHeight() + "x"
                    + refImp.getNSlices() + "; allowed: images of the same size");
        }
        // both images (read and as volumes) and the five double-precision filtered moments of SSIM
        MemoryCheck.require("compare of " + refImp.getWidth() + "x" + refImp.getHeight() + "x" + refImp.getNSlices(),
                MemoryCheck.floats((long) refImp.getWidth() * refImp.getHeight() * refImp.getNSlices(), 14));
        Volume ref = InputChecks.oneVolume("reference", refImp);
        Volume img = InputChecks.oneVolume("input", imgImp);
        InputChecks.requireFinite("reference", ref);
        InputChecks.requireFinite("input", img);
        double range = v.given("data-range") ? v.number("data-range") : Double.NaN;
        QualityMetrics q = QualityMetrics.of(ref, img, range);
        Result r = new Result();
        r.record("operation", "compare");
        r.record("settings", v.effective());
        r.record("data_range", q.dataRange());
        r.record("nrmse", q.nrmse());
        r.record("nrmse_min_max", q.nrmseMinMax());
        r.record("nrmse_mean", q.nrmseMean());
        r.record("psnr_db", q.psnr());
        r.record("ssim", q.ssim());
        r.record("pearson", q.pearson());
        r.line(String.format(Locale.ROOT, "data range: %.6g%s", q.dataRange(),
                v.given("data-range") ? "" : " (reference max - min)"));
        r.line(String.format(Locale.ROOT, "NRMSE: %.6f (Euclidean; min-max %.6f, mean %.6f)", q.nrmse(),
                q.nrmseMinMax(), q.nrmseMean()));
        r.line(String.format(Locale.ROOT, "PSNR: %.4f dB", q.psnr()));
        r.line(String.format(Locale.ROOT, "SSIM: %.6f (Gaussian window sigma 1.5)", q.ssim()));
        r.line(String.format(Locale.ROOT, "Pearson correlation: %.6f", q.pearson()));
        return r;
    }
}
