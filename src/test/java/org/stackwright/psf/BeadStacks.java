package org.stackwright.psf;

import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Bead stacks made with the suite's own Gibson-Lanni model: beads at known integer voxel positions on a grid,
 * each the modelled PSF times a brightness, on a uniform background, recorded by the simulator's camera
 * (Poisson photon noise, gain, offset, Gaussian read noise).
 */
final class BeadStacks {

    /** Oil objective NA 1.3 into water, 520 nm, 0.1 x 0.1 x 0.2 um voxels. */
    static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.2);

    /** The camera of the tests: gain 2 ADU/e-, offset 100 ADU, read noise 1.5 ADU. */
    static final Camera CAMERA = new Camera(2, 100, 1.5, Double.POSITIVE_INFINITY);

    private BeadStacks() {
    }

    /** @return the optics at a depth, oil (1.518) into water (1.33), NA 1.3, 520 nm, grid 41x41x45 */
    static PsfSettings oilIntoWater(double depth) {
        return PsfSettings.matched(1.3, 520, 1.518, VOXEL, 41, 41, 45).withSample(1.33, depth);
    }

    /**
     * @param truth optics and PSF grid of the beads
     * @param columns beads per row
     * @param rows rows of beads
     * @param photons photo-electrons of each bead (sum of its PSF volume)
     * @param background photo-electrons per voxel
     * @return the recorded stack (ADU)
     */
    static Volume make(PsfSettings truth, int columns, int rows, double photons, double background, long seed,
            Workers workers) {
        Volume psf = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI).compute(truth, workers);
        int spacing = 30;
        int nx = columns * spacing + 10;
        int ny = rows * spacing + 10;
        int nz = 40;
        float[] mu = new float[nx * ny * nz];
        java.util.Arrays.fill(mu, (float) background);
        for (int r = 0; r < rows; r++) {
            for (int c = 0; c < columns; c++) {
                int bx = 20 + c * spacing;
                int by = 20 + r * spacing;
                int bz = 19 + (r + c) % 3;
                add(psf, mu, nx, ny, nz, bx, by, bz, photons * (1 + 0.1 * ((r * columns + c) % 3)));
            }
        }
        return CAMERA.record(new Volume(nx, ny, nz, mu, truth.voxel()), seed);
    }

    private static void add(Volume psf, float[] mu, int nx, int ny, int nz, int bx, int by, int bz, double a) {
        for (int z = 0; z < psf.depth(); z++) {
            int gz = bz + z - psf.depth() / 2;
            for (int y = 0; y < psf.height(); y++) {
                int gy = by + y - psf.height() / 2;
                for (int x = 0; x < psf.width(); x++) {
                    int gx = bx + x - psf.width() / 2;
                    if (gx >= 0 && gy >= 0 && gz >= 0 && gx < nx && gy < ny && gz < nz) {
                        mu[(gz * ny + gy) * nx + gx] += (float) (a * psf.get(x, y, z));
                    }
                }
            }
        }
    }
}
