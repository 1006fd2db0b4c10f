package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The residual view in blocks against the whole stack: the normalised residual stack, chi^2 over the trusted region,
 * the whole image, the border band and per slice, and (the crop being the whole of this small stack) the verdict,
 * for the default boundary exclude and for zero.
 */
class ResidualsBlocksTest {

    @org.junit.jupiter.params.ParameterizedTest
    @org.junit.jupiter.params.provider.ValueSource(strings = {"exclude", "zero"})
    void residualStackAndChiSquareAgreeWithTheWholeStack(String boundary) {
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
            Values v = Values.parse("residuals", op.params(), k == 0 ? Map.of("offset", "100", "boundary", boundary)
                    : Map.of("offset", "100", "boundary", boundary, "block-size", "30x30x6"));
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
        for (String key : new String[] {"chi2_per_pixel", "chi2_per_pixel_whole_image", "chi2_per_pixel_border_band"}) {
            double ca = (double) res[0].record().get(key);
            double cb = (double) res[1].record().get(key);
            assertEquals(ca, cb, 1e-5 * ca, key);
        }
        assertEquals(res[0].record().get("trusted_voxels"), res[1].record().get("trusted_voxels"));
        assertEquals(res[0].record().get("verdict"), res[1].record().get("verdict"));
        assertTrue(res[1].record().get("verdict_from").toString().startsWith("central crop"));
    }
}
