package org.stackwright.testing;

import static org.junit.jupiter.api.Assertions.fail;

import org.stackwright.volume.Volume;

/** Assertions on volumes that report the first failing voxel (position, expected, actual). */
public final class VolumeAssert {

    private VolumeAssert() {
    }

    /**
     * Asserts |actual - expected| <= tol * max|expected| at every voxel.
     *
     * @param what what is being compared, for the message
     */
    public static void assertClose(float[] expected, float[] actual, double relTol, int width, int height, String what) {
        if (expected.length != actual.length) {
            fail(what + ": lengths differ, " + expected.length + " vs " + actual.length);
        }
        double scale = 0;
        for (float v : expected) {
            scale = Math.max(scale, Math.abs(v));
        }
        double tol = relTol * Math.max(scale, Float.MIN_NORMAL);
        for (int i = 0; i < expected.length; i++) {
            double d = Math.abs((double) actual[i] - expected[i]);
            if (!(d <= tol)) {
                int x = i % width;
                int y = (i / width) % height;
                int z = i / (width * height);
                fail(String.format("%s: voxel (%d, %d, %d) expected %.8g but was %.8g (difference %.3g > %.3g = %.1g x max|expected|)",
                        what, x, y, z, expected[i], actual[i], d, tol, relTol));
            }
        }
    }

    /** As {@link #assertClose(float[], float[], double, int, int, String)} for volumes of the same shape. */
    public static void assertClose(Volume expected, Volume actual, double relTol, String what) {
        if (!expected.sameShape(actual)) {
            fail(what + ": shapes differ, " + expected.shape() + " vs " + actual.shape());
        }
        assertClose(expected.data(), actual.data(), relTol, expected.width(), expected.height(), what);
    }

    /** @return max |a - b| / max |a| */
    public static double maxRelativeError(float[] a, float[] b) {
        double scale = 0;
        double err = 0;
        for (int i = 0; i < a.length; i++) {
            scale = Math.max(scale, Math.abs(a[i]));
            err = Math.max(err, Math.abs(a[i] - b[i]));
        }
        return err / scale;
    }
}
