package org.stackwright.repair;

import java.util.Arrays;
import java.util.Comparator;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.repair.SeamDetector.Line;

/**
 * A shading fold moved onto a strong lone edge. The shading's cross-validated score is broad in the step: it fixes
 * the step to a few pixels, and among the uncropped tilings near it the best score may lie 3-5 px off (measured on the
 * independent generator's whole mosaics: held-out a-steps s100006 folded 87 for 90, c-snake s100200 92 for 88). There
 * a seam often shows by itself as a step edge above the threshold, too weak for a seam without a period
 * ({@link LoneEdges#LONE} times the threshold) and reported as a line that is not a seam, at 180 and 176, within a
 * few pixels of the fold's tooth. The fold is found again through each such edge, strongest first, and the one
 * through it is taken where the step evidence at its teeth exceeds that at the first fold's teeth: both tilings
 * explain the shading, the steps at the borders tell them apart.
 */
final class FoldEdges {

    /**
     * the fold through an edge is searched over twice the usual reach of the best-scoring step: that step wanders
     * with the phase that scores best (measured: tune2 a-steps s30004 along x, best 95 for 100; held-out a-steps
     * s100000 along y, best 83 for 90); the edge and the uncropped tiling then pin it
     */
    static final int WIDEN = 2;

    private FoldEdges() {
    }

    /**
     * @param p the shading's profiles along the axis
     * @param fold the fold found through the anchors (found and backed)
     * @param e the step evidence along the axis over the whole image
     * @param seams the seams already found along the axis
     * @param anchors their anchors (the fold's seams must pass through them)
     * @param gaps first zeros of the gaps along the axis
     * @return fold, or the fold through a lone step edge whose teeth show more step evidence
     */
    static SeamTemplate.Fold throughEdges(SeamTemplate.Profiles p, SeamTemplate.Fold fold, SeamEvidence e,
            List<Band> seams, int[] anchors, int[] gaps, double threshold) {
        List<Line> edges = LoneEdges.lines(e, seams, threshold).stream().filter(l -> l.width() == 0)
                .sorted(Comparator.comparingDouble(Line::strength).reversed()).toList();
        double own = teeth(e, fold, threshold);
        for (Line edge : edges) {
            if (onTooth(fold, edge.position())) {
                return fold;
            }
            int[] with = Arrays.copyOf(anchors, anchors.length + 1);
            with[anchors.length] = edge.position();
            Arrays.sort(with);
            SeamTemplate.Fold f = SeamTemplate.find(p, with, gaps, WIDEN);
            if (f != null && f.found() && ShadingRules.backed(p, f) && teeth(e, f, threshold) > own) {
                return f;
            }
        }
        return fold;
    }

    /** @return whether the border b lies within a pixel of a tooth of the fold */
    private static boolean onTooth(SeamTemplate.Fold f, int b) {
        int d = Math.floorMod(b - f.phase(), f.pitch());
        return Math.min(d, f.pitch() - d) <= 1;
    }

    /** @return the step evidence at the fold's teeth ({@link TileRowSeams#teethSum}, narrow lines not counted) */
    private static double teeth(SeamEvidence e, SeamTemplate.Fold f, double threshold) {
        return TileRowSeams.teethSum(e, f.pitch(), f.phase(), threshold / 2);
    }
}
