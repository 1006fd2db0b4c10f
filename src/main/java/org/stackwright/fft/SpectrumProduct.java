package org.stackwright.fft;

/**
 * The element-wise step between a forward and an inverse transform: each complex spectrum value w is combined with
 * the kernel's value k. One implementation for every engine (engines hand it ranges of their spectra as float
 * arrays), so both compute the same products.
 */
public final class SpectrumProduct {

    private enum Kind { MULTIPLY, CONJUGATE, TIKHONOV }

    /** w k: convolution with the kernel */
    public static final SpectrumProduct MULTIPLY = new SpectrumProduct(Kind.MULTIPLY, 0f);

    /** w conj(k): correlation with the kernel (the adjoint of the convolution) */
    public static final SpectrumProduct CONJUGATE = new SpectrumProduct(Kind.CONJUGATE, 0f);

    private final Kind kind;
    private final float lambda;

    private SpectrumProduct(Kind kind, float lambda) {
        this.kind = kind;
        this.lambda = lambda;
    }

    /**
     * w conj(k) / (|k|^2 + lambda): a one-step Tikhonov-regularised inverse filter (a Wiener filter with a flat
     * noise-to-signal ratio).
     *
     * @param lambda regularisation, positive
     */
    public static SpectrumProduct tikhonov(double lambda) {
        return new SpectrumProduct(Kind.TIKHONOV, (float) lambda);
    }

    /**
     * Combines {@code count} complex values: w[wFrom + 2j], w[wFrom + 2j + 1] (re, im) with k[kFrom + 2j], ..., and
     * multiplies the result by {@code scale} (engines whose inverse transform is unscaled pass 1/N; others 1).
     *
     * @param w spectrum values, modified
     * @param k kernel spectrum, not modified
     */
    public void apply(float[] w, int wFrom, float[] k, int kFrom, int count, float scale) {
        int end = wFrom + 2 * count;
        switch (kind) {
            case MULTIPLY -> {
                for (int i = wFrom, j = kFrom; i < end; i += 2, j += 2) {
                    float a = w[i];
                    float b = w[i + 1];
                    float c = k[j];
                    float d = k[j + 1];
                    w[i] = (a * c - b * d) * scale;
                    w[i + 1] = (a * d + b * c) * scale;
                }
            }
            case CONJUGATE -> {
                for (int i = wFrom, j = kFrom; i < end; i += 2, j += 2) {
                    float a = w[i];
                    float b = w[i + 1];
                    float c = k[j];
                    float d = -k[j + 1];
                    w[i] = (a * c - b * d) * scale;
                    w[i + 1] = (a * d + b * c) * scale;
                }
            }
            default -> {
                for (int i = wFrom, j = kFrom; i < end; i += 2, j += 2) {
                    float a = w[i];
                    float b = w[i + 1];
                    float c = k[j];
                    float d = -k[j + 1];
                    float s = scale / (c * c + d * d + lambda);
                    w[i] = (a * c - b * d) * s;
                    w[i + 1] = (a * d + b * c) * s;
                }
            }
        }
    }
}
