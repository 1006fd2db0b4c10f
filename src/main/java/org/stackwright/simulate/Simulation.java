package org.stackwright.simulate;

import org.stackwright.fft.Convolution;
import org.stackwright.model.Camera;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * An invented acquisition: a specimen is drawn on a field larger than the camera's view (so light from outside the
 * view blurs into it, as in a real microscope), blurred with the PSF, cropped to the view, given a background and
 * recorded by the camera; defects and seams are planted on request.
 */
public final class Simulation {

    /**
     * The outcome.
     *
     * @param truth photons per voxel before blur, in the view
     * @param expected expected photons per voxel after blur, with background (the Poisson mean)
     * @param data camera values in ADU
     * @param damageMask one plane, 255 where a defect or a seam was planted; null when none
     */
    public record Outcome(Volume truth, Volume expected, Volume data, byte[] damageMask) {
    }

    /**
     * What to simulate.
     *
     * @param nx view width
     * @param ny view height
     * @param nz view depth
     * @param voxel voxel size
     * @param contents what the specimen holds
     * @param psf the PSF (odd sizes, unit sum) at the same voxel size
     * @param backgroundPhotons uniform background in photons per voxel
     * @param camera the camera
     * @param defectsPerKind hot, dead and stuck pixels to plant (each)
     * @param gridRows tile rows for seams (1 = none)
     * @param gridColumns tile columns for seams (1 = none)
     * @param seamWidth seam band width in pixels
     * @param seed random seed
     */
    public record Plan(int nx, int ny, int nz, VoxelSize voxel, Specimen.Contents contents, Volume psf,
            double backgroundPhotons, Camera camera, int defectsPerKind, int gridRows, int gridColumns, int seamWidth,
            long seed) {
    }

    private Simulation() {
    }

    /** Runs the plan; deterministic for its seed. */
    public static Outcome run(Plan plan, Workers workers) {
        Volume psf = plan.psf();
        int mx = psf.width() / 2;
        int my = psf.height() / 2;
        int mz = plan.nz() == 1 ? 0 : psf.depth() / 2;
        Volume field = Specimen.draw(plan.nx() + 2 * mx, plan.ny() + 2 * my, plan.nz() + 2 * mz, plan.voxel(),
                plan.contents(), plan.seed());
        Volume blurredField = Convolution.convolve(field, plan.nz() == 1 ? centrePlane(psf) : psf, workers);
        Volume truth = Padding.crop(field, mx, my, mz, plan.nx(), plan.ny(), plan.nz());
        Volume expected = Padding.crop(blurredField, mx, my, mz, plan.nx(), plan.ny(), plan.nz());
        float[] e = expected.data();
        for (int i = 0; i < e.length; i++) {
            e[i] = Math.max(0f, e[i]) + (float) plan.backgroundPhotons();
        }
        Volume data = plan.camera().record(expected, plan.seed() ^ 0x5DEECE66DL);
        byte[] mask = null;
        if (plan.gridRows() > 1 || plan.gridColumns() > 1) {
            mask = Damage.seams(data, plan.gridRows(), plan.gridColumns(), plan.seamWidth(), 0.55, 0.12,
                    plan.camera().offset(), plan.seed() + 17);
        }
        if (plan.defectsPerKind() > 0) {
            int n = plan.defectsPerKind();
            double off = plan.camera().offset();
            double hot = Math.min(plan.camera().fullScale(), off + 20 * (data.max() - off) + 500);
            double stuck = off + 0.5 * (data.max() - off) + 50;
            Damage.DefectKind[] kinds = Damage.defects(data, new int[] {n, n, n}, off, hot, stuck, plan.seed() + 29);
            if (mask == null) {
                mask = new byte[plan.nx() * plan.ny()];
            }
            for (int i = 0; i < kinds.length; i++) {
                if (kinds[i] != null) {
                    mask[i] = (byte) 255;
                }
            }
        }
        return new Outcome(truth, expected, data, mask);
    }

    /** The in-focus plane of a 3D PSF, renormalised, for 2D simulations. */
    static Volume centrePlane(Volume psf) {
        if (psf.depth() == 1) {
            return psf;
        }
        Volume p = Padding.crop(psf, 0, 0, psf.depth() / 2, psf.width(), psf.height(), 1);
        double s = p.sum();
        float[] d = p.data();
        for (int i = 0; i < d.length; i++) {
            d[i] /= (float) s;
        }
        return p;
    }
}
