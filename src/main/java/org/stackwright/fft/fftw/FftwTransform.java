package org.stackwright.fft.fftw;

import static org.bytedeco.fftw.global.fftw3.fftwf_execute_dft_c2r;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute_dft_r2c;

import java.lang.ref.Reference;
import java.nio.FloatBuffer;

import org.bytedeco.javacpp.FloatPointer;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.RealTransform;
import org.stackwright.fft.SpectrumProduct;
import org.stackwright.fft.WorkGrid;
import org.stackwright.parallel.Workers;

/**
 * One grid size on FFTW: a spectrum-sized buffer in native memory, aligned to 64 bytes, in which the real-to-complex
 * and complex-to-real transforms run in place (the real rows padded to 2 (nx/2+1) floats, FFTW's in-place layout).
 * Java arrays are copied in and out row by row by the caller's threads; {@link #filter} applies the kernel product
 * to the native spectrum block by block, so the spectrum never needs a Java copy. The buffer is freed by JavaCPP when
 * this object is no longer reachable.
 *
 * <p>FFTW's inverse is unscaled: the 1/(nx ny nz) is applied in the product ({@link #filter}) or to the output rows
 * ({@link #inverse}). Not safe to call from two threads at once (one buffer).
 */
final class FftwTransform implements RealTransform {

    /** Complex values per block of the product step (32 KiB of floats: stays in the first-level cache). */
    private static final int BLOCK = 4096;

    /** FFTW's SIMD code needs the same alignment for every array a plan runs on; 64 bytes suits every ISA. */
    private static final int ALIGN_FLOATS = 16;

    private final int nx;
    private final int ny;
    private final int nz;
    private final int row;
    private final Workers workers;
    private final FloatPointer buffer;
    private final FloatBuffer view;
    private final FftwPlanner.Plans plans;
    private final float[][] blocks;
    private NativeGrid grid;

    FftwTransform(int nx, int ny, int nz, Workers workers) {
        RealTransform.checkSize(nx, ny, nz);
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.row = 2 * (nx / 2 + 1);
        this.workers = workers;
        int n = spectrumLength();
        FloatPointer raw = new FloatPointer((long) n + ALIGN_FLOATS);
        long misaligned = (raw.address() / Float.BYTES) % ALIGN_FLOATS;
        long shift = misaligned == 0 ? 0 : ALIGN_FLOATS - misaligned;
        this.buffer = raw.position(shift).limit(shift + n);
        this.view = buffer.asBuffer();
        this.plans = FftwPlanner.plans(new FftwPlanner.Grid(nx, ny, nz, workers.threads()), buffer);
        this.blocks = new float[workers.threads()][2 * BLOCK];
    }

    @Override
    public int nx() {
        return nx;
    }

    @Override
    public int ny() {
        return ny;
    }

    @Override
    public int nz() {
        return nz;
    }

    @Override
    public int workLength() {
        return realLength();
    }

    @Override
    public void forward(float[] real, float[] spectrum) {
        check(real, realLength(), "real");
        check(spectrum, spectrumLength(), "spectrum");
        lost();
        try {
            copyIn(real);
            fftwf_execute_dft_r2c(plans.forward(), buffer, buffer);
            int complex = spectrumLength() / 2;
            workers.forRange(blocks(complex), (from, to) -> {
                int start = 2 * from * BLOCK;
                int end = 2 * Math.min(to * BLOCK, complex);
                view.get(start, spectrum, start, end - start);
            });
        } finally {
            Reference.reachabilityFence(buffer);
        }
    }

    @Override
    public void inverse(float[] spectrum, float[] real) {
        check(spectrum, spectrumLength(), "spectrum");
        check(real, realLength(), "real");
        lost();
        try {
            int complex = spectrumLength() / 2;
            workers.forRange(blocks(complex), (from, to) -> {
                int start = 2 * from * BLOCK;
                int end = 2 * Math.min(to * BLOCK, complex);
                view.put(start, spectrum, start, end - start);
            });
            fftwf_execute_dft_c2r(plans.inverse(), buffer, buffer);
            copyOut(real, 1f / realLength());
        } finally {
            Reference.reachabilityFence(buffer);
        }
    }

    @Override
    public void filter(float[] in, float[] out, float[] kernel, SpectrumProduct product) {
        check(in, realLength(), "input");
        check(out, realLength(), "output");
        check(kernel, spectrumLength(), "kernel spectrum");
        lost();
        try {
            copyIn(in);
            filterInBuffer(kernel, product);
            copyOut(out, 1f);
        } finally {
            Reference.reachabilityFence(buffer);
        }
    }

    @Override
    public WorkGrid work() {
        if (grid == null) {
            grid = new NativeGrid(buffer, view, nx, ny, nz, row);
        }
        return grid;
    }

    @Override
    public void filterWork(float[] kernel, SpectrumProduct product) {
        check(kernel, spectrumLength(), "kernel spectrum");
        filterInBuffer(kernel, product);
    }

    /** The buffer's grid filtered in place: forward, product (with the inverse's 1/N), inverse; timed for planning. */
    private void filterInBuffer(float[] kernel, SpectrumProduct product) {
        long t0 = System.nanoTime();
        try {
            fftwf_execute_dft_r2c(plans.forward(), buffer, buffer);
            float scale = 1f / realLength();
            int complex = spectrumLength() / 2;
            workers.forSlots(blocks(complex), (slot, from, to) -> {
                float[] b = blocks[slot];
                for (int k = from; k < to; k++) {
                    int c0 = k * BLOCK;
                    int count = Math.min(BLOCK, complex - c0);
                    view.get(2 * c0, b, 0, 2 * count);
                    product.apply(b, 0, kernel, 2 * c0, count, scale);
                    view.put(2 * c0, b, 0, 2 * count);
                }
            });
            fftwf_execute_dft_c2r(plans.inverse(), buffer, buffer);
        } finally {
            Reference.reachabilityFence(buffer);
        }
        plans.ran(System.nanoTime() - t0);
    }

    /** The buffer is about to be used for something other than the work grid. */
    private void lost() {
        if (grid != null) {
            grid.lost();
        }
    }

    /**
     * Runs the forward and the inverse plan once on the work buffer as it is: the bare transforms, without copies
     * or product (for the benchmark's comparison with other FFTW front ends).
     */
    void roundTripInPlace() {
        lost();
        try {
            fftwf_execute_dft_r2c(plans.forward(), buffer, buffer);
            fftwf_execute_dft_c2r(plans.inverse(), buffer, buffer);
        } finally {
            Reference.reachabilityFence(buffer);
        }
    }

    private static int blocks(int complex) {
        return (complex + BLOCK - 1) / BLOCK;
    }

    /** Real rows (x fastest) into the padded rows of the native buffer. */
    private void copyIn(float[] real) {
        workers.forRange(ny * nz, (from, to) -> {
            for (int r = from; r < to; r++) {
                view.put(r * row, real, r * nx, nx);
            }
        });
    }

    /** Padded native rows out to real rows, times scale. */
    private void copyOut(float[] real, float scale) {
        workers.forRange(ny * nz, (from, to) -> {
            for (int r = from; r < to; r++) {
                int o = r * nx;
                view.get(r * row, real, o, nx);
                if (scale != 1f) {
                    for (int x = o; x < o + nx; x++) {
                        real[x] *= scale;
                    }
                }
            }
        });
    }

    private void check(float[] a, int min, String what) {
        RealTransform.checkLength(this, a, min, what);
    }

    @Override
    public String engine() {
        return FftEngines.NATIVE_NAME;
    }

    @Override
    public String planning() {
        return plans.planning();
    }
}
