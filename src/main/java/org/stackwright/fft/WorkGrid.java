package org.stackwright.fft;

import java.util.concurrent.ConcurrentLinkedDeque;

/**
 * One grid held in a work space between transforms: nx x ny x nz voxels, voxel index x + nx (y + ny z), rows stored
 * {@link #stride()} floats apart (for an FFT engine's own work space the in-place real-to-complex layout,
 * 2 (nx/2+1)). Solvers run their element-wise passes here, between the filterings of {@link RealTransform#filterWork},
 * so the grid never needs a copy in a Java array of its own: on the native engine the passes read and write FFTW's
 * buffer in small blocks; on the Java engine and for plain arrays they work in the array itself.
 *
 * <p>A pass hands the body the voxels of an index range in {@link Piece}s, each within one row and in index order,
 * the same pieces on every implementation with the same row length; ranges given to different threads must not
 * overlap. Sums over pieces in a fixed order stay deterministic (see {@code solve.Sums}).
 *
 * <p>{@link #generation()} tells a solver whether the grid still holds what it left there: the transform counts up
 * whenever it uses the space for something else (a one-off {@link RealTransform#filter}, forward or inverse), and
 * another user of the grid {@link #claim}s it before filling it.
 */
public abstract class WorkGrid {

    /** A piece of a row: voxels index, ..., index + count - 1 at a[at], ..., a[at + count - 1]. */
    @FunctionalInterface
    public interface Piece {
        void run(float[] a, int at, int index, int count);
    }

    private final int nx;
    private final int ny;
    private final int nz;
    private final int stride;
    private long generation;

    protected WorkGrid(int nx, int ny, int nz, int stride) {
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.stride = stride;
    }

    /**
     * A grid in a Java array.
     *
     * @param a the array, at least stride (ny nz - 1) + nx floats; used, not copied
     * @param stride floats from one row's start to the next, at least nx
     */
    public static WorkGrid of(float[] a, int nx, int ny, int nz, int stride) {
        return new ArrayGrid(a, nx, ny, nz, stride);
    }

    public final int nx() {
        return nx;
    }

    public final int ny() {
        return ny;
    }

    public final int nz() {
        return nz;
    }

    /** @return number of voxels, nx ny nz */
    public final int length() {
        return nx * ny * nz;
    }

    /** @return floats from one row's start to the next */
    public final int stride() {
        return stride;
    }

    /** @return a count that changes whenever the space was used for something other than this grid */
    public final synchronized long generation() {
        return generation;
    }

    /**
     * Announces a new user of the grid, who is about to fill it: counts up {@link #generation()}, so that a solver
     * that left its iterate here loads it again.
     */
    public final void claim() {
        disturb();
    }

    /** Called by the owner when it uses the space for something else: the grid's values are gone. */
    protected final synchronized void disturb() {
        generation++;
    }

    /** @return where voxel i sits in the storage */
    protected final int at(int i) {
        return (i / nx) * stride + i % nx;
    }

    /** Runs body over voxels [from, to) for reading; values the body writes are not kept. */
    public abstract void read(int from, int to, Piece body);

    /** Runs body over voxels [from, to); values the body writes are kept. */
    public abstract void update(int from, int to, Piece body);

    /** @return the value of voxel i (for scattered reads) */
    public abstract float get(int i);

    /**
     * Copies a grid in (first nx ny nz floats of the array, x fastest), on the calling thread.
     *
     * @param from voxel range start
     * @param to voxel range end (exclusive)
     */
    public final void load(float[] grid, int from, int to) {
        update(from, to, (a, at, index, count) -> System.arraycopy(grid, index, a, at, count));
    }

    /** Copies voxels [from, to) out into the same indices of grid, on the calling thread. */
    public final void store(float[] grid, int from, int to) {
        read(from, to, (a, at, index, count) -> System.arraycopy(a, at, grid, index, count));
    }

    /** Calls body once per row piece of [from, to) with positions in a storage laid out from voxel 0 at float base. */
    protected final void pieces(float[] a, int base, int from, int to, Piece body) {
        int i = from;
        while (i < to) {
            int end = Math.min(to, (i / nx + 1) * nx);
            body.run(a, at(i) - base, i, end - i);
            i = end;
        }
    }

    /** A grid in a Java array: the passes work in the array itself. */
    private static final class ArrayGrid extends WorkGrid {
        private final float[] a;

        ArrayGrid(float[] a, int nx, int ny, int nz, int stride) {
            super(nx, ny, nz, stride);
            if (stride < nx || a.length < (long) stride * ((long) ny * nz - 1) + nx) {
                throw new IllegalArgumentException("work array of " + a.length + " floats does not hold a " + nx + "x"
                        + ny + "x" + nz + " grid with rows " + stride + " floats apart");
            }
            this.a = a;
        }

        @Override
        public void read(int from, int to, Piece body) {
            pieces(a, 0, from, to, body);
        }

        @Override
        public void update(int from, int to, Piece body) {
            pieces(a, 0, from, to, body);
        }

        @Override
        public float get(int i) {
            return a[at(i)];
        }
    }

    /**
     * Small Java arrays for implementations that copy blocks of their storage in and out: one per thread at a time,
     * kept for reuse.
     */
    protected static final class Blocks {
        private final int size;
        private final ConcurrentLinkedDeque<float[]> free = new ConcurrentLinkedDeque<>();

        /** @param size floats per block */
        public Blocks(int size) {
            this.size = size;
        }

        public int size() {
            return size;
        }

        public float[] take() {
            float[] b = free.poll();
            return b != null ? b : new float[size];
        }

        public void give(float[] b) {
            free.push(b);
        }
    }
}
