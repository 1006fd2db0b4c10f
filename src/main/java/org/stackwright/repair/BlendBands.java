package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.volume.Volume;

/**
 * Blend bands of a stitched mosaic found from its noise. Every tile is an exposure of its own, with its own photon
 * and read noise, and the stitcher blends the tiles after acquisition: inside a band where two tiles are averaged
 * with weights w and 1 - w (w running linearly across the overlap) the noise variance is w^2 + (1 - w)^2 of one
 * exposure's, down to 0.5 in the middle of the band (the variance of a weighted sum of independent variables;
 * Bevington &amp; Robinson, "Data Reduction and Error Analysis for the Physical Sciences", 3rd ed. 2003, ch. 3-4,
 * propagation of errors; cited from memory). The specimen cannot fake this: its structure adds to the residuals,
 * it does not remove noise. The dip repeats with the tile step.
 *
 * <p>The profile of {@link NoiseRatioProfile} along an axis (3-point running median against single defective
 * lines) is compared, at every start s and width W, with the dip of a linear blend, g(x) = 2 u (1 - u),
 * u = (x - s + 0.5) / W (the deficit 1 - w^2 - (1 - w)^2): a matched filter gives a z per band, the deficit's
 * robust spread (1.4826 MAD over the axis) its noise. A comb over the tile step then keeps the step and phase at
 * which every band inside the image (away from its ends by one step, less a slack) is a dip of z >= {@link #TOOTH}
 * whose depth is that of a blend ({@link #MIN_DEPTH} to {@link #MAX_DEPTH} of the expected 0.5 in the middle),
 * with at least two bands. The band's ends (the overlap) are then fitted to all bands together by least squares
 * with the depth of the model, the baseline taken again away from the bands.
 *
 * <p>No noise dip shows when the noise was denoised (non-linearly) before blending or after it, or smoothed beyond
 * what {@link NoisePredictor} sees through, or when the tiles were not blended (the later tile covering the
 * overlap): then nothing is found here and the steps and shading ({@link SeamEvidence}, {@link SeamTemplate}) are
 * all that is left.
 */
final class BlendBands {

    /** narrowest and widest blend band searched, pixels (a best comb at the widest is taken for a trend: none) */
    static final int MIN_WIDTH = 6;
    static final int MAX_WIDTH = SeamDetector.MAX_BAND;
    /** each band of the comb needs a matched-filter z of at least this */
    static final double TOOTH = 4;
    /** the dip's fitted depth, as a share of a linear blend's, must lie in this range */
    static final double MIN_DEPTH = 0.5;
    static final double MAX_DEPTH = 1.6;
    /** half width of the running median that is the profile's baseline: four of the widest bands */
    static final int BASELINE = 2 * MAX_WIDTH;
    /** the comb's summed z over the root of its number of bands must reach this */
    static final double COMB = 8;
    /** and the mean depth of its dips this (a linear blend of two exposures: about 0.7 to 1 on the invented mosaics) */
    static final double MIN_MEAN_DEPTH = 0.6;
    /** the band's start is refined this far around the comb's, pixels */
    static final int REFINE = 4;
    /**
     * the two axes' free widths at most this far apart are taken for one overlap (fitted: 18 of the 20 draws of
     * tune-d-blend, one overlap on both axes, have free widths this close; 4 or more gave the same draws)
     */
    static final int ONE_OVERLAP = 4;

    /**
     * The blend bands along one axis.
     *
     * @param step tile step (pixels between the starts of neighbouring bands)
     * @param width band width: the overlap
     * @param starts first pixel of each band
     * @param z matched-filter z of each band
     * @param depth fitted depth of the dips, 1 for a linear blend of two independent exposures
     */
    record Axis(int step, int width, int[] starts, double[] z, double depth) {

        /** @return the phase of the comb: the first band's start modulo the step */
        int phase() {
            return Math.floorMod(starts[0], step);
        }
    }

    /**
     * @param x bands of columns (vertical seams), null when none
     * @param y bands of rows (horizontal seams), null when none
     */
    record Found(Axis x, Axis y) {
        static final Found NONE = new Found(null, null);
    }

    private BlendBands() {
    }

