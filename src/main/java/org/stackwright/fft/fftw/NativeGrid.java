package org.stackwright.fft.fftw;

import java.lang.ref.Reference;
import java.nio.FloatBuffer;

import org.bytedeco.javacpp.FloatPointer;
import org.stackwright.fft.WorkGrid;

/**
 * The grid in FFTW's native buffer (rows 2 (nx/2+1) floats apart, the in-place layout): a pass copies the rows of its
 * range in blocks of about {@link #BLOCK_FLOATS} floats into a small Java array (which stays in the processor's
 * cache), runs the body there and, for {@link #update}, copies the block back. Only the floats of the range itself
 * are copied (the padding between two rows of the range too), so threads with neighbouring ranges never write over
 * each other.
 */
final class NativeGrid extends WorkGrid {

    /** Floats per block: 64 KiB, within the second-level cache with the solver's arrays streaming past. */
    static final int BLOCK_FLOATS = 16384;

    private final FloatPointer buffer;
    private final FloatBuffer view;
    private final Blocks blocks;

    NativeGrid(FloatPointer buffer, FloatBuffer view, int nx, int ny, int nz, int stride) {
        super(nx, ny, nz, stride);
        this.buffer = buffer;
        this.view = view;
        this.blocks = new Blocks(Math.max(BLOCK_FLOATS, stride));
    }

    /** The transform used the buffer for something else. */
    void lost() {
        disturb();
    }

    @Override
    public void read(int from, int to, Piece body) {
        pass(from, to, body, false);
    }

    @Override
    public void update(int from, int to, Piece body) {
        pass(from, to, body, true);
    }

    @Override
    public float get(int i) {
        try {
            return view.get(at(i));
        } finally {
            Reference.reachabilityFence(buffer);
        }
    }

    private void pass(int from, int to, Piece body, boolean write) {
        if (from >= to) {
            return;
        }
        int nx = nx();
        int stride = stride();
        float[] b = blocks.take();
        try {
            int i = from;
            while (i < to) {
                // the block: from voxel i to the end of as many whole rows as fit (at least the rest of i's row)
                int start = at(i);
                int row = i / nx;
                int rows = (b.length - nx + (start - row * stride)) / stride + 1;
                int end = Math.min(to, (row + rows) * nx);
                int length = at(end - 1) + 1 - start;
                view.get(start, b, 0, length);
                pieces(b, start, i, end, body);
                if (write) {
                    view.put(start, b, 0, length);
                }
                i = end;
            }
        } finally {
            blocks.give(b);
            Reference.reachabilityFence(buffer);
        }
    }
}
