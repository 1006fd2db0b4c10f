package org.stackwright.repair;

/**
 * The tile period along one axis: the pitch S and phase p such that the borders p + k S (k = 0, 1, ...) all look
 * like seams ({@link SeamEvidence}). A comb of teeth at those borders is laid over the evidence for every pitch and
 * phase; a tooth is strong when the evidence within one pixel of it exceeds the tooth limit. A period must have at
 * least two strong teeth, at least {@link #STRONG_SHARE} of its teeth strong, and one tooth above the seam limit.
 * Edges of narrow lines (a defective column, a thin structure: {@link SeamEvidence#combStrength}) are no
 * teeth. Of all such combs the one with the most strong teeth wins (then one whose tiles start at the image's
 * first pixel, as in an uncropped mosaic, then the largest summed evidence, then the smaller pitch); a multiple of the true pitch has fewer strong teeth, a fraction of it too many weak ones, and a line
 * that does not repeat (a defective column, a structure) cannot fill a comb. The pitch and phase are then refined
 * on the exact border positions. This is a comb filter in the sense of harmonic period estimation (a periodic
 * pulse train matched against the signal; e.g. Hermes, "Measurement of pitch by subharmonic summation", J.
 * Acoust. Soc. Am. 83(1):257-264, 1988, which also explains the preference for the most teeth).
 */
final class SeamComb {

    /** smallest tile pitch searched, pixels */
    static final int MIN_PITCH = 16;
    /** share of the teeth of a period that must be strong */
    static final double STRONG_SHARE = 0.6;

    /**
     * @param pitch the tile step S, pixels
     * @param phase the first border of the comb, in [0, S)
     * @param strong number of strong teeth
     * @param teeth number of teeth inside the searchable range
     * @param sum summed evidence of the strong teeth
     */
    record Period(int pitch, int phase, int strong, int teeth, double sum) {

        /** @return the borders p + k S where the evidence is defined (away from the image ends) */
        int[] borders(int n) {
            return java.util.stream.IntStream.iterate(phase, b -> b < n, b -> b + pitch).filter(b -> inRange(b, n))
                    .toArray();
        }

        /** @return whether the image's first pixel lies on a tile border of this comb (within 3 pixels) */
        boolean anchored() {
            return phase <= 3 || phase >= pitch - 3;
        }

        boolean better(Period o) {
            if (o == null || strong != o.strong) {
                return o == null || strong > o.strong;
            }
            if (anchored() != o.anchored()) {
                return anchored();
            }
            if (Math.abs(sum - o.sum) > 1e-9 * Math.max(1, sum)) {
                return sum > o.sum;
            }
            return pitch < o.pitch;
        }
    }

    private SeamComb() {
    }

    /** @return whether border b is far enough from the image ends for the evidence to be defined */
    static boolean inRange(int b, int n) {
        return b >= SeamEvidence.REACH + 1 && b <= n - SeamEvidence.REACH - 1;
    }

    /**
     * @param e the evidence along the axis
     * @param pitchRange smallest and largest pitch to try (null: {@link #MIN_PITCH} to the axis length)
     * @param toothLimit evidence a strong tooth must exceed
     * @param seamLimit evidence at least one tooth must exceed
     * @return the best period, or null when no comb qualifies
     */
    static Period find(SeamEvidence e, int[] pitchRange, double toothLimit, double seamLimit) {
        int n = e.length();
        int lo = pitchRange == null ? MIN_PITCH : pitchRange[0];
        int hi = pitchRange == null ? n - 1 : Math.min(n - 1, pitchRange[1]);
        Period best = null;
        for (int s = lo; s <= hi; s++) {
            for (int p = 0; p < s; p++) {
                Period c = score(e, s, p, 1, toothLimit, seamLimit);
                if (c != null && c.better(best)) {
                    best = c;
                }
            }
        }
        if (best == null) {
            return null;
        }
        // refine on exact positions: the window of one pixel lets neighbouring pitches tie
        Period refined = null;
        for (int s = Math.max(2, best.pitch() - 2); s <= best.pitch() + 2; s++) {
            for (int p = best.phase() - 2; p <= best.phase() + 2; p++) {
                Period c = score(e, s, Math.floorMod(p, s), 0, toothLimit, seamLimit);
                if (c != null && c.better(refined)) {
                    refined = c;
                }
            }
        }
        return refined != null && refined.strong() >= best.strong() ? refined : best;
    }

    /** @return the comb (s, p) scored with teeth that look window pixels either side, or null if it fails */
    static Period score(SeamEvidence e, int s, int p, int window, double toothLimit, double seamLimit) {
        int n = e.length();
        int teeth = 0;
        int strong = 0;
        double sum = 0;
        double top = 0;
        for (int b = p; b < n; b += s) {
            if (!inRange(b, n)) {
                continue;
            }
            teeth++;
            double t = 0;
            for (int d = -window; d <= window; d++) {
                t = Math.max(t, e.peak(b + d, toothLimit));
            }
            if (t > toothLimit) {
                strong++;
                sum += t;
                top = Math.max(top, t);
            }
        }
        if (strong < 2 || strong < STRONG_SHARE * teeth || top <= seamLimit) {
            return null;
        }
        return new Period(s, p, strong, teeth, sum);
    }
}
