package org.stackwright.repair;

import java.util.Arrays;

import org.stackwright.volume.Volume;

/**
 * The tile step along one axis from the shading every tile shares, for seams too faint to show at a single border
 * (tiles of equal gain whose vignetting makes a step of 2-3 % and a gentle corner; blended overlaps). Each block of
 * {@link #BLOCK} lines gives a profile along the axis: the log of the median of its lines at every position (the
 * median drops most of the specimen), cleaned of narrow lines by a running median of 5. At a candidate step P and
 * phase the profile is cut into tiles and fitted by a level per tile and block plus one template over the tile, common
 * to all tiles and blocks, both by medians in turn (a robust two-way fit: Tukey, "Exploratory Data Analysis",
 * Addison-Wesley 1977, ch. 11, median polish). The score is cross-validated over up to {@link #FOLDS} folds of
 * tiles: the template fitted to the other folds is scored on each, as the share of the absolute residual (about the
 * tile levels alone) it removes, every residual clipped at {@link #CLIP} robust sigmas so that a cell in one block
 * weighs the same with and without the template. The specimen does not repeat with the tiles, and a smooth trend
 * over the whole image differs from tile to tile: a template fitted to either predicts the other tiles no better than
 * nothing (score near 0); the shading repeats, so the true step scores well above that.
 *
 * <p>Where the seam lies in the tile is read from the template itself: vignetting darkens every tile towards its
 * borders, so the template, repeated, has its sharpest valley (a convex corner: the slope jumps up) near the seam.
 * The exact step is the best score near the best step among the tilings of an uncropped mosaic: the first tile
 * starts at the image's first pixel with the template's valley within {@link #FIT} / 2 of it, the last tile ends at
 * the image's last pixel (give or take an overlap of up to {@link SeamDetector#MAX_BAND}), and the seams pass through
 * every seam already found (a gap of zeros). The same template supports a tile row whose seams are too faint for a
 * comb of their own when another tile row found the step ({@link #supports}).
 */
final class SeamTemplate {

    /** lines per block of the profiles */
    static final int BLOCK = 16;
    /**
     * at most this many blocks per plane (longer lines go into larger blocks): the fits' work grows with the blocks,
     * and 32 medians of 16 or more lines already give the template; images under 528 lines are unchanged by it
     */
    static final int MAX_BLOCKS = 32;
    /**
     * profiles longer than this are searched for the best step first binned to about this length, then at full
     * resolution near the step found: the search's work grows with the length squared (a 2048-px axis took 128 s of
     * CPU before, SeamDetectBenchmark); profiles up to this length are searched as before
     */
    static final int COARSE = 512;
    /**
     * the cross-validated score a tiling needs; on invented mosaics ({@code InventedMosaic}, seeds 44-53) without
     * seams along the axis the best of all steps scored at most 0.010, at the true step of seams of shading only (2x4
     * tiles of 110 px, 3x3 of 128 px) 0.078 to 0.23 (our measurement, no published value)
     */
    static final double SCORE = 0.03;
    /** folds of the cross-validation (at most; one tile each up to this many tiles) */
    static final int FOLDS = 4;
    /** residuals are clipped at this many robust sigmas (1.4826 MAD) of the fit to all tiles */
    static final double CLIP = 2;
    /** the template's corner at the seam must exceed the spread of its corners elsewhere this many times */
    static final double CORNER = 3;
    /** pixels of each straight-line fit of the template's corner test */
    static final int FIT = 8;
    /** phases tried per step in the search (the fit is nearly blind to the phase; the valley fixes it later) */
    static final int PHASES = 4;
    /** a tiling needs this many tiles along the axis: two tiles fold a smooth trend as readily as a shading */
    static final int MIN_TILES = 3;

    /**
     * @param pitch the tile step
     * @param phase the first seam border (in [0, pitch))
     * @param score the cross-validated share of the absolute residual the template removes
     * @param corner the template's corner at the seam over the spread of its corners elsewhere
     */
    record Fold(int pitch, int phase, double score, double corner) {

        /** @return whether the evidence passes both limits */
        boolean found() {
            return score >= SCORE && corner >= CORNER;
        }
    }

    /**
     * Block profiles along one axis: log medians, running median 5; positions with missing data are not valid. The
     * best step's search ({@link #bestStep}) is kept with them: several rules of one detection ask for it.
     */
    static final class Profiles {
        final double[][] m;
        final boolean[] valid;
        /** the result of {@link #bestStep}, {@link Integer#MIN_VALUE} until it is first asked for */
        private int best = Integer.MIN_VALUE;

