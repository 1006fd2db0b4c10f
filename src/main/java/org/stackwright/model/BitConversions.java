package org.stackwright.model;

/**
 * Float-to-double, double-to-float and integer-to-double conversions done on the bits, giving exactly what the
 * Java casts give, for the hot loops of the per-pixel passes.
 *
 * <p>Why: on x86-64 with AVX the just-in-time compiler (HotSpot C2 of Java 17) turns a cast into an instruction that
 * also reads its destination register ({@code vcvtss2sd dst, dst, src}, likewise {@code vcvtsd2ss} and
 * {@code vcvtsi2sd}). Which register that is depends on the register allocation, which depends on the branch
 * profile the compiler saw, so it changes from one JVM to the next. When it is a register that the previous pixel
 * wrote at the end of its long chain (a division and a logarithm), each pixel waits for the previous one: the
 * Richardson-Lucy ratio pass then ran at 39 ns per pixel instead of 12 in about half of the JVMs (measured
 * 2026-12-05, README, "Deconvolution benchmark"). These helpers use only integer operations and bit moves
 * ({@link Double#longBitsToDouble}), which write their whole register, so no pixel waits for the previous one
 * whatever registers the compiler picks. Rare values (subnormal, infinite, NaN; for {@link #narrow} and
 * {@link #roundToFloat} also negative values) take the cast.
 */
public final class BitConversions {

    /** bits of 1.5 * 2^52: adding a small integer to its mantissa and subtracting it again gives the integer */
    private static final long MAGIC_BITS = 0x4338000000000000L;
    private static final double MAGIC = 0x1.8p52;
    /** float exponent bias against double exponent bias, in the exponent field */
    private static final long REBIAS = 1023 - 127;

    private BitConversions() {
    }

    /** @return (double) f */
    public static double widen(float f) {
        int b = Float.floatToRawIntBits(f);
        int e = (b >>> 23) & 0xff;
        if (e == 0 || e == 0xff) {
            if ((b & 0x7fffffff) == 0) {
                return b == 0 ? 0.0 : -0.0; // zeros are common in camera data: no cast for them either
            }
            return (double) f; // subnormal, infinite, NaN
        }
        long bits = ((long) (b & 0x80000000) << 32) | ((e + REBIAS) << 52) | ((long) (b & 0x7fffff) << 29);
        return Double.longBitsToDouble(bits);
    }

    /**
     * @param d at least 0 (or NaN)
     * @return (double) (float) d: d rounded to float precision (nearest, ties to even), kept as a double
     */
    public static double roundToFloat(double d) {
        long bits = Double.doubleToRawLongBits(d);
        long rounded = (bits + 0x0fffffffL + ((bits >>> 29) & 1)) & ~0x1fffffffL;
        long e = rounded >>> 52;
        if (e - (REBIAS + 1) < 254 && e >= REBIAS + 1) {
            return Double.longBitsToDouble(rounded);
        }
        return bits == 0 ? 0.0 : (double) (float) d; // below the float's normal range, overflow, NaN
    }

    /**
     * @param d at least 0 (or NaN)
     * @return (float) d
     */
    public static float narrow(double d) {
        long bits = Double.doubleToRawLongBits(d);
        long rounded = (bits + 0x0fffffffL + ((bits >>> 29) & 1)) & ~0x1fffffffL;
        long e = rounded >>> 52;
        if (e - (REBIAS + 1) < 254 && e >= REBIAS + 1) {
            return Float.intBitsToFloat((int) ((e - REBIAS) << 23 | (rounded >>> 29) & 0x7fffff));
        }
        return bits == 0 ? 0f : (float) d;
    }

    /**
     * @param n an integer of magnitude below 2^51
     * @return (double) n
     */
    public static double toDouble(long n) {
        return Double.longBitsToDouble(MAGIC_BITS + n) - MAGIC;
    }
}
