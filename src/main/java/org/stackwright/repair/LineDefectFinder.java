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
        double[] win = new double[WINDOW];
        boolean[] run = new boolean[score.length];
        // columns: lines along y, neighbours along x
        for (int x = 0; x < w; x++) {
            for (int sign = 1; sign >= -1; sign -= 2) {
                if (!lineScores(v, off, w, h, x, true, sign, noise, noData, score, dev, outer)) {
                    continue;
                }
                mark(score, dev, outer, h, limit, win, run);
                boolean[] target = sign > 0 ? hot : dead;
                for (int y = 0; y < h; y++) {
                    if (run[y]) {
                        target[y * w + x] = true;
                    }
                }
            }
        }
        // rows: lines along x, neighbours along y
        for (int y = 0; y < h; y++) {
            for (int sign = 1; sign >= -1; sign -= 2) {
                if (!lineScores(v, off, w, h, y, false, sign, noise, noData, score, dev, outer)) {
                    continue;
                }
                mark(score, dev, outer, w, limit, win, run);
                boolean[] target = sign > 0 ? hot : dead;
                for (int x = 0; x < w; x++) {
                    if (run[x]) {
                        target[y * w + x] = true;
                    }
                }
            }
        }
    }

    /**
     * Scores along line `at` (a column when vertical, else a row). One pixel from the border the second neighbour
     * on the outer side is missing and the first one stands in for it.
     *
     * @return false when the plane is too narrow across the line
     */
    private static boolean lineScores(float[] v, int off, int w, int h, int at, boolean vertical, int sign,
            NoiseLevel noise, boolean[] noData, double[] score, double[] dev, double[] outer) {
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
                continue;
            }
            double c = v[p];
            double l = v[p + l1];
            double r = v[p + r1];
            double d = Math.min(sign * (c - l), sign * (c - r));
            dev[s] = d;
            outer[s] = Math.max(Math.abs(l - v[p + l2]), Math.abs(r - v[p + r2]));
            score[s] = d / noise.sigma(0.5 * (l + r));
        }
        return true;
    }

    private static int reflect(int i, int n) {
        return i < 0 ? -i : i >= n ? 2 * n - 2 - i : i;
    }

    /** Sets run[s] for positions of runs at least MIN_LENGTH long whose window medians pass both tests. */
    private static void mark(double[] score, double[] dev, double[] outer, int n, double limit, double[] win,
            boolean[] run) {
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
                trim(score, start, s, n, limit, run);
                start = -1;
            }
        }
        bridge(score, n, run, win);
    }

    /**
     * Bridges short gaps between two runs of one line (a structure crossing the defect interrupts the test, not the
     * defect), and between a run and the border when the gap's median score is still positive.
     */
    private static void bridge(double[] score, int n, boolean[] run, double[] scratch) {
        int lastEnd = -1;
        for (int s = 0; s < n; s++) {
            if (!run[s]) {
                continue;
            }
            boolean between = lastEnd >= 0;
            int gapFrom = between ? lastEnd : 0;
            if (s > gapFrom && s - gapFrom <= BRIDGE && (between || medianPositive(score, gapFrom, s))) {
                java.util.Arrays.fill(run, gapFrom, s, true);
            }
            while (s < n && run[s]) {
                s++;
            }
            lastEnd = s;
        }
        if (lastEnd >= 0 && lastEnd < n && n - lastEnd <= BRIDGE && medianPositive(score, lastEnd, n)) {
            java.util.Arrays.fill(run, lastEnd, n, true);
        }
    }

    private static boolean medianPositive(double[] score, int from, int to) {
        double[] c = java.util.Arrays.copyOfRange(score, from, to);
        return RobustStats.median(c, c.length) > 0;
    }

    /**
     * A run of passing window centres [from, to) marks the pixels from the first to the last one, within half a
     * window beyond the run, whose own score exceeds half the line threshold (the window median blurs the ends).
     */
    private static void trim(double[] score, int from, int to, int n, double limit, boolean[] run) {
        int half = WINDOW / 2;
        int first = -1;
        int last = -1;
        for (int s = Math.max(0, from - half); s < Math.min(n, to + half); s++) {
            if (score[s] > 0.5 * limit) {
                if (first < 0) {
                    first = s;
                }
                last = s;
            }
        }
        if (first >= 0 && last - first + 1 >= MIN_LENGTH) {
            Arrays.fill(run, first, last + 1, true);
        }
    }
}
