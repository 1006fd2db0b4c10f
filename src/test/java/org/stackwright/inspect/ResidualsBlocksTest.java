package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** The residual view in blocks against the whole stack: the normalised residual stack and chi^2 per slice. */
class ResidualsBlocksTest {

    @Test
    void residualStackAndChiSquareAgreeWithTheWholeStack() {
        VoxelSize vx = new VoxelSize(0.1, 0.1, 0.25);
        int w = 70;
        int h = 64;
        int d = 12;
        SplittableRandom r = new SplittableRandom(4);
        float[] est = new float[w * h * d];
        for (int i = 0; i < est.length; i++) {
            est[i] = (float) (20 + (r.nextDouble() < 0.01 ? 2000 * r.nextDouble() : 0));
        }
        Volume estimate = new Volume(w, h, d, est, vx);
        Volume psf = GaussianPsf.sampled(0.15, 0.3, vx, 9, 9, 7);
        Volume blurred = ForwardBlur.blur(estimate, psf, new org.stackwright.parallel.Workers(1));
        float[] y = blurred.data().clone();
        for (int i = 0; i < y.length; i++) {
            // Poisson counts by the normal approximation around the prediction, offset 100
            y[i] = (float) Math.rint(100 + y[i] + Math.sqrt(y[i]) * Math.sqrt(-2 * Math.log(1 - r.nextDouble()))
                    * Math.cos(2 * Math.PI * r.nextDouble()));
        }
        Volume data = new Volume(w, h, d, y, vx);
        ResidualsOperation op = new ResidualsOperation();
        Result[] res = new Result[2];
        for (int k = 0; k < 2; k++) {
            Values v = Values.parse("residuals", op.params(), k == 0 ? Map.of("offset", "100")
                    : Map.of("offset", "100", "block-size", "30x30x6"));
            v.withImage("input", ImagePlusAdapter.toImagePlus(data, "data"));
            v.withImage("estimate", ImagePlusAdapter.toImagePlus(estimate, "estimate"));
            v.withImage("psf", ImagePlusAdapter.toImagePlus(psf, "psf"));
            res[k] = op.run(v, RunContext.quiet(2));
        }
        Volume a = ImagePlusAdapter.toVolume(res[0].images().get("output"));
        Volume b = ImagePlusAdapter.toVolume(res[1].images().get("output"));
        double diff = 0;
        for (int i = 0; i < a.size(); i++) {
            diff = Math.max(diff, Math.abs(a.data()[i] - b.data()[i]));
        }
        System.out.printf(Locale.ROOT, "residuals in blocks: normalised residuals differ by at most %.3g%n", diff);
        // the same values up to the float rounding of FFTs of other sizes
        assertTrue(diff < 1e-4, "largest difference " + diff);
        double[] sa = (double[]) res[0].record().get("chi2_per_slice");
        double[] sb = (double[]) res[1].record().get("chi2_per_slice");
        assertEquals(sa.length, sb.length);
        for (int z = 0; z < sa.length; z++) {
            assertEquals(sa[z], sb[z], 1e-5 * sa[z], "slice " + z);
        }
        assertTrue(res[1].record().get("verdict_from").toString().startsWith("central crop"));
    }
}
