package org.stackwright.fft;

import org.jtransforms.fft.FloatFFT_1D;
import org.stackwright.parallel.Workers;

/**
 * Real-to-complex (half-spectrum) discrete Fourier transform of a 3D real array of any size, assembled from 1D
 * transforms: a real transform along x, then complex transforms along y and z. Lengths 2^a 3^b 5^c (all sizes
 * {@link FastSizes} picks) go through {@link LineFft}, several lines at once (along x two real rows per complex
 * line); other lengths through JTransforms' 1D transforms (Bluestein's algorithm for large primes).
 *
 * <p>Layout (known only to this package): the spectrum holds (nx/2+1) x ny x nz complex values, interleaved
 * (re, im), kx fastest, then ky, then kz. Forward uses exp(-2 pi i k x / n); {@link #inverse} scales by 1/N so a
 * forward-inverse round trip returns the input. 2D arrays (nz = 1) skip the z pass.
 *
 * <p>Every 1D line is transformed the same way whatever the thread count, so results are bit-identical across
 * thread counts. The object holds one work buffer per thread; it is not safe to call from two threads at once.
 */
public final class RealFft3D {

    /** Lines gathered together in the y and z passes: reads contiguous runs instead of single strided values. */
    private static final int BLOCK = 16;

    /** Lines transformed together by {@link LineFft} in the y and z passes (sizes 2^a 3^b 5^c); 8 measured fastest of 4-32. */
    private static final int LINES = 8;

    static {
        // Lines are distributed over our own workers; JTransforms must not start threads of its own inside a
        // line. This is JTransforms' global setting, set once here (our copy is relocated inside the plugin jar).
        org.jtransforms.utils.CommonUtils.setThreadsBeginN_1D_FFT_2Threads(Integer.MAX_VALUE);
        org.jtransforms.utils.CommonUtils.setThreadsBeginN_1D_FFT_4Threads(Integer.MAX_VALUE);
    }

    private final int nx;
    private final int ny;
    private final int nz;
    private final int hx;
    private final Workers workers;
    private final FloatFFT_1D[] fx;
    private final FloatFFT_1D[] fy;
    private final FloatFFT_1D[] fz;
    private final float[][] bufX;
    private final float[][] bufY;
    private final float[][] bufZ;
    /** vectorised line transforms along y and z (null when the size has a prime factor above 5) */
    private final LineFft[] ly;
    private final LineFft[] lz;
    private final LineFft[] lx;
    /** per thread: re, im and two work arrays for up to LINES lines of the longer of y and z */
    private final float[][][] lineBuf;

    /**
     * @param nx size along x (fastest), at least 1
     * @param ny size along y, at least 1
     * @param nz size along z, at least 1
     * @param workers the threads to use (not closed by this object)
     */
    public RealFft3D(int nx, int ny, int nz, Workers workers) {
        RealTransform.checkSize(nx, ny, nz);
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.hx = nx / 2 + 1;
        this.workers = workers;
        int t = workers.threads();
        fx = new FloatFFT_1D[t];
        fy = new FloatFFT_1D[t];
        fz = new FloatFFT_1D[t];
        bufX = new float[t][];
        bufY = new float[t][];
        bufZ = new float[t][];
        ly = new LineFft[t];
        lz = new LineFft[t];
        lineBuf = new float[t][][];
        lx = new LineFft[t];
        boolean pairX = nx > 1 && FastSizes.isFast(nx);
        int longest = Math.max(ny > 1 && FastSizes.isFast(ny) ? ny : 0, nz > 1 && FastSizes.isFast(nz) ? nz : 0);
        longest = Math.max(longest, pairX ? nx : 0);
        for (int i = 0; i < t; i++) {
            fx[i] = nx > 1 ? new FloatFFT_1D(nx) : null;
            fy[i] = ny > 1 ? new FloatFFT_1D(ny) : null;
            fz[i] = nz > 1 ? new FloatFFT_1D(nz) : null;
            bufX[i] = new float[Math.max(nx, 2)];
            bufY[i] = new float[2 * ny * BLOCK];
            bufZ[i] = new float[2 * nz * BLOCK];
            ly[i] = ny > 1 && FastSizes.isFast(ny) ? (i == 0 ? new LineFft(ny) : ly[0]) : null;
            lz[i] = nz > 1 && FastSizes.isFast(nz) ? (i == 0 ? new LineFft(nz) : lz[0]) : null;
            lx[i] = pairX ? (i == 0 ? new LineFft(nx) : lx[0]) : null;
            if (longest > 0) {
                lineBuf[i] = new float[4][longest * LINES];
            }
        }
    }

