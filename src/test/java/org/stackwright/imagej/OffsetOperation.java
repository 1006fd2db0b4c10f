package org.stackwright.imagej;

import java.awt.event.KeyEvent;
import java.util.ArrayList;
import java.util.List;

import ij.IJ;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * A test-only operation with a known answer: output = input + wavelength + sum of the PSF (when given), reached
 * after {@code iterations} steps that each report progress and check for cancel. With {@code cancel-at=k} it
 * presses Esc (as a user would) during step k.
 */
public final class OffsetOperation implements Operation {

    @Override
    public String name() {
        return "test-offset";
    }

    @Override
    public String summary() {
        return "test only: adds the wavelength and the PSF's sum to every voxel";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the image"),
                Param.image("psf", false, "a PSF whose sum is added"),
                Param.number("wavelength", 500.0, 200, 2000, "nm", "added to every voxel"),
                Param.choice("method", "plain", List.of("plain", "other words"), "a choice with a space"),
                Param.flag("verbose", "a switch"),
                Param.integer("iterations", 4, 1, 1000, "steps"),
                Param.integer("cancel-at", 0, 0, 1000, "press Esc during this step (0 = never)"),
                Param.text("note", "a b", "free text with a space"),
                Param.number("read-noise", 2.0, 0, 100, "ADU", "a key that ends with another key"),
                Param.choice("noise", "poisson", List.of("poisson", "gaussian"), "the key the other one ends with"),
                Param.outputImage("output", true, "the result"),
                Param.outputImage("extra", false, "a copy of the input"),
                Param.outputFile("record", "the run record"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        Volume in = ImagePlusAdapter.toVolume(v.image("input"));
        double add = v.number("wavelength") + (v.image("psf") == null ? 0 : ImagePlusAdapter.toVolume(v.image("psf")).sum());
        int n = v.integer("iterations");
        int cancelAt = v.integer("cancel-at");
        List<Double> history = new ArrayList<>();
        float[] out = new float[in.size()];
        for (int it = 1; it <= n; it++) {
            if (it == cancelAt) {
                IJ.setKeyDown(KeyEvent.VK_ESCAPE);
            }
            ctx.checkCancelled();
            ctx.progress((double) it / n, "step " + it + " of " + n);
            history.add(1.0 / it);
        }
        for (int i = 0; i < out.length; i++) {
            out[i] = (float) (in.data()[i] + add);
        }
        if (v.flag("verbose")) {
            ctx.warn("verbose is on");
        }
        Result r = new Result();
        r.image("output", ImagePlusAdapter.toImagePlus(in.withData(out), "offset"));
        r.image("extra", ImagePlusAdapter.toImagePlus(in.copy(), "extra"));
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("iterations", n);
        r.record("stop_reason", "fixed");
        r.record("added", add);
        r.record("history", history);
        r.row(java.util.Map.of("added", add));
        return r;
    }
}