    /** @param image the mosaic, not modified */
    static Found find(Volume image) {
        NoiseRatioProfile p = NoiseRatioProfile.of(image);
        if (p == null) {
            return Found.NONE;
        }
        Axis cx = comb(p.columns);
        Axis cy = comb(p.rows);
        if (cx == null || cy == null) {
            return new Found(cx == null ? null : refine(p.columns, cx), cy == null ? null : refine(p.rows, cy));
        }
        Fits fx = fits(p.columns, cx);
        Fits fy = fits(p.rows, cy);
        Axis[] both = oneOverlap(fx, fy);
        return both != null ? new Found(both[0], both[1]) : new Found(fx.best(), fy.best());
    }

    /** @return the blend bands of one profile (ratio per line, 1 = one exposure), or null */
    static Axis along(double[] ratio) {
        Axis a = comb(ratio);
        return a == null ? null : refine(ratio, a);
    }

    /** @return the best comb of blend dips of one profile, step and width still those of the comb search, or null */
    private static Axis comb(double[] ratio) {
        int n = ratio.length;
        if (n < 2 * SeamComb.MIN_PITCH) {
            return null;
        }
        double[] deficit = deficit(ratio, null, 0, 0);
        Axis best = null;
        double bestSum = 0;
        for (int wdt = MIN_WIDTH; wdt <= MAX_WIDTH; wdt++) {
            double[][] zd = filter(deficit, wdt);
            for (int pitch = Math.max(SeamComb.MIN_PITCH, wdt + 1); pitch <= n / 2; pitch++) {
                for (int phase = 0; phase < pitch; phase++) {
                    Axis a = comb(zd, n, pitch, phase, wdt);
                    if (a == null) {
                        continue;
                    }
                    double sum = 0;
                    for (double z : a.z()) {
                        sum += z;
                    }
                    if (sum > bestSum) {
                        bestSum = sum;
                        best = a;
                    }
                }
            }
        }
        // a best dip at the widest width searched is a slower trend of the noise ratio, not a band of blending
        return best == null || best.width() == MAX_WIDTH ? null : best;
    }

    /**
     * The deficit 1 - ratio / baseline after a 3-point running median; the baseline is the median of the lines
     * within {@link #BASELINE} (outside the bands [s, s + width) of the comb, when one is given): a slow drift of
     * the ratio (the noise model fitted over the whole image is off by some per cent at the darkest or brightest
     * levels, and the shading repeats with the tiles) is no dip.
     */
    static double[] deficit(double[] ratio, int[] starts, int width, int margin) {
        int n = ratio.length;
        double[] med = new double[n];
        double[] three = new double[3];
        for (int i = 0; i < n; i++) {
            int m = 0;
            for (int j = Math.max(0, i - 1); j <= Math.min(n - 1, i + 1); j++) {
                if (Double.isFinite(ratio[j])) {
                    three[m++] = ratio[j];
                }
            }
            med[i] = m == 0 ? Double.NaN : RobustStats.medianInPlace(three, m);
        }
        double[] base = new double[2 * BASELINE + 1];
        double[] out = new double[n];
        for (int i = 0; i < n; i++) {
            int m = 0;
            for (int j = Math.max(0, i - BASELINE); j <= Math.min(n - 1, i + BASELINE); j++) {
                if (Double.isFinite(med[j]) && !inside(j, starts, width, margin)) {
                    base[m++] = med[j];
                }
            }
            double b = m > 0 ? RobustStats.median(base, m) : Double.NaN;
            out[i] = Double.isFinite(med[i]) && b > 0 ? 1 - med[i] / b : 0;
        }
        return out;
    }

    private static boolean inside(int i, int[] starts, int width, int margin) {
        if (starts == null) {
            return false;
        }
        for (int s : starts) {
            if (i >= s - margin && i < s + width + margin) {
                return true;
            }
        }
        return false;
    }

    /** @return the dip of a linear blend of width W at offset j: 2 u (1 - u), u = (j + 0.5) / W */
    static double dip(int j, int width) {
        double u = (j + 0.5) / width;
        return 2 * u * (1 - u);
    }

