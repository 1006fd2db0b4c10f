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
        int[] whole = BlockSizing.auto(new int[] {100, 80, 10}, new int[] {5, 5, 2}, 1L << 20, fourBytes, false);
        assertArrayEquals(new int[] {100, 80, 10}, whole);
        int[] cut = BlockSizing.auto(new int[] {1000, 1000, 20}, new int[] {10, 10, 4}, 4L << 20, fourBytes, false);
        long need = fourBytes.of(cut[0] + 20, cut[1] + 20, Math.min(20, cut[2] + 8));
        assertTrue(need <= 4L << 20, "fits: " + need);
        assertEquals(20, cut[2], "x and y are cut before z");
        int[] deep = BlockSizing.auto(new int[] {300, 300, 50}, new int[] {2, 2, 0}, 4L << 20, fourBytes, true);
        assertEquals(50, deep[2]);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> BlockSizing.auto(
                new int[] {512, 512, 64}, new int[] {21, 21, 15}, 1L << 20, (w, h, d) -> 40L * w * h * d, false));
        assertTrue(e.getMessage().startsWith("memory: 1 MB is not enough for even the smallest block"), e.getMessage());
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