    public int nx() {
        return nx;
    }

    public int ny() {
        return ny;
    }

    public int nz() {
        return nz;
    }

    /** @return number of floats in a spectrum array: 2 (nx/2+1) ny nz */
    public int spectrumLength() {
        return 2 * hx * ny * nz;
    }

    /** @return number of floats in a real array: nx ny nz */
    public int realLength() {
        return nx * ny * nz;
    }

    /** @return a new spectrum array */
    public float[] newSpectrum() {
        return new float[spectrumLength()];
    }

    /**
     * Forward transform.
     *
     * @param real input, nx*ny*nz values, not modified
     * @param spectrum output, {@link #spectrumLength()} values, overwritten
     */
    public void forward(float[] real, float[] spectrum) {
        checkLengths(real, spectrum);
        forward(real, nx, spectrum);
    }

    /**
     * Inverse transform, scaled by 1/(nx ny nz).
     *
     * @param spectrum input, destroyed (used as work space)
     * @param real output, overwritten
     */
    public void inverse(float[] spectrum, float[] real) {
        checkLengths(real, spectrum);
        inverse(spectrum, real, nx);
    }

    /**
     * Forward transform in place: on entry real row r (r = y + ny z) sits at float {@code 2 (nx/2+1) r} of
     * {@code buf} (rows padded to the length of a spectrum row); on exit {@code buf} holds the spectrum. The same
     * operations as {@link #forward(float[], float[])}, so the values are bit-identical.
     *
     * @param buf at least {@link #spectrumLength()} floats, modified
     */
    void forwardInPlace(float[] buf) {
        checkInPlace(buf);
        forward(buf, 2 * hx, buf);
    }

    /**
     * Inverse transform in place, the counterpart of {@link #forwardInPlace}: on exit real row r sits at float
     * {@code 2 (nx/2+1) r}; the floats between rows are undefined.
     *
     * @param buf at least {@link #spectrumLength()} floats, modified
     */
    void inverseInPlace(float[] buf) {
        checkInPlace(buf);
        inverse(buf, buf, 2 * hx);
    }

    private void checkInPlace(float[] buf) {
        if (buf.length < spectrumLength()) {
            throw new IllegalArgumentException("in-place array of " + buf.length + " floats is shorter than the spectrum ("
                    + spectrumLength() + ") of FFT size " + nx + "x" + ny + "x" + nz);
        }
    }

    /**
     * Forward transform without length checks; real row r starts at float {@code r * rs}. In place when
     * real == spectrum and rs = 2 (nx/2+1).
     */
    void forward(float[] real, int rs, float[] spectrum) {
        if (lx[0] != null) {
            xPairs(real, rs, spectrum, true);
            complexPasses(spectrum, true);
            return;
        }
        workers.forSlots(ny * nz, (slot, from, to) -> {
            float[] b = bufX[slot];
            for (int row = from; row < to; row++) {
                rowForward(real, row * rs, spectrum, row * hx * 2, b, fx[slot]);
            }
        });
        complexPasses(spectrum, true);
    }

    /** Inverse transform without length checks, scaled; real row r starts at float {@code r * rs}. */
    void inverse(float[] spectrum, float[] real, int rs) {
        complexPasses(spectrum, false);
        if (lx[0] != null) {
            xPairs(real, rs, spectrum, false);
            return;
        }
        workers.forSlots(ny * nz, (slot, from, to) -> {
            float[] b = bufX[slot];
            for (int row = from; row < to; row++) {
                rowInverse(spectrum, row * hx * 2, real, row * rs, b, fx[slot]);
            }
        });
    }

