package org.stackwright.repair;

/**
 * The tile period along one axis: the pitch S and phase p such that the borders p + k S (k = 0, 1, ...) all look
 * like seams ({@link SeamEvidence}). A comb of teeth at those borders is laid over the evidence for every pitch and
 * phase; a tooth is strong when the evidence within one pixel of it exceeds the tooth limit. A period must have at
 * least two strong teeth, at least {@link #STRONG_SHARE} of its teeth strong, and its teeth together must exceed the
 * seam limit: the sum of their z-scores over the square root of their number (Stouffer, Suchman, DeVinney, Star &
 * Williams, "The American Soldier", Vol. 1, Princeton University Press 1949; combining independent z-scores).
 * Edges of narrow lines (a defective column, a thin structure: {@link SeamEvidence#combStrength}) are no
 * teeth. Of all such combs the one with the most strong teeth less teeth without evidence wins (then the most
 * strong teeth, then the fewest teeth without evidence, then one whose tiles start at the image's first pixel, as
 * in an uncropped mosaic, then the smaller pitch, then the largest summed evidence); a multiple of the true pitch
 * has fewer strong teeth, a fraction of it as many empty teeth as it may catch stray evidence, and a line
 * that does not repeat (a defective column, a structure) cannot fill a comb. The pitch and phase are then refined
 * on the exact border positions. This is a comb filter in the sense of harmonic period estimation (a periodic
 * pulse train matched against the signal; e.g. Hermes, "Measurement of pitch by subharmonic summation", J.
 * Acoust. Soc. Am. 83(1):257-264, 1988, which also explains the preference for the most teeth).
 */
final class SeamComb {

    /** smallest tile pitch searched, pixels */
    static final int MIN_PITCH = 16;
    /** a tooth may lie this much closer to an end than one step: the two edges of a band straddle the border */
    static final int END_SLACK = 6;
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

        /**
         * @return the borders p + k S where the evidence is defined (away from the image ends), including those
         *     closer than one step to the end (which are seams only where the evidence shows one)
         */
        int[] borders(int n) {
            return java.util.stream.IntStream.iterate(phase, b -> b < n, b -> b + pitch).filter(b -> inRange(b, n))
                    .toArray();
        }

        /** @return whether the image's first pixel lies on a tile border of this comb (within 3 pixels) */
        boolean anchored() {
            return phase <= 3 || phase >= pitch - 3;
        }

        boolean better(Period o) {
            if (o == null) {
                return true;
            }
            // strong teeth less empty ones: half the pitch adds as many empty teeth as it may catch stray evidence
            if (2 * strong - teeth != 2 * o.strong - o.teeth) {
                return 2 * strong - teeth > 2 * o.strong - o.teeth;
            }
            if (strong != o.strong) {
                return strong > o.strong;
            }
            if (teeth - strong != o.teeth - o.strong) {
                // as many seams explained, fewer teeth without a seam: a fraction of the pitch has empty teeth
                return teeth - strong < o.teeth - o.strong;
            }
            if (anchored() != o.anchored()) {
                return anchored();
            }
            if (pitch != o.pitch) {
                // the teeth's one-pixel windows let pitches a few pixels apart explain the same borders; the exact
                // refinement that follows moves the pitch up as readily as down
                return pitch < o.pitch;
            }
            return sum > o.sum;
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
        return refine(java.util.List.of(e), new Period[] {best}, toothLimit, false)[0];
    }

    /**
     * @return the best comb of the one pitch s (its phase searched and refined, the pitch kept), or null when none
     *     qualifies
     */
    static Period atPitch(SeamEvidence e, int s, double toothLimit, double seamLimit) {
        Period best = null;
        for (int p = 0; p < s && s < e.length(); p++) {
            Period c = score(e, s, p, 1, toothLimit, seamLimit);
            if (c != null && c.better(best)) {
                best = c;
            }
        }
        return best == null ? null : refine(java.util.List.of(e), new Period[] {best}, toothLimit, true)[0];
    }

