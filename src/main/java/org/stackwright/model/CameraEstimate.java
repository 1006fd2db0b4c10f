package org.stackwright.model;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

import org.stackwright.volume.Volume;

/**
 * The camera a run uses and how each of its values was found: given by the user, measured from dark or flat frames,
 * or estimated from the image itself ({@link ImageNoiseFit}). Values that are given win over frames, frames over the
 * image. The offset and the read noise cannot be told apart in one image (the photon-transfer line gives only
 * read noise^2 - gain * offset): with neither given nor dark frames, the model uses offset - read noise^2 / gain as
 * its offset and no read noise, which gives the same shifted-Poisson model (see {@link DeconvolutionProblem}).
 *
 * @param camera the camera values used
 * @param gain how the gain was found
 * @param offset how the offset was found
 * @param readNoise how the read noise was found
 * @param imageFit the fit to the image when one was made, else null
 * @param warnings what the user should know (too little smooth area, values assumed)
 */
public record CameraEstimate(Camera camera, Found gain, Found offset, Found readNoise, ImageNoiseFit imageFit,
        List<String> warnings) {

    /** Where a value came from (the words of the run record). */
    public static final String GIVEN = "given";
    public static final String IMAGE = "image";
    public static final String DARK = "dark-frames";
    public static final String FLAT = "flat-frames";
    /** not given and not estimable: a stated default was used */
    public static final String ASSUMED = "assumed";

    /** A value, its standard error (0 when given or assumed) and its source word. */
    public record Found(double value, double standardError, String source) {
    }

    /**
     * What the user gave; NaN for a value to estimate, null for frames not given.
     *
     * @param gain ADU per photo-electron, or NaN
     * @param offset ADU, or NaN
     * @param readNoise ADU, or NaN
     * @param dark dark frames, or null
     * @param flat flat frames, or null
     */
    public record Given(double gain, double offset, double readNoise, Volume dark, Volume flat) {

        /** Everything given as numbers, no frames. */
        public static Given numbers(double gain, double offset, double readNoise) {
            return new Given(gain, offset, readNoise, null, null);
        }

        /** @return true when nothing is left to estimate */
        public boolean complete() {
            return !Double.isNaN(gain) && !Double.isNaN(offset) && !Double.isNaN(readNoise);
        }
    }

    public CameraEstimate {
        warnings = List.copyOf(warnings);
    }

    /**
     * Finds the camera values.
     *
     * @param data camera data (ADU), not modified
     * @param mask pixels to leave out of the image fit, or null
     * @param g what the user gave
     * @param darkKey, flatKey parameter keys of the frames, for messages
     */
    public static CameraEstimate of(Volume data, byte[] mask, Given g, String darkKey, String flatKey) {
        List<String> warn = new ArrayList<>();
        Found offset = Double.isNaN(g.offset()) ? null : new Found(g.offset(), 0, GIVEN);
        Found rn = Double.isNaN(g.readNoise()) ? null : new Found(g.readNoise(), 0, GIVEN);
        Found gain = Double.isNaN(g.gain()) ? null : new Found(g.gain(), 0, GIVEN);
        if (g.dark() != null && (offset == null || rn == null)) {
            CalibrationFrames.Dark dk = CalibrationFrames.dark(darkKey, g.dark());
            offset = offset != null ? offset : new Found(dk.offset().value(), dk.offset().standardError(), DARK);
            rn = rn != null ? rn : new Found(dk.readNoise().value(), dk.readNoise().standardError(), DARK);
            if (dk.pixelsLeftOut() > 0) {
                warn.add(darkKey + ": " + dk.pixelsLeftOut() + " hot or flickering pixel(s) left out of the offset and read noise");
            }
        }
        if (g.flat() != null && gain == null) {
            CalibrationFrames.Flat fl = CalibrationFrames.flat(flatKey, g.flat(), offset == null ? Double.NaN : offset.value(),
                    rn == null ? Double.NaN : rn.value());
            gain = new Found(fl.gain().value(), fl.gain().standardError(), FLAT);
        }
        ImageNoiseFit fit = null;
        if (gain == null || offset == null || rn == null) {
            fit = ImageNoiseFit.of(data, mask);
            if (!fit.usable()) {
                warn.add("camera: the noise could not be measured in the image (" + fit.problem() + "); assumed "
                        + (gain == null ? "gain 1 ADU/e-, " : "") + (rn == null ? "read noise 0 ADU, " : "")
                        + (offset == null ? "offset 0 ADU, " : "") + "which may be far off: give --gain and --read-noise"
                        + " (camera data sheet), or dark and flat frames");
                gain = gain != null ? gain : new Found(1, 0, ASSUMED);
                rn = rn != null ? rn : new Found(0, 0, ASSUMED);
                offset = offset != null ? offset : new Found(0, 0, ASSUMED);
            } else {
                if (fit.smoothShare() < 0.25) {
                    warn.add(String.format(Locale.ROOT, "camera: only %.0f%% of the image is smooth enough to measure the"
                            + " noise (a quarter or more is best); the estimate is less certain: see its standard errors"
                            + " in the record, or give --gain and --read-noise", 100 * fit.smoothShare()));
                }
                if (gain == null) {
                    gain = new Found(fit.slope(), fit.slopeError(), IMAGE);
                }
                Found[] or = offsetAndReadNoise(fit, offset, rn, gain.value(), warn);
                offset = or[0];
                rn = or[1];
            }
        }
        return new CameraEstimate(Camera.of(gain.value(), offset.value(), rn.value()), gain, offset, rn, fit, warn);
    }

    /** Offset and read noise from the image's line where they are not known yet. */
    private static Found[] offsetAndReadNoise(ImageNoiseFit fit, Found offset, Found rn, double gain, List<String> warn) {
        double a = fit.slope();
        double c = fit.intercept();
        double va = fit.slopeError() * fit.slopeError();
        double vc = fit.interceptError() * fit.interceptError();
        double cov = fit.covariance();
        if (offset != null && rn == null) {
            // r^2 = line at the offset = c + a o
            double o = offset.value();
            double r2 = c + a * o;
            double se2 = Math.sqrt(Math.max(vc + o * o * va + 2 * o * cov, 0) + offset.standardError() * offset.standardError() * a * a);
            if (r2 <= 0) {
                warn.add(String.format(Locale.ROOT, "read noise: the image gives read noise^2 = %.3g +- %.2g ADU^2, not"
                        + " above 0 (read noise small against the photon noise, or the offset %.4g ADU is too high); 0 used",
                        r2, se2, o));
                return new Found[] {offset, new Found(0, Math.sqrt(se2), IMAGE)};
            }
            double r = Math.sqrt(r2);
            return new Found[] {offset, new Found(r, se2 / (2 * r), IMAGE)};
        }
        if (offset == null && rn != null) {
            // o = (r^2 - c) / a
            double r2 = rn.value() * rn.value();
            double o = (r2 - c) / a;
            double dA = -(r2 - c) / (a * a);
            double dC = -1 / a;
            double se = Math.sqrt(Math.max(dA * dA * va + dC * dC * vc + 2 * dA * dC * cov, 0));
            return new Found[] {new Found(o, se, IMAGE), rn};
        }
        if (offset == null) {
            // neither: offset - r^2 / gain from the line, no read noise (the same shifted-Poisson model)
            double o = -c / a;
            double dA = c / (a * a);
            double dC = -1 / a;
            double se = Math.sqrt(Math.max(dA * dA * va + dC * dC * vc + 2 * dA * dC * cov, 0));
            warn.add(String.format(Locale.ROOT, "offset: not given; one image cannot tell the camera offset from the read"
                    + " noise, so the model uses offset - read noise^2 / gain = %.4g ADU (from the image) and no read"
                    + " noise, which is the same noise model; give --offset or --dark frames to have both", o));
            return new Found[] {new Found(o, se, IMAGE), new Found(0, 0, IMAGE)};
        }
        return new Found[] {offset, rn};
    }

    /** Passes the warnings on (e.g. to a run context). */
    public void warnTo(Consumer<String> sink) {
        warnings.forEach(sink);
    }

    /**
     * @return the run-record fields: the values ({@code gain}, {@code offset_adu}, {@code read_noise_adu}),
     *     {@code camera_source} (source word per value) and {@code camera_standard_error} (per estimated value)
     */
    public Map<String, Object> record() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("gain", gain.value());
        m.put("offset_adu", offset.value());
        m.put("read_noise_adu", readNoise.value());
        Map<String, Object> src = new LinkedHashMap<>();
        src.put("gain", gain.source());
        src.put("offset_adu", offset.source());
        src.put("read_noise_adu", readNoise.source());
        m.put("camera_source", src);
        Map<String, Object> se = new LinkedHashMap<>();
        for (Map.Entry<String, Found> e : Map.of("gain", gain, "offset_adu", offset, "read_noise_adu", readNoise).entrySet()) {
            if (!e.getValue().source().equals(GIVEN) && !e.getValue().source().equals(ASSUMED)) {
                se.put(e.getKey(), e.getValue().standardError());
            }
        }
        m.put("camera_standard_error", new java.util.TreeMap<>(se));
        if (imageFit != null && imageFit.usable()) {
            m.put("camera_smooth_share", imageFit.smoothShare());
        }
        return m;
    }
}