    /** @return {z, depth} of a blend dip of this width starting at every position (NaN where it does not fit) */
    static double[][] filter(double[] deficit, int width) {
        int n = deficit.length;
        double[] dev = new double[n];
        double med = RobustStats.median(deficit, n);
        for (int i = 0; i < n; i++) {
            dev[i] = Math.abs(deficit[i] - med);
        }
        double spread = Math.max(1e-6, RobustStats.MAD_TO_SIGMA * RobustStats.median(dev, n));
        double gg = 0;
        for (int j = 0; j < width; j++) {
            gg += dip(j, width) * dip(j, width);
        }
        double[] z = new double[n];
        double[] depth = new double[n];
        for (int s = 0; s < n; s++) {
            if (s + width > n) {
                z[s] = Double.NaN;
                depth[s] = Double.NaN;
                continue;
            }
            double gd = 0;
            for (int j = 0; j < width; j++) {
                gd += dip(j, width) * deficit[s + j];
            }
            z[s] = gd / (spread * Math.sqrt(gg));
            depth[s] = gd / gg;
        }
        return new double[][] {z, depth};
    }

    /**
     * The comb of bands of this width at phase + k pitch: null unless every band away from the ends (by one step
     * less {@link SeamComb#END_SLACK}) is a dip of a blend's depth with z >= {@link #TOOTH}, and at least two are;
     * bands nearer the ends are kept when they show one.
     */
    private static Axis comb(double[][] zd, int n, int pitch, int phase, int width) {
        List<Integer> starts = new ArrayList<>();
        List<Double> zs = new ArrayList<>();
        double depth = 0;
        for (int s = phase; s + width <= n; s += pitch) {
            boolean required = s >= pitch - SeamComb.END_SLACK && n - (s + width) >= pitch - SeamComb.END_SLACK;
            double z = zd[0][s];
            double dp = zd[1][s];
            boolean dipped = z >= TOOTH && dp >= MIN_DEPTH && dp <= MAX_DEPTH;
            if (!dipped) {
                if (required) {
                    return null;
                }
                continue;
            }
            starts.add(s);
            zs.add(z);
            depth += dp;
        }
        double zsum = 0;
        for (double z : zs) {
            zsum += z;
        }
        if (starts.size() < 2 || zsum / Math.sqrt(starts.size()) < COMB || depth / starts.size() < MIN_MEAN_DEPTH) {
            return null;
        }
        return new Axis(pitch, width, starts.stream().mapToInt(Integer::intValue).toArray(),
                zs.stream().mapToDouble(Double::doubleValue).toArray(), depth / starts.size());
    }

    /**
     * The bands' step, start and width fitted to all bands of the comb together: least squares of the deficit (its
     * baseline now taken away from the bands) against the dip of a blend with one depth for all (fitted), over the
     * same window around each band of the comb for every candidate. With two or three bands the step of a free fit
     * is only good to a pixel or two, so when the fit is that close to an uncropped mosaic (k bands, k + 1 whole tiles
     * from the first pixel to the last: n = (k + 1) step + width, the bands starting at step, 2 step, ...), only the
     * uncropped tilings near it are candidates. A trimmed mosaic (the first tile not starting at pixel 0) is far from
     * any and keeps the free fit, its step and phase from the bands alone.
     */
    private static Axis refine(double[] ratio, Axis a) {
        return fits(ratio, a).best();
    }

    /**
     * The candidates of one axis: every tiling (step, start, width) near the comb, or only the uncropped ones near the
     * free fit when there are any (see {@link #refine}), with their misfit in units of the deficit's variance so that
     * the misfits of the two axes add up.
     *
     * @param comb the comb found
     * @param freeWidth the width of the best free fit
     * @param candidates {step, start, width} of each candidate
     * @param cost its misfit over the deficit's robust variance
     */
    private record Fits(Axis comb, int freeWidth, List<int[]> candidates, List<Double> cost) {

        /** @return the bands of the best candidate of this width, or of any width when it is 0; null when none */
        Axis at(int width) {
            int best = -1;
            for (int i = 0; i < candidates.size(); i++) {
                if ((width == 0 || candidates.get(i)[2] == width) && (best < 0 || cost.get(i) < cost.get(best))) {
                    best = i;
                }
            }
            if (best < 0) {
                return null;
            }
            int[] c = candidates.get(best);
            int[] starts = new int[comb.starts().length];
            for (int t = 0; t < starts.length; t++) {
                starts[t] = c[1] + t * c[0];
            }
            return new Axis(c[0], c[2], starts, comb.z(), comb.depth());
        }

        Axis best() {
            return at(0);
        }

        /** @return the least misfit of a candidate of this width, infinite when none */
        double least(int width) {
            double m = Double.POSITIVE_INFINITY;
            for (int i = 0; i < candidates.size(); i++) {
                if (candidates.get(i)[2] == width) {
                    m = Math.min(m, cost.get(i));
                }
            }
            return m;
        }
    }

