package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;

import ij.IJ;
import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.testing.FuzzText;
import org.stackwright.testing.TinyTiff;

/**
 * Fuzzing of TIFF reading: small valid files (32-bit stack, 16-bit and 8-bit planes, hyperstack, RGB) are cut
 * at random lengths or get random bits flipped, mostly in the header and image directory. Each damaged file must
 * either open as an image (flips inside pixel data cannot be detected: TIFF has no checksum) or be refused with
 * an IllegalArgumentException naming the parameter; no other exception, no hang. A file cut short of its pixel
 * data must always be refused.
 *
 * <p>CI runs a bounded count; a longer run: {@code mvn -o test -Dtest=TiffFuzzTest -Dstackwright.fuzz.count=100000}.
 */
class TiffFuzzTest {

    private static final int COUNT = FuzzText.count(1500) / 3;

    private static List<byte[]> seeds(Path dir) throws IOException {
        List<byte[]> out = new ArrayList<>();
        float[] px = new float[9 * 7 * 3];
        for (int i = 0; i < px.length; i++) {
            px[i] = i * 0.5f - 7;
        }
        TiffFiles.write(new Volume(9, 7, 3, px, new VoxelSize(0.1, 0.1, 0.25)), dir.resolve("f32.tif"), true);
        out.add(Files.readAllBytes(dir.resolve("f32.tif")));
        for (String type : new String[] {"16-bit ramp", "8-bit ramp"}) {
            ImagePlus imp = IJ.createImage("p", type, 11, 5, 1);
            TiffFiles.write(imp, dir.resolve("p.tif"), true);
            out.add(Files.readAllBytes(dir.resolve("p.tif")));
        }
        TiffFiles.write(IJ.createImage("h", "16-bit ramp", 6, 4, 2, 2, 2), dir.resolve("h.tif"), true);
        out.add(Files.readAllBytes(dir.resolve("h.tif")));
        byte[] rgb = new byte[5 * 3 * 3];
        Arrays.fill(rgb, (byte) 9);
        TinyTiff.writeRgb(dir.resolve("rgb.tif"), 5, 3, rgb);
        out.add(Files.readAllBytes(dir.resolve("rgb.tif")));
        return out;
    }

    /** Opens the file as the command line would; returns "ok", "refused" or throws what escaped. */
    private static String open(Path p) {
        try {
            ImagePlus imp = TiffFiles.open(p, "--input");
            ImagePlusAdapter.toVolume(imp, 1, 1);
            return "ok";
        } catch (IllegalArgumentException e) {
            assertTrue(e.getMessage() != null && (e.getMessage().contains("--input") || e.getMessage().contains("image '")),
                    "message does not name the input: " + e.getMessage());
            return "refused";
        }
    }

    @Test
    void truncatedAndBitFlippedFiles(@TempDir Path dir) throws IOException {
        List<byte[]> seeds = seeds(dir);
        Path p = dir.resolve("damaged.tif");
        int[] counts = new int[2];
        assertTimeoutPreemptively(Duration.ofSeconds(60 + COUNT / 20), () -> {
            SplittableRandom r = new SplittableRandom(11);
            for (int i = 0; i < COUNT; i++) {
                int which = r.nextInt(seeds.size());
                byte[] b = seeds.get(which).clone();
                String what;
                if (r.nextInt(3) == 0) {
                    int len = r.nextInt(b.length);
                    b = Arrays.copyOf(b, len);
                    what = "cut to " + len;
                } else {
                    int flips = r.nextInt(1, 9);
                    int span = r.nextBoolean() ? Math.min(b.length, 256) : b.length;
                    StringBuilder sb = new StringBuilder("bits");
                    for (int k = 0; k < flips; k++) {
                        int bit = r.nextInt(span * 8);
                        b[bit / 8] ^= (byte) (1 << (bit % 8));
                        sb.append(' ').append(bit);
                    }
                    what = sb.toString();
                }
                Files.write(p, b);
                try {
                    counts[open(p).equals("ok") ? 0 : 1]++;
                } catch (RuntimeException | OutOfMemoryError e) {
                    fail("case " + i + " (seed file " + which + ", " + what + "): " + e, e);
                }
            }
        });
        assertEquals(COUNT, counts[0] + counts[1]);
        assertTrue(counts[1] > 0, "no damaged file was refused");
    }

    @Test
    void everyCutThroughThePixelDataIsRefused(@TempDir Path dir) throws IOException {
        float[] px = new float[16 * 16 * 4];
        Arrays.fill(px, 3);
        Path whole = dir.resolve("whole.tif");
        TiffFiles.write(new Volume(16, 16, 4, px, VoxelSize.UNIT), whole, true);
        byte[] b = Files.readAllBytes(whole);
        Path cut = dir.resolve("cut.tif");
        // ImageJ writes header, directory and description first, then the pixels; find where they end
        int pixelEnd = -1;
        for (int len = b.length; len > 0; len -= 13) {
            Files.write(cut, Arrays.copyOf(b, len));
            boolean refused = open(cut).equals("refused");
            if (refused && pixelEnd < 0) {
                pixelEnd = len;
            }
            if (pixelEnd >= 0) {
                assertTrue(refused, "a file cut to " + len + " bytes (pixels end before " + pixelEnd + ") was read");
            }
        }
        assertTrue(pixelEnd > 16 * 16 * 4 * 4, "pixel data ends at " + pixelEnd);
    }
}
