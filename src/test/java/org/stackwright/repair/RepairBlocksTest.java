package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.simulate.Damage;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * inpaint in blocks against the whole image at once (find-defects refuses blocks), on an invented series of moving blobs with
 * planted hot, dead and stuck pixels, holes and a seam.
 */
class RepairBlocksTest {

    private static final int W = 100;
    private static final int H = 84;
    private static final int D = 6;

    /** Blobs drifting over the frames with photon and read noise, then planted defects (Damage.defects). */
    private static Volume series() {
        Volume img = DefectFinderTest.blobSeries(W, H, D, 15, 5);
        img = img.withVoxel(new VoxelSize(0.1, 0.1, 0.3));
        double max = img.max();
        Damage.defects(img, new int[] {30, 30, 30}, 100, 100 + 20 * (max - 100) + 500, 100 + 0.5 * (max - 100) + 50, 9);
        return img;
    }

    private static Result run(Operation op, Map<String, String> raw, Map<String, ImagePlus> images) {
        Values v = Values.parse(op.name(), op.params(), raw);
        images.forEach(v::withImage);
        return op.run(v, RunContext.quiet(2));
    }

    /**
     * find-defects judges lines, clusters and the noise level over the whole image, so blocks would give another
     * mask: a block size is refused with a message naming the key, and auto runs on the whole image.
     */
    @Test
    void findDefectsRefusesBlocks() {
        ImagePlus imp = ImagePlusAdapter.toImagePlus(series(), "series");
        FindDefectsOperation op = new FindDefectsOperation();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> run(op, Map.of("block-size", "30x40x6"), Map.of("input", imp)));
        assertTrue(e.getMessage().contains("block-size") && e.getMessage().contains("auto"), e.getMessage());
        Result auto = run(op, Map.of("block-size", "auto"), Map.of("input", imp));
        assertFalse(auto.record().containsKey("blocks"));
        assertArrayEquals((byte[]) run(op, Map.of(), Map.of("input", imp)).images().get("output").getProcessor().getPixels(),
                (byte[]) auto.images().get("output").getProcessor().getPixels());
    }

    /** Dead pixels, 4x4 holes and a 2-pixel seam across the whole image. */
    private static Volume mask() {
        float[] m = new float[W * H];
        SplittableRandom r = new SplittableRandom(3);
        for (int i = 0; i < 150; i++) {
            m[r.nextInt(W * H)] = 255;
        }
        for (int i = 0; i < 12; i++) {
            int x0 = r.nextInt(W - 4);
            int y0 = r.nextInt(H - 4);
            for (int y = y0; y < y0 + 4; y++) {
                for (int x = x0; x < x0 + 4; x++) {
                    m[y * W + x] = 255;
                }
            }
        }
        for (int x = 0; x < W; x++) {
            m[41 * W + x] = 255;
            m[42 * W + x] = 255;
        }
        return new Volume(W, H, 1, m, new VoxelSize(0.1, 0.1, 0.3));
    }

    /**
     * Inpainting in blocks: the median fill (local by construction) is identical; the conjugate-gradient fills
     * agree within their stopping tolerance (each block's solve stops on its own residual; relative residual 1e-7).
     */
    @Test
    void inpaintingAgreesWithTheWholeImage() {
        Volume img = series();
        ImagePlus imp = ImagePlusAdapter.toImagePlus(img, "series");
        ImagePlus m = ImagePlusAdapter.toImagePlus(mask(), "mask");
        InpaintOperation op = new InpaintOperation();
        double range = img.max();
        for (String method : new String[] {"median", "harmonic", "biharmonic"}) {
            Map<String, String> raw = new LinkedHashMap<>();
            raw.put("method", method);
            Map<String, ImagePlus> in = Map.of("input", imp, "mask", m);
            Result whole = run(op, raw, in);
            raw.put("block-size", "40x30x6");
            Result blocks = run(op, raw, in);
            Volume a = ImagePlusAdapter.toVolume(whole.images().get("output"));
            Volume b = ImagePlusAdapter.toVolume(blocks.images().get("output"));
            double diff = 0;
            for (int i = 0; i < a.size(); i++) {
                diff = Math.max(diff, Math.abs(a.data()[i] - b.data()[i]));
            }
            System.out.printf(Locale.ROOT, "inpaint %s: blocks differ from the whole image by at most %.3g (%.3g of the"
                    + " range)%n", method, diff, diff / range);
            if (method.equals("median")) {
                assertArrayEquals(a.data(), b.data());
            } else {
                assertTrue(diff <= 1e-4 * range, method + ": " + diff);
            }
            assertArrayEquals((byte[]) whole.images().get("filled-output").getStack().getPixels(3),
                    (byte[]) blocks.images().get("filled-output").getStack().getPixels(3));
        }
    }
}