        private Profiles(double[][] m, boolean[] valid) {
            this.m = m;
            this.valid = valid;
        }

        int length() {
            return valid.length;
        }

        /** @return these profiles averaged over bins of f positions (a bin is valid when all its positions are) */
        Profiles binned(int f) {
            int nb = length() / f;
            double[][] mb = new double[m.length][nb];
            boolean[] vb = new boolean[nb];
            for (int b = 0; b < nb; b++) {
                vb[b] = true;
                for (int i = b * f; i < b * f + f; i++) {
                    vb[b] &= valid[i];
                }
                for (int j = 0; j < m.length; j++) {
                    double sum = 0;
                    for (int i = b * f; i < b * f + f; i++) {
                        sum += m[j][i];
                    }
                    mb[j][b] = sum / f;
                }
            }
            return new Profiles(mb, vb);
        }
    }

    private SeamTemplate() {
    }

    /** @return the block profiles of the image along x (alongX) or y */
    static Profiles profiles(Volume v, boolean alongX) {
        return profiles(v, alongX, 0, alongX ? v.height() : v.width());
    }

    /** @return the block profiles of the image along x (alongX) or y over the lines [from, to) of the other axis */
    static Profiles profiles(Volume v, boolean alongX, int from, int to) {
        int w = v.width();
        int h = v.height();
        int n = alongX ? w : h;
        int lines = to - from;
        int step = alongX ? 1 : w;
        int lineStep = alongX ? w : 1;
        float[] f = v.data();
        int perSlice = Math.max(1, Math.min(MAX_BLOCKS, lines / BLOCK));
        int blockLines = perSlice < lines / BLOCK ? lines / perSlice : BLOCK;
        double[][] m = new double[perSlice * v.depth()][n];
        long[] zeros = new long[n];
        double[] col = new double[lines];
        double[] win = new double[5];
        for (int z = 0; z < v.depth(); z++) {
            for (int j = 0; j < perSlice; j++) {
                int l0 = from + j * blockLines;
                int l1 = j == perSlice - 1 ? to : l0 + blockLines;
                double[] raw = new double[n];
                for (int i = 0; i < n; i++) {
                    int c = 0;
                    for (int l = l0; l < l1; l++) {
                        float val = f[z * w * h + l * lineStep + i * step];
                        if (val == 0) {
                            zeros[i]++;
                        }
                        col[c++] = val;
                    }
                    raw[i] = Math.log(Math.max(1, RobustStats.medianInPlace(col, c)));
                }
                double[] row = m[z * perSlice + j];
                for (int i = 0; i < n; i++) {
                    int c = 0;
                    for (int d = -2; d <= 2; d++) {
                        win[c++] = raw[Math.min(n - 1, Math.max(0, i + d))];
                    }
                    row[i] = RobustStats.medianInPlace(win, c);
                }
            }
        }
        boolean[] valid = new boolean[n];
        long all = (long) lines * v.depth();
        for (int i = 0; i < n; i++) {
            valid[i] = true;
            for (int d = -2; d <= 2; d++) {
                int q = Math.min(n - 1, Math.max(0, i + d));
                valid[i] &= zeros[q] < 0.5 * all;
            }
        }
        return new Profiles(m, valid);
    }

    /**
     * @return the step of the best cross-validated score over all steps with at least {@link #MIN_TILES} tiles (every
     *     second step, then the neighbours of the best; the smallest step that explains nearly as much as a multiple
     *     of it), or -1 when the axis is too short; searched once per profiles (the profiles are read only)
     */
    static int bestStep(Profiles p) {
        if (p.best == Integer.MIN_VALUE) {
            p.best = searchBestStep(p);
        }
        return p.best;
    }

    private static int searchBestStep(Profiles p) {
        int f = (p.length() + COARSE - 1) / COARSE;
        if (f == 1) {
            return searchBestStep(p, SeamComb.MIN_PITCH);
        }
        int coarse = searchBestStep(p.binned(f), (SeamComb.MIN_PITCH + f - 1) / f);
        int hi = p.length() / MIN_TILES;
        if (coarse < 0 || hi < SeamComb.MIN_PITCH) {
            return -1;
        }
        double[] score = new double[hi + 2];
        Arrays.fill(score, Double.NEGATIVE_INFINITY);
        int best = -1;
        for (int s = Math.max(SeamComb.MIN_PITCH, (coarse - 1) * f); s <= Math.min(hi, (coarse + 1) * f); s++) {
            scoreAt(p, s, score);
            best = best < 0 || score[s] > score[best] ? s : best;
        }
        return best;
    }

