package org.stackwright.model;

/**
 * A linear map between flat float arrays, given by its action and the action of its adjoint (no stored matrix).
 * The adjoint satisfies {@code <A x, y> = <x, A^T y>}; every implementation is tested that way.
 */
public interface LinearOperator {

    /** @return length of the arrays the operator acts on */
    int domainLength();

    /** @return length of the arrays it produces */
    int rangeLength();

    /**
     * out = A in.
     *
     * @param in domain array, not modified
     * @param out range array, overwritten (may be the same array as in when the lengths agree)
     */
    void apply(float[] in, float[] out);

    /**
     * out = A^T in.
     *
     * @param in range array, not modified
     * @param out domain array, overwritten (may be the same array as in when the lengths agree)
     */
    void applyAdjoint(float[] in, float[] out);

    /**
     * @return a new array to pass as the output of {@link #apply} and {@link #applyAdjoint}: at least
     *     {@link #rangeLength()} floats (an operator whose transforms can run in place in a longer array gives one)
     */
    default float[] newWorkArray() {
        return new float[Math.max(rangeLength(), domainLength())];
    }

    /** @return the operator "first this, then next": next * this */
    default LinearOperator then(LinearOperator next) {
        return new ComposedOperator(this, next);
    }
}
