package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Seams found in invented mosaics of several layouts made by {@link InventedMosaic} (not by simulate): with and
 * without overlap, row-by-row and snake order, blended overlaps, gaps and no gaps, seams that are only gain steps,
 * only shading, or both. Goals of the issue (ours, no published benchmark): every seam found within 2 px and
 * nothing else; the tile step found exactly (and the tile size where the overlap shows: snake order or blending).
 * The detection relies on the sign test (Dixon & Mood 1946) and a comb over the tile period (Hermes 1988), see
 * {@link SeamDetector}.
 */
class MosaicSeamTest {

    /**
     * @param held whether the case is held to the goals; the others are measured and printed (known limits, see
     *     README), and only checked for not taking a defective line for a seam
     */
    record Case(String name, InventedMosaic.Layout layout, InventedMosaic.Defects defects, long seed, boolean held) {
        @Override
        public String toString() {
            return name;
        }
    }

    /** the defects of the issue's mosaic: one dead and one hot column, an 80-px hot row segment, 500 + 40 */
    static final InventedMosaic.Defects ISSUE_DEFECTS = new InventedMosaic.Defects(1, 1, 1, 80, 500, 40);

    static Stream<Case> cases() {
        InventedMosaic.Defects lines = new InventedMosaic.Defects(1, 1, 1, 80, 200, 20);
        return Stream.of(
                new Case("issue: 3x4 of 200 px, gaps, defects", new InventedMosaic.Layout(3, 4, 200, 200, 0, false,
                        false, 2, 0.25, 0.15, 300), ISSUE_DEFECTS, 41, true),
                new Case("steps and shading, 3x4 of 120x100", new InventedMosaic.Layout(3, 4, 120, 100, 0, false,
                        false, 0, 0.25, 0.15, 300), InventedMosaic.Defects.NONE, 42, true),
                new Case("overlap 16, row-by-row", new InventedMosaic.Layout(3, 4, 128, 128, 16, false, false, 0,
                        0.25, 0.15, 300), lines, 43, true),
                new Case("overlap 16, snake", new InventedMosaic.Layout(3, 4, 128, 128, 16, true, false, 0, 0.25,
                        0.15, 300), InventedMosaic.Defects.NONE, 44, true),
                new Case("overlap 20, blended", new InventedMosaic.Layout(3, 3, 140, 140, 20, false, true, 0, 0.25,
                        0.15, 300), InventedMosaic.Defects.NONE, 45, true),
                // blend bands found from the noise (BlendBands): another overlap, tile size and snake order; the
                // bands and the exact step are held in BlendBandsTest (not held here: a blend shows no snake shift,
                // so the overlap comes from the band width, not from the shift this test asks of snake layouts)
                new Case("overlap 12, blended, snake, 3x4 of 100x90", new InventedMosaic.Layout(3, 4, 100, 90, 12,
                        true, true, 0, 0.25, 0.15, 300), InventedMosaic.Defects.NONE, 48, false),
                // seams of shading only: the vertical ones are too faint at each border; their step comes from the
                // shading every tile shares (SeamTemplate), two draws
                new Case("shading only (equal gains), gaps", new InventedMosaic.Layout(2, 4, 110, 110, 0, false,
                        false, 2, 0.25, 0, 300), InventedMosaic.Defects.NONE, 46, true),
                new Case("shading only (equal gains), gaps, 2nd draw", new InventedMosaic.Layout(2, 4, 110, 110, 0,
                        false, false, 2, 0.25, 0, 300), InventedMosaic.Defects.NONE, 47, true),
                new Case("gain steps only (no shading)", new InventedMosaic.Layout(3, 3, 150, 130, 0, false, false, 0,
                        0, 0.15, 300), InventedMosaic.Defects.NONE, 47, true),
                // one tile row: the step of the vertical seams, tried along y, must not invent horizontal seams
                new Case("one tile row, 1x4 of 150x400", new InventedMosaic.Layout(1, 4, 150, 400, 0, false, false, 0,
                        0.25, 0.15, 300), InventedMosaic.Defects.NONE, 100, true),
                // the specimen alone under one tile's shading: nothing is a seam
                new Case("one tile, shading, no seams", new InventedMosaic.Layout(1, 1, 600, 500, 0, false, false, 0,
                        0.25, 0, 300), lines, 101, true));
    }

