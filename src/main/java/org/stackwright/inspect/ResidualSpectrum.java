package org.stackwright.inspect;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.RealTransform;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Radially averaged power spectrum of a residual: P(k) = |F(k)|^2 / N averaged over shells of spatial frequency
 * |f| = sqrt((kx/nx)^2 + (ky/ny)^2 + (kz/nz)^2) in cycles per voxel. For white noise of variance s^2 every
 * frequency has expected power s^2 (Parseval), so the normalised residual of a correct model gives a flat spectrum
 * at 1. Structure the model misses (a wrong PSF, a wrong background) raises the low-frequency shells.
 *
 * <p>Shells have width {@value #SHELL} up to 0.5 cycles per voxel (the Nyquist frequency along one axis; corner
 * frequencies beyond it are not shown). The zero frequency (the mean) is reported apart, not in a shell. The
 * low-frequency ratio divides the mean power at 0 < |f| <= {@value #LOW} by the mean at
 * {@value #HIGH} < |f| <= 0.5: 1 for white noise whatever its level, above 1 when structure is left at low
 * frequency.
 *
 * @param frequency shell centres, cycles per voxel
 * @param power mean power per shell (NaN for a shell with no frequency)
 * @param modes number of frequencies per shell
 * @param dcPower power at zero frequency, N mean^2
 * @param lowFrequencyRatio mean power at low frequency over mean power at high frequency
 * @param lowModes number of frequencies in the low band
 * @param lowExcess chi^2 per voxel carried by the low band above the high-frequency level (Parseval):
 *     (low mean - high mean) lowModes / N
 */
public record ResidualSpectrum(double[] frequency, double[] power, long[] modes, double dcPower,
        double lowFrequencyRatio, long lowModes, double lowExcess) {

    /** Shell width, cycles per voxel. */
    public static final double SHELL = 1.0 / 64;
    /** Upper end of the low band, cycles per voxel. */
    public static final double LOW = 0.1;
    /** Lower end of the high (reference) band, cycles per voxel. */
    public static final double HIGH = 0.25;

    /** @param residual the residual, not modified */
    public static ResidualSpectrum of(Volume residual, Workers workers) {
        return of(residual, null, workers);
    }

    /**
     * @param residual the residual, not modified
     * @param exclude voxels set to 0 before the transform (listed regions, so that a few saturated patches do not
     *     pose as low-frequency structure); may be null
     */
    public static ResidualSpectrum of(Volume residual, boolean[] exclude, Workers workers) {
        return of(residual, exclude, workers, FftEngines.standard());
    }

    /** As above, on a given FFT engine. */
    public static ResidualSpectrum of(Volume residual, boolean[] exclude, Workers workers, FftEngine engine) {
        int nx = residual.width();
        int ny = residual.height();
        int nz = residual.depth();
        RealTransform fft = engine.transform(nx, ny, nz, workers);
        float[] spec = fft.newSpectrum();
        float[] in = residual.data();
        if (exclude != null) {
            in = in.clone();
            for (int i = 0; i < in.length; i++) {
                if (exclude[i]) {
                    in[i] = 0;
                }
            }
        }
        fft.forward(in, spec);
        int shells = (int) Math.round(0.5 / SHELL);
        double[] sum = new double[shells];
        long[] count = new long[shells];
        double n = (double) nx * ny * nz;
        double lowSum = 0;
        long lowCount = 0;
        double highSum = 0;
        long highCount = 0;
        int hx = nx / 2 + 1;
        for (int kz = 0; kz < nz; kz++) {
            double fz = (kz <= nz / 2 ? kz : kz - nz) / (double) nz;
            for (int ky = 0; ky < ny; ky++) {
                double fy = (ky <= ny / 2 ? ky : ky - ny) / (double) ny;
                int row = (kz * ny + ky) * hx;
                for (int kx = 0; kx < hx; kx++) {
                    if (kx == 0 && ky == 0 && kz == 0) {
                        continue;
                    }
                    double fx = kx / (double) nx;
                    double f = Math.sqrt(fx * fx + fy * fy + fz * fz);
                    if (f > 0.5) {
                        continue;
                    }
                    double re = spec[2 * (row + kx)];
                    double im = spec[2 * (row + kx) + 1];
                    double p = (re * re + im * im) / n;
                    // the half spectrum holds each frequency once for kx = 0 (and kx = nx/2 when nx is even),
                    // and stands for the pair (k, -k) otherwise
                    int w = (kx == 0 || (2 * kx == nx)) ? 1 : 2;
                    int s = Math.min(shells - 1, (int) (f / SHELL));
                    sum[s] += w * p;
                    count[s] += w;
                    if (f <= LOW) {
                        lowSum += w * p;
                        lowCount += w;
                    } else if (f > HIGH) {
                        highSum += w * p;
                        highCount += w;
                    }
                }
            }
        }
        double[] freq = new double[shells];
        double[] power = new double[shells];
        for (int s = 0; s < shells; s++) {
            freq[s] = (s + 0.5) * SHELL;
            power[s] = count[s] > 0 ? sum[s] / count[s] : Double.NaN;
        }
        double dc = (double) spec[0] * spec[0] / n;
        double ratio = lowCount > 0 && highCount > 0 && highSum > 0 ? (lowSum / lowCount) / (highSum / highCount) : Double.NaN;
        double excess = lowCount > 0 && highCount > 0 ? (lowSum / lowCount - highSum / highCount) * lowCount / n : 0;
        return new ResidualSpectrum(freq, power, count, dc, ratio, lowCount, excess);
    }
}
