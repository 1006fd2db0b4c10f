package org.stackwright.blocks;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The plan of blocks: cores tile the volume once, read boxes hold the halo inside the volume, sizes from memory. */
class BlockPlanTest {

    @Test
    void coresTileTheVolumeExactlyOnceAndSizesAreEvenedOut() {
        BlockPlan p = new BlockPlan(1000, 37, 5, new int[] {400, 16, 2}, new int[] {7, 3, 1});
        int[] hit = new int[1000 * 37 * 5];
        for (Block b : p.blocks()) {
            Box c = b.core();
            Box r = b.read();
            assertTrue(r.x() <= c.x() && r.x() + r.w() >= c.x() + c.w() && r.x() + r.w() <= 1000, b.toString());
            assertTrue(c.x() - r.x() == Math.min(7, c.x()), "halo clipped only at the volume's face: " + b);
            for (int z = c.z(); z < c.z() + c.d(); z++) {
                for (int y = c.y(); y < c.y() + c.h(); y++) {
                    for (int x = c.x(); x < c.x() + c.w(); x++) {
                        hit[(z * 37 + y) * 1000 + x]++;
                    }
                }
            }
        }
        for (int h : hit) {
            assertEquals(1, h);
        }
        assertArrayEquals(new int[] {3, 3, 3}, p.counts());
        assertEquals(333, p.blocks().get(1).core().x());
        assertEquals(334, p.blocks().get(2).core().w());
        assertArrayEquals(new int[] {9, 9, 9, 9, 9}, p.blocksPerPlane());
    }

    @Test
    void autoSizeFitsTheBudgetAndRefusesWhenNothingFits() {
        BlockSizing.BlockBytes fourBytes = (w, h, d) -> 4L * w * h * d;
        BlockSizing.BlockBytes voxels = (w, h, d) -> (long) w * h * d;
        BlockPlan whole = BlockSizing.auto(new int[] {100, 80, 10}, new int[] {5, 5, 2}, 1L << 20, fourBytes, voxels,
                false);
        assertEquals(1, whole.blocks().size());
        assertEquals(1.0, whole.workFactor(voxels), 0);
        BlockPlan cut = BlockSizing.auto(new int[] {1000, 1000, 20}, new int[] {10, 10, 4}, 4L << 20, fourBytes,
                voxels, false);
        int[] r = cut.largestRead();
        assertTrue(fourBytes.of(r[0], r[1], r[2]) <= 4L << 20, "fits: " + cut.describe());
        assertEquals(1, cut.counts()[2], "a thin stack is not cut in z: " + cut.describe());
        for (Block b : cut.blocks()) {
            // integer cores: the read sizes differ by one voxel at most
            assertTrue(r[0] - b.read().w() <= 1 && r[1] - b.read().h() <= 1 && r[2] == b.read().d(), "every block"
                    + " reads the same size (the cores at the faces are one halo wider): " + b);
        }
        BlockPlan deep = BlockSizing.auto(new int[] {300, 300, 50}, new int[] {2, 2, 2}, 4L << 20, fourBytes, voxels,
                true);
        assertEquals(1, deep.counts()[2]);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> BlockSizing.auto(
                new int[] {512, 512, 64}, new int[] {21, 21, 15}, 1L << 20, (w, h, d) -> 40L * w * h * d, voxels,
                false));
        assertTrue(e.getMessage().startsWith("memory: 1 MB is not enough for even the smallest block"), e.getMessage());
    }

    /**
     * Deconvolution's cost model (README, "Memory per block"): the FFT grid is the read box plus the PSF less one,
     * rounded up to a fast size; 7 grid-sized float arrays (problem and accelerated Richardson-Lucy) and 17 bytes
     * per voxel of the block. Automatic blocks must cost no more than any evened-out plan that fits (every core
     * size tried), and stay whole in depth for this thin stack.
     */
    @Test
    void autoBlocksDoNoMoreWorkThanAnyEvenedOutPlanThatFits() {
        int[] dims = {1024, 1024, 64};
        int[] halo = {32, 32, 23};
        int[] psf = {21, 21, 15};
        BlockSizing.BlockBytes grid = (w, h, d) -> (long) org.stackwright.fft.Convolution.paddedSize(w, psf[0])
                * org.stackwright.fft.Convolution.paddedSize(h, psf[1])
                * org.stackwright.fft.Convolution.paddedSize(d, psf[2]);
        BlockSizing.BlockBytes bytes = (w, h, d) -> 28 * grid.of(w, h, d) + 17L * w * h * d;
        for (long budget : new long[] {650L << 20, 1900L << 20}) {
            BlockPlan auto = BlockSizing.auto(dims, halo, budget, bytes, grid, false);
            int[] r = auto.largestRead();
            assertTrue(bytes.of(r[0], r[1], r[2]) <= budget, auto.describe());
            assertEquals(1, auto.counts()[2], auto.describe());
            double best = Double.POSITIVE_INFINITY;
            for (int cx = 128; cx <= 1024; cx += 32) {
                for (int cy = 128; cy <= 1024; cy += 32) {
                    for (int cz : new int[] {32, 64}) {
                        BlockPlan p = new BlockPlan(dims[0], dims[1], dims[2], new int[] {cx, cy, cz}, halo);
                        int[] pr = p.largestRead();
                        if (bytes.of(pr[0], pr[1], pr[2]) <= budget) {
                            best = Math.min(best, p.workFactor(grid));
                        }
                    }
                }
            }
            assertTrue(auto.workFactor(grid) <= best + 1e-12, auto.describe() + ": " + auto.workFactor(grid)
                    + " against " + best);
            System.out.printf(java.util.Locale.ROOT, "budget %d MB: %s, work %.3f (best evened-out plan %.3f)%n",
                    budget >> 20, auto.describe(), auto.workFactor(grid), best);
        }
    }

    @Test
    void memorySizesParse() {
        assertEquals(700L << 20, BlockSettings.parseSize("700m"));
        assertEquals(4L << 30, BlockSettings.parseSize("4g"));
        assertEquals((long) (1.5 * (1L << 30)), BlockSettings.parseSize("1.5G"));
        assertThrows(IllegalArgumentException.class, () -> BlockSettings.parseSize("700"));
        assertThrows(IllegalArgumentException.class, () -> BlockSettings.parseSize("12k"));
    }
}
