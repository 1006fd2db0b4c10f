package org.stackwright.volume;

/**
 * Size of one voxel in micrometres (x = width, y = height, z = depth). Immutable.
 *
 * @param x voxel width in micrometres, positive and finite
 * @param y voxel height in micrometres, positive and finite
 * @param z voxel depth (z step) in micrometres, positive and finite
 */
public record VoxelSize(double x, double y, double z) {

    /** One micrometre in every direction: the size given to uncalibrated images. */
    public static final VoxelSize UNIT = new VoxelSize(1, 1, 1);

    public VoxelSize {
        check("voxel width", x);
        check("voxel height", y);
        check("voxel depth", z);
    }

    private static void check(String name, double v) {
        if (!(v > 0) || Double.isInfinite(v)) {
            throw new IllegalArgumentException(name + " must be a positive number of micrometres (given " + v + ")");
        }
    }

    /** @return true when both sizes agree to a relative 1e-6 in every direction */
    public boolean sameAs(VoxelSize o) {
        return close(x, o.x) && close(y, o.y) && close(z, o.z);
    }

    private static boolean close(double a, double b) {
        return Math.abs(a - b) <= 1e-6 * Math.max(Math.abs(a), Math.abs(b));
    }

    @Override
    public String toString() {
        return String.format(java.util.Locale.ROOT, "%.4gx%.4gx%.4g um", x, y, z);
    }
}
