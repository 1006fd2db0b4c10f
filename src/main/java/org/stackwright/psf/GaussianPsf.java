package org.stackwright.psf;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Gaussian approximation of the widefield PSF (paraxial): sigma_xy = 0.21 lambda / NA, sigma_z = 0.66 n lambda /
 * NA^2. Zhang, Zerubia & Olivo-Marin, "Gaussian approximations of fluorescence microscope point-spread function
 * models", Applied Optics 46(10):1819-1829, 2007. Fast and smooth, but it has no side lobes and underestimates the
 * axial spread of a real widefield PSF: use it for quick work and simulations, not for quantitative results.
 */
public final class GaussianPsf implements PsfModel {

    /** The model; the static helpers below can also be used directly. */
    public GaussianPsf() {
    }

    @Override
    public String name() {
        return "gaussian";
    }

    /**
     * The Gaussian for the emission wavelength, NA and immersion index of the settings, integrated over each
     * voxel. Other settings (sample, coverslip, depth, pinhole) are not part of this approximation.
     */
    @Override
    public Volume compute(PsfSettings s, Workers workers) {
        s.check(name());
        return sampled(sigmaLateral(s.wavelengthNm(), s.na()), sigmaAxial(s.wavelengthNm(), s.na(), s.immersionIndex()),
                s.voxel(), s.nx(), s.ny(), s.nz());
    }

    /** @return lateral standard deviation in micrometres for emission wavelength (nm) and NA */
    public static double sigmaLateral(double wavelengthNm, double na) {
        return 0.21 * wavelengthNm * 1e-3 / na;
    }

    /** @return axial standard deviation in micrometres for wavelength (nm), NA and immersion index n */
    public static double sigmaAxial(double wavelengthNm, double na, double n) {
        return 0.66 * n * wavelengthNm * 1e-3 / (na * na);
    }

    /**
     * A sampled Gaussian, unit sum, peak on the centre voxel. Each voxel holds the Gaussian integrated over the
     * voxel (error functions), so narrow PSFs keep their variance.
     *
     * @param sigmaXy lateral standard deviation, micrometres
     * @param sigmaZ axial standard deviation, micrometres (ignored when nz is 1)
     * @param nx width in voxels, odd
     * @param ny height in voxels, odd
     * @param nz depth in voxels, odd
     */
    public static Volume sampled(double sigmaXy, double sigmaZ, VoxelSize voxel, int nx, int ny, int nz) {
        double[] gx = profile(nx, sigmaXy / voxel.x());
        double[] gy = profile(ny, sigmaXy / voxel.y());
        double[] gz = nz == 1 ? new double[] {1} : profile(nz, sigmaZ / voxel.z());
        Volume v = Volume.zeros(nx, ny, nz, voxel);
        double sum = 0;
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    sum += gx[x] * gy[y] * gz[z];
                }
            }
        }
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    v.set(x, y, z, (float) (gx[x] * gy[y] * gz[z] / sum));
                }
            }
        }
        return v;
    }

    /** Voxel-integrated 1D Gaussian of the given sigma (in voxels), centred on index n/2. */
    static double[] profile(int n, double sigma) {
        double[] g = new double[n];
        int c = n / 2;
        double s = sigma * Math.sqrt(2);
        for (int i = 0; i < n; i++) {
            double a = (i - c - 0.5) / s;
            double b = (i - c + 0.5) / s;
            g[i] = org.apache.commons.math3.special.Erf.erf(a, b);
        }
        return g;
    }
}
