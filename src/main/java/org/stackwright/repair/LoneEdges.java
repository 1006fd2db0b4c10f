package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.MAX_BAND;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.repair.SeamDetector.Line;

/**
 * Strong edges without the support of a repeating comb: along an axis (or tile row) without a period they may still
 * be seams when strong enough ({@link #lone}); next to the seams found they are lines that do not repeat with the
 * tile step, a defective column or a structure, handed to the user instead ({@link #lines}).
 */
final class LoneEdges {

    /** a seam that does not repeat must be this many times stronger than the threshold */
    static final double LONE = 2;

    private LoneEdges() {
    }

    /**
     * Without a period: the strong edges that are not narrow lines, each a band of the requested width. Without the
     * support of repeating teeth an edge must exceed {@link #LONE} times the threshold (structure that runs along a
     * line gives evidence of the size of the threshold now and then); the first border of a gap of zeros, which no
     * structure makes, needs only the threshold.
     */
    static List<Band> lone(SeamEvidence e, double thresholdIn, int stepWidth, int from, int to) {
        double threshold = LONE * thresholdIn;
        int n = e.length();
        List<Band> out = new ArrayList<>();
        for (int b = 1; b < n; b++) {
            double s = e.combStrength(b, threshold / 2);
            // a gap of zeros across the lines is no structure: the usual threshold (its sign test saturates near it
            // when the lines are few or the empirical null is wide)
            double bar = e.zeros[b] >= 0.5 ? thresholdIn : threshold;
            if (s > bar && s >= e.combStrength(b - 1, threshold / 2) && s >= e.combStrength(b + 1 < n ? b + 1 : b,
                    threshold / 2)) {
                if (!out.isEmpty() && b - out.get(out.size() - 1).centre() <= MAX_BAND) {
                    continue;
                }
                List<String> looks = new ArrayList<>();
                looks.add(Math.abs(e.step[b]) >= Math.abs(e.kink[b]) ? "step" : "shading");
                out.add(new Band(Math.max(0, b - stepWidth / 2), Math.min(n, b - stepWidth / 2 + stepWidth), s, from,
                        to, looks));
            }
        }
        return out;
    }

    /** Strong evidence more than 2 pixels from every seam band: lines that do not repeat with the tile step. */
    static List<Line> lines(SeamEvidence e, List<Band> seams, double threshold) {
        int n = e.length();
        List<Line> out = new ArrayList<>();
        for (int b = 1; b < n; b++) {
            if (e.strength(b) <= threshold || nearSeam(b, seams)) {
                continue;
            }
            int wdt = e.narrowLine(b, threshold / 2);
            double s = e.strength(b);
            if (wdt > 0) {
                s = Math.max(s, e.strength(b + wdt));
            }
            if (!out.isEmpty()) {
                Line prev = out.get(out.size() - 1);
                if (b <= prev.position() + Math.max(prev.width(), 2)) {
                    continue;
                }
            }
            out.add(new Line(b, wdt, s));
        }
        return out;
    }

    private static boolean nearSeam(int b, List<Band> seams) {
        for (Band s : seams) {
            if (b >= s.start() - 2 && b <= s.end() + 2) {
                return true;
            }
        }
        return false;
    }
}
