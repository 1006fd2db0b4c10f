package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.testing.ReferenceFiles;

/**
 * Padding against numpy.pad (NumPy 1.24.2; reference arrays from tools/reference/make_fft_references.py): ZERO =
 * mode 'constant', MIRROR = mode 'symmetric' (edge voxel repeated), PERIODIC = indices modulo the size
 * (checked in the script against mode 'wrap', which NumPy 1.24 gets wrong for widths above the size), with widths larger
 * than the volume along x (several reflections). Cropping against direct indexing.
 */
class PaddingTest {

    @Test
    void matchesNumpyPad() {
        String[] row = ReferenceFiles.table("fft/padding.txt").get(0);
        int[] a = new int[row.length - 1];
        for (int i = 1; i < row.length; i++) {
            a[i - 1] = Integer.parseInt(row[i]);
        }
        int nx = a[0];
        int ny = a[1];
        int nz = a[2];
        Volume v = new Volume(nx, ny, nz, ReferenceFiles.floats("fft/pad-image.raw", nx * ny * nz), VoxelSize.UNIT);
        Volume before = v.copy();
        int px = nx + a[3] + a[4];
        int py = ny + a[5] + a[6];
        int pz = nz + a[7] + a[8];
        String[] names = {"zero", "mirror", "periodic"};
        Padding.Mode[] modes = {Padding.Mode.ZERO, Padding.Mode.MIRROR, Padding.Mode.PERIODIC};
        for (int m = 0; m < modes.length; m++) {
            float[] expected = ReferenceFiles.floats("fft/pad-" + names[m] + ".raw", px * py * pz);
            Volume padded = Padding.pad(v, px, py, pz, a[3], a[5], a[7], modes[m]);
            // numpy.pad(image, widths, mode=...) copies values: exact equality
            assertArrayEquals(expected, padded.data(), modes[m] + " vs reference '" + names[m] + "'");
        }
        assertEquals(before, v, "input must not be modified");
    }

    @Test
    void smallCasesByHand() {
        Volume v = new Volume(3, 1, 1, new float[] {1, 2, 3}, VoxelSize.UNIT);
        assertArrayEquals(new float[] {0, 0, 1, 2, 3, 0, 0}, Padding.padBy(v, 2, 0, 0, Padding.Mode.ZERO).data());
        assertArrayEquals(new float[] {2, 1, 1, 2, 3, 3, 2}, Padding.padBy(v, 2, 0, 0, Padding.Mode.MIRROR).data());
        assertArrayEquals(new float[] {2, 3, 1, 2, 3, 1, 2}, Padding.padBy(v, 2, 0, 0, Padding.Mode.PERIODIC).data());
        Volume one = new Volume(1, 1, 1, new float[] {5}, VoxelSize.UNIT);
        assertArrayEquals(new float[] {5, 5, 5, 5, 5}, Padding.padBy(one, 2, 0, 0, Padding.Mode.MIRROR).data());
    }

    @Test
    void cropTakesTheBoxAndKeepsCalibration() {
        VoxelSize vs = new VoxelSize(0.1, 0.2, 0.3);
        Volume v = Volume.zeros(7, 6, 5, vs);
        for (int i = 0; i < v.size(); i++) {
            v.data()[i] = i;
        }
        Volume c = Padding.crop(v, 2, 1, 3, 4, 5, 2);
        assertEquals("4x5x2", c.shape());
        assertEquals(vs, c.voxel());
        for (int z = 0; z < 2; z++) {
            for (int y = 0; y < 5; y++) {
                for (int x = 0; x < 4; x++) {
                    assertEquals(v.get(x + 2, y + 1, z + 3), c.get(x, y, z));
                }
            }
        }
        // crop undoes pad
        Volume p = Padding.pad(v, 12, 9, 8, 3, 2, 1, Padding.Mode.MIRROR);
        assertEquals(v, Padding.crop(p, 3, 2, 1, 7, 6, 5));
    }

    @Test
    void badBoxesAreRefusedWithTheirSizes() {
        Volume v = Volume.zeros(4, 4, 4, VoxelSize.UNIT);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Padding.crop(v, 2, 0, 0, 3, 4, 4));
        assertTrue(e.getMessage().contains("2,0,0") && e.getMessage().contains("3x4x4") && e.getMessage().contains("4x4x4"),
                e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Padding.pad(v, 5, 4, 4, 2, 0, 0, Padding.Mode.ZERO));
        assertTrue(e.getMessage().contains("5x4x4"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Padding.pad(v, 5, 4, 4, 0, 0, 0, null));
        assertTrue(e.getMessage().contains("mode"), e.getMessage());
    }
}
