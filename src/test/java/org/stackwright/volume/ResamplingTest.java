package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.psf.GaussianPsf;

/**
 * Trilinear resampling: exact on linear functions (trilinear interpolation reproduces any function that is linear
 * in each coordinate; elementary property of multilinear interpolation), with the physical centres of input and
 * output aligned, for odd and even sizes.
 */
class ResamplingTest {

    private static final double A = 3.0;
    private static final double BX = 1.7;
    private static final double BY = -2.3;
    private static final double BZ = 0.9;

    /** f at a physical position (um) measured from the volume's centre. */
    private static double f(double x, double y, double z) {
        return A + BX * x + BY * y + BZ * z;
    }

    private static Volume linear(int nx, int ny, int nz, VoxelSize vs) {
        Volume v = Volume.zeros(nx, ny, nz, vs);
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    v.set(x, y, z, (float) f((x - (nx - 1) / 2.0) * vs.x(), (y - (ny - 1) / 2.0) * vs.y(),
                            (z - (nz - 1) / 2.0) * vs.z()));
                }
            }
        }
        return v;
    }

    @Test
    void exactOnLinearFunctionsWithCentresAligned() {
        Volume v = linear(21, 16, 9, new VoxelSize(0.1, 0.1, 0.3));
        VoxelSize target = new VoxelSize(0.07, 0.13, 0.25);
        Volume r = Resampling.toVoxelSize(v, target);
        // same physical extent, rounded to whole voxels: 21*0.1/0.07 = 30, 16*0.1/0.13 = 12.3, 9*0.3/0.25 = 10.8
        assertEquals("30x12x11", r.shape());
        assertEquals(target, r.voxel());
        double hx = (21 - 1) / 2.0 * 0.1;
        double hy = (16 - 1) / 2.0 * 0.1;
        double hz = (9 - 1) / 2.0 * 0.3;
        int checked = 0;
        for (int z = 0; z < r.depth(); z++) {
            double pz = (z - (r.depth() - 1) / 2.0) * target.z();
            for (int y = 0; y < r.height(); y++) {
                double py = (y - (r.height() - 1) / 2.0) * target.y();
                for (int x = 0; x < r.width(); x++) {
                    double px = (x - (r.width() - 1) / 2.0) * target.x();
                    if (Math.abs(px) > hx + 1e-9 || Math.abs(py) > hy + 1e-9 || Math.abs(pz) > hz + 1e-9) {
                        continue; // outside the input: edge values, not the linear function
                    }
                    // float storage of values up to ~10: 1e-5 absolute
                    assertEquals(f(px, py, pz), r.get(x, y, z), 1e-5, "voxel " + x + "," + y + "," + z);
                    checked++;
                }
            }
        }
        assertTrue(checked > r.size() / 2, "only " + checked + " voxels lie inside the input");
    }

    @Test
    void oddSizedPsfKeepsItsPeakOnTheCentreVoxel() {
        Volume psf = GaussianPsf.sampled(0.12, 0.4, new VoxelSize(0.1, 0.1, 0.3), 15, 15, 11);
        Volume r = Resampling.resample(psf, new VoxelSize(0.04, 0.04, 0.17), 37, 37, 19);
        int peak = r.argMax();
        assertEquals(r.index(18, 18, 9), peak, "peak at the centre voxel");
        // symmetric input, centres aligned: the centroid stays on the centre voxel
        double s = 0;
        double[] c = new double[3];
        for (int z = 0; z < r.depth(); z++) {
            for (int y = 0; y < r.height(); y++) {
                for (int x = 0; x < r.width(); x++) {
                    double w = r.get(x, y, z);
                    s += w;
                    c[0] += w * x;
                    c[1] += w * y;
                    c[2] += w * z;
                }
            }
        }
        assertEquals(18, c[0] / s, 1e-4);
        assertEquals(18, c[1] / s, 1e-4);
        assertEquals(9, c[2] / s, 1e-4);
    }

    @Test
    void sameGridReturnsTheSameValuesAndInputIsUntouched() {
        Volume v = linear(8, 7, 6, new VoxelSize(0.2, 0.2, 0.5));
        for (int i = 0; i < v.size(); i++) {
            v.data()[i] += (float) Math.sin(i);
        }
        Volume before = v.copy();
        Volume r = Resampling.toVoxelSize(v, v.voxel());
        assertEquals(v, r);
        assertEquals(before, v);
    }
}