    @ParameterizedTest
    @MethodSource("cases")
    void seamsFoundWithin2PxAndNothingElse(Case c) {
        InventedMosaic m = InventedMosaic.make(c.layout(), c.defects(), false, c.seed());
        InventedMosaic.Layout l = c.layout();
        SeamDetector.Found f = SeamDetector.detect(m.image, 8, 4);
        int band = l.blend() ? l.overlap() : 0;
        List<String> problems = new ArrayList<>();
        int worst = 0;
        // horizontal seams
        worst = Math.max(worst, match("y", m.rowSeams, f.rows(), band, l.gap(), problems, -1));
        // vertical seams, tile row by tile row (a snake shifts the odd rows)
        int sy = l.tileH() - l.overlap();
        for (int tr = 0; tr < l.rows(); tr++) {
            List<SeamDetector.Band> here = across(f.columns(), tr * sy + sy / 2);
            worst = Math.max(worst, match("x (tile row " + tr + ")", m.columnSeams[tr], here, band, l.gap(), problems,
                    tr));
        }
        SeamDetector.Tiling t = f.tiling();
        // a single tile along an axis has no seam there: no step to find
        int stepX = l.cols() > 1 ? l.tileW() - l.overlap() : 0;
        int stepY = l.rows() > 1 ? l.tileH() - l.overlap() : 0;
        System.out.printf(Locale.ROOT, "%-38s step %dx%d (true %dx%d), overlap seen %d, blend %dx%d, worst seam error "
                + "%d px, step from the other axis '%s', lines not seams x=%s y=%s%s%n", c.name(), t.stepX(), t.stepY(),
                stepX, stepY, t.overlapX(), t.blendX(), t.blendY(), worst, t.borrowed(), positions(f.columnLines()),
                positions(f.rowLines()), problems.isEmpty() ? "" : " PROBLEMS " + problems);
        if (c.held()) {
            assertTrue(problems.isEmpty(), c.name() + ": " + problems);
            assertEquals(stepX, t.stepX(), "tile step x");
            assertEquals(stepY, t.stepY(), "tile step y");
            if (l.snake() && l.overlap() > 0) {
                assertEquals(l.overlap(), t.overlapX(), "overlap from the snake shift");
            }
        }
        // the planted defective columns and row segment are not seams
        for (InventedMosaic.Line line : m.lines) {
            for (SeamDetector.Band b : line.vertical() ? f.columns() : f.rows()) {
                int at = line.vertical() ? line.x() : line.y();
                assertTrue(at < b.start() - 2 || at >= b.end() + 2, "defect line at " + at + " reported as seam " + b);
            }
        }
    }

    /**
     * The issue's mosaic over many seeds (specimen, gains, noise and defects drawn anew): how often every seam is
     * found within 2 px with nothing else and the tile step exact. A measurement for README, off by default
     * ({@code -Dstackwright.seamsweep=N}, N seeds; about a second each).
     */
    @org.junit.jupiter.api.Test
    void issueMosaicOverSeeds() {
        int seeds = Integer.getInteger("stackwright.seamsweep", 0);
        org.junit.jupiter.api.Assumptions.assumeTrue(seeds > 0, "sweep off; -Dstackwright.seamsweep=N to run it");
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        int right = 0;
        for (long seed = 100; seed < 100 + seeds; seed++) {
            InventedMosaic m = InventedMosaic.make(l, ISSUE_DEFECTS, false, seed);
            SeamDetector.Found f = SeamDetector.detect(m.image, 8, 4);
            List<String> problems = new ArrayList<>();
            match("y", m.rowSeams, f.rows(), 0, l.gap(), problems, -1);
            match("x", m.columnSeams[0], f.columns(), 0, l.gap(), problems, 0);
            boolean ok = problems.isEmpty() && f.tiling().stepX() == 200 && f.tiling().stepY() == 200;
            right += ok ? 1 : 0;
            System.out.printf(Locale.ROOT, "seed %d: step %dx%d %s%n", seed, f.tiling().stepX(), f.tiling().stepY(),
                    ok ? "all seams within 2 px, nothing else" : problems.toString());
        }
        System.out.printf(Locale.ROOT, "issue mosaic: %d of %d seeds right%n", right, seeds);
        // our goal, no published benchmark: 8 of 10 (measured: see README)
        assertTrue(right >= 0.8 * seeds, right + " of " + seeds + " seeds right");
    }

    /** Matches found bands to true seams; @return the worst error in pixels, adding a problem per miss or extra. */
    static int match(String axis, int[] truth, List<SeamDetector.Band> found, int blend, int gap, List<String> problems,
            int row) {
        int worst = 0;
        boolean[] used = new boolean[found.size()];
        for (int s : truth) {
            int bestErr = Integer.MAX_VALUE;
            int best = -1;
            for (int i = 0; i < found.size(); i++) {
                SeamDetector.Band b = found.get(i);
                int err;
                if (blend > 0) {
                    err = Math.max(Math.abs(b.start() - s), Math.abs(b.end() - (s + blend)));
                } else {
                    // a lone border s is the centre of its band; a gap [s, s + gap) is covered by its band
                    double centre = 0.5 * (b.start() + b.end());
                    err = (int) Math.ceil(Math.abs(centre - (s + 0.5 * gapAt(b, gap))));
                }
                if (err < bestErr) {
                    bestErr = err;
                    best = i;
                }
            }
            if (best < 0 || bestErr > 2) {
                problems.add(axis + ": seam " + s + " not found within 2 px (nearest error " + bestErr + ")");
            } else {
                used[best] = true;
                worst = Math.max(worst, bestErr);
            }
        }
        for (int i = 0; i < found.size(); i++) {
            if (!used[i]) {
                problems.add(axis + ": extra band " + found.get(i).start() + ".." + (found.get(i).end() - 1));
            }
        }
        return worst;
    }

    /** @return the vertical bands that cross line y */
    static List<SeamDetector.Band> across(List<SeamDetector.Band> columns, int y) {
        return columns.stream().filter(b -> y >= b.from() && y < b.to()).toList();
    }

    private static int gapAt(SeamDetector.Band b, int gap) {
        return b.looks().contains("gap") ? gap : 0;
    }

    private static String positions(List<SeamDetector.Line> lines) {
        return lines.stream().map(l -> Integer.toString(l.position())).toList().toString();
    }
}
