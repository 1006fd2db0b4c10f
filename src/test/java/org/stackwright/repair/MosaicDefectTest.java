package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Locale;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;

/**
 * Line, cluster and pixel defects found in invented mosaics made by {@link InventedMosaic} (not by simulate). Goals
 * of the issue: recall >= 98 % over every kind and false alarms <= 0.05 % of the pixels; columns and segments found
 * with their lengths. These goals are ours (common practice for a usable defect map, no published benchmark); the
 * camera model is the Poisson-Gaussian one of REFERENCES.md (Janesick, "Photon Transfer", SPIE Press 2007).
 */
class MosaicDefectTest {

    /** Counts of a found map against the truth: per kind found / planted, and false alarms. */
    static String score(InventedMosaic m, DefectMap found, int[] out) {
        int lineHit = 0;
        int lineAll = 0;
        boolean[] onLine = new boolean[m.defects.length];
        int w = m.image.width();
        for (InventedMosaic.Line l : m.lines) {
            for (int i = 0; i < l.length(); i++) {
                int p = l.vertical() ? (l.y() + i) * w + l.x() : l.y() * w + l.x() + i;
                if (m.defects[p] == 0) {
                    continue;
                }
                onLine[p] = true;
                lineAll++;
                if (found.kinds()[p] != null) {
                    lineHit++;
                }
            }
        }
        int otherHit = 0;
        int otherAll = 0;
        int falseAlarms = 0;
        for (int p = 0; p < m.defects.length; p++) {
            boolean bad = m.defects[p] != 0;
            boolean flagged = found.kinds()[p] != null;
            if (bad && !onLine[p]) {
                otherAll++;
                otherHit += flagged ? 1 : 0;
            }
            if (!bad && flagged) {
                falseAlarms++;
            }
        }
        out[0] = lineHit;
        out[1] = lineAll;
        out[2] = otherHit;
        out[3] = otherAll;
        out[4] = falseAlarms;
        return String.format(Locale.ROOT, "line pixels %d/%d, cluster and single pixels %d/%d, recall %.2f %%, false "
                + "alarms %d (%.4f %% of %d pixels)", lineHit, lineAll, otherHit, otherAll,
                100.0 * (lineHit + otherHit) / (lineAll + otherAll), falseAlarms, 100.0 * falseAlarms / m.defects.length,
                m.defects.length);
    }

    /**
     * The mosaic of the issue (3x4 tiles of 200x200, gains 0.85-1.15, shading 25 %, 2-px gaps, one dead and one hot
     * column, an 80-px hot row segment, 500 single pixels and 40 clusters of 2-3), several seeds: recall and false alarms as above, and every planted line found as one
     * line of its kind with its position and length. A column crosses the horizontal gap of zeros (no data, not a
     * break) and, on seed 41, a cell and a bright spot that break the edge test for 20 px: it must still be one
     * column of 600 px. Segments: their ends within 2 px, except where a filament runs along the segment's end
     * (seed 31: a bright filament lies on the first 14 px of the row segment; there a defect cannot be told from
     * the filament's own ridge, so at least 3/4 of the segment must be found and nothing beyond its ends).
     */
    @Test
    void linesFoundWholeWithTheirLengthsOverSeeds() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        for (long seed : new long[] {31, 41, 51, 61, 71}) {
            InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, seed);
            List<Defect> found = check(m);
            for (InventedMosaic.Line planted : m.lines) {
                Defect d = found.stream().filter(f -> f.direction().equals(planted.vertical() ? "vertical"
                        : "horizontal") && (planted.vertical() ? f.x() == planted.x() : f.y() == planted.y()))
                        .findFirst().orElse(null);
                String what = "seed " + seed + ", planted " + planted + ", found " + d;
                assertTrue(d != null, what);
                assertEquals(1, found.stream().filter(f -> f.direction().equals(d.direction())
                        && f.x() == d.x() && f.y() == d.y() || planted.vertical() && f.kind() != Defect.Kind.PIXEL
                        && f.kind() != Defect.Kind.CLUSTER && f.x() == planted.x()).count(), "one line: " + what);
                assertEquals(planted.hot() ? PixelDefect.HOT : PixelDefect.DEAD, d.fault(), what);
                if (planted.vertical()) {
                    assertEquals(Defect.Kind.COLUMN, d.kind(), what);
                    assertEquals(planted.length(), d.length(), what);
                    assertEquals(planted.y(), d.y(), what);
                } else {
                    assertEquals(Defect.Kind.SEGMENT, d.kind(), what);
                    int start = planted.x();
                    int end = planted.x() + planted.length();
                    assertTrue(d.x() >= start - 2 && d.x() + d.length() <= end + 2, "nothing beyond the ends: " + what);
                    if (seed == 31) {
                        assertTrue(d.length() >= 0.75 * planted.length(), what);
                    } else {
                        assertTrue(Math.abs(d.x() - start) <= 2 && Math.abs(d.x() + d.length() - end) <= 2, what);
                    }
                }
            }
        }
    }

    List<Defect> check(InventedMosaic m) {
        DefectMap found;
        try (Workers w = new Workers(2)) {
            found = ImageDefectFinder.find(m.image, 5, 0.5, w);
        }
        int[] s = new int[5];
        String msg = score(m, found, s);
        List<Defect> defects = found.defects();
        System.out.println(m.layout + ": " + msg);
        for (Defect d : defects) {
            if (d.kind() != Defect.Kind.PIXEL && d.kind() != Defect.Kind.CLUSTER) {
                System.out.println("  found " + d);
            }
        }
        for (InventedMosaic.Line l : m.lines) {
            System.out.println("  planted " + l);
        }
        assertTrue(s[0] + s[2] >= 0.98 * (s[1] + s[3]), msg);
        assertTrue(s[4] <= 5e-4 * m.defects.length, msg);
        return defects;
    }
}
