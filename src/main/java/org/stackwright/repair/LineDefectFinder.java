package org.stackwright.repair;

import java.util.Arrays;

/**
 * Finds defective columns, rows and segments of them in one plane: a line one pixel wide that reads higher (hot) or
 * lower (dead) than both its neighbours along its length.
 *
 * <p>For each pixel of a candidate column x the deviation from the two sides, dev = min(v(x) - v(x-1), v(x) -
 * v(x+1)) for hot lines (mirrored for dead), is divided by the noise sigma at the neighbours' level
 * ({@link NoiseLevel}). Along the line, the median over a window of {@link #WINDOW} pixels of these scores is a
 * robust test of the line against its neighbours (Hampel, "The influence curve and its role in robust
 * estimation", J. Am. Stat. Assoc. 69:383-393, 1974: the median ignores a minority of crossing structures and
 * outliers); a run of windows whose median exceeds the line threshold marks a segment. A window median of 9
 * scores has a spread of about 1.25 / 3 of one score (the median's asymptotic variance pi / (2 n) sigma^2; any
 * robust statistics text), so the line threshold can be lower than the pixel threshold at the same false-alarm
 * rate: {@link #LINE_FACTOR} times it.
 *
 * <p>Specimen structure is told apart by shape. An edge along the line steps one way, so the line is above one
 * neighbour and below the other: dev is negative. A blurred ridge (a filament lying along a column) falls off
 * gradually: the neighbours themselves differ from the next pixels out by a large share of the ridge's height,
 * whereas beside a defective line the neighbours are flat. The window median of dev must exceed {@link #RIDGE}
 * times the window median of that outer difference (common practice, no source: an optical line spread function
 * sampled at Nyquist drops to about half at one pixel and near zero at two, giving a ratio near 1, while a
 * defect on a flat background gives a ratio of 5 and more).
 *
 * <p>Two pieces of one line are joined into one when the line still stands out between them: a structure crossing
 * a defective column (a cell edge, a bright spot) breaks the edge and ridge tests for as long as it lasts, but not
 * the line's second difference across it, v(x) - (v(x-1) + v(x+1)) / 2, which is blind to any straight slope of
 * the specimen. When its median over the pixels between the pieces exceeds the line threshold in noise sigmas,
 * the pieces are one line, however long the gap. Pixels without data (a gap of zeros between mosaic tiles) count
 * neither way: they are never marked, and a line that crosses them is one line.
 */
final class LineDefectFinder {

    /**
     * Gaps of at most this many pixels between two segments of one line are bridged (a structure crossing a
     * defective column interrupts the test, not the defect), and so are gaps between a segment and the image border
     * when most of their pixels still deviate the same way (common practice, no source).
     */
    static final int BRIDGE = 16;
    /** pixels of the running window along a line */
    static final int WINDOW = 9;
    /** a segment must be at least this long (shorter runs are left to the pixel and cluster test) */
    static final int MIN_LENGTH = 12;
    /** line threshold = this times the pixel threshold k (the window median is about 3x less noisy) */
    static final double LINE_FACTOR = 0.6;
    /** the line's deviation must exceed this multiple of the neighbours' own outward difference */
    static final double RIDGE = 2.0;

    private LineDefectFinder() {
    }

    /**
     * Marks line-defect pixels of one plane.
     *
     * @param v the plane (offset off, width w, height h); not modified
     * @param noise the plane's noise model
     * @param k pixel threshold in sigmas
     * @param noData pixels without data (gaps of zeros): no evidence either way where the line or a neighbour is one
     * @param hot receives true at pixels of hot lines (modified: only set, never cleared)
     * @param dead receives true at pixels of dead lines (modified likewise)
     */
    static void scan(float[] v, int off, int w, int h, NoiseLevel noise, double k, boolean[] noData, boolean[] hot,
            boolean[] dead) {
        double limit = LINE_FACTOR * k;
        double[] score = new double[Math.max(w, h)];
        double[] dev = new double[score.length];
        double[] outer = new double[score.length];
        double[] curve = new double[score.length];
        double[] bend = new double[score.length];
        double[] win = new double[WINDOW];
        boolean[] run = new boolean[score.length];
        // columns: lines along y, neighbours along x
        for (int x = 0; x < w; x++) {
            for (int sign = 1; sign >= -1; sign -= 2) {
                if (!lineScores(v, off, w, h, x, true, sign, noise, noData, score, dev, outer, curve, bend)) {
                    continue;
                }
                mark(score, dev, outer, curve, bend, h, limit, win, run);
                boolean[] target = sign > 0 ? hot : dead;
                for (int y = 0; y < h; y++) {
                    if (run[y] && !noData[y * w + x]) {
                        target[y * w + x] = true;
                    }
                }
            }
        }
        // rows: lines along x, neighbours along y
        for (int y = 0; y < h; y++) {
            for (int sign = 1; sign >= -1; sign -= 2) {
                if (!lineScores(v, off, w, h, y, false, sign, noise, noData, score, dev, outer, curve, bend)) {
                    continue;
                }
                mark(score, dev, outer, curve, bend, w, limit, win, run);
                boolean[] target = sign > 0 ? hot : dead;
                for (int x = 0; x < w; x++) {
                    if (run[x] && !noData[y * w + x]) {
                        target[y * w + x] = true;
                    }
                }
            }
        }
    }

