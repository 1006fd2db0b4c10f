package org.stackwright.model;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The conversions by bits against the Java language's own casts (Java Language Specification 17, section 5.1.2
 * widening float to double: exact; section 5.1.3 narrowing double to float: IEEE 754 round to nearest, ties to even),
 * compared bit for bit: every float exponent with many mantissas (all float bit patterns with {@code
 * -Dstackwright.bitconversions.all=true}, about a minute), random doubles over the whole range, the values around each
 * rounding tie and around the float's smallest normal and largest value.
 */
class BitConversionsTest {

    @Test
    void widenIsTheCastForFloats() {
        long step = Boolean.getBoolean("stackwright.bitconversions.all") ? 1 : 4093;
        for (long b = 0; b <= 0xffffffffL; b += step) {
            checkWiden(Float.intBitsToFloat((int) b));
        }
        for (float f : new float[] {0f, -0f, Float.MIN_VALUE, Float.MIN_NORMAL, -Float.MIN_NORMAL, Float.MAX_VALUE,
            Float.POSITIVE_INFINITY, Float.NEGATIVE_INFINITY, Float.NaN, 1f, -1f}) {
            checkWiden(f);
        }
    }

    @Test
    void narrowAndRoundToFloatAreTheCastForNonNegativeDoubles() {
        SplittableRandom rng = new SplittableRandom(14);
        for (int t = 0; t < 2_000_000; t++) {
            // random bits over every exponent, and values around the float ties (the 29 dropped bits 0x10000000)
            long bits = rng.nextLong() & Long.MAX_VALUE;
            checkNarrow(Double.longBitsToDouble(bits));
            long tie = (bits & ~0x1fffffffL) | 0x10000000L;
            checkNarrow(Double.longBitsToDouble(tie));
            checkNarrow(Double.longBitsToDouble(tie - 1));
            checkNarrow(Double.longBitsToDouble(tie + 1));
        }
        double[] edges = {0.0, Double.MIN_VALUE, Float.MIN_VALUE, Float.MIN_NORMAL, Math.nextDown((double) Float.MIN_NORMAL),
            Float.MAX_VALUE, Math.nextUp((double) Float.MAX_VALUE), (double) Float.MAX_VALUE + Math.ulp(Float.MAX_VALUE) / 2,
            Math.nextDown((double) Float.MAX_VALUE + Math.ulp(Float.MAX_VALUE) / 2), Double.MAX_VALUE,
            Double.POSITIVE_INFINITY, Double.NaN, 1.0, 0.5, 1e-30, 1e30};
        for (double d : edges) {
            checkNarrow(d);
        }
        for (int e = -160; e <= 130; e++) {
            double p = Math.scalb(1.0, e);
            checkNarrow(p);
            checkNarrow(Math.nextUp(p));
            checkNarrow(Math.nextDown(p));
            checkNarrow(p * (1 + 0x1p-24));
            checkNarrow(p * (1 - 0x1p-25));
        }
    }

    @Test
    void toDoubleIsTheCastForSmallIntegers() {
        SplittableRandom rng = new SplittableRandom(3);
        for (long n = -5000; n <= 5000; n++) {
            assertEquals(Double.doubleToRawLongBits((double) n), Double.doubleToRawLongBits(BitConversions.toDouble(n)),
                    "n = " + n);
        }
        for (int t = 0; t < 100_000; t++) {
            long n = rng.nextLong(-(1L << 51) + 1, 1L << 51);
            assertEquals((double) n, BitConversions.toDouble(n), "n = " + n);
        }
    }

    private static void checkWiden(float f) {
        assertEquals(Double.doubleToRawLongBits((double) f), Double.doubleToRawLongBits(BitConversions.widen(f)),
                () -> "widen of float bits " + Integer.toHexString(Float.floatToRawIntBits(f)));
    }

    private static void checkNarrow(double d) {
        assertEquals(Float.floatToRawIntBits((float) d), Float.floatToRawIntBits(BitConversions.narrow(d)),
                () -> "narrow of double bits " + Long.toHexString(Double.doubleToRawLongBits(d)));
        assertEquals(Double.doubleToRawLongBits((double) (float) d),
                Double.doubleToRawLongBits(BitConversions.roundToFloat(d)),
                () -> "roundToFloat of double bits " + Long.toHexString(Double.doubleToRawLongBits(d)));
    }
}
