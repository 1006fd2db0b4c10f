package org.stackwright.model;

/**
 * The composition second * first (first applied first); its adjoint is first^T * second^T. Holds one work array
 * of the intermediate length, so it is not safe to call from two threads at once.
 */
public final class ComposedOperator implements LinearOperator {

    private final LinearOperator first;
    private final LinearOperator second;
    private final float[] middle;

    /**
     * @throws IllegalArgumentException when the range of first is not the domain of second
     */
    public ComposedOperator(LinearOperator first, LinearOperator second) {
        if (first.rangeLength() != second.domainLength()) {
            throw new IllegalArgumentException("cannot compose operators: range length " + first.rangeLength()
                    + " differs from domain length " + second.domainLength());
        }
        this.first = first;
        this.second = second;
        this.middle = new float[first.rangeLength()];
    }

    @Override
    public int domainLength() {
        return first.domainLength();
    }

    @Override
    public int rangeLength() {
        return second.rangeLength();
    }

    @Override
    public void apply(float[] in, float[] out) {
        first.apply(in, middle);
        second.apply(middle, out);
    }

    @Override
    public void applyAdjoint(float[] in, float[] out) {
        second.applyAdjoint(in, middle);
        first.applyAdjoint(middle, out);
    }
}
