package org.stackwright.volume;

/**
 * Trilinear resampling to another voxel size. The physical centre of the volume stays fixed: voxel i of the output
 * sits at (i - (n'-1)/2) * d' from the centre, voxel j of the input at (j - (n-1)/2) * d. Outside the input the
 * nearest edge value is used.
 */
public final class Resampling {

    private Resampling() {
    }

    /**
     * Resamples to the given voxel size; the output covers the same physical extent (sizes rounded to the nearest
     * whole voxel, at least 1).
     */
    public static Volume toVoxelSize(Volume v, VoxelSize target) {
        int nx = Math.max(1, (int) Math.round(v.width() * v.voxel().x() / target.x()));
        int ny = Math.max(1, (int) Math.round(v.height() * v.voxel().y() / target.y()));
        int nz = Math.max(1, (int) Math.round(v.depth() * v.voxel().z() / target.z()));
        return resample(v, target, nx, ny, nz);
    }

    /**
     * Resamples to a given voxel size and output size, centres aligned. Keeps odd sizes odd when asked by the
     * caller (PSFs: pass odd nx, ny, nz so the peak stays on the centre voxel).
     */
    public static Volume resample(Volume v, VoxelSize target, int nx, int ny, int nz) {
        Volume out = Volume.zeros(nx, ny, nz, target);
        double[] sx = new double[nx];
        double[] sy = new double[ny];
        double[] sz = new double[nz];
        for (int i = 0; i < nx; i++) {
            sx[i] = sourceCoordinate(i, nx, target.x(), v.width(), v.voxel().x());
        }
        for (int i = 0; i < ny; i++) {
            sy[i] = sourceCoordinate(i, ny, target.y(), v.height(), v.voxel().y());
        }
        for (int i = 0; i < nz; i++) {
            sz[i] = sourceCoordinate(i, nz, target.z(), v.depth(), v.voxel().z());
        }
        float[] o = out.data();
        int p = 0;
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    o[p++] = (float) interpolate(v, sx[x], sy[y], sz[z]);
                }
            }
        }
        return out;
    }

    private static double sourceCoordinate(int i, int n, double d, int nSrc, double dSrc) {
        double physical = (i - (n - 1) / 2.0) * d;
        return physical / dSrc + (nSrc - 1) / 2.0;
    }

    /** Trilinear interpolation at a fractional voxel position, clamped to the volume. */
    public static double interpolate(Volume v, double x, double y, double z) {
        x = clamp(x, v.width() - 1);
        y = clamp(y, v.height() - 1);
        z = clamp(z, v.depth() - 1);
        int x0 = (int) Math.floor(x);
        int y0 = (int) Math.floor(y);
        int z0 = (int) Math.floor(z);
        int x1 = Math.min(x0 + 1, v.width() - 1);
        int y1 = Math.min(y0 + 1, v.height() - 1);
        int z1 = Math.min(z0 + 1, v.depth() - 1);
        double fx = x - x0;
        double fy = y - y0;
        double fz = z - z0;
        double c00 = v.get(x0, y0, z0) * (1 - fx) + v.get(x1, y0, z0) * fx;
        double c10 = v.get(x0, y1, z0) * (1 - fx) + v.get(x1, y1, z0) * fx;
        double c01 = v.get(x0, y0, z1) * (1 - fx) + v.get(x1, y0, z1) * fx;
        double c11 = v.get(x0, y1, z1) * (1 - fx) + v.get(x1, y1, z1) * fx;
        double c0 = c00 * (1 - fy) + c10 * fy;
        double c1 = c01 * (1 - fy) + c11 * fy;
        return c0 * (1 - fz) + c1 * fz;
    }

    private static double clamp(double c, int max) {
        return c < 0 ? 0 : Math.min(c, max);
    }
}
