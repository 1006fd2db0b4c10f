package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * The 16-bit storage of accelerated RL's previous step ({@link Extrapolation#toHalf}): the upper half of the float's
 * bits, rounded to nearest with ties to even, as the bfloat16 format defines it (Intel, "BFLOAT16 - Hardware
 * Numerics Definition", white paper 338302-001US, 2018, section 2; bit patterns worked out by hand from the
 * IEEE 754 single format).
 */
class HalfStepTest {

    @Test
    void roundsToNearestWithTiesToEven() {
        assertEquals((short) 0x3F80, Extrapolation.toHalf(1f)); // exactly representable
        assertEquals((short) 0x3F80, Extrapolation.toHalf(1f + 0x1p-8f)); // tie, the even neighbour is below
        assertEquals((short) 0x3F82, Extrapolation.toHalf(1f + 3 * 0x1p-8f)); // tie, the even neighbour is above
        assertEquals((short) 0x3F81, Extrapolation.toHalf(1f + 0x1p-8f + 0x1p-20f)); // just above the tie: up
        assertEquals((short) 0xC020, Extrapolation.toHalf(-2.5f)); // sign kept
        assertEquals(0f, Extrapolation.fromHalf(Extrapolation.toHalf(0f)));
        assertEquals(-2.5f, Extrapolation.fromHalf((short) 0xC020));
    }

    @Test
    void relativeErrorIsAtMostTwoToTheMinusEight() {
        java.util.SplittableRandom r = new java.util.SplittableRandom(7);
        for (int i = 0; i < 100000; i++) {
            float f = (float) ((r.nextDouble() - 0.5) * Math.pow(10, r.nextInt(-20, 20)));
            float back = Extrapolation.fromHalf(Extrapolation.toHalf(f));
            assertEquals(f, back, Math.abs(f) * 0x1p-8, "value " + f);
        }
    }
}