    /**
     * Scores along line `at` (a column when vertical, else a row). One pixel from the border the second neighbour
     * on the outer side is missing and the first one stands in for it. curve receives the second difference across
     * the line in noise sigmas and bend its excess over {@link #RIDGE} times the outer difference (both NaN where
     * the line or a neighbour has no data).
     *
     * @return false when the plane is too narrow across the line
     */
    private static boolean lineScores(float[] v, int off, int w, int h, int at, boolean vertical, int sign,
            NoiseLevel noise, boolean[] noData, double[] score, double[] dev, double[] outer, double[] curve,
            double[] bend) {
        int across = vertical ? w : h;
        int along = vertical ? h : w;
        // the outermost column or row has a neighbour on one side only: a structure along the border cannot be told
        // from a defect there, so it is not tested (its pixels still go through the cluster and pixel test)
        if (across < 5 || at == 0 || at == across - 1) {
            return false;
        }
        int step = vertical ? 1 : w;
        int l1 = (reflect(at - 1, across) - at) * step;
        int r1 = (reflect(at + 1, across) - at) * step;
        // second neighbours; when the mirror lands on the line itself (one pixel from the border) the first one
        int l2 = reflect(at - 2, across) == at ? l1 : (reflect(at - 2, across) - at) * step;
        int r2 = reflect(at + 2, across) == at ? r1 : (reflect(at + 2, across) - at) * step;
        for (int s = 0; s < along; s++) {
            int q = vertical ? s * w + at : at * w + s;
            int p = off + q;
            if (noData[q] || noData[q + l1] || noData[q + r1]) {
                dev[s] = 0;
                outer[s] = 0;
                score[s] = 0;
                curve[s] = Double.NaN;
                bend[s] = Double.NaN;
                continue;
            }
            double c = v[p];
            double l = v[p + l1];
            double r = v[p + r1];
            double d = Math.min(sign * (c - l), sign * (c - r));
            dev[s] = d;
            outer[s] = Math.max(Math.abs(l - v[p + l2]), Math.abs(r - v[p + r2]));
            double sigma = noise.sigma(0.5 * (l + r));
            score[s] = d / sigma;
            curve[s] = sign * (c - 0.5 * (l + r)) / sigma;
            bend[s] = sign * (c - 0.5 * (l + r)) - RIDGE * outer[s];
        }
        return true;
    }

    private static int reflect(int i, int n) {
        return i < 0 ? -i : i >= n ? 2 * n - 2 - i : i;
    }

    /** Sets run[s] for positions of runs at least MIN_LENGTH long whose window medians pass both tests. */
    private static void mark(double[] score, double[] dev, double[] outer, double[] curve, double[] bend, int n,
            double limit, double[] win, boolean[] run) {
        Arrays.fill(run, 0, n, false);
        if (n < MIN_LENGTH) {
            return;
        }
        int half = WINDOW / 2;
        int start = -1;
        for (int s = 0; s <= n; s++) {
            boolean pass = false;
            if (s < n) {
                int lo = Math.max(0, Math.min(n - WINDOW, s - half));
                int m = Math.min(WINDOW, n);
                System.arraycopy(score, lo, win, 0, m);
                if (RobustStats.medianInPlace(win, m) > limit) {
                    System.arraycopy(dev, lo, win, 0, m);
                    double md = RobustStats.medianInPlace(win, m);
                    System.arraycopy(outer, lo, win, 0, m);
                    pass = md > RIDGE * RobustStats.medianInPlace(win, m);
                }
            }
            if (pass && start < 0) {
                start = s;
            } else if (!pass && start >= 0) {
                trim(curve, bend, start, s, n, limit, run);
                start = -1;
            }
        }
        bridge(score, curve, bend, n, limit, run);
    }

