package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** The steps that gaps of zeros and the axis's length leave for an uncropped mosaic ({@link GapTiling#step}). */
class GapTilingTest {

    @Test
    void coarsestTilingThroughTheGaps() {
        // expected values: the arithmetic of the tiling itself (multiples and remainders), no outside source needed
        // 3 tiles of 118: a gap on the second seam (236) or the first (118) leaves 118 (59 would add empty seams)
        assertEquals(118, GapTiling.step(new int[] {236}, 354));
        assertEquals(118, GapTiling.step(new int[] {118}, 354));
        // gaps on every seam of 4 tiles of 96
        assertEquals(96, GapTiling.step(new int[] {96, 192, 288}, 384));
        // an overlap of 16 past the last whole tile: 3 tiles of 116 and 368 px
        assertEquals(116, GapTiling.step(new int[] {232}, 364));
        // two tiles: the one gap halves the axis
        assertEquals(120, GapTiling.step(new int[] {120}, 240));
        // no gap, or gaps no uncropped tiling passes through (a cropped mosaic): nothing
        assertEquals(0, GapTiling.step(new int[0], 354));
        assertEquals(0, GapTiling.step(new int[] {101}, 354));
        // a trimmed mosaic: 340 % 42 = 4 and 340 % 30 = 10 fit the length, but 42 and 30 (divisors of the gap at
        // 210) would add 7 and 10 seams that only the length shows for one gap: nothing
        assertEquals(0, GapTiling.step(new int[] {210}, 340));
    }
}
