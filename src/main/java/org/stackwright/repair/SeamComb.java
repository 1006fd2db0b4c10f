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
 * in an uncropped mosaic, then, in a trimmed reading, between pitches more than {@link #FAR} apart the largest summed
 * evidence, then the smaller pitch, then the largest summed evidence); a multiple of the true pitch has fewer strong
 * teeth, a fraction of it as many empty teeth as it may catch stray evidence, and a line that does not repeat (a
 * defective column, a structure) cannot fill a comb. No tooth is scored within a step of an end of an uncropped
 * mosaic, whose end tiles are whole; in a trimmed reading ({@link #freePhase}) the end tiles are partial, so a tooth
 * within a step of an end that shows a seam counts ({@link #withinStep}). The pitch and phase are then refined on the
 * exact border positions. This is a comb filter in the sense of harmonic period estimation (a periodic
 * pulse train matched against the signal; e.g. Hermes, "Measurement of pitch by subharmonic summation", J.
 * Acoust. Soc. Am. 83(1):257-264, 1988, which also explains the preference for the most teeth).
 */
final class SeamComb {

    /** smallest tile pitch searched, pixels */
    static final int MIN_PITCH = 16;
    /** a tooth may lie this much closer to an end than one step: the two edges of a band straddle the border */
    static final int END_SLACK = 6;
    /**
     * pitches further apart than this (pixels) cannot explain the same borders: the refinement's reach (3 px) on
     * either side plus the teeth's one-pixel window; nearer ones are told apart by the smaller pitch (the demo mosaic
     * of 128 px tiles, whose pitches 126 and 130 both catch its dimmed bands, found 132 when they were compared by
     * their evidence)
     */
    static final int FAR = 7;
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
            if (freePhase() && Math.abs(pitch - o.pitch) > FAR) {
                // pitches far apart that explain as many teeth (two strong teeth each, as on a trimmed axis of three
                // tiles, whose end tiles are partial): the stronger evidence, stray steps are weaker than seams
                return sum > o.sum;
            }
            if (pitch != o.pitch) {
                // the teeth's one-pixel windows let pitches a few pixels apart explain the same borders; the exact
                // refinement that follows moves the pitch up as readily as down
                return pitch < o.pitch;
            }
            return sum > o.sum;
        }
    }

    /**
     * Whether the detection running on this thread reads the mosaic as trimmed
     * ({@link #freePhase(java.util.function.Supplier)}): the scoring of teeth near the ends and the ranking of far
     * pitches depend on it. A thread-scoped setting because the combs are scored from several steps of one detection
     * (tile rows, other axis), which all read the same way and run on the caller's thread; a reading passed as a
     * parameter through {@code TileRowSeams} and {@code CombBands} would be plainer and is the intended next form.
     */
    private static final ThreadLocal<Boolean> FREE_PHASE = ThreadLocal.withInitial(() -> false);

    private SeamComb() {
    }

    /** @return whether the detection on this thread reads the mosaic as trimmed (its end tiles partial) */
    static boolean freePhase() {
        return FREE_PHASE.get();
    }

    /**
     * Runs a detection that reads the mosaic as trimmed: a tooth within a step of an end that shows a seam by itself
     * counts, pitches far apart are ranked by their evidence. An uncropped mosaic is read first (the default), since
     * a trimmed reading lets a comb of a wrong pitch catch a seam near an end that a whole end tile explains (a
     * snake row's shifted seam, measured on draws c-snake-s7204 and s7212 of the independent generator).
     */
    static <T> T freePhase(java.util.function.Supplier<T> detection) {
        boolean was = FREE_PHASE.get();
        FREE_PHASE.set(true);
        try {
            return detection.get();
        } finally {
            FREE_PHASE.set(was);
        }
    }

    /**
     * @return whether border b lies within {@link SeamDetector#MAX_BAND} of an image end, where an overlap past the
     *     last step of an uncropped mosaic (no seam), a snake row's shifted first tooth (no seam) and the border of a
     *     partial tile of a trimmed mosaic (a seam) cannot be told apart: such a tooth is not scored
     */
    static boolean atEnd(int b, int n) {
        return b <= SeamDetector.MAX_BAND || n - b <= SeamDetector.MAX_BAND;
    }

    /**
     * @return whether border b lies closer than one step S to an end: an uncropped mosaic, whose first and last tiles
     *     are whole, has no seam there, a trimmed one (its first or last tile partial, the grid's phase free) does.
     *     Such a tooth counts when its evidence exceeds the seam limit and is not held against the comb when it does
     *     not
     */
    static boolean withinStep(int b, int n, int s) {
        return n - b < s - END_SLACK || b < s - END_SLACK;
    }

    /**
     * @return whether border b lies within half a step (and {@link #END_SLACK}) of an end: twice the pitch of an
     *     uncropped mosaic with an even number of tiles puts its end teeth exactly there, so a partial tile that short
     *     cannot be told from a comb of double pitch; it is left to the smaller pitch (no tooth counted there)
     */
    static boolean withinHalfStep(int b, int n, int s) {
        return n - b <= s / 2 + END_SLACK || b <= s / 2 + END_SLACK;
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
            // teeth near the ends: an uncropped mosaic's end tiles are whole (no seam within a step of an end, an
            // overlap past the last step, a snake row's shifted first tooth), a trimmed one's are partial (a seam)
            if (!inRange(b, n) || (freePhase() ? atEnd(b, n) : withinStep(b, n, s))) {
                continue;
            }
            double t = 0;
            for (int d = -window; d <= window; d++) {
                t = Math.max(t, e.peak(b + d, toothLimit));
            }
            // a tooth within a step of an end counts only where it shows a seam by itself, as a lone edge must:
            // stray steps near the ends, counted at the tooth limit, made combs of uncropped mosaics whose seams are
            // faint (measured on committed draws: a-steps-1 got a pitch of 112 for 100)
            if (withinStep(b, n, s) && (t <= seamLimit || withinHalfStep(b, n, s))) {
                continue;
            }
            teeth++;
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