    private static Fits fits(double[] ratio, Axis a) {
        int n = ratio.length;
        double[] deficit = deficit(ratio, a.starts(), a.width(), REFINE);
        double[] dev = new double[n];
        double med = RobustStats.median(deficit, n);
        for (int i = 0; i < n; i++) {
            dev[i] = Math.abs(deficit[i] - med);
        }
        double spread = Math.max(1e-6, RobustStats.MAD_TO_SIGMA * RobustStats.median(dev, n));
        int first = a.starts()[0];
        int k = a.starts().length;
        List<int[]> free = new ArrayList<>();
        List<Double> freeCost = new ArrayList<>();
        int[] best = null;
        double bestCost = Double.POSITIVE_INFINITY;
        for (int pitch = a.step() - 2; pitch <= a.step() + 2; pitch++) {
            for (int start = first - REFINE; start <= first + REFINE; start++) {
                for (int wdt = MIN_WIDTH; wdt <= MAX_WIDTH; wdt++) {
                    double cost = cost(deficit, a.starts(), start, pitch, wdt) / (spread * spread);
                    free.add(new int[] {pitch, start, wdt});
                    freeCost.add(cost);
                    if (cost < bestCost) {
                        bestCost = cost;
                        best = new int[] {pitch, start, wdt};
                    }
                }
            }
        }
        List<int[]> uncropped = new ArrayList<>();
        List<Double> uncroppedCost = new ArrayList<>();
        for (int pitch = best[0] - 2; pitch <= best[0] + 2; pitch++) {
            int wdt = n - (k + 1) * pitch;
            if (wdt < MIN_WIDTH || wdt > MAX_WIDTH || Math.abs(pitch - best[1]) > 2 || Math.abs(wdt - best[2]) > 3) {
                continue;
            }
            uncropped.add(new int[] {pitch, pitch, wdt});
            uncroppedCost.add(cost(deficit, a.starts(), pitch, pitch, wdt) / (spread * spread));
        }
        return uncropped.isEmpty() ? new Fits(a, best[2], free, freeCost)
                : new Fits(a, best[2], uncropped, uncroppedCost);
    }

    /**
     * Both axes with one band width, the overlap the acquisition set for the whole mosaic: the width whose best
     * candidates on the two axes misfit least together. With two bands per axis the width of one axis alone is only
     * good to a pixel or two (free widths of one overlap 0-5 px apart between the axes on the draws of tune-d-blend);
     * the bands of both axes together narrow it and, on an uncropped mosaic, the step with it. Taken only when the
     * axes' own widths lie within {@link #ONE_OVERLAP} of each other, else each keeps its own.
     *
     * @return {x, y}, or null when the axes are fitted apart
     */
    private static Axis[] oneOverlap(Fits fx, Fits fy) {
        if (Math.abs(fx.freeWidth() - fy.freeWidth()) > ONE_OVERLAP) {
            return null;
        }
        int best = 0;
        double bestCost = Double.POSITIVE_INFINITY;
        for (int wdt = MIN_WIDTH; wdt <= MAX_WIDTH; wdt++) {
            double c = fx.least(wdt) + fy.least(wdt);
            if (c < bestCost) {
                bestCost = c;
                best = wdt;
            }
        }
        return best == 0 ? null : new Axis[] {fx.at(best), fy.at(best)};
    }

    /**
     * @return the squared misfit of k bands of this width at start + t pitch, one depth for all fitted, over windows
     *     fixed by the comb's bands (so that every candidate is scored on the same lines)
     */
    private static double cost(double[] deficit, int[] comb, int start, int pitch, int wdt) {
        int n = deficit.length;
        double gd = 0;
        double gg = 0;
        double dd = 0;
        for (int t = 0; t < comb.length; t++) {
            int s = start + t * pitch;
            for (int i = comb[t] - 2 * REFINE; i < comb[t] + MAX_WIDTH + 2 * REFINE; i++) {
                if (i < 0 || i >= n) {
                    continue;
                }
                double g = i >= s && i < s + wdt ? dip(i - s, wdt) : 0;
                gd += g * deficit[i];
                gg += g * g;
                dd += deficit[i] * deficit[i];
            }
        }
        return gg > 0 ? dd - gd * gd / gg : dd;
    }
}
