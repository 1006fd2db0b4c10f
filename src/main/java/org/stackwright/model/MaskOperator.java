package org.stackwright.model;

/**
 * Multiplication by fixed weights (1 = trusted data pixel, 0 = no likelihood: outside the data or masked as
 * dead, saturated or seam). A diagonal operator, so it is its own adjoint.
 */
public final class MaskOperator implements LinearOperator {

    private final float[] weights;

    /** @param weights one weight per pixel; kept (not copied), not modified */
    public MaskOperator(float[] weights) {
        this.weights = weights;
    }

    @Override
    public int domainLength() {
        return weights.length;
    }

    @Override
    public int rangeLength() {
        return weights.length;
    }

    @Override
    public void apply(float[] in, float[] out) {
        for (int i = 0; i < weights.length; i++) {
            out[i] = in[i] * weights[i];
        }
    }

    @Override
    public void applyAdjoint(float[] in, float[] out) {
        apply(in, out);
    }
}
