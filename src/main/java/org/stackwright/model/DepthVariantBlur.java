package org.stackwright.model;

import java.util.List;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.KernelBank;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Blur by a PSF that changes with depth, by interpolation between K PSFs computed at K depths ("strata"): the
 * PSF for an object plane z is sum_k w_k(z) h_k, with w_k the linear interpolation weights between the strata's
 * planes (sum 1 on every plane; the first and last PSF hold beyond the first and last stratum), so that
 *
 * <pre>
 *   H x = sum_k h_k (*) (w_k x),      H^T y = sum_k w_k (h_k (x) y)
 * </pre>
 *
 * (Preza &amp; Conchello, "Depth-variant maximum-likelihood restoration for three-dimensional fluorescence
 * microscopy", J. Opt. Soc. Am. A 21(9):1593-1601, 2004). One object plane's PSF is then exact at the strata and
 * interpolated between them. The convolutions are periodic on the grid (as {@link BlurOperator}); grid planes
 * beyond the data (the padding, z at or above {@code dataDepth}) lie half below the last data plane and half above
 * the first, and take the weights of the nearest data plane. Cost: K + 1 FFTs per application, K transfer
 * functions held.
 *
 * <p>Not safe to call from two threads at once (owns its buffers).
 */
public final class DepthVariantBlur implements LinearOperator {

    private final KernelBank bank;
    private final int planeSize;
    private final int nz;
    private final float[][] weights;
    private final float[] work;
    private final Workers workers;

    /**
     * @param psfs the K PSFs (odd sizes, centre at n/2), all of one size; not modified
     * @param planes the data plane (z index, may be fractional) where each PSF holds exactly, increasing
     * @param dataDepth number of data planes (planes from here on are padding)
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     */
    public DepthVariantBlur(List<Volume> psfs, double[] planes, int dataDepth, int nx, int ny, int nz,
            Workers workers) {
        this(psfs, planes, dataDepth, nx, ny, nz, workers, FftEngines.standard());
    }

    /** As above, on the given FFT engine. */
    public DepthVariantBlur(List<Volume> psfs, double[] planes, int dataDepth, int nx, int ny, int nz,
            Workers workers, FftEngine engine) {
        if (psfs.isEmpty() || psfs.size() != planes.length) {
            throw new IllegalArgumentException("give one plane per PSF (" + psfs.size() + " PSFs, " + planes.length
                    + " planes)");
        }
        for (int k = 1; k < planes.length; k++) {
            if (!(planes[k] > planes[k - 1])) {
                throw new IllegalArgumentException("the strata planes must increase: " + java.util.Arrays.toString(planes));
            }
        }
        this.bank = new KernelBank(psfs, nx, ny, nz, workers, engine);
        this.planeSize = nx * ny;
        this.nz = nz;
        this.workers = workers;
        this.weights = planeWeights(planes, dataDepth, nz);
        this.work = new float[bank.gridLength()];
    }

    /**
     * @return weights[k][z] for every grid plane: linear interpolation between the strata, clamped at the ends;
     *     padding planes take the weights of the nearest data plane (across the wrap-around)
     */
    static float[][] planeWeights(double[] planes, int dataDepth, int nz) {
        int k = planes.length;
        float[][] w = new float[k][nz];
        for (int z = 0; z < nz; z++) {
            double p;
            if (z < dataDepth) {
                p = z;
            } else {
                // padding: the first half continues below the last plane, the rest wraps to above the first
                p = z - dataDepth < (nz - dataDepth + 1) / 2 ? dataDepth - 1 : 0;
            }
            if (k == 1 || p <= planes[0]) {
                w[0][z] = 1;
            } else if (p >= planes[k - 1]) {
                w[k - 1][z] = 1;
            } else {
                int j = 0;
                while (p > planes[j + 1]) {
                    j++;
                }
                double f = (p - planes[j]) / (planes[j + 1] - planes[j]);
                w[j][z] = (float) (1 - f);
                w[j + 1][z] = (float) f;
            }
        }
        return w;
    }

    @Override
    public int domainLength() {
        return bank.gridLength();
    }

    @Override
    public int rangeLength() {
        return bank.gridLength();
    }

    @Override
    public void apply(float[] in, float[] out) {
        bank.clearSum();
        for (int k = 0; k < bank.size(); k++) {
            if (!weigh(k, in, work)) {
                continue;
            }
            bank.addConvolved(k, work);
        }
        bank.finishSum(out);
    }

    @Override
    public void applyAdjoint(float[] in, float[] out) {
        bank.hold(in);
        boolean first = true;
        for (int k = 0; k < bank.size(); k++) {
            if (!uses(k)) {
                continue;
            }
            bank.correlateHeld(k, work);
            float[] wk = weights[k];
            boolean start = first;
            workers.forRange(nz, (z0, z1) -> {
                for (int z = z0; z < z1; z++) {
                    float wz = wk[z];
                    int o = z * planeSize;
                    for (int i = o; i < o + planeSize; i++) {
                        out[i] = start ? wz * work[i] : out[i] + wz * work[i];
                    }
                }
            });
            first = false;
        }
        if (first) {
            java.util.Arrays.fill(out, 0f);
        }
    }

    /** @return whether stratum k has a nonzero weight on some plane */
    private boolean uses(int k) {
        for (float v : weights[k]) {
            if (v != 0) {
                return true;
            }
        }
        return false;
    }

    /** dst = w_k in, plane by plane; @return false when w_k is zero everywhere */
    private boolean weigh(int k, float[] in, float[] dst) {
        if (!uses(k)) {
            return false;
        }
        float[] wk = weights[k];
        workers.forRange(nz, (z0, z1) -> {
            for (int z = z0; z < z1; z++) {
                float wz = wk[z];
                int o = z * planeSize;
                for (int i = o; i < o + planeSize; i++) {
                    dst[i] = wz * in[i];
                }
            }
        });
        return true;
    }

    /** @return the name of the FFT engine, for run records */
    public String fftEngine() {
        return bank.engine();
    }

    /** @return how the FFT engine planned its transforms, for run records */
    public String fftPlanning() {
        return bank.planning();
    }

    /** @return the number of strata */
    public int strata() {
        return bank.size();
    }
}