    private void checkLengths(float[] real, float[] spectrum) {
        if (real.length != realLength() || spectrum.length != spectrumLength()) {
            throw new IllegalArgumentException("array lengths " + real.length + "/" + spectrum.length
                    + " do not match FFT size " + nx + "x" + ny + "x" + nz);
        }
    }

    /** One real row to nx/2+1 complex values, unpacking JTransforms' packed real layout. */
    private void rowForward(float[] real, int r0, float[] spec, int s0, float[] b, FloatFFT_1D f) {
        if (nx == 1) {
            spec[s0] = real[r0];
            spec[s0 + 1] = 0;
            return;
        }
        System.arraycopy(real, r0, b, 0, nx);
        f.realForward(b);
        spec[s0] = b[0];
        spec[s0 + 1] = 0;
        if ((nx & 1) == 0) {
            // a[2k] = Re k, a[2k+1] = Im k for 0 < k < n/2; a[1] = Re n/2
            System.arraycopy(b, 2, spec, s0 + 2, nx - 2);
            spec[s0 + nx] = b[1];
            spec[s0 + nx + 1] = 0;
        } else {
            // a[2k] = Re k for 0 <= k < (n+1)/2, a[2k+1] = Im k for 0 < k < (n-1)/2, a[1] = Im (n-1)/2
            System.arraycopy(b, 2, spec, s0 + 2, nx - 3);
            spec[s0 + nx - 1] = b[nx - 1];
            spec[s0 + nx] = b[1];
        }
    }

    private void rowInverse(float[] spec, int s0, float[] real, int r0, float[] b, FloatFFT_1D f) {
        if (nx == 1) {
            real[r0] = spec[s0];
            return;
        }
        b[0] = spec[s0];
        if ((nx & 1) == 0) {
            System.arraycopy(spec, s0 + 2, b, 2, nx - 2);
            b[1] = spec[s0 + nx];
        } else {
            System.arraycopy(spec, s0 + 2, b, 2, nx - 3);
            b[nx - 1] = spec[s0 + nx - 1];
            b[1] = spec[s0 + nx];
        }
        f.realInverse(b, true);
        System.arraycopy(b, 0, real, r0, nx);
    }

    private void complexPasses(float[] spec, boolean forward) {
        if (forward) {
            yPass(spec, true);
            zPass(spec, true);
        } else {
            zPass(spec, false);
            yPass(spec, false);
        }
    }

    /**
     * Complex transforms along y, gathering up to {@code BLOCK} neighbouring kx lines of one z plane at once: each
     * y row is read as one contiguous run instead of single strided values (fewer cache lines per line).
     */
    private void yPass(float[] spec, boolean forward) {
        if (ny == 1) {
            return;
        }
        final int rowStride = 2 * hx;
        if (ly[0] != null) {
            linesPass(spec, ly, hx, nz, ny * rowStride, rowStride, forward);
            return;
        }
        final int blocksPerPlane = (hx + BLOCK - 1) / BLOCK;
        workers.forSlots(nz * blocksPerPlane, (slot, from, to) -> {
            float[] b = bufY[slot];
            FloatFFT_1D f = fy[slot];
            for (int task = from; task < to; task++) {
                int z = task / blocksPerPlane;
                int kx0 = (task % blocksPerPlane) * BLOCK;
                int count = Math.min(BLOCK, hx - kx0);
                int base = z * ny * rowStride + 2 * kx0;
                // gather: line j (kx = kx0 + j) goes to b[j*2ny ...]
                for (int y = 0, p = base; y < ny; y++, p += rowStride) {
                    for (int j = 0; j < count; j++) {
                        b[j * 2 * ny + 2 * y] = spec[p + 2 * j];
                        b[j * 2 * ny + 2 * y + 1] = spec[p + 2 * j + 1];
                    }
                }
                for (int j = 0; j < count; j++) {
                    if (forward) {
                        f.complexForward(b, j * 2 * ny);
                    } else {
                        f.complexInverse(b, j * 2 * ny, true);
                    }
                }
                for (int y = 0, p = base; y < ny; y++, p += rowStride) {
                    for (int j = 0; j < count; j++) {
                        spec[p + 2 * j] = b[j * 2 * ny + 2 * y];
                        spec[p + 2 * j + 1] = b[j * 2 * ny + 2 * y + 1];
                    }
                }
            }
        });
    }