    /**
     * Refines a common pitch and each band's phase on the exact borders (the one-pixel window of the search lets
     * neighbouring pitches tie): the pitch within 3 pixels and the phases within 3 pixels (of the phase that keeps
     * the middle tooth in place) that give the largest summed peak evidence exactly at the teeth.
     *
     * @param best one comb per band (null where a band has none), all of one pitch
     * @param keepPitch refine the phases only
     */
    static Period[] refine(java.util.List<SeamEvidence> ex, Period[] best, double tooth, boolean keepPitch) {
        int pitch = 0;
        for (Period p : best) {
            if (p != null) {
                pitch = p.pitch();
            }
        }
        Period[] refined = best;
        double top = -1;
        int reach = keepPitch ? 0 : 3;
        for (int s = Math.max(MIN_PITCH, pitch - reach); s <= pitch + reach; s++) {
            Period[] at = new Period[ex.size()];
            double sum = 0;
            for (int i = 0; i < ex.size(); i++) {
                if (best[i] == null) {
                    continue;
                }
                double here = -1;
                // the teeth of the comb found, carried to pitch s about its middle tooth, then 3 pixels either way
                int teeth = best[i].borders(ex.get(i).length()).length;
                int mid = best[i].phase() + (teeth / 2) * (best[i].pitch() - s);
                for (int p = mid - 3; p <= mid + 3; p++) {
                    int ph = Math.floorMod(p, s);
                    double e = exactSum(ex.get(i), s, ph, tooth);
                    if (e > here) {
                        here = e;
                        at[i] = new Period(s, ph, best[i].strong(), best[i].teeth(), e);
                    }
                }
                sum += here;
            }
            if (sum > top) {
                top = sum;
                refined = at;
            }
        }
        return refined;
    }

    /** @return the summed peak evidence exactly at the teeth of comb (s, phase) */
    static double exactSum(SeamEvidence e, int s, int phase, double tooth) {
        double sum = 0;
        for (int b : new Period(s, phase, 0, 0, 0).borders(e.length())) {
            sum += e.peak(b, tooth);
        }
        return sum;
    }

    /** @return the comb (s, p) scored with teeth that look window pixels either side, or null if it fails */
    static Period score(SeamEvidence e, int s, int p, int window, double toothLimit, double seamLimit) {
        return score(e, s, p, window, toothLimit, seamLimit, 2);
    }

    /**
     * @param minStrong the fewest strong teeth the comb needs: 2 (and {@link #STRONG_SHARE} of its teeth) for a comb
     *     searched over pitches and phases, 1 for one comb tried at a step and phase found elsewhere
     * @return the comb (s, p) scored with teeth that look window pixels either side, or null if it fails
     */
    static Period score(SeamEvidence e, int s, int p, int window, double toothLimit, double seamLimit, int minStrong) {
        int n = e.length();
        int teeth = 0;
        int strong = 0;
        double sum = 0;
        double all = 0;
        for (int b = p; b < n; b += s) {
            // the first and last tiles are whole, at least one step wide: no tooth is expected closer than that to
            // either end (an overlap extends the image past the last step, a snake row starts with a shifted seam)
            if (!inRange(b, n) || n - b < s - END_SLACK || b < s - END_SLACK) {
                continue;
            }
            teeth++;
            double t = 0;
            for (int d = -window; d <= window; d++) {
                t = Math.max(t, e.peak(b + d, toothLimit));
            }
            all += t;
            if (t > toothLimit) {
                strong++;
                sum += t;
            }
        }
        // the teeth together: Stouffer's sum of z-scores over sqrt(teeth)
        boolean share = minStrong == 1 || strong >= STRONG_SHARE * teeth;
        if (strong < minStrong || !share || all / Math.sqrt(teeth) <= seamLimit) {
            return null;
        }
        return new Period(s, p, strong, teeth, sum);
    }
}