    /** The search of {@link #bestStep} over steps from lo px on profiles of their full resolution. */
    private static int searchBestStep(Profiles p, int lo) {
        int hi = p.length() / MIN_TILES;
        if (hi < lo) {
            return -1;
        }
        double[] score = new double[hi + 2];
        Arrays.fill(score, Double.NEGATIVE_INFINITY);
        int best = lo;
        for (int s = lo; s <= hi; s += 2) {
            scoreAt(p, s, score);
            best = score[s] > score[best] ? s : best;
        }
        for (int s = Math.max(lo, best - 1); s <= Math.min(hi, best + 1); s++) {
            scoreAt(p, s, score);
            best = score[s] > score[best] ? s : best;
        }
        // a multiple of the step fits as well: take the smallest step that explains nearly as much
        for (int div = MIN_TILES; div >= 2; div--) {
            int q = Math.round(best / (float) div);
            for (int s = Math.max(lo, q - 2); s <= Math.min(hi, q + 2); s++) {
                scoreAt(p, s, score);
                if (score[s] >= 0.9 * score[best]) {
                    best = s;
                }
            }
        }
        return best;
    }

    /** @return whether step s lies within the search's reach (3 px or 5 %) of the best-scoring step */
    static boolean nearBestStep(Profiles p, int s) {
        int best = bestStep(p);
        return best > 0 && near(best, s);
    }

    private static int reach(int best) {
        return Math.max(3, best / 20);
    }

    /**
     * Searches all steps with at least {@link #MIN_TILES} tiles ({@link #bestStep}), then picks the exact step near
     * the best one.
     *
     * @param anchors seams already found along the axis (borders), may be empty
     * @return the fold found (check {@link Fold#found()}), or null when the axis is too short or no tiling near the
     *     best step starts at the image's first pixel with its darkest corner there and passes through the anchors
     */
    static Fold find(Profiles p, int[] anchors) {
        return find(p, anchors, new int[0]);
    }

    /**
     * As {@link #find(Profiles, int[])}, the tiling's seams also passing exactly through every gap's first zero: that
     * is the tile border itself (the stitcher leaves no data from there), where the anchor of a step found is the
     * centre of its band, within a pixel of the border.
     *
     * @param gaps first zero of every gap of zeros along the axis, may be empty
     */
    static Fold find(Profiles p, int[] anchors, int[] gaps) {
        return find(p, anchors, gaps, 1);
    }

    /**
     * As {@link #find(Profiles, int[], int[])} over steps within widen times the search's reach of the best step: a
     * fold through a seam that shows by itself may lie further from the best-scoring step ({@link FoldEdges})
     */
    static Fold find(Profiles p, int[] anchors, int[] gaps, int widen) {
        int n = p.length();
        int hi = n / MIN_TILES;
        int best = bestStep(p);
        if (best < 0) {
            return null;
        }
        // the exact step: the best score at phase 0 near the best step, among the tilings whose first tile starts at
        // the image's first pixel and whose last tile ends at the last one, give or take an overlap (an uncropped
        // mosaic), whose seams pass through every seam already found, and whose template has its sharpest valley
        // within FIT / 2 of the seam (an off-centre vignetting moves the sharpest corner by a few pixels; our
        // measurement on InventedMosaic: up to 3 px)
        Fold pick = null;
        int r = widen * reach(best);
        for (int s = Math.max(SeamComb.MIN_PITCH, best - r); s <= Math.min(hi, best + r); s++) {
            if (!onTeeth(anchors, s, 0, 1) || !onTeeth(gaps, s, 0, 0) || n % s > SeamDetector.MAX_BAND) {
                continue;
            }
            double[] t = template(p, s, 0);
            int u = sharpest(t);
            if (Math.min(u, s - u) > FIT / 2) {
                continue;
            }
            double sc = score(p, s, 0);
            if (pick == null || sc > pick.score()) {
                pick = new Fold(s, 0, sc, cornerAt(t, u));
            }
        }
        return pick;
    }

