package org.stackwright.op;

import java.util.Locale;

import ij.ImagePlus;

import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * Checks on the pixels of an input image that every operation makes before computing, with one documented rule
 * per case so that the doors behave the same:
 * <ul>
 * <li><b>NaN or infinite pixels</b>: treated as untrusted, exactly like pixels of a mask: they carry no data, a
 * warning gives their count, and {@link Scan#nonFiniteMask()} marks them (1 = untrusted) so the operation can
 * merge it into its own mask. {@link #finiteCopy} gives a copy in which they hold the mean of the finite pixels,
 * so FFTs stay finite. An image with no finite pixel at all is refused.</li>
 * <li><b>negative pixels</b>: kept as they are, with a warning (usually a camera offset or a background that was
 * subtracted and clipped wrongly; Poisson models expect counts &ge; 0).</li>
 * <li><b>constant image</b>: a warning (nothing to restore; the result is constant too).</li>
 * <li><b>too small</b> (1 pixel, or smaller than an operation needs): refused by {@link #requireMinSize}.</li>
 * </ul>
 * An empty image (a size of 0) cannot exist as a {@link Volume}; {@link Volume#checkSize} refuses it. The input
 * volume is never modified.
 */
public final class InputChecks {

    /**
     * What a scan found.
     *
     * @param nonFinite number of NaN or infinite pixels
     * @param negative number of negative (finite) pixels
     * @param min smallest finite value (NaN when there is none)
     * @param max largest finite value (NaN when there is none)
     * @param finiteMean mean of the finite pixels (NaN when there is none)
     * @param nonFiniteMask one byte per pixel, 1 where the pixel is NaN or infinite; null when there is none
     * @param absSum sum of the absolute finite values
     */
    public record Scan(int nonFinite, int negative, double min, double max, double finiteMean, byte[] nonFiniteMask,
            double absSum) {

        /** @return true when every finite pixel has the same value */
        public boolean constant() {
            return min == max;
        }
    }

    /**
     * The largest sum of absolute pixel values an image may have. 32-bit float holds up to 3.4e38; an FFT (blur,
     * correlation) adds every pixel into its zero-frequency coefficient and the solvers multiply values by ratios
     * and steps, so 1e30 keeps eight orders of magnitude of room (common practice for the margin, no source). Camera
     * data are many orders below it (a 2^31-voxel stack of 2^32 ADU sums to 1e19).
     */
    public static final double MAX_ABS_SUM = 1e30;

    private InputChecks() {
    }

    /**
     * Scans an image; no warnings, no refusals.
     *
     * @param v the image, not modified
     */
    public static Scan scan(Volume v) {
        float[] d = v.data();
        int bad = 0;
        int neg = 0;
        double min = Double.POSITIVE_INFINITY;
        double max = Double.NEGATIVE_INFINITY;
        double sum = 0;
        double abs = 0;
        byte[] mask = null;
        for (int i = 0; i < d.length; i++) {
            float f = d[i];
            if (!Float.isFinite(f)) {
                if (mask == null) {
                    mask = new byte[d.length];
                }
                mask[i] = 1;
                bad++;
                continue;
            }
            if (f < 0) {
                neg++;
            }
            min = Math.min(min, f);
            max = Math.max(max, f);
            sum += f;
            abs += Math.abs(f);
        }
        int good = d.length - bad;
        return good == 0 ? new Scan(bad, 0, Double.NaN, Double.NaN, Double.NaN, mask, 0)
                : new Scan(bad, neg, min, max, sum / good, mask, abs);
    }

    /**
     * Scans an image, refuses one without a finite pixel, and warns about NaN/infinite pixels (treated as
     * untrusted), negative pixels and a constant image.
     *
     * @param key the parameter the image came from (e.g. "input"), named in messages
     * @param v the image, not modified
     * @param ctx where warnings go
     * @throws IllegalArgumentException naming the key when no pixel is finite
     */
    public static Scan check(String key, Volume v, RunContext ctx) {
        Scan s = scan(v);
        if (s.nonFinite() == v.size()) {
            throw new IllegalArgumentException(key + ": every one of the " + v.size()
                    + " pixels is NaN or infinite; at least one finite pixel is needed");
        }
        requireRepresentable(key, s);
        if (s.nonFinite() > 0) {
            ctx.warn(key + ": " + s.nonFinite() + " of " + v.size() + " pixels are NaN or infinite; they are treated as"
                    + " untrusted (masked): their values are not used");
        }
        if (s.negative() > 0) {
            ctx.warn(key + ": " + s.negative() + " pixels are negative (smallest " + num(s.min()) + "); they are used as"
                    + " given; check the camera offset and background settings");
        }
        if (s.constant()) {
            ctx.warn(key + ": every finite pixel has the value " + num(s.min()) + "; there is no structure to restore and"
                    + " the result will be flat");
        }
        return s;
    }

    /** Share of pixels below the offset above which a warning is given (a small share: common practice, no source). */
    public static final double BELOW_OFFSET_WARN = 0.05;
    /** Share of pixels below the offset above which the offset is refused (most pixels). */
    public static final double BELOW_OFFSET_REFUSE = 0.5;

    /**
     * Checks a camera offset against the data: camera data lie above the offset up to the noise, so when the typical
     * pixel lies below it the offset is set too high, or the data were already offset-subtracted; such pixels would
     * be clamped to zero photons and the result invented. So: a refusal naming the offset when more than
     * {@link #BELOW_OFFSET_REFUSE} of the finite pixels lie more than one noise standard deviation below it (the
     * median more than one sigma below the offset), and a warning when more than {@link #BELOW_OFFSET_WARN} lie
     * below the offset minus 3 x the read noise given (0.13 % of the dark pixels of a correct camera model). The
     * noise of the refusal is the read noise given or, when none is given (or a smaller one), the pixel noise
     * measured in the data ({@link #pixelNoise}): on a dark image with the right offset half the pixels lie below
     * the offset itself, and a refusal at the offset would be a coin flip. Every operation that takes a camera
     * offset calls this.
     *
     * @param key the image's parameter key, named in messages
     * @param v the image (ADU), not modified
     * @param offset the camera offset given (ADU)
     * @param readNoise the camera read noise given (ADU, 0 or more)
     * @param ctx where the warning goes
     * @throws IllegalArgumentException naming offset when most pixels lie below it
     */
    public static void checkOffset(String key, Volume v, double offset, double readNoise, RunContext ctx) {
        double given = readNoise > 0 ? readNoise : 0; // NaN (auto, found later) counts as none given
        // compared in the pixels' own precision: a pixel of exactly the offset (0 photons, no read noise) stored as
        // float may lie a rounding step below the offset given as a decimal
        float warnLimit = (float) (offset - 3 * given);
        float[] d = v.data();
        // counted first against the read noise given alone: the measured pixel noise can only lower the refusal's
        // limit (noise = the larger of the two), so it is measured only when this count alone would refuse
        long[] counts = countBelow(d, warnLimit, (float) (offset - given));
        long finite = counts[0];
        if (finite == 0) {
            return;
        }
        long belowWarn = counts[1];
        long belowRefuse = counts[2];
        double measured = 0;
        double noise = given;
        if ((double) belowRefuse / finite > BELOW_OFFSET_REFUSE) {
            measured = pixelNoise(v);
            noise = Math.max(given, measured);
            belowRefuse = countBelow(d, warnLimit, (float) (offset - noise))[2];
        }
        double refuseShare = (double) belowRefuse / finite;
        double warnShare = (double) belowWarn / finite;
        if (refuseShare <= BELOW_OFFSET_REFUSE && warnShare <= BELOW_OFFSET_WARN) {
            return; // the usual case: no message, so the data's percentiles are not needed
        }
        String level = String.format(Locale.ROOT, " (their level: 1st percentile %s, median %s ADU)",
                num(quantile(d, 0.01)), num(quantile(d, 0.5)));
        if (refuseShare > BELOW_OFFSET_REFUSE) {
            throw new IllegalArgumentException(String.format(Locale.ROOT, "offset = %s is above most of the data:"
                    + " %.1f %% of the %s pixels lie more than one noise standard deviation (%s, %s ADU) below the offset"
                    + " %s ADU%s; allowed: an"
                    + " offset at or below the camera's dark level (give the camera's offset with --offset; data"
                    + " that were already offset-subtracted need offset 0)", num(offset), 100 * refuseShare, key,
                    given >= measured ? "the read noise" : "the pixel noise measured in the data", num(noise),
                    num(offset), level));
        }
        if (warnShare > BELOW_OFFSET_WARN) {
            ctx.warn(String.format(Locale.ROOT, "offset: %.1f %% of the %s pixels lie below the offset %s ADU%s%s;"
                    + " they carry no signal above the offset (taken as 0 photons). Check the offset%s", 100 * warnShare,
                    key, num(offset), given > 0 ? " minus 3 x read-noise" : "", level,
                    given > 0 ? "" : " and give the read noise"));
        }
    }

    /** @return finite pixels, those below {@code warnLimit} and those below {@code refuseLimit} */
    private static long[] countBelow(float[] d, float warnLimit, float refuseLimit) {
        long finite = 0;
        long belowWarn = 0;
        long belowRefuse = 0;
        for (float f : d) {
            if (Float.isFinite(f)) {
                finite++;
                belowWarn += f < warnLimit ? 1 : 0;
                belowRefuse += f < refuseLimit ? 1 : 0;
            }
        }
        return new long[] {finite, belowWarn, belowRefuse};
    }

    /**
     * The pixel noise of an image, measured without knowing its offset: from the differences of neighbouring
     * pixels along x, whose median absolute value is 0.6745 x sqrt(2) x sigma for independent Gaussian noise of
     * standard deviation sigma (the median absolute deviation, Hampel 1974, J. Am. Stat. Assoc. 69:383). Structure
     * in the image adds to the differences, so on bright structured images this is an upper estimate; the median
     * keeps it at the noise of the dark background where that covers most of the image. A strided sample of at most
     * 100 000 differences.
     *
     * @param v the image
     * @return sigma in the image's units (0 for an image one pixel wide or without finite neighbours)
     */
    static double pixelNoise(Volume v) {
        int w = v.width();
        if (w < 2) {
            return 0;
        }
        float[] d = v.data();
        int step = Math.max(1, d.length / 100_000);
        float[] diffs = new float[d.length / step + 1];
        int n = 0;
        for (int i = 0; i + 1 < d.length; i += step) {
            if ((i + 1) % w != 0 && Float.isFinite(d[i]) && Float.isFinite(d[i + 1])) {
                diffs[n++] = Math.abs(d[i + 1] - d[i]);
            }
        }
        if (n == 0) {
            return 0;
        }
        java.util.Arrays.sort(diffs, 0, n);
        return diffs[n / 2] / (0.6745 * Math.sqrt(2));
    }

    /** @return the q-quantile of the finite values, from a strided sample of at most 100 000 (NaN when none) */
    private static double quantile(float[] d, double q) {
        int step = Math.max(1, d.length / 100_000);
        float[] s = new float[(d.length + step - 1) / step];
        int n = 0;
        for (int i = 0; i < d.length; i += step) {
            if (Float.isFinite(d[i])) {
                s[n++] = d[i];
            }
        }
        if (n == 0) {
            return Double.NaN;
        }
        java.util.Arrays.sort(s, 0, n);
        return s[(int) Math.min(n - 1, Math.floor(q * n))];
    }

    /**
     * Reads an image that must be one channel and one time point (the ImageJ doors split hyperstacks before an
     * operation runs; on the command line a hyperstack would otherwise be cut to its first channel unnoticed).
     *
     * @param key the parameter the image came from, named in the message
     * @param imp the image, not modified
     * @return its pixels as a volume
     * @throws IllegalArgumentException naming the key and the channel and time point counts
     */
    public static Volume oneVolume(String key, ImagePlus imp) {
        if (imp != null && (imp.getNChannels() > 1 || imp.getNFrames() > 1)) {
            throw new IllegalArgumentException(key + ": image '" + imp.getTitle() + "' has " + imp.getNChannels()
                    + " channel(s) and " + imp.getNFrames() + " time point(s); allowed: one channel and one time point"
                    + " (split the hyperstack, or run from ImageJ, which runs each channel in turn)");
        }
        return ImagePlusAdapter.toVolume(imp);
    }

    /**
     * Refuses NaN or infinite pixels, for the images an operation cannot compute around (an estimate that is
     * blurred again, both images of a comparison whose SSIM windows cannot skip pixels, a bead stack).
     *
     * @param key the parameter the image came from, named in the message
     * @param v the image, not modified
     * @throws IllegalArgumentException naming the key and the count
     */
    public static void requireFinite(String key, Volume v) {
        Scan s = scan(v);
        if (s.nonFinite() > 0) {
            throw new IllegalArgumentException(key + ": " + s.nonFinite() + " of " + v.size() + " pixels are NaN or"
                    + " infinite; allowed: finite values only for this image");
        }
        requireRepresentable(key, s);
    }

    /**
     * Refuses values so large that a float Fourier transform of the image overflows ({@link #MAX_ABS_SUM}).
     *
     * @throws IllegalArgumentException naming the key, the largest value and the limit
     */
    static void requireRepresentable(String key, Scan s) {
        if (s.absSum() > MAX_ABS_SUM) {
            throw new IllegalArgumentException(key + ": pixel values up to " + num(Math.max(Math.abs(s.min()),
                    Math.abs(s.max()))) + " add up to " + num(s.absSum()) + ", beyond what 32-bit Fourier transforms"
                    + " can hold; allowed: values whose absolute sum stays below " + num(MAX_ABS_SUM)
                    + " (scale the image down)");
        }
    }

    /**
     * @param v the image, not modified
     * @param s its scan
     * @return v itself when every pixel is finite, otherwise a copy whose NaN/infinite pixels hold the mean of the
     *     finite pixels (a neutral value that keeps FFTs finite; those pixels stay untrusted)
     */
    public static Volume finiteCopy(Volume v, Scan s) {
        if (s.nonFinite() == 0) {
            return v;
        }
        float fill = (float) s.finiteMean();
        float[] d = v.data().clone();
        for (int i = 0; i < d.length; i++) {
            if (!Float.isFinite(d[i])) {
                d[i] = fill;
            }
        }
        return v.withData(d);
    }

    private static String num(double v) {
        return v == Math.rint(v) && Math.abs(v) < 1e15 ? Long.toString((long) v) : String.format(Locale.ROOT, "%.6g", v);
    }

    /**
     * Refuses an image smaller than an operation can use (a 1-pixel image, a 2-pixel-wide strip ...).
     *
     * @throws IllegalArgumentException naming the key, the size given and the smallest size allowed
     */
    public static void requireMinSize(String key, Volume v, int minWidth, int minHeight, int minDepth) {
        requireMinSize(key, v.shape(), v.width() >= minWidth && v.height() >= minHeight && v.depth() >= minDepth,
                minWidth + "x" + minHeight + "x" + minDepth);
    }

    /** As above for an image not read into a volume: its shape in words, whether it is large enough, the minimum. */
    public static void requireMinSize(String key, String shape, boolean largeEnough, String minimum) {
        if (!largeEnough) {
            throw new IllegalArgumentException(key + ": image is " + shape + " pixels; allowed: at least " + minimum);
        }
    }
}
