package org.stackwright.fft;

import org.stackwright.parallel.Workers;

/**
 * Sub-voxel translation of a small volume by a linear phase in the Fourier domain (the shift theorem): exact for
 * band-limited content, with no interpolation blur. The volume is treated as periodic, so content that leaves one
 * side enters at the other; give it a margin of background around what matters. Odd sizes avoid the ambiguous
 * Nyquist term of even sizes (there the term is left unshifted). One object per size; not safe for two threads at
 * once (it owns its work buffer).
 */
public final class FourierShift {

    private final RealFft3D fft;
    private final float[] spectrum;

    /**
     * @param nx width
     * @param ny height
     * @param nz depth
     * @param workers the threads (not closed by this object)
     */
    public FourierShift(int nx, int ny, int nz, Workers workers) {
        this.fft = new RealFft3D(nx, ny, nz, workers);
        this.spectrum = fft.newSpectrum();
    }

    /**
     * Moves the content by (dx, dy, dz) voxels: out(x) = in(x - d).
     *
     * @param in nx*ny*nz values, not modified
     * @param out receives the shifted values (modified; may be {@code in})
     */
    public void shift(float[] in, float[] out, double dx, double dy, double dz) {
        int nx = fft.nx();
        int ny = fft.ny();
        int nz = fft.nz();
        int hx = nx / 2 + 1;
        fft.forward(in, spectrum);
        for (int kz = 0; kz < nz; kz++) {
            double pz = phase(kz, nz, dz);
            for (int ky = 0; ky < ny; ky++) {
                double py = phase(ky, ny, dy);
                int row = 2 * hx * (kz * ny + ky);
                for (int kx = 0; kx < hx; kx++) {
                    double p = pz + py + phase(kx, nx, dx);
                    double c = Math.cos(p);
                    double s = Math.sin(p);
                    int i = row + 2 * kx;
                    double re = spectrum[i];
                    double im = spectrum[i + 1];
                    spectrum[i] = (float) (re * c - im * s);
                    spectrum[i + 1] = (float) (re * s + im * c);
                }
            }
        }
        fft.inverse(spectrum, out);
    }

    /** @return -2 pi k d / n with k taken in (-n/2, n/2]; 0 at the Nyquist term of an even size */
    private static double phase(int k, int n, double d) {
        if (n % 2 == 0 && k == n / 2) {
            return 0;
        }
        int signed = k <= n / 2 ? k : k - n;
        return -2 * Math.PI * signed * d / n;
    }
}
