package org.stackwright.model;

import org.stackwright.fft.Convolution;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.WorkGrid;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * One deconvolution problem in the form every solver uses: data y on a grid, blur H on that grid, weights w
 * (1 = trusted data pixel, 0 = no likelihood) and a background b, with the camera statistics turned into a
 * Poisson model.
 *
 * <p><b>Camera units.</b> Camera data y_adu = gain * Poisson(x) + offset + N(0, readNoise^2) are turned into the
 * shifted-Poisson form of Snyder, Hammoud &amp; White (JOSA A 10(5), 1993): y = (y_adu - offset) / gain + s with
 * s = (readNoise / gain)^2, modelled as Poisson(Hx + b) with b = background / gain + s. The data are never
 * background-subtracted and clipped beforehand; the object x is in photo-electrons and {@link #toVolume} returns
 * it in ADU above the offset (x * gain).
 *
 * <p><b>Boundaries and damaged pixels, one mechanism.</b> With {@link Boundary#EXTENDED} the object lives on a grid
 * of at least data + PSF - 1 voxels per axis (rounded up to a fast FFT size); the data occupy the corner
 * [0, w) x [0, h) x [0, d) and the periodic blur on the larger grid equals the linear blur of an object that reaches
 * past the image edges. The padding and masked pixels (dead, saturated, seams) get weight 0, and the
 * normalisation of the multiplicative updates is H^T w instead of H^T 1 (Bertero &amp; Boccacci, "A simple method
 * for the reduction of boundary effects in the Richardson-Lucy approach to image deconvolution", A&amp;A 437, 2005).
 * Object voxels where H^T w is below 1e-3 of its maximum see (almost) no data and are held at zero (common
 * practice). {@link Boundary#PERIODIC} uses the data grid itself (the object wraps around).
 * {@link #compatible} reproduces the textbook variant of a widely used library (zero-padded "same" convolution,
 * object only on the data grid, no normalisation, start 0.5).
 *
 * <p>Memory: the data in photo-electrons are not stored. Each pass computes them from the caller's camera data
 * (which the caller keeps anyway, so the problem holds a reference to it and needs it unchanged for its life), by
 * the same expression every time, so the values are the same as a stored copy's; pixels without likelihood (mask,
 * held out, non-finite) are one bit each. A pixel without likelihood reads as y = -1 (data are never negative after
 * the clamp at 0). This saves an image-sized array during every iteration (half a grid or more).
 */
public final class DeconvolutionProblem {

    /** How the image edges are treated. */
    public enum Boundary {
        /** object on a larger grid, padding carries no likelihood (non-circular) */
        EXTENDED,
        /** object and data on the same grid, blur wraps around */
        PERIODIC,
        /** object on the data grid only, zero outside, no normalisation: compatibility with a reference library */
        ZERO_SAME
    }

    static final float NO_DATA = -1f;
    private static final double SUPPORT_CUTOFF = 1e-3;
    /** Absolute floor of the model H x + b (photo-electrons) for data without any light. */
    private static final double TINY = 1e-12;
    /**
     * Floor of the model H x + b relative to the brightest datum. A float FFT blur carries an absolute error of a
     * few 1e-7 of the largest value of H x (single-precision rounding over about log2(n) butterfly stages; Schatzman,
     * "Accuracy of the discrete Fourier transform and the fast Fourier transform", SIAM J Sci Comput 17, 1996), so
     * model values below about 1e-6 of the brightest are rounding noise and may even be negative. Dividing a datum by
     * such a value gives ratios of 1e12 and more, whose own FFT error then swamps the update of every voxel (the
     * estimate turned to NaN at 5e4 photons per voxel). Flooring the model there bounds every ratio by 1e6, well
     * inside what the next float FFT carries (common practice for the size of the floor, no source).
     */
    static final double MODEL_FLOOR_RELATIVE = 1e-6;

    private final int w;
    private final int h;
    private final int d;
    private final int nx;
    private final int ny;
    private final int nz;
    private final VoxelSize voxel;
    private final Boundary boundary;
    private final Camera camera;
    private final double backgroundAdu;
    /** the caller's camera data on the image window (w x h x d, ADU), not modified; see {@link #datum} */
    private final float[] adu;
    /** one bit per image pixel: set where the pixel carries no likelihood (mask, held out, non-finite); or null */
    private final long[] noData;
    private final double offset;
    private final double gain;
    private final double shift;
    private final float[] norm;
    private final float background;
    private final BlurOperator blur;
    /** H: the blur, or the depth-variant blur (then {@link #blur} is null) */
    private final LinearOperator forward;
    private final Workers workers;
    private final int trusted;
    /** start value of the iterations in photo-electrons: the caller's, or the mean of (y - b) over trusted pixels */
    private final float start;
    /** lower bound of the model H x + b in the ratio and the fit, photo-electrons */
    private final double modelFloor;
    /** held-out pixels (cross-validation): their index on the image window */
    private final int[] heldIndex;

    /**
     * @param data camera data (ADU), not modified, kept by reference: leave it unchanged while the problem is used;
     *     non-finite pixels get no likelihood
     * @param psf the PSF at the data's voxel size (odd sizes, unit sum: see {@code psf.PsfChecks}); not modified
     * @param mask pixels that carry no likelihood (nonzero = untrusted), one per data voxel, or null
     * @param boundary how the edges are treated
     * @param camera offset, gain and read noise (its full scale is not used)
     * @param backgroundAdu background above the offset in ADU (light that is not the object), 0 or more
     * @param workers the threads (not closed here)
     */
    public DeconvolutionProblem(Volume data, Volume psf, byte[] mask, Boundary boundary, Camera camera,
            double backgroundAdu, Workers workers) {
        this(data, psf, mask, boundary, camera, backgroundAdu, workers, FftEngines.standard(), Float.NaN, null, null, 0, 0);
    }

    /**
     * As above, with the FFT engine of the blur.
     *
     * @param fft the FFT engine (a run's choice: {@code op.RunContext#fft()})
     */
    public DeconvolutionProblem(Volume data, Volume psf, byte[] mask, Boundary boundary, Camera camera,
            double backgroundAdu, Workers workers, FftEngine fft) {
        this(data, psf, mask, boundary, camera, backgroundAdu, workers, fft, Float.NaN, null, null, 0, 0);
    }

    /**
     * A trial problem for cross-validation: as the constructor, but a random share of the trusted pixels carries
     * no likelihood and is kept apart, so that {@link #heldOutFit} can tell how well an estimate predicts data it
     * was not fitted to.
     *
     * @param fft the FFT engine of the blur
     * @param share share of the trusted pixels held out, in (0, 0.5]
     * @param seed which pixels are held out (the same seed gives the same pixels)
     */
    public static DeconvolutionProblem withHeldOut(Volume data, Volume psf, byte[] mask, Boundary boundary,
            Camera camera, double backgroundAdu, Workers workers, FftEngine fft, double share, long seed) {
        if (!(share > 0 && share <= 0.5)) {
            throw new IllegalArgumentException("held-out share = " + share + " is not allowed; give a value in (0, 0.5]");
        }
        return new DeconvolutionProblem(data, psf, mask, boundary, camera, backgroundAdu, workers, fft, Float.NaN, null,
                null, share, seed);
    }

    /**
     * A problem whose blur changes with depth ({@link DepthVariantBlur}): only solvers that use {@link #forward()}
     * (Richardson-Lucy, plain and accelerated) can solve it.
     *
     * @param psfs the PSFs of the strata at the data's voxel size, all of one odd size, unit sum; not modified
     * @param planes the data plane where each PSF holds, increasing
     * @param fft the FFT engine
     * @see #DeconvolutionProblem(Volume, Volume, byte[], Boundary, Camera, double, Workers)
     */
    public static DeconvolutionProblem depthVariant(Volume data, java.util.List<Volume> psfs, double[] planes,
            byte[] mask, Boundary boundary, Camera camera, double backgroundAdu, Workers workers, FftEngine fft) {
        return new DeconvolutionProblem(data, psfs.get(0), mask, boundary, camera, backgroundAdu, workers, fft,
                Float.NaN, psfs, planes, 0, 0);
    }

    /**
     * As above, with the start value of the iterations fixed by the caller: a block of a larger volume starts from
     * the value of the whole volume, so that neighbouring blocks agree.
     *
     * @param start start value in photo-electrons wherever the object is not held at zero, or NaN for the mean of
     *     (y - b) over this problem's trusted pixels ({@link #initialEstimate})
     */
    public DeconvolutionProblem(Volume data, Volume psf, byte[] mask, Boundary boundary, Camera camera,
            double backgroundAdu, Workers workers, FftEngine fft, float start) {
        this(data, psf, mask, boundary, camera, backgroundAdu, workers, fft, start, null, null, 0, 0);
    }

    private DeconvolutionProblem(Volume data, Volume psf, byte[] mask, Boundary boundary, Camera camera,
            double backgroundAdu, Workers workers, FftEngine fft, float start, java.util.List<Volume> strata,
            double[] planes, double heldShare, long heldSeed) {
        this(data, psf, mask, boundary, camera, backgroundAdu, workers, fft, start, strata, planes, heldShare, heldSeed,
                null);
    }

    /**
     * An extended-boundary problem on a grid of a given size instead of image + PSF - 1 rounded up to a fast size:
     * for measuring how much padding a result needs (a grid smaller than that wraps the PSF's faint outer part
     * around). Not used by runs.
     *
     * @param grid nx, ny, nz: each at least the image's size along that axis
     * @see #DeconvolutionProblem(Volume, Volume, byte[], Boundary, Camera, double, Workers, FftEngine)
     */
    public static DeconvolutionProblem onGrid(Volume data, Volume psf, Camera camera, double backgroundAdu,
            Workers workers, FftEngine fft, int[] grid) {
        if (grid[0] < data.width() || grid[1] < data.height() || grid[2] < data.depth()) {
            throw new IllegalArgumentException("grid " + grid[0] + "x" + grid[1] + "x" + grid[2]
                    + " is smaller than the image " + data.shape() + "; give at least the image size");
        }
        return new DeconvolutionProblem(data, psf, null, Boundary.EXTENDED, camera, backgroundAdu, workers, fft,
                Float.NaN, null, null, 0, 0, grid.clone());
    }

    private DeconvolutionProblem(Volume data, Volume psf, byte[] mask, Boundary boundary, Camera camera,
            double backgroundAdu, Workers workers, FftEngine fft, float start, java.util.List<Volume> strata,
            double[] planes, double heldShare, long heldSeed, int[] grid) {
        if (!(backgroundAdu >= 0) || !Double.isFinite(backgroundAdu)) {
            throw new IllegalArgumentException("background = " + backgroundAdu + " is not allowed; give 0 or more ADU above the offset");
        }
        if (mask != null && mask.length != data.size()) {
            throw new IllegalArgumentException("mask has " + mask.length + " pixels but the image " + data.shape()
                    + " has " + data.size() + "; give a mask of the same size");
        }
        this.w = data.width();
        this.h = data.height();
        this.d = data.depth();
        this.voxel = data.voxel();
        this.boundary = boundary;
        this.camera = camera;
        this.backgroundAdu = backgroundAdu;
        this.workers = workers;
        if (boundary == Boundary.PERIODIC) {
            nx = w;
            ny = h;
            nz = d;
        } else if (grid != null) {
            nx = grid[0];
            ny = grid[1];
            nz = grid[2];
        } else {
            nx = Convolution.paddedSize(w, psf.width());
            ny = Convolution.paddedSize(h, psf.height());
            nz = Convolution.paddedSize(d, psf.depth());
        }
        Volume.checkSize(nx, ny, nz);
        int n = nx * ny * nz;
        if (strata == null) {
            this.blur = new BlurOperator(psf, nx, ny, nz, workers, fft);
            this.forward = blur;
        } else {
            this.blur = null;
            this.forward = new DepthVariantBlur(strata, planes, d, nx, ny, nz, workers, fft);
        }
        int pixels = w * h * d;
        double s = camera.readNoiseShift();
        this.adu = data.data();
        this.offset = camera.offset();
        this.gain = camera.gain();
        this.shift = s;
        this.background = (float) (backgroundAdu / camera.gain() + s);
        long[] bits = new long[(pixels + 63) / 64];
        boolean any = false;
        int count = 0;
        java.util.SplittableRandom pick = new java.util.SplittableRandom(heldSeed);
        int[] hi = new int[heldShare > 0 ? pixels : 0];
        int held = 0;
        float brightest = 0;
        // the sum behind the default start value ({@link #initialEstimate}), in the order of the pixels
        double aboveBackground = 0;
        for (int i = 0; i < pixels; i++) {
            float v = adu[i];
            if ((mask != null && mask[i] != 0) || !Float.isFinite(v)) {
                bits[i >>> 6] |= 1L << i;
                any = true;
                continue;
            }
            if (heldShare > 0 && pick.nextDouble() < heldShare) {
                hi[held++] = i;
                bits[i >>> 6] |= 1L << i;
                any = true;
                continue;
            }
            float e = toElectrons(v);
            brightest = Math.max(brightest, e);
            aboveBackground += e - background;
            count++;
        }
        this.noData = any ? bits : null;
        this.heldIndex = java.util.Arrays.copyOf(hi, held);
        if (count == 0) {
            throw new IllegalArgumentException("mask covers every pixel of the image " + data.shape()
                    + ": nothing is left to deconvolve");
        }
        this.trusted = count;
        float begin = Float.isNaN(start) ? (float) Math.max(aboveBackground / count, 1e-3) : start;
        this.modelFloor = Math.max(TINY, MODEL_FLOOR_RELATIVE * (brightest + background));
        if (boundary == Boundary.ZERO_SAME) {
            this.norm = new float[n];
            for (int i = 0; i < n; i++) {
                norm[i] = inWindow(i) ? 1f : 0f;
            }
            this.start = begin;
        } else {
            // H^T w computed in the operator's work grid (the FFT engine's own buffer for a blur, which the solver
            // uses afterwards), then copied out
            OperatorWork t = OperatorWork.of(forward, nx, ny, nz);
            WorkGrid g = t.grid();
            g.claim();
            workers.forRange(nz * ny, (from, to) -> g.update(from * nx, to * nx, (a, at, index, length) -> {
                int r = index / nx;
                int x0 = index - r * nx;
                boolean inside = r / ny < d && r % ny < h;
                int wrow = ((r / ny) * h + r % ny) * w;
                for (int j = 0; j < length; j++) {
                    int x = x0 + j;
                    a[at + j] = inside && x < w && trusted(wrow + x) ? 1f : 0f;
                }
            }));
            t.applyAdjoint();
            float[] hw = new float[n];
            workers.forRange(nz * ny, (from, to) -> g.store(hw, from * nx, to * nx));
            this.norm = hw;
            float max = 0;
            for (float v : norm) {
                max = Math.max(max, v);
            }
            float cut = (float) (SUPPORT_CUTOFF * max);
            for (int i = 0; i < n; i++) {
                if (norm[i] < cut) {
                    norm[i] = 0;
                }
            }
            this.start = begin;
        }
    }

    /**
     * The compatibility problem: object only on the data grid and zero outside, zero-padded "same" convolution,
     * no normalisation (H^T 1 taken as 1), no background, start value 0.5 everywhere.
     */
    public static DeconvolutionProblem compatible(Volume data, Volume psf, Workers workers) {
        return new DeconvolutionProblem(data, psf, null, Boundary.ZERO_SAME, Camera.photonCounting(), 0, workers,
                FftEngines.standard(), 0.5f, null, null, 0, 0);
    }

    private boolean inWindow(int i) {
        int x = i % nx;
        int r = i / nx;
        return x < w && r % ny < h && r / ny < d;
    }

    /** @return number of voxels of the object grid */
    public int gridLength() {
        return norm.length;
    }

    public int gridWidth() {
        return nx;
    }

    public int gridHeight() {
        return ny;
    }

    public int gridDepth() {
        return nz;
    }

    /** @return the image width (data window) */
    public int imageWidth() {
        return w;
    }

    /** @return the image height */
    public int imageHeight() {
        return h;
    }

    /** @return the image depth */
    public int imageDepth() {
        return d;
    }

    public VoxelSize voxel() {
        return voxel;
    }

    public Boundary boundary() {
        return boundary;
    }

    public Camera camera() {
        return camera;
    }

    /** @return the background above the offset in ADU, as given */
    public double backgroundAdu() {
        return backgroundAdu;
    }

    public Workers workers() {
        return workers;
    }

    /**
     * @return the blur H on the object grid
     * @throws IllegalStateException for a depth-variant problem (use {@link #forward()})
     */
    public BlurOperator blur() {
        if (blur == null) {
            throw new IllegalStateException("this solver needs one PSF; a depth-variant blur works with richardson-lucy only");
        }
        return blur;
    }

    /** @return the name of the FFT engine of the forward operator, for run records */
    public String fftEngine() {
        return blur != null ? blur.fftEngine() : ((DepthVariantBlur) forward).fftEngine();
    }

    /** @return how the FFT engine planned its transforms, for run records */
    public String fftPlanning() {
        return blur != null ? blur.fftPlanning() : ((DepthVariantBlur) forward).fftPlanning();
    }

    /** @return the forward operator H on the object grid: the blur, or the depth-variant blur */
    public LinearOperator forward() {
        return forward;
    }

    /** @return number of pixels that carry likelihood */
    public int trustedPixels() {
        return trusted;
    }

    /**
     * @return the smallest value the model H x + b takes in the ratio and the fit (photo-electrons): 1e-6 of the
     *     brightest datum, so that FFT rounding noise in H x cannot give unbounded ratios
     */
    public double modelFloor() {
        return modelFloor;
    }

    /** @return the background b in photo-electrons (including the read-noise shift) */
    public float background() {
        return background;
    }

    /**
     * @return a new array with the data on the image window (w x h x d, x fastest) in photo-electrons, -1 where a
     *     pixel carries no likelihood
     */
    public float[] dataWindow() {
        float[] out = new float[w * h * d];
        for (int i = 0; i < out.length; i++) {
            out[i] = datum(i);
        }
        return out;
    }

    /** The camera value of a trusted pixel in photo-electrons (shifted-Poisson units), clamped at 0. */
    private float toElectrons(float v) {
        return (float) Math.max(0, (v - offset) / gain + shift);
    }

    /** @return whether pixel i of the image window carries likelihood */
    private boolean trusted(int i) {
        return noData == null || (noData[i >>> 6] & (1L << i)) == 0;
    }

    /** @return the datum of pixel i of the image window in photo-electrons, or -1 where it carries no likelihood */
    private float datum(int i) {
        return trusted(i) ? toElectrons(adu[i]) : NO_DATA;
    }

    /**
     * @return a new grid-sized array with the data in the image window and -1 (no likelihood) elsewhere, for
     *     solvers that loop over the grid
     */
    public float[] dataOnGrid() {
        float[] g = new float[gridLength()];
        java.util.Arrays.fill(g, NO_DATA);
        for (int z = 0; z < d; z++) {
            for (int yy = 0; yy < h; yy++) {
                int row = (z * ny + yy) * nx;
                int wrow = (z * h + yy) * w;
                for (int x = 0; x < w; x++) {
                    g[row + x] = datum(wrow + x);
                }
            }
        }
        return g;
    }

    /** @return H^T w on the grid, 0 where the object is held at zero; do not modify */
    public float[] normalisation() {
        return norm;
    }

    /** @return weight of the z differences in total variation: voxel width / voxel depth (anisotropy) */
    public double zWeight() {
        return voxel.x() / voxel.z();
    }

    /**
     * Writes the start estimate: 0.5 in compatibility mode, else the mean of (y - b) over trusted pixels
     * (at least 1e-3 photo-electrons) wherever the object is not held at zero.
     *
     * @param x grid-sized, overwritten
     */
    public void initialEstimate(float[] x) {
        float v = start;
        workers.forRange(x.length, (from, to) -> {
            for (int i = from; i < to; i++) {
                x[i] = norm[i] > 0 ? v : 0f;
            }
        });
    }

    /**
     * The Richardson-Lucy ratio, fused with the data fit: on entry mu holds H x; on exit it holds
     * w y / (H x + b) (0 where a pixel carries no likelihood).
     *
     * @param mu grid-sized, modified
     * @return sum over trusted pixels of the Kullback-Leibler divergence y ln(y / m) - y + m with m = H x + b
     */
    public double ratioAndFit(float[] mu) {
        return pass(WorkGrid.of(mu, nx, ny, nz, nx), true);
    }

    /**
     * {@link #ratioAndFit(float[])} on a work grid (H x where the transforms left it, see {@link OperatorWork}).
     *
     * @param mu the grid, modified
     */
    public double ratioAndFit(WorkGrid mu) {
        return pass(mu, true);
    }

    /** @return the operator H with a work grid for its products ({@link OperatorWork}) */
    public OperatorWork forwardWork() {
        return OperatorWork.of(forward, nx, ny, nz);
    }

    /**
     * @param mu H x on the grid, not modified
     * @return the sum over trusted pixels of the Kullback-Leibler divergence of y from H x + b
     */
    public double fit(float[] mu) {
        return pass(WorkGrid.of(mu, nx, ny, nz, nx), false);
    }

    /**
     * One parallel pass over the grid rows; rows and columns outside the image window carry no likelihood. The sum
     * runs through the pieces of a block in index order, one running total per block (deterministic). The logarithm
     * is {@link FastLog}: {@link Math#log} made most of this pass's time (one call per pixel per iteration); its
     * argument y / m is positive here (y &gt; 0, m at least the model floor).
     */
    private double pass(WorkGrid mu, boolean ratio) {
        final float b = background;
        final double floor = modelFloor;
        return workers.sum(nz * ny, (from, to) -> {
            double[] total = new double[1];
            WorkGrid.Piece piece = (a, at, index, count) -> {
                int r = index / nx;
                int x0 = index - r * nx;
                int z = r / ny;
                int yy = r % ny;
                int g = at - x0; // where x = 0 of this row sits in a
                if (z >= d || yy >= h) {
                    if (ratio) {
                        java.util.Arrays.fill(a, at, at + count, 0f);
                    }
                    return;
                }
                int wrow = (z * h + yy) * w;
                int x1 = x0 + count;
                int xw = Math.min(x1, w);
                double kl = total[0];
                // the casts of the formula y ln(y / m) - y + m, with y = (float) electrons, are done by
                // BitConversions: the same values, but compiled without a wait on the previous pixel (its Javadoc)
                for (int x = x0; x < xw; x++) {
                    int i = wrow + x;
                    if (!trusted(i)) {
                        if (ratio) {
                            a[g + x] = 0f;
                        }
                        continue;
                    }
                    double yi = BitConversions.roundToFloat(
                            Math.max(0, (BitConversions.widen(adu[i]) - offset) / gain + shift));
                    double m = Math.max(BitConversions.widen(a[g + x] + b), floor);
                    double q = yi / m;
                    if (ratio) {
                        a[g + x] = BitConversions.narrow(q);
                    }
                    kl += yi > 0 ? yi * FastLog.log(q) - yi + m : m;
                }
                total[0] = kl;
                if (ratio && x1 > w) {
                    java.util.Arrays.fill(a, g + Math.max(w, x0), g + x1, 0f);
                }
            };
            if (ratio) {
                mu.update(from * nx, to * nx, piece);
            } else {
                mu.read(from * nx, to * nx, piece);
            }
            return total[0];
        });
    }

    /** @return number of held-out pixels (0 unless made by {@link #withHeldOut}) */
    public int heldOutPixels() {
        return heldIndex.length;
    }

    /**
     * How well a model predicts the held-out pixels: the mean Kullback-Leibler divergence of their data from
     * H x + b. Call it before {@link #ratioAndFit} overwrites mu.
     *
     * @param mu H x on the grid, not modified
     * @return mean divergence per held-out pixel, NaN when the problem has none
     */
    public double heldOutFit(float[] mu) {
        return heldOutFit(WorkGrid.of(mu, nx, ny, nz, nx));
    }

    /**
     * {@link #heldOutFit(float[])} on a work grid.
     *
     * @param mu H x, not modified
     */
    public double heldOutFit(WorkGrid mu) {
        int n = heldIndex.length;
        if (n == 0) {
            return Double.NaN;
        }
        final float b = background;
        double sum = workers.sum(n, (from, to) -> {
            double kl = 0;
            for (int k = from; k < to; k++) {
                int i = heldIndex[k];
                int x = i % w;
                int r = i / w;
                int g = ((r / h) * ny + r % h) * nx + x;
                float yi = toElectrons(adu[i]);
                double m = Math.max(mu.get(g) + b, TINY);
                kl += yi > 0 ? yi * FastLog.log(yi / m) - yi + m : m;
            }
            return kl;
        });
        return sum / n;
    }

    /**
     * The data fit of an estimate, per trusted pixel (costs one blur).
     *
     * @param x grid-sized estimate, not modified
     * @param work grid-sized, overwritten
     * @return mean Kullback-Leibler divergence per trusted pixel
     */
    public double meanFit(float[] x, float[] work) {
        forward.apply(x, work);
        return fit(work) / trusted;
    }

    /**
     * The expected mean data fit when the model equals the truth: 1/2 per pixel for Poisson data with counts
     * well above 1 (2 KL is asymptotically chi-square with one degree of freedom per pixel; Bertero, Boccacci,
     * Talenti, Zanella &amp; Zanni, "A discrepancy principle for Poisson data", Inverse Problems 26, 2010).
     */
    public double expectedFit() {
        return new PoissonNoise().expectedDeviance();
    }

    /**
     * What an estimate predicts for the data, on the image window, in ADU above the camera offset: gain (H x) +
     * background, with H x from the whole (extended) grid, so the prediction at the border holds the light of the
     * object beyond the field as the solver modelled it: no padding guess. In the problem's own units the
     * prediction is H x + b, and its shifted-Poisson variance H x + b equals the camera variance
     * (gain (H x) + background) gain + read noise^2 of {@link Camera#variance} divided by gain^2, so the residual
     * view normalises these ADU values by the camera's Poisson-Gaussian variance. Costs one blur.
     *
     * @param x grid-sized estimate, not modified
     * @return a new image-sized volume
     */
    public Volume predictedAboveOffset(float[] x) {
        float[] work = new float[x.length];
        forward.apply(x, work);
        Volume m = toVolume(work);
        float[] d = m.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (d[i] + backgroundAdu);
        }
        return m;
    }

    /**
     * The fit of an estimate, as a stop rule or the run record reads it: the estimate clipped at zero, blurred once.
     *
     * @param x grid-sized estimate, not modified
     * @return {mean data fit per trusted pixel, what noise alone leaves in it ({@link #expectedFit(float[])})}
     */
    public double[] fitOfEstimate(float[] x) {
        // blurred in the operator's work grid (no grid-sized arrays of its own); a solver that left its iterate there
        // sees the claim and loads it again
        OperatorWork hw = forwardWork();
        WorkGrid g = hw.grid();
        g.claim();
        workers.forRange(x.length, (from, to) -> g.update(from, to, (a, at, index, count) -> {
            for (int j = 0; j < count; j++) {
                a[at + j] = Math.max(x[index + j], 0f);
            }
        }));
        hw.apply();
        return new double[] {pass(g, false) / trustedPixels(), expectedFit(g)};
    }

    /**
     * What noise alone leaves in the data fit under a given model: the mean over trusted pixels of the expected
     * divergence of a Poisson count of mean H x + b ({@link PoissonDeviance}); 1/2 for bright data, more for dim data.
     *
     * @param mu H x on the grid, not modified
     */
    public double expectedFit(float[] mu) {
        return expectedFit(WorkGrid.of(mu, nx, ny, nz, nx));
    }

    /** {@link #expectedFit(float[])} on a work grid; one running total per block, rows in order. */
    private double expectedFit(WorkGrid mu) {
        final float b = background;
        double sum = workers.sum(d * h, (from, to) -> {
            double[] total = new double[1];
            for (int r = from; r < to; r++) {
                int g = ((r / h) * ny + r % h) * nx;
                int wrow = r * w;
                mu.read(g, g + w, (a, at, index, count) -> {
                    int x0 = index - g;
                    double e = total[0];
                    for (int j = 0; j < count; j++) {
                        if (trusted(wrow + x0 + j)) {
                            e += PoissonDeviance.expected(a[at + j] + b);
                        }
                    }
                    total[0] = e;
                });
            }
            return total[0];
        });
        return sum / trusted;
    }

    /** @return the estimate on the data grid, in ADU above the offset (x * gain), as a new volume */
    public Volume toVolume(float[] x) {
        Volume out = Volume.zeros(w, h, d, voxel);
        float[] o = out.data();
        float g = (float) camera.gain();
        for (int z = 0; z < d; z++) {
            for (int yy = 0; yy < h; yy++) {
                int row = (z * ny + yy) * nx;
                int orow = (z * h + yy) * w;
                for (int i = 0; i < w; i++) {
                    o[orow + i] = x[row + i] * g;
                }
            }
        }
        return out;
    }
}
