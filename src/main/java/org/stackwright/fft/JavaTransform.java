package org.stackwright.fft;

import org.stackwright.parallel.Workers;

/**
 * The pure-Java engine's {@link RealTransform}: {@link RealFft3D} (the reference implementation) plus the filter
 * step. {@link #filter} works in place when the output array can hold a spectrum: the grid's rows are moved apart
 * to the spectrum's row length, transformed forward and back in that array and moved together again, so no second
 * grid-sized buffer is needed; the values are bit-identical to the out-of-place path.
 */
final class JavaTransform implements RealTransform {

    private final RealFft3D fft;
    private final Workers workers;
    private final int rowIn;
    private final int rowOut;
    private final int rows;
    /** work spectrum for out-of-place filtering and the work grid, allocated on first use */
    private float[] work;
    private WorkGrid grid;

    JavaTransform(int nx, int ny, int nz, Workers workers) {
        this.fft = new RealFft3D(nx, ny, nz, workers);
        this.workers = workers;
        this.rowIn = nx;
        this.rowOut = 2 * (nx / 2 + 1);
        this.rows = ny * nz;
    }

    @Override
    public int nx() {
        return fft.nx();
    }

    @Override
    public int ny() {
        return fft.ny();
    }

    @Override
    public int nz() {
        return fft.nz();
    }

    @Override
    public void forward(float[] real, float[] spectrum) {
        check(real, realLength(), "real");
        check(spectrum, spectrumLength(), "spectrum");
        fft.forward(real, rowIn, spectrum);
    }

    @Override
    public void inverse(float[] spectrum, float[] real) {
        check(spectrum, spectrumLength(), "spectrum");
        check(real, realLength(), "real");
        fft.inverse(spectrum, real, rowIn);
    }

    @Override
    public int workLength() {
        return spectrumLength();
    }

    @Override
    public void filter(float[] in, float[] out, float[] kernel, SpectrumProduct product) {
        check(in, realLength(), "input");
        check(out, realLength(), "output");
        check(kernel, spectrumLength(), "kernel spectrum");
        float[] w;
        if (out.length >= spectrumLength()) {
            if (in != out) {
                System.arraycopy(in, 0, out, 0, realLength());
            }
            spreadRows(out);
            fft.forwardInPlace(out);
            w = out;
        } else {
            workSpace();
            if (grid != null) {
                grid.disturb();
            }
            fft.forward(in, rowIn, work);
            w = work;
        }
        multiply(w, kernel, product);
        if (w == out) {
            fft.inverseInPlace(out);
            joinRows(out);
        } else {
            fft.inverse(work, out, rowIn);
        }
    }

    @Override
    public WorkGrid work() {
        if (grid == null) {
            grid = WorkGrid.of(workSpace(), nx(), ny(), nz(), rowOut);
        }
        return grid;
    }

    @Override
    public void filterWork(float[] kernel, SpectrumProduct product) {
        check(kernel, spectrumLength(), "kernel spectrum");
        float[] w = workSpace();
        fft.forwardInPlace(w);
        multiply(w, kernel, product);
        fft.inverseInPlace(w);
    }

    private float[] workSpace() {
        if (work == null) {
            work = fft.newSpectrum();
        }
        return work;
    }

    private void multiply(float[] w, float[] kernel, SpectrumProduct product) {
        workers.forRange(spectrumLength() / 2, (from, to) -> product.apply(w, 2 * from, kernel, 2 * from, to - from, 1f));
    }

    /** Moves row r from float r nx to float r (2 (nx/2+1)); last row first, so no row overwrites an unmoved one. */
    private void spreadRows(float[] a) {
        for (int r = rows - 1; r > 0; r--) {
            System.arraycopy(a, r * rowIn, a, r * rowOut, rowIn);
        }
    }

    /** The inverse of {@link #spreadRows}; first row first. */
    private void joinRows(float[] a) {
        for (int r = 1; r < rows; r++) {
            System.arraycopy(a, r * rowOut, a, r * rowIn, rowIn);
        }
    }

    private void check(float[] a, int min, String what) {
        RealTransform.checkLength(this, a, min, what);
    }

    @Override
    public String engine() {
        return FftEngines.JAVA_NAME;
    }

    @Override
    public String planning() {
        return "fixed";
    }
}
