package org.stackwright.volume;

import java.util.Arrays;

import net.imglib2.img.array.ArrayImg;
import net.imglib2.img.array.ArrayImgs;
import net.imglib2.img.basictypeaccess.array.FloatArray;
import net.imglib2.type.numeric.real.FloatType;

/**
 * A calibrated 32-bit float volume: one contiguous {@code float[]} with x fastest, then y, then z, and the voxel
 * size in micrometres. A 2D image is a volume with depth 1.
 *
 * <p>The array is shared, not copied: {@link #data()} and {@link #asImg()} give views on the same pixels. Use
 * {@link #copy()} before changing a volume you do not own.
 */
public final class Volume {

    private final int width;
    private final int height;
    private final int depth;
    private final float[] data;
    private final VoxelSize voxel;

    /**
     * Wraps an existing array (not copied).
     *
     * @throws IllegalArgumentException if a size is below 1 or the array length is not width*height*depth
     */
    public Volume(int width, int height, int depth, float[] data, VoxelSize voxel) {
        checkSize(width, height, depth);
        if (data == null || data.length != (long) width * height * depth) {
            throw new IllegalArgumentException("pixel array length " + (data == null ? "null" : data.length)
                    + " does not match " + width + "x" + height + "x" + depth);
        }
        if (voxel == null) {
            throw new IllegalArgumentException("voxel size must be given");
        }
        this.width = width;
        this.height = height;
        this.depth = depth;
        this.data = data;
        this.voxel = voxel;
    }

    /** A new zero-filled volume. */
    public static Volume zeros(int width, int height, int depth, VoxelSize voxel) {
        checkSize(width, height, depth);
        return new Volume(width, height, depth, new float[width * height * depth], voxel);
    }

    /**
     * Checks that a volume of these sizes can be held in one Java array.
     *
     * @throws IllegalArgumentException naming the sizes when one is below 1 or the product exceeds 2^31 - 1
     */
    public static void checkSize(int width, int height, int depth) {
        if (width < 1 || height < 1 || depth < 1) {
            throw new IllegalArgumentException("image size must be at least 1x1x1 (given " + width + "x" + height
                    + "x" + depth + ")");
        }
        long n = (long) width * height * depth;
        if (n > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("image size " + width + "x" + height + "x" + depth + " has " + n
                    + " voxels; one volume can hold at most " + (Integer.MAX_VALUE - 8)
                    + ": process it in parts (crop or split the stack)");
        }
    }

    public int width() {
        return width;
    }

    public int height() {
        return height;
    }

    public int depth() {
        return depth;
    }

    /** @return number of voxels */
    public int size() {
        return data.length;
    }

    /** @return the pixel array itself (x fastest); changes write through */
    public float[] data() {
        return data;
    }

    public VoxelSize voxel() {
        return voxel;
    }

    /** @return the linear index of (x, y, z) */
    public int index(int x, int y, int z) {
        return (z * height + y) * width + x;
    }

    public float get(int x, int y, int z) {
        return data[index(x, y, z)];
    }

    public void set(int x, int y, int z, float v) {
        data[index(x, y, z)] = v;
    }

    /** @return true when sizes match in x, y and z */
    public boolean sameShape(Volume o) {
        return width == o.width && height == o.height && depth == o.depth;
    }

    /** @return "WxHxD" */
    public String shape() {
        return width + "x" + height + "x" + depth;
    }

    /** @return a deep copy */
    public Volume copy() {
        return new Volume(width, height, depth, data.clone(), voxel);
    }

    /** @return a volume with the same pixels (shared) and another voxel size */
    public Volume withVoxel(VoxelSize v) {
        return new Volume(width, height, depth, data, v);
    }

    /** @return a new volume of the same shape and calibration holding the given pixels (not copied) */
    public Volume withData(float[] pixels) {
        return new Volume(width, height, depth, pixels, voxel);
    }

    /** @return sum of all voxels, in double */
    public double sum() {
        double s = 0;
        for (float v : data) {
            s += v;
        }
        return s;
    }

    /** @return the largest voxel value */
    public float max() {
        float m = Float.NEGATIVE_INFINITY;
        for (float v : data) {
            m = Math.max(m, v);
        }
        return m;
    }

    /** @return index of the largest voxel (first one on ties) */
    public int argMax() {
        int best = 0;
        for (int i = 1; i < data.length; i++) {
            if (data[i] > data[best]) {
                best = i;
            }
        }
        return best;
    }

    /** @return the number of voxels that are NaN or infinite */
    public int countNonFinite() {
        int n = 0;
        for (float v : data) {
            if (!Float.isFinite(v)) {
                n++;
            }
        }
        return n;
    }

    /**
     * A view of the same pixels as an ImgLib2 image: 2D (width, height) when depth is 1, 3D otherwise. Changes
     * write through in both directions.
     */
    public ArrayImg<FloatType, FloatArray> asImg() {
        return depth == 1 ? ArrayImgs.floats(data, width, height) : ArrayImgs.floats(data, width, height, depth);
    }

    @Override
    public String toString() {
        return "Volume " + shape() + " (" + voxel + ")";
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Volume v && sameShape(v) && voxel.equals(v.voxel) && Arrays.equals(data, v.data);
    }

    @Override
    public int hashCode() {
        return Arrays.hashCode(data) * 31 + voxel.hashCode();
    }
}