    /**
     * Whether the shading supports vertical seams of step s and phase ph in a tile row [from, to) whose seams are too
     * faint for a comb of their own, the step and phase found in other tile rows: the template at that tiling explains
     * the shading of the whole mosaic (its cross-validated score reaches {@link #SCORE} and the step lies near the
     * best-scoring step of all, {@link #bestStep}) and the template of the tile
     * row alone has its sharpest valley within {@link #FIT} / 2 of the phase.
     *
     * @param alongX the profiles of the whole image along x ({@link #profiles(Volume, boolean)}), shared by the rules
     */
    static boolean supports(Profiles alongX, Volume v, int from, int to, int s, int ph) {
        if (score(alongX, s, ph) < SCORE) {
            return false;
        }
        return valleyAt(v, from, to, s, ph) && nearBestStep(alongX, s);
    }

    /**
     * @return the best-scoring step ({@link #bestStep}) when the shading every tile shares shows it (its
     *     cross-validated score, the best of {@link #PHASES} phases, reaches {@link #SCORE}), else -1: a mosaic
     *     without shading, or one whose tiles differ only in gain, shows no step of its own here
     */
    static int shownStep(Profiles p) {
        int best = bestStep(p);
        if (best < 0) {
            return -1;
        }
        double sc = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < PHASES; k++) {
            sc = Math.max(sc, score(p, best, k * best / PHASES));
        }
        return sc >= SCORE ? best : -1;
    }

    /** @return whether step s lies within the search's reach (3 px or 5 %) of step best */
    static boolean near(int best, int s) {
        return Math.abs(s - best) <= reach(best);
    }

    /**
     * @return whether the template of the tile row [from, to) alone, at step s and phase ph, has its sharpest valley
     *     within {@link #FIT} / 2 of the phase (vignetting darkens every tile towards its borders)
     */
    static boolean valleyAt(Volume v, int from, int to, int s, int ph) {
        int u = Math.floorMod(sharpest(template(profiles(v, true, from, to), s, ph)), s);
        return Math.min(u, s - u) <= FIT / 2;
    }

    /** @return whether every anchor lies within slack px of a seam of step s, phase ph */
    private static boolean onTeeth(int[] anchors, int s, int ph, int slack) {
        for (int a : anchors) {
            int d = Math.floorMod(a - ph, s);
            if (Math.min(d, s - d) > slack) {
                return false;
            }
        }
        return true;
    }

    /** The best cross-validated score of step s over {@link #PHASES} phases, kept in score[s] (computed once). */
    private static void scoreAt(Profiles p, int s, double[] score) {
        if (score[s] != Double.NEGATIVE_INFINITY) {
            return;
        }
        for (int k = 0; k < PHASES; k++) {
            score[s] = Math.max(score[s], score(p, s, k * s / PHASES));
        }
    }

    /**
     * @return the share of the absolute residual (tile levels only) that the template at step s, phase ph removes,
     *     cross-validated over {@link #FOLDS} folds of tiles (tile index modulo the folds; one tile per fold up to
     *     four tiles): the template fitted to the other folds is scored on each, so that a template fitted to noise or
     *     to a smooth trend that differs from tile to tile scores nothing or less. Each residual is clipped at
     *     {@link #CLIP} robust sigmas of the residual of the fit to all tiles: a cell or a bright structure in one
     *     block then weighs the same with and without the template, instead of swamping the shading's few percent
     *     (a Huber-like bounded loss: Huber, "Robust estimation of a location parameter", Ann. Math. Stat.
     *     35:73-101, 1964)
     */
    static double score(Profiles p, int s, int ph) {
        double[][] r = foldResiduals(p, s, ph, false);
        if (r == null) {
            return 0;
        }
        double base = r[2][0];
        double crossed = 0;
        for (double c : r[1]) {
            crossed += c;
        }
        return base > 0 ? 1 - crossed / base : 0;
    }

    /**
     * @return the least, over the folds of tiles of {@link #score}, of the share of that fold's clipped residual the
     *     template fitted to the other folds removes: a repeating shading is predicted in every tile, one falloff over
     *     the whole image cut into tiles is not (its middle tile is a cap, its outer tiles slopes)
     */
    static double worstFold(Profiles p, int s, int ph) {
        double[][] r = foldResiduals(p, s, ph, true);
        if (r == null) {
            return 0;
        }
        double worst = Double.MAX_VALUE;
        for (int k = 0; k < r[0].length; k++) {
            worst = Math.min(worst, r[0][k] > 0 ? 1 - r[1][k] / r[0][k] : 0);
        }
        return worst;
    }

    /**
     * @param perFold whether each fold's residual without a template is wanted ({@link #worstFold}), else that of all
     *     tiles ({@link #score}; the search's hot path makes only the one)
     * @return per fold of tiles k: [0][k] its clipped residual without a template (perFold), [1][k] with the template
     *     fitted to the other folds; [2][0] the clipped residual of all tiles without a template (not perFold); null
     *     with fewer than two tiles
     */
    private static double[][] foldResiduals(Profiles p, int s, int ph, boolean perFold) {
        Fit all = fit(p, s, ph, -1, 1);
        int tiles = all.tiles();
        if (tiles < 2) {
            return null;
        }
        int folds = Math.min(FOLDS, tiles);
        double clip = CLIP * RobustStats.MAD_TO_SIGMA * all.medianAbs(p, all.template);
        double[][] r = new double[3][folds];
        if (!perFold) {
            r[2][0] = all.residualOn(p, new double[s], -1, folds, clip);
        }
        for (int k = 0; k < folds; k++) {
            if (perFold) {
                r[0][k] = all.residualOn(p, new double[s], k, folds, clip);
            }
            r[1][k] = all.residualOn(p, fit(p, s, ph, k, folds).template, k, folds, clip);
        }
        return r;
    }

    /** @return the template over one tile at step s, phase ph (index 0 = the border at ph), fitted to all tiles */
    static double[] template(Profiles p, int s, int ph) {
        return fit(p, s, ph, -1, 1).template;
    }

    /** A template and the tiling it was fitted on. */
    private record Fit(double[] template, int[] pos, int[] tile, int[] u, int cnt) {

        int tiles() {
            return cnt == 0 ? 0 : tile[cnt - 1] + 1;
        }

        /** @return the levels of every block and tile for the template t */
        double[][] levelsFor(Profiles p, double[] t) {
            double[][] level = new double[p.m.length][tiles()];
            levels(p, pos, tile, cnt, t, u, level, new double[Math.max(1, p.length())]);
            return level;
        }

        /** @return the median absolute residual of all tiles about their levels plus the template t */
        double medianAbs(Profiles p, double[] t) {
            double[][] level = levelsFor(p, t);
            double[] r = new double[p.m.length * cnt];
            int m = 0;
            for (int j = 0; j < p.m.length; j++) {
                for (int c = 0; c < cnt; c++) {
                    r[m++] = Math.abs(p.m[j][pos[c]] - level[j][tile[c]] - t[u[c]]);
                }
            }
            return select(r, m);
        }

        /**
         * @return the absolute residual, each term clipped at clip, of the tiles of fold k (tile index modulo folds;
         *     all tiles for k < 0) about their levels plus the template t (fitted elsewhere), the levels fitted again
         *     for t
         */
        double residualOn(Profiles p, double[] t, int k, int folds, double clip) {
            double[][] level = levelsFor(p, t);
            double sum = 0;
            for (int j = 0; j < p.m.length; j++) {
                for (int c = 0; c < cnt; c++) {
                    if (k < 0 || tile[c] % folds == k) {
                        sum += Math.min(clip, Math.abs(p.m[j][pos[c]] - level[j][tile[c]] - t[u[c]]));
                    }
                }
            }
            return sum;
        }
    }

    /**
     * Median polish of the profiles into a level per tile and block plus a template over the tile.
     *
     * @param k the template from all tiles but those of fold k (tile index modulo folds), or from all (k < 0)
     */
    private static Fit fit(Profiles p, int s, int ph, int k, int folds) {
        int n = p.length();
        int blocks = p.m.length;
        // tile index and position in the tile of every valid position
        int[] pos = new int[n];
        int[] tile = new int[n];
        int[] u = new int[n];
        int cnt = 0;
        int firstTile = Math.floorDiv(-ph, s);
        for (int i = 0; i < n; i++) {
            if (p.valid[i]) {
                pos[cnt] = i;
                tile[cnt] = Math.floorDiv(i - ph, s) - firstTile;
                u[cnt] = Math.floorMod(i - ph, s);
                cnt++;
            }
        }
        int tiles = cnt == 0 ? 0 : tile[cnt - 1] + 1;
        double[][] level = new double[blocks][tiles];
        double[] t = new double[s];
        double[] buf = new double[Math.max(n, blocks * (tiles + 1))];
        levels(p, pos, tile, cnt, t, u, level, buf);
        // the valid positions grouped by their position in the tile (a counting sort)
        int[] start = new int[s + 1];
        for (int c = 0; c < cnt; c++) {
            start[u[c] + 1]++;
        }
        for (int q = 0; q < s; q++) {
            start[q + 1] += start[q];
        }
        int[] byU = new int[cnt];
        int[] fill = Arrays.copyOf(start, s);
        for (int c = 0; c < cnt; c++) {
            byU[fill[u[c]]++] = c;
        }
        for (int it = 0; it < 2; it++) {
            // the template: median over blocks and tiles at each position in the tile
            for (int q = 0; q < s; q++) {
                int m = 0;
                for (int j = 0; j < blocks; j++) {
                    for (int i = start[q]; i < start[q + 1]; i++) {
                        int c = byU[i];
                        if (k >= 0 && tile[c] % folds == k) {
                            continue;
                        }
                        buf[m++] = p.m[j][pos[c]] - level[j][tile[c]];
                    }
                }
                t[q] = m == 0 ? 0 : select(buf, m);
            }
            levels(p, pos, tile, cnt, t, u, level, buf);
        }
        return new Fit(t, pos, tile, u, cnt);
    }

    /** The level of each tile in each block: the median of the profile less the template over the tile. */
    private static void levels(Profiles p, int[] pos, int[] tile, int cnt, double[] t, int[] u, double[][] level,
            double[] buf) {
        for (int j = 0; j < p.m.length; j++) {
            int c = 0;
            while (c < cnt) {
                int k = tile[c];
                int m = 0;
                while (c < cnt && tile[c] == k) {
                    buf[m++] = p.m[j][pos[c]] - t[u[c]];
                    c++;
                }
                level[j][k] = select(buf, m);
            }
        }
    }

    /** @return the position of the largest convex corner of the template repeated with its period */
    static int sharpest(double[] t) {
        double[] k = corners(t);
        int best = 0;
        for (int q = 1; q < t.length; q++) {
            if (k[q] > k[best]) {
                best = q;
            }
        }
        return best;
    }

    /**
     * @return the corner at position u over the robust spread (1.4826 MAD about the median) of the corners more than
     *     {@link #FIT} positions away: how much sharper the valley at the seam is than the template's curvature
     *     elsewhere
     */
    static double cornerAt(double[] t, int u) {
        double[] k = corners(t);
        int s = t.length;
        double[] rest = new double[s];
        int m = 0;
        for (int d = FIT + 1; d < s - FIT; d++) {
            rest[m++] = k[Math.floorMod(u + d, s)];
        }
        if (m < 8) {
            return 0;
        }
        double[] ms = RobustStats.medianSigma(rest, m);
        return ms[1] > 0 ? (k[u] - ms[0]) / ms[1] : 0;
    }

    /** Slope of a straight line over the FIT positions after q minus that over the FIT before, t repeated. */
    private static double[] corners(double[] t) {
        int s = t.length;
        double[] k = new double[s];
        double mt = 0.5 * (FIT - 1);
        double den = 0;
        for (int d = 0; d < FIT; d++) {
            den += (d - mt) * (d - mt);
        }
        for (int q = 0; q < s; q++) {
            double right = 0;
            double left = 0;
            for (int d = 0; d < FIT; d++) {
                right += (d - mt) * t[Math.floorMod(q + d, s)];
                left += (d - mt) * t[Math.floorMod(q - FIT + d, s)];
            }
            k[q] = (right - left) / den;
        }
        return k;
    }

    /** Median of the first m values of a (reordered): Hoare's selection, average of the two middle ones when even. */
    static double select(double[] a, int m) {
        if (m == 0) {
            return 0;
        }
        double hiMid = kth(a, 0, m - 1, m / 2);
        if (m % 2 == 1) {
            return hiMid;
        }
        double loMid = a[0];
        for (int i = 1; i < m / 2; i++) {
            loMid = Math.max(loMid, a[i]);
        }
        return 0.5 * (loMid + hiMid);
    }

    private static double kth(double[] a, int lo, int hi, int k) {
        while (lo < hi) {
            double pivot = a[(lo + hi) >>> 1];
            int i = lo;
            int j = hi;
            while (i <= j) {
                while (a[i] < pivot) {
                    i++;
                }
                while (a[j] > pivot) {
                    j--;
                }
                if (i <= j) {
                    double x = a[i];
                    a[i] = a[j];
                    a[j] = x;
                    i++;
                    j--;
                }
            }
            if (k <= j) {
                hi = j;
            } else if (k >= i) {
                lo = i;
            } else {
                return a[k];
            }
        }
        return a[k];
    }
}