    /** Complex transforms along z, gathering up to BLOCK neighbouring lines at once. */
    private void zPass(float[] spec, boolean forward) {
        if (nz == 1) {
            return;
        }
        final int plane = 2 * hx * ny;
        final int lines = hx * ny; // complex lines along z, one per (kx, ky)
        if (lz[0] != null) {
            linesPass(spec, lz, lines, 1, 0, plane, forward);
            return;
        }
        final int blocks = (lines + BLOCK - 1) / BLOCK;
        workers.forSlots(blocks, (slot, from, to) -> {
            float[] b = bufZ[slot];
            FloatFFT_1D f = fz[slot];
            for (int blk = from; blk < to; blk++) {
                int l0 = blk * BLOCK;
                int count = Math.min(BLOCK, lines - l0);
                int off = 2 * l0;
                // gather: line j of the block goes to b[j*2nz ...]
                for (int z = 0; z < nz; z++) {
                    int p = z * plane + off;
                    for (int j = 0; j < count; j++) {
                        b[j * 2 * nz + 2 * z] = spec[p + 2 * j];
                        b[j * 2 * nz + 2 * z + 1] = spec[p + 2 * j + 1];
                    }
                }
                for (int j = 0; j < count; j++) {
                    if (forward) {
                        f.complexForward(b, j * 2 * nz);
                    } else {
                        f.complexInverse(b, j * 2 * nz, true);
                    }
                }
                for (int z = 0; z < nz; z++) {
                    int p = z * plane + off;
                    for (int j = 0; j < count; j++) {
                        spec[p + 2 * j] = b[j * 2 * nz + 2 * z];
                        spec[p + 2 * j + 1] = b[j * 2 * nz + 2 * z + 1];
                    }
                }
            }
        });
    }

    /**
     * Complex transforms of lines along one axis with {@link LineFft}, {@code LINES} neighbouring lines at a time.
     * In each of {@code groups} groups (z planes for the y pass; one group for the z pass) there are
     * {@code perGroup} lines; line l of group g starts at float {@code g*groupStride + 2l}, and its elements are
     * {@code step} floats apart.
     */
    private void linesPass(float[] spec, LineFft[] fft, int perGroup, int groups, int groupStride, int step,
            boolean forward) {
        final int n = fft[0].length();
        final int blocksPerGroup = (perGroup + LINES - 1) / LINES;
        workers.forSlots(groups * blocksPerGroup, (slot, from, to) -> {
            float[][] w = lineBuf[slot];
            float[] re = w[0];
            float[] im = w[1];
            LineFft f = fft[slot];
            for (int task = from; task < to; task++) {
                int g = task / blocksPerGroup;
                int l0 = (task % blocksPerGroup) * LINES;
                int count = Math.min(LINES, perGroup - l0);
                int base = g * groupStride + 2 * l0;
                for (int e = 0, p = base, q = 0; e < n; e++, p += step, q += count) {
                    for (int j = 0; j < count; j++) {
                        re[q + j] = spec[p + 2 * j];
                        im[q + j] = spec[p + 2 * j + 1];
                    }
                }
                boolean inPlace = f.transform(re, im, w[2], w[3], count, forward);
                float[] or = inPlace ? re : w[2];
                float[] oi = inPlace ? im : w[3];
                for (int e = 0, p = base, q = 0; e < n; e++, p += step, q += count) {
                    for (int j = 0; j < count; j++) {
                        spec[p + 2 * j] = or[q + j];
                        spec[p + 2 * j + 1] = oi[q + j];
                    }
                }
            }
        });
    }

