package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.repair.TileRowSeams.Columns;
import org.stackwright.volume.Volume;

/**
 * The last look at an uncropped mosaic whose vertical seams came out in one phase for every tile row, from whichever
 * rule lent it (a tile row's comb, the shading's support, a grid of blocks, a fold): its width, a whole number of
 * steps plus a covered overlap of 3 px up to {@link SeamDetector#MAX_BAND}, admits a snake order, whose rows placed
 * right to left have their seams one overlap further right. Such a row has nothing at the other rows' teeth, and the
 * rules that lend a phase cannot tell (measured on tune2 c-snake s30215 and s30219: a grid of blocks and a fold put
 * the unshifted seams on the shifted row). Each tile row's own steps are weighed ({@link TileRowSeams#teethSum}) at
 * every phase within {@link SeamDetector#MAX_BAND} of the common one (the best of some fifty phases):
 * <ul>
 * <li>a row whose evidence is largest at the width's other phase (within a pixel) shows the shift; the rows of its
 * parity are then read shifted where their own steps show it, and lose their bands where they show no phase (their
 * shift cannot be told, so nothing is stamped on them);</li>
 * <li>when no row shows the shift, but every row of one parity shows the common phase (within 2 px) and every row of
 * the other parity shows neither, the latter lose their bands: their own steps back no seam there, and a snake's
 * shifted row would have its seams elsewhere (as {@link TileRowSeams#gridRow} weighs a row without a comb);</li>
 * <li>a row of the parity to move that shows the common phase keeps the reading as it is (no snake).</li>
 * </ul>
 * A blended overlap has no shift (both tiles are in its band whichever came later): blend bands are left as they are.
 */
final class SnakeOwnRows {

    private SnakeOwnRows() {
    }

    /** @return the columns with the shifted rows' own seams, or c unchanged */
    static Columns apply(Volume image, List<Band> rows, Columns c, double tooth, int stepWidth) {
        int w = image.width();
        int h = image.height();
        int step = c.step();
        // a blended overlap holds both tiles whichever was placed later: its band lies at the same place in both
        // directions, and there is no shift to find (measured: the blend bands' rows lost their seams on tune
        // d-blend s7301 and the own generator's blended 3x3, whose steps show no phase of their own)
        if (step <= 0 || rows.isEmpty() || c.bands().isEmpty() || c.blend() > 0
                || c.bands().stream().anyMatch(b -> b.looks().contains("blend"))) {
            return c;
        }
        int over = Math.floorMod(w, step);
        if (over < 3 || over > SeamDetector.MAX_BAND || 2 * SeamDetector.MAX_BAND >= step) {
            return c;
        }
        // one phase shared by every row that has one, at 0 or at the overlap (within a pixel)
        int p0 = -1;
        for (int p : c.phases()) {
            if (p >= 0 && p0 >= 0 && !near(p, p0, step, 1)) {
                return c;
            }
            p0 = p >= 0 && p0 < 0 ? p : p0;
        }
        if (p0 < 0 || near(p0, 0, step, 1) == near(p0, over, step, 1)) {
            return c;
        }
        int p1 = near(p0, 0, step, 1) ? over : 0;
        int stripes = rows.size() + 1;
        // per row: 1 shows the other phase, 0 the common one, -1 neither
        int[] shows = new int[stripes];
        int[] at = new int[stripes];
        SeamEvidence[] ev = new SeamEvidence[stripes];
        int[] cuts = new int[stripes + 1];
        cuts[stripes] = Integer.MAX_VALUE;
        for (int s = 0; s < stripes; s++) {
            cuts[s] = s == 0 ? 0 : rows.get(s - 1).centre();
            int[] y = TileRowSeams.stripe(rows, s, h);
            SeamEvidence e = SeamEvidence.of(image, true, y[0], y[1], true);
            ev[s] = e;
            int best = -1;
            double top = 0;
            for (int d = -SeamDetector.MAX_BAND; d <= SeamDetector.MAX_BAND; d++) {
                int ph = Math.floorMod(p0 + d, step);
                double sum = TileRowSeams.teethSum(e, step, ph, tooth);
                if (sum > top) {
                    top = sum;
                    best = ph;
                }
            }
            at[s] = best;
            shows[s] = best < 0 ? -1 : near(best, p1, step, 1) ? 1 : near(best, p0, step, 2) ? 0 : -1;
        }
        int parity = -1;
        for (int s = 0; s < stripes; s++) {
            if (shows[s] == 1) {
                if (parity >= 0 && parity != s % 2) {
                    return c;
                }
                parity = s % 2;
            }
        }
        if (parity < 0) {
            // no row shows the shift: a parity whose rows show neither phase while the other's show the common one
            // by their own steps is no row of that grid by its own evidence, and its shift cannot be told
            parity = faintParity(shows);
        }
        if (parity < 0) {
            return c;
        }
        for (int s = parity; s < stripes; s += 2) {
            if (shows[s] == 0) {
                return c;
            }
        }
        List<Band> out = new ArrayList<>(c.bands());
        int[] phases = new int[stripes];
        for (int s = 0; s < stripes; s++) {
            phases[s] = c.phases().length == stripes ? c.phases()[s] : p0;
        }
        for (int s = parity; s < stripes; s += 2) {
            out = without(out, cuts[s], cuts[s + 1]);
            phases[s] = -1;
            if (shows[s] != 1) {
                continue;
            }
            phases[s] = at[s];
            SeamEvidence e = ev[s];
            for (int b : new SeamComb.Period(step, at[s], 0, 0, 0).borders(w)) {
                // the first and last tiles are whole (as ShadingRules.withTeeth lays a fold's seams)
                if (b < step - SeamComb.END_SLACK || w - b < step - SeamComb.END_SLACK) {
                    continue;
                }
                out.add(new Band(Math.max(0, b - stepWidth / 2), Math.min(w, b - stepWidth / 2 + stepWidth),
                        e.peak(b, tooth), cuts[s], cuts[s + 1], List.of("step")));
            }
        }
        out.sort((x, y) -> x.start() != y.start() ? Integer.compare(x.start(), y.start())
                : Integer.compare(x.from(), y.from()));
        return new Columns(out, c.periods(), phases, c.blend(), step);
    }

    /** @return the parity whose rows all show neither phase while the other's all show the common one, else -1 */
    private static int faintParity(int[] shows) {
        for (int q = 0; q < 2; q++) {
            boolean faint = true;
            boolean grid = true;
            for (int s = 0; s < shows.length; s++) {
                faint &= s % 2 != q || shows[s] == -1;
                grid &= s % 2 == q || shows[s] == 0;
            }
            if (faint && grid && q < shows.length) {
                return q;
            }
        }
        return -1;
    }

    /** @return the bands with the lines [from, to) cut out of each */
    private static List<Band> without(List<Band> bands, int from, int to) {
        List<Band> out = new ArrayList<>();
        for (Band b : bands) {
            if (b.to() <= from || b.from() >= to) {
                out.add(b);
                continue;
            }
            if (b.from() < from) {
                out.add(new Band(b.start(), b.end(), b.strength(), b.from(), from, b.looks()));
            }
            if (b.to() > to) {
                out.add(new Band(b.start(), b.end(), b.strength(), to, b.to(), b.looks()));
            }
        }
        return out;
    }

    /** @return whether phases a and b of step s lie within d px of each other (circularly) */
    private static boolean near(int a, int b, int s, int d) {
        int x = Math.floorMod(a - b, s);
        return Math.min(x, s - x) <= d;
    }
}
