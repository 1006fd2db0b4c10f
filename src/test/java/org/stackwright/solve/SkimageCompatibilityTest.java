package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Compatibility mode against the reference library: zero-padded "same" convolution, start 0.5, no background, no
 * normalisation, same iteration count as skimage.restoration.richardson_lucy(clip=False) of Debian's
 * python3-skimage 0.19.3 (reference files made by tools/reference/richardson_lucy_reference.py; see
 * src/test/resources/reference/README.md). Required agreement: 1e-4 relative (max |ours - theirs| / max |theirs|).
 */
class SkimageCompatibilityTest {

    static float[] raw(String name, int n) throws IOException {
        try (InputStream in = SkimageCompatibilityTest.class.getResourceAsStream("/reference/" + name)) {
            byte[] b = in.readAllBytes();
            if (b.length != 4 * n) {
                throw new IOException(name + ": " + b.length + " bytes, expected " + 4 * n);
            }
            float[] f = new float[n];
            ByteBuffer.wrap(b).order(ByteOrder.LITTLE_ENDIAN).asFloatBuffer().get(f);
            return f;
        }
    }

    static int[] shape(String json, String key) {
        Matcher m = Pattern.compile("\"" + key + "\":\\s*\\[\\s*(\\d+),\\s*(\\d+),\\s*(\\d+)\\s*\\]").matcher(json);
        if (!m.find()) {
            throw new IllegalStateException(key + " missing");
        }
        return new int[] {Integer.parseInt(m.group(3)), Integer.parseInt(m.group(2)), Integer.parseInt(m.group(1))};
    }

    @ParameterizedTest
    @ValueSource(strings = {"2d", "3d"})
    void matchesSkimageRichardsonLucy(String name) throws IOException {
        String json;
        try (InputStream in = getClass().getResourceAsStream("/reference/rl-" + name + ".json")) {
            json = new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
        int[] is = shape(json, "image_shape_zyx");
        int[] ps = shape(json, "psf_shape_zyx");
        Matcher it = Pattern.compile("\"iterations\":\\s*(\\d+)").matcher(json);
        assertTrue(it.find());
        int iterations = Integer.parseInt(it.group(1));
        int n = is[0] * is[1] * is[2];
        Volume image = new Volume(is[0], is[1], is[2], raw("rl-" + name + "-image.raw", n), VoxelSize.UNIT);
        Volume psf = new Volume(ps[0], ps[1], ps[2], raw("rl-" + name + "-psf.raw", ps[0] * ps[1] * ps[2]), VoxelSize.UNIT);
        float[] expected = raw("rl-" + name + "-result.raw", n);
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = DeconvolutionProblem.compatible(image, psf, w);
            Solution s = new RichardsonLucy(Stopping.fixed(iterations), false).solve(p, RunContext.quiet(2), IterationListener.NONE);
            float[] ours = p.toVolume(s.estimate()).data();
            double err = 0;
            double scale = 0;
            for (int i = 0; i < n; i++) {
                err = Math.max(err, Math.abs(ours[i] - expected[i]));
                scale = Math.max(scale, Math.abs(expected[i]));
            }
            if (System.getenv("STACKWRIGHT_PRINT") != null) {
                System.out.println(name + ": max relative difference " + err / scale);
            }
            assertTrue(err / scale <= 1e-4, name + ": max relative difference " + err / scale);
        }
    }
}
