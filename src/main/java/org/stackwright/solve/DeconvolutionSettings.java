package org.stackwright.solve;

import java.util.List;

/**
 * The settings of one deconvolution, validated, defaults in one place.
 *
 * @param method richardson-lucy, richardson-lucy-tv, total-variation or wiener
 * @param stopping stopping rule, maximum iterations and tolerance
 * @param offset camera offset, ADU
 * @param background background above the offset in ADU, or NaN to estimate it ("auto")
 * @param gain ADU per photo-electron
 * @param readNoise read noise, ADU
 * @param regularization lambda, or NaN for the method's default ({@link #defaultRegularization})
 * @param boundary "extended" or "periodic"
 * @param accelerated vector extrapolation for richardson-lucy
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

    /** @return the camera these settings describe (no saturation level; background apart) */
    public org.stackwright.model.Camera camera() {
        return org.stackwright.model.Camera.of(gain, offset, readNoise);
    }

    /** @return the solver these settings describe */
    public Solver solver() {
        return switch (method) {
            case "richardson-lucy" -> new RichardsonLucy(stopping, accelerated);
            case "richardson-lucy-tv" -> new RichardsonLucyTv(stopping, lambda());
            case "total-variation" -> new PrimalDualTv(stopping, lambda(),
                    likelihood.equals("poisson") ? PrimalDualTv.DataTerm.POISSON : PrimalDualTv.DataTerm.GAUSSIAN);
            default -> new WienerFilter(lambda());
        };
    }
}
