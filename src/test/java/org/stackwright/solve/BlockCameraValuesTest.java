package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.stackwright.blocks.BlockRun;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * Camera values found in blocks, on stacks of the independent generator ({@link ConditionStacks}: its own pupil PSF,
 * specimen and camera noise, {@code tools/reference/make_deconvolution_conditions.py}), against its truth and the
 * oracle. A run in blocks estimates gain and read noise once, on the read box of the block whose core holds the most
 * signal in ADU (photon transfer on the image itself, {@code model.ImageNoiseFit}), so from a part of the stack;
 * the whole-stack run from all of it. Compared here: both estimates with the generator's truth, and the error of the
 * block result (every other value automatic too) with the whole-stack default's and the oracle's (accelerated
 * Richardson-Lucy with the true camera, its best iteration against the truth).
 *
 * <p>The stacks are 48x48x16 with a 31x31x17 PSF: four blocks of 24x24x16 cores need a halo below the PSF's size to
 * be parts of the stack at all (0.35 PSF: 11x11x6, read boxes of 35x35x16, about half the stack), so the block
 * result also carries the seams of a short halo; the bounds below say how much.
 */
class BlockCameraValuesTest {

    private static final DeconvolveOperation OP = new DeconvolveOperation();
    private static final double HALO = 0.35;

    private record Found(double gain, double readNoise, double error, int iterations) {
    }

    private static Values values(ConditionStacks.Condition c, double offset, String blockSize) {
        Map<String, String> raw = new LinkedHashMap<>();
        raw.put("offset", Double.toString(offset));
        if (blockSize != null) {
            raw.put("block-size", blockSize);
        }
        Values v = Values.parse("deconvolve", OP.params(), raw);
        v.withImage("input", ImagePlusAdapter.toImagePlus(ConditionStacks.read(c.data()), c.data()));
        v.withImage("psf", ImagePlusAdapter.toImagePlus(ConditionStacks.read("psf-" + c.psf()), "psf"));
        return v;
    }

    private static Found found(Result r, Volume truth) {
        @SuppressWarnings("unchecked")
        Map<String, Object> set = (Map<String, Object>) r.record().get("settings");
        Volume out = ImagePlusAdapter.toVolume(r.images().get("output"));
        return new Found(((Number) set.get("gain")).doubleValue(), ((Number) set.get("read_noise_adu")).doubleValue(),
                ConditionStacks.error(out.data(), truth.data()), ((Number) r.record().get("iterations")).intValue());
    }

    /**
     * The two conditions whose camera differs (gain 2.2 ADU/e-, read noise 3 ADU; gain 1, read noise 6): camera values
     * from the brightest block land as close to the truth as the whole stack's, and the block run's error stays near
     * the whole-stack default's.
     */
    @Test
    void cameraValuesFromTheBrightestBlockAgainstTruthAndTheWholeStack() {
        // a statistical check of automatic values: once, not again in the pure-Java FFT execution
        org.junit.jupiter.api.Assumptions.assumeFalse("java".equals(System.getProperty("stackwright.fft")),
                "runs on the default FFT engine only");
        Volume truth = ConditionStacks.read("truth");
        StringBuilder table = new StringBuilder();
        for (String name : new String[] {"exact", "read-noise"}) {
            ConditionStacks.Condition c = ConditionStacks.ALL.stream().filter(x -> x.name().equals(name)).findFirst()
                    .orElseThrow();
            double[] cam = ConditionStacks.truth(c.data());
            Found whole = found(OP.run(values(c, cam[2], null), RunContext.quiet(2)), truth);
            Result br = BlockRun.inMemory(OP, new DeconvolveBlocks(HALO), values(c, cam[2], "24x24x16"),
                    RunContext.quiet(2));
            Found block = found(br, truth);
            @SuppressWarnings("unchecked")
            Map<String, Object> set = (Map<String, Object>) br.record().get("settings");
            assertTrue(set.get("camera_values_from").toString().startsWith("block "), set.toString());
            double[] oracle = ConditionStacks.oracle(ConditionStacks.read(c.data()), ConditionStacks.read("psf-"
                    + c.psf()), cam, truth, 2 * Math.max(whole.iterations(), block.iterations()) + 20, 2);
            table.append(String.format(Locale.ROOT, "%-10s truth gain %.2f read noise %.1f | whole stack gain %.3f"
                    + " read noise %.2f error %.4f | blocks gain %.3f read noise %.2f error %.4f | oracle error %.4f%n",
                    name, cam[0], cam[1], whole.gain(), whole.readNoise(), whole.error(), block.gain(),
                    block.readNoise(), block.error(), oracle[1]));
            String where = table.toString();
            // gain: photon transfer on a part of the image; within 15 % of the truth, and no further from it than
            // the whole stack's estimate plus 10 % of the truth (common practice for a photon-transfer gain from
            // the image itself, no source)
            assertTrue(Math.abs(block.gain() - cam[0]) <= 0.15 * cam[0], where);
            assertTrue(Math.abs(block.gain() - cam[0]) <= Math.abs(whole.gain() - cam[0]) + 0.10 * cam[0], where);
            // read noise: the hardest value to find in the image (the intercept of the photon-transfer line);
            // within 2 ADU of the truth
            assertTrue(Math.abs(block.readNoise() - cam[1]) <= 2.0, where);
            // the block result (camera, background, stop all automatic, a short halo) within 15 % of the
            // whole-stack default's error, and within 1.5 times the oracle's
            assertTrue(block.error() <= 1.15 * whole.error(), where);
            assertTrue(block.error() <= 1.5 * oracle[1], where);
        }
        System.out.print(table);
    }
}
