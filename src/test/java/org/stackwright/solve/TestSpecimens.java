package org.stackwright.solve;

import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Small invented 3D problems with known truth, shared by the solver tests (deterministic seeds). */
public final class TestSpecimens {

    static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.25);

    private TestSpecimens() {
    }

    /** A Gaussian PSF with sigma 1.5 px laterally and 1.2 planes axially, 11 x 11 x 9. */
    public static Volume psf() {
        return GaussianPsf.sampled(0.15, 0.3, VOXEL, 11, 11, 9);
    }

    /**
     * A cell-like field simulated with a field larger than the view (light from outside blurs in), a background
     * and a photon-counting camera (Poisson noise), or a camera with offset and read noise.
     *
     * @param brightness scales the photon counts (lower = noisier)
     */
    public static Simulation.Outcome cells(int nx, int ny, int nz, double brightness, double background, Camera camera,
            long seed) {
        Specimen.Contents c = Specimen.Contents.cellField();
        Specimen.Contents s = new Specimen.Contents(c.beads(), c.filaments(), c.vesicles(), c.beadPhotons() * brightness,
                c.filamentPhotons() * brightness, c.vesiclePhotons() * brightness, c.hazePhotons() * brightness);
        try (Workers w = new Workers(1)) {
            return Simulation.run(new Simulation.Plan(nx, ny, nz, VOXEL, s, psf(), background, camera, 0, 1, 1, 4, seed), w);
        }
    }
}