    /**
     * Bridges gaps between two runs of one line when they are short or the line still stands out across them
     * ({@link #standsOut}: a structure crossing the defect interrupts the test, not the defect), and between a run
     * and the border when the gap's median score is still positive or the line stands out there too.
     */
    private static void bridge(double[] score, double[] curve, double[] bend, int n, double limit, boolean[] run) {
        int lastEnd = -1;
        for (int s = 0; s < n; s++) {
            if (!run[s]) {
                continue;
            }
            boolean between = lastEnd >= 0;
            int gapFrom = between ? lastEnd : 0;
            if (s > gapFrom && (s - gapFrom <= BRIDGE && (between || medianPositive(score, gapFrom, s))
                    || standsOut(curve, gapFrom, s, limit, true) && (between || notRidge(bend, gapFrom, s)))) {
                java.util.Arrays.fill(run, gapFrom, s, true);
            }
            while (s < n && run[s]) {
                s++;
            }
            lastEnd = s;
        }
        if (lastEnd >= 0 && lastEnd < n && (n - lastEnd <= BRIDGE && medianPositive(score, lastEnd, n)
                || standsOut(curve, lastEnd, n, limit, true) && notRidge(bend, lastEnd, n))) {
            java.util.Arrays.fill(run, lastEnd, n, true);
        }
    }

    /**
     * Whether the median second difference over the pixels with data of [from, to) exceeds the line threshold;
     * emptyPasses: whether a range without any data stands out (a gap of no data is no evidence against a line).
     */
    private static boolean standsOut(double[] curve, int from, int to, double limit, boolean emptyPasses) {
        double[] c = new double[to - from];
        int m = 0;
        for (int s = from; s < to; s++) {
            if (!Double.isNaN(curve[s])) {
                c[m++] = curve[s];
            }
        }
        return m == 0 ? emptyPasses : RobustStats.median(c, m) > limit;
    }

    /**
     * Whether [from, to) is no ridge of the specimen: the median second difference exceeds {@link #RIDGE} times the
     * neighbours' outward difference (the ridge test of the class comment, on the slope-blind second difference).
     */
    private static boolean notRidge(double[] bend, int from, int to) {
        return standsOut(bend, from, to, 0, false);
    }

    private static boolean medianPositive(double[] score, int from, int to) {
        double[] c = java.util.Arrays.copyOfRange(score, from, to);
        return RobustStats.median(c, c.length) > 0;
    }

    /**
     * A run of passing window centres [from, to) marks its pixels, and beyond each end the pixels that continue
     * it: while the median second difference over the next {@link #WINDOW} pixels still stands out, and then pixel
     * by pixel while a pixel's own second difference exceeds half the line threshold (a window median passes as soon
     * as five of its nine pixels are defective, so the run of centres starts and ends near the defect's ends; a
     * structure along the line's end breaks the edge test there, not the second difference; the ridge test keeps a
     * filament that continues the line from being taken for it).
     */
    private static void trim(double[] curve, double[] bend, int from, int to, int n, double limit, boolean[] run) {
        int first = from;
        int last = to - 1;
        while (first > 0 && standsOut(curve, Math.max(0, first - WINDOW), first, limit, false)
                && notRidge(bend, Math.max(0, first - WINDOW), first)) {
            first--;
        }
        while (first > 0 && curve[first - 1] > 0.5 * limit && bend[first - 1] > 0) {
            first--;
        }
        while (last < n - 1 && standsOut(curve, last + 1, Math.min(n, last + 1 + WINDOW), limit, false)
                && notRidge(bend, last + 1, Math.min(n, last + 1 + WINDOW))) {
            last++;
        }
        while (last < n - 1 && curve[last + 1] > 0.5 * limit && bend[last + 1] > 0) {
            last++;
        }
        if (last - first + 1 >= MIN_LENGTH) {
            Arrays.fill(run, first, last + 1, true);
        }
    }
}