    /**
     * The x pass for lengths 2^a 3^b 5^c: two real rows a, b make one complex line z = a + i b, and {@link LineFft}
     * transforms LINES such lines at once. Forward: A_k = (Z_k + conj Z_{n-k}) / 2, B_k = (Z_k - conj Z_{n-k}) / 2i
     * (the two-for-one real FFT; Brigham, The Fast Fourier Transform and its Applications, 1988, section 9.3).
     * Inverse: Z_k = A_k + i B_k with A_{n-k} = conj A_k, and a = Re z, b = Im z; as in a real inverse DFT the
     * imaginary parts of the k = 0 and (n even) k = n/2 coefficients are ignored. Rows are paired by their index
     * (2p, 2p+1), whatever the thread count. Real row r starts at float {@code r * rs}; a task reads all its rows
     * before it writes any, so the pass also works in place (real == spec, rs = 2 hx).
     */
    private void xPairs(float[] real, int rs, float[] spec, boolean forward) {
        final int rows = ny * nz;
        final int perTask = 2 * LINES;
        final int tasks = (rows + perTask - 1) / perTask;
        final int n = nx;
        workers.forSlots(tasks, (slot, from, to) -> {
            float[][] w = lineBuf[slot];
            float[] re = w[0];
            float[] im = w[1];
            LineFft f = lx[slot];
            for (int task = from; task < to; task++) {
                int r0 = task * perTask;
                int count = Math.min(perTask, rows - r0);
                int width = (count + 1) / 2;
                if (forward) {
                    for (int j = 0; j < width; j++) {
                        int ra = (r0 + 2 * j) * rs;
                        boolean hasB = 2 * j + 1 < count;
                        int rb = ra + rs;
                        for (int x = 0, q = j; x < n; x++, q += width) {
                            re[q] = real[ra + x];
                            im[q] = hasB ? real[rb + x] : 0f;
                        }
                    }
                    boolean inPlace = f.transform(re, im, w[2], w[3], width, true);
                    float[] zr = inPlace ? re : w[2];
                    float[] zi = inPlace ? im : w[3];
                    for (int j = 0; j < width; j++) {
                        int sa = (r0 + 2 * j) * 2 * hx;
                        boolean hasB = 2 * j + 1 < count;
                        int sb = sa + 2 * hx;
                        for (int k = 0; k < hx; k++) {
                            int pk = k * width + j;
                            int pm = ((n - k) % n) * width + j;
                            float kr = zr[pk];
                            float ki = zi[pk];
                            float mr = zr[pm];
                            float mi = zi[pm];
                            spec[sa + 2 * k] = 0.5f * (kr + mr);
                            spec[sa + 2 * k + 1] = 0.5f * (ki - mi);
                            if (hasB) {
                                spec[sb + 2 * k] = 0.5f * (ki + mi);
                                spec[sb + 2 * k + 1] = -0.5f * (kr - mr);
                            }
                        }
                    }
                } else {
                    for (int j = 0; j < width; j++) {
                        int sa = (r0 + 2 * j) * 2 * hx;
                        boolean hasB = 2 * j + 1 < count;
                        int sb = sa + 2 * hx;
                        for (int k = 0; k < n; k++) {
                            int kk = k < hx ? k : n - k;
                            float sign = k < hx ? 1f : -1f;
                            boolean realOnly = kk == 0 || 2 * kk == n;
                            float ar = spec[sa + 2 * kk];
                            float ai = realOnly ? 0f : sign * spec[sa + 2 * kk + 1];
                            float br = hasB ? spec[sb + 2 * kk] : 0f;
                            float bi = hasB && !realOnly ? sign * spec[sb + 2 * kk + 1] : 0f;
                            re[k * width + j] = ar - bi;
                            im[k * width + j] = ai + br;
                        }
                    }
                    boolean inPlace = f.transform(re, im, w[2], w[3], width, false);
                    float[] zr = inPlace ? re : w[2];
                    float[] zi = inPlace ? im : w[3];
                    for (int j = 0; j < width; j++) {
                        int ra = (r0 + 2 * j) * rs;
                        boolean hasB = 2 * j + 1 < count;
                        int rb = ra + rs;
                        for (int x = 0, q = j; x < n; x++, q += width) {
                            real[ra + x] = zr[q];
                            if (hasB) {
                                real[rb + x] = zi[q];
                            }
                        }
                    }
                }
            }
        });
    }
}
