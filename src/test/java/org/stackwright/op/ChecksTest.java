package org.stackwright.op;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** What the shared input and mask checks return (their refusals are rows of the bad-input table). */
class ChecksTest {

    @Test
    void nonFinitePixelsAreMaskedAndFilledWithTheFiniteMeanInACopy() {
        float[] px = {1, Float.NaN, 3, Float.NEGATIVE_INFINITY, 8, Float.POSITIVE_INFINITY};
        float[] before = px.clone();
        Volume v = new Volume(3, 2, 1, px, VoxelSize.UNIT);
        RunContext ctx = RunContext.quiet(1);
        InputChecks.Scan s = InputChecks.check("input", v, ctx);
        assertEquals(3, s.nonFinite());
        assertArrayEquals(new byte[] {0, 1, 0, 1, 0, 1}, s.nonFiniteMask());
        assertEquals(4.0, s.finiteMean(), 0); // (1 + 3 + 8) / 3
        assertEquals(1.0, s.min(), 0);
        assertEquals(8.0, s.max(), 0);
        Volume f = InputChecks.finiteCopy(v, s);
        assertArrayEquals(new float[] {1, 4, 3, 4, 8, 4}, f.data());
        assertArrayEquals(before, px, "the input was modified");
        assertEquals(1, ctx.warnings().size(), ctx.warnings().toString());
    }

    @Test
    void cleanImageIsUsedAsItIsWithoutWarnings() {
        Volume v = new Volume(2, 2, 1, new float[] {1, 2, 3, 4}, VoxelSize.UNIT);
        RunContext ctx = RunContext.quiet(1);
        InputChecks.Scan s = InputChecks.check("input", v, ctx);
        assertNull(s.nonFiniteMask());
        assertSame(v, InputChecks.finiteCopy(v, s));
        assertEquals(0, ctx.warnings().size(), ctx.warnings().toString());
    }

    @Test
    void twoDimensionalMaskAppliesToEveryPlane() {
        Volume image = Volume.zeros(2, 2, 3, VoxelSize.UNIT);
        Volume mask = new Volume(2, 2, 1, new float[] {0, 255, 0, Float.NaN}, VoxelSize.UNIT);
        byte[] m = MaskChecks.check("mask", mask, image, RunContext.quiet(1));
        assertArrayEquals(new byte[] {0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1}, m);
        assertArrayEquals(new byte[] {1, 1, 0, 1}, MaskChecks.union(new byte[] {1, 0, 0, 1}, new byte[] {0, 1, 0, 0}));
        assertNull(MaskChecks.union(null, null));
        assertThrows(IllegalArgumentException.class, () -> MaskChecks.union(new byte[2], new byte[3]));
    }

    @Test
    void memoryCheckPassesWhatFits() {
        MemoryCheck.require("small", 1000, 2000, 4000);
        assertEquals(4L * 1000 * 3, MemoryCheck.floats(1000, 3));
        assertTrue(MemoryCheck.available() > 0);
        assertThrows(ArithmeticException.class, () -> MemoryCheck.floats(Long.MAX_VALUE / 2, 3));
    }

    @Test
    void iterationLimitIsTheParameterRange() {
        Param p = Limits.iterations("iterations", 50, "help");
        assertEquals(1, p.min(), 0);
        assertEquals(Limits.MAX_ITERATIONS, p.max(), 0);
        Values.parse("x", java.util.List.of(p), java.util.Map.of("iterations", "10000"));
    }
}
