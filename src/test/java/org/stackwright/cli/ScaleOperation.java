package org.stackwright.cli;

import java.util.List;

import org.stackwright.op.InputChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * A test-only operation (never registered in {@code Operations}): multiplies its input by a factor, after the
 * shared input checks. It stands in for the real operations in tests of the command-line door (batch, files,
 * overwrite) on a branch where only {@code simulate} exists.
 */
final class ScaleOperation implements Operation {

    @Override
    public String name() {
        return "test-scale";
    }

    @Override
    public String summary() {
        return "multiply an image by a factor (tests only)";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the image"),
                Param.number("factor", 2.0, -1e6, 1e6, "", "multiplier"),
                Param.integer("channel", 1, 1, 10_000, "channel of a hyperstack"),
                Param.outputImage("output", true, "the scaled image"),
                Param.outputFile("record", "the run record (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        Volume in = ImagePlusAdapter.toVolume(v.image("input"), v.integer("channel"), 1);
        MemoryCheck.require("test-scale of " + in.shape(), MemoryCheck.floats(in.size(), 2));
        InputChecks.Scan scan = InputChecks.check("input", in, ctx);
        Volume work = InputChecks.finiteCopy(in, scan);
        float f = (float) v.number("factor");
        float[] out = new float[work.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = scan.nonFiniteMask() != null && scan.nonFiniteMask()[i] != 0 ? Float.NaN : work.data()[i] * f;
        }
        Result r = new Result();
        r.image("output", ImagePlusAdapter.toImagePlus(in.withData(out), "scaled"));
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("non_finite_pixels", scan.nonFinite());
        return r;
    }
}
