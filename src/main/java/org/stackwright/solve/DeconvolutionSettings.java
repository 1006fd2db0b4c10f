package org.stackwright.solve;

import java.util.List;

/**
 * The settings of one deconvolution, validated, defaults in one place. NaN stands for a value the run finds itself
 * ("auto"); {@link AutomaticSettings#resolve} turns such settings into concrete ones before a solver runs.
 *
 * @param method richardson-lucy, richardson-lucy-tv, total-variation or wiener
 * @param stopping stopping rule, maximum iterations and tolerance
 * @param offset camera offset, ADU, or NaN when not given (from dark frames or the image)
 * @param background background above the offset in ADU, or NaN to estimate it ("auto")
 * @param gain ADU per photo-electron, or NaN to estimate it ("auto")
 * @param readNoise read noise, ADU, or NaN to estimate it ("auto")
 * @param regularization lambda, or NaN to choose it from the data ("auto"; a solver built from unresolved settings
 *     uses {@link #defaultRegularization})
 * @param boundary "extended" or "periodic"
 * @param accelerated vector extrapolation for richardson-lucy and richardson-lucy-tv; adaptive primal-dual steps for total-variation
 * @param likelihood data term of total-variation (and of gaussian noise replicas): "poisson" or "gaussian"
 */
public record DeconvolutionSettings(String method, Stopping stopping, double offset, double background, double gain,
        double readNoise, double regularization, String boundary, boolean accelerated, String likelihood) {

    /** The method names (CLI words). */
    public static final List<String> METHODS = List.of("richardson-lucy", "richardson-lucy-tv", "total-variation", "wiener");

    public DeconvolutionSettings {
        if (!METHODS.contains(method)) {
            throw new IllegalArgumentException("method = '" + method + "' is not allowed; choose one of " + String.join(", ", METHODS));
        }
        if (!boundary.equals("extended") && !boundary.equals("periodic")) {
            throw new IllegalArgumentException("boundary = '" + boundary + "' is not allowed; choose extended or periodic");
        }
        if (!likelihood.equals("poisson") && !likelihood.equals("gaussian")) {
            throw new IllegalArgumentException("likelihood = '" + likelihood + "' is not allowed; choose poisson or gaussian");
        }
    }

    /** Plain Richardson-Lucy settings for photon-counting data. */
    public static DeconvolutionSettings richardsonLucy(Stopping stopping, boolean accelerated) {
        return new DeconvolutionSettings("richardson-lucy", stopping, 0, 0, 1, 0, Double.NaN, "extended", accelerated, "poisson");
    }

    /**
     * @return the default lambda of a method: 0.002 for richardson-lucy-tv (the range Dey et al. 2006 used),
     *     0.01 for total-variation, 0.001 for wiener, 0 for richardson-lucy (common-practice starting points: try
     *     a few values on your data)
     */
    public static double defaultRegularization(String method) {
        return switch (method) {
            case "richardson-lucy-tv" -> 0.002;
            case "total-variation" -> 0.01;
            case "wiener" -> 0.001;
            default -> 0;
        };
    }

    /** @return lambda in use */
    public double lambda() {
        return Double.isNaN(regularization) ? defaultRegularization(method) : regularization;
    }

    /** @return a copy with another method and lambda */
    public DeconvolutionSettings withMethod(String m, double lambda) {
        return new DeconvolutionSettings(m, stopping, offset, background, gain, readNoise, lambda, boundary, accelerated, likelihood);
    }

    /** @return a copy with another stopping rule */
    public DeconvolutionSettings withStopping(Stopping s) {
        return new DeconvolutionSettings(method, s, offset, background, gain, readNoise, regularization, boundary, accelerated, likelihood);
    }

    /** @return a copy with another boundary */
    public DeconvolutionSettings withBoundary(String b) {
        return new DeconvolutionSettings(method, stopping, offset, background, gain, readNoise, regularization, b, accelerated, likelihood);
    }

    /** @return a copy with camera settings */
    public DeconvolutionSettings withCamera(double off, double bg, double g, double rn) {
        return new DeconvolutionSettings(method, stopping, off, bg, g, rn, regularization, boundary, accelerated, likelihood);
    }

    /** @return a copy with another lambda */
    public DeconvolutionSettings withLambda(double lambda) {
        return new DeconvolutionSettings(method, stopping, offset, background, gain, readNoise, lambda, boundary, accelerated, likelihood);
    }

    /** @return true when the method takes a regularisation weight */
    public boolean regularized() {
        return !method.equals("richardson-lucy");
    }

    /**
     * @return true when the solver extrapolates (Biggs &amp; Andrews 1997): acceleration on and a Richardson-Lucy
     *     method (the run record's {@code acceleration})
     */
    public boolean extrapolated() {
        return accelerated && (method.equals("richardson-lucy") || method.equals("richardson-lucy-tv"));
    }

    /** @return true when nothing is left for {@link AutomaticSettings} to find */
    public boolean resolved() {
        return !Double.isNaN(offset) && !Double.isNaN(background) && !Double.isNaN(gain) && !Double.isNaN(readNoise)
                && (!regularized() || !Double.isNaN(regularization))
                && (stopping.rule() != StopRule.AUTO || method.equals("total-variation"));
    }

    /**
     * @return the camera these settings describe (no saturation level; background apart)
     * @throws IllegalStateException when a camera value is still "auto" (resolve the settings first)
     */
    public org.stackwright.model.Camera camera() {
        if (Double.isNaN(gain) || Double.isNaN(offset) || Double.isNaN(readNoise)) {
            throw new IllegalStateException("camera values not resolved (gain " + gain + ", offset " + offset
                    + ", read noise " + readNoise + "): resolve the settings with AutomaticSettings first");
        }
        return org.stackwright.model.Camera.of(gain, offset, readNoise);
    }

    /** @return the solver these settings describe */
    public Solver solver() {
        return switch (method) {
            case "richardson-lucy" -> new RichardsonLucy(stopping, accelerated);
            case "richardson-lucy-tv" -> new RichardsonLucyTv(stopping, lambda(), accelerated);
            case "total-variation" -> new PrimalDualTv(stopping, lambda(),
                    likelihood.equals("poisson") ? PrimalDualTv.DataTerm.POISSON : PrimalDualTv.DataTerm.GAUSSIAN,
                    accelerated);
            default -> new WienerFilter(lambda());
        };
    }
}
