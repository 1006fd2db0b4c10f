package org.stackwright.model;

import org.stackwright.fft.WorkGrid;

/**
 * A forward operator H and its adjoint applied to one grid held in a work space ({@link WorkGrid}), so that a solver's
 * element-wise passes between H and H^T run where the transforms leave their result: for a blur, the FFT engine's
 * own buffer (FFTW's native memory or the Java engine's in-place array), with no copy to and from a Java array; for
 * any other operator, a Java array of its own ({@link LinearOperator#newWorkArray()}) on which it runs in place.
 */
public final class OperatorWork {

    private final WorkGrid grid;
    private final BlurOperator blur;
    private final LinearOperator op;
    private final float[] array;

    private OperatorWork(WorkGrid grid, BlurOperator blur, LinearOperator op, float[] array) {
        this.grid = grid;
        this.blur = blur;
        this.op = op;
        this.array = array;
    }

    /**
     * @param op the operator on an nx x ny x nz grid (domain and range)
     * @return the operator with its work grid: the blur's own, or a new array for another operator
     */
    public static OperatorWork of(LinearOperator op, int nx, int ny, int nz) {
        if (op instanceof BlurOperator b) {
            return new OperatorWork(b.work(), b, op, null);
        }
        float[] a = op.newWorkArray();
        return new OperatorWork(WorkGrid.of(a, nx, ny, nz, nx), null, op, a);
    }

    /** @return the grid H and H^T act on */
    public WorkGrid grid() {
        return grid;
    }

    /** grid = H grid */
    public void apply() {
        if (blur != null) {
            blur.applyInWork();
        } else {
            op.apply(array, array);
        }
    }

    /** grid = H^T grid */
    public void applyAdjoint() {
        if (blur != null) {
            blur.applyAdjointInWork();
        } else {
            op.applyAdjoint(array, array);
        }
    }
}
