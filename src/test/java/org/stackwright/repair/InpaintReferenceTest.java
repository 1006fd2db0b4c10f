package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Biharmonic fill against the reference library: skimage.restoration.inpaint_biharmonic (scikit-image 0.19.3,
 * Debian python3-skimage) on cases with interior holes, made by tools/reference/make_inpaint_reference.py.
 * Away from the border both solve the same 13-point bi-Laplace equations, so the fills must agree to the
 * accuracy of the solvers; the bound is 1e-3 of the data range.
 */
class InpaintReferenceTest {

    static byte[] resource(String name) throws IOException {
        try (InputStream in = InpaintReferenceTest.class.getResourceAsStream("/reference/" + name)) {
            if (in == null) {
                throw new IOException("missing test resource reference/" + name);
            }
            return in.readAllBytes();
        }
    }

    static float[] floats(String name) throws IOException {
        ByteBuffer b = ByteBuffer.wrap(resource(name)).order(ByteOrder.LITTLE_ENDIAN);
        float[] f = new float[b.remaining() / 4];
        b.asFloatBuffer().get(f);
        return f;
    }

    @ParameterizedTest
    @CsvSource({"blobs, 64, 64", "band, 48, 40"})
    void matchesSkimageBiharmonic(String name, int w, int h) throws IOException {
        float[] image = floats("inpaint-" + name + "-image.raw");
        byte[] maskBytes = resource("inpaint-" + name + "-mask.raw");
        float[] expected = floats("inpaint-" + name + "-biharmonic.raw");
        float[] mask = new float[w * h];
        for (int i = 0; i < mask.length; i++) {
            mask[i] = maskBytes[i] != 0 ? 255 : 0;
        }
        Inpainting.Outcome o;
        try (Workers workers = new Workers(2)) {
            o = Inpainting.run(new Volume(w, h, 1, image, VoxelSize.UNIT), new Volume(w, h, 1, mask, VoxelSize.UNIT),
                    Inpainting.Settings.of(Inpainting.Method.BIHARMONIC, Inpainting.Mode.SLICES), workers);
        }
        float lo = Float.POSITIVE_INFINITY;
        float hi = Float.NEGATIVE_INFINITY;
        for (float v : expected) {
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
        }
        double worst = 0;
        for (int i = 0; i < mask.length; i++) {
            if (mask[i] != 0) {
                worst = Math.max(worst, Math.abs(o.filled().data()[i] - expected[i]));
            }
        }
        double rel = worst / (hi - lo);
        System.out.printf("%s: max |ours - skimage| on filled pixels = %.3g of the data range%n", name, rel);
        assertTrue(rel <= 1e-3, name + ": " + rel);
    }
}
