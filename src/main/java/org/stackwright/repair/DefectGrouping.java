package org.stackwright.repair;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;

/**
 * Groups the defective pixels of a map into the defects a user looks for: straight runs of at least
 * {@link LineDefectFinder#MIN_LENGTH} pixels along a column or row are lines (a whole column or row when they span
 * at least {@link #WHOLE} of it, else a segment); the other defective pixels form 8-connected groups, a cluster
 * when two or more touch, else a single pixel. A pixel where two lines cross belongs to both. Pixels without data
 * (gaps of zeros between mosaic tiles) do not break a line: its length runs from its first to its last defective
 * pixel across them.
 */
final class DefectGrouping {

    /** a line spanning at least this share of the image is a whole column or row */
    static final double WHOLE = 0.9;

    private DefectGrouping() {
    }

    /** @return the defects of the map, lines first (columns by x, then rows by y), then clusters and pixels */
    static List<Defect> group(DefectMap map) {
        int w = map.width();
        int h = map.height();
        PixelDefect[] k = map.kinds();
        boolean[] inLine = new boolean[k.length];
        List<Defect> lines = new ArrayList<>();
        for (int x = 0; x < w; x++) {
            runs(map, x, true, inLine, lines);
        }
        for (int y = 0; y < h; y++) {
            runs(map, y, false, inLine, lines);
        }
        List<Defect> out = new ArrayList<>(lines);
        boolean[] seen = new boolean[k.length];
        int[] queue = new int[k.length];
        for (int p0 = 0; p0 < k.length; p0++) {
            if (k[p0] == null || inLine[p0] || seen[p0]) {
                continue;
            }
            int head = 0;
            int tail = 0;
            queue[tail++] = p0;
            seen[p0] = true;
            EnumMap<PixelDefect, Integer> faults = new EnumMap<>(PixelDefect.class);
            while (head < tail) {
                int p = queue[head++];
                faults.merge(k[p], 1, Integer::sum);
                int x = p % w;
                int y = p / w;
                for (int dy = -1; dy <= 1; dy++) {
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = x + dx;
                        int yy = y + dy;
                        if (xx >= 0 && yy >= 0 && xx < w && yy < h) {
                            int q = yy * w + xx;
                            if (k[q] != null && !inLine[q] && !seen[q]) {
                                seen[q] = true;
                                queue[tail++] = q;
                            }
                        }
                    }
                }
            }
            out.add(new Defect(tail > 1 ? Defect.Kind.CLUSTER : Defect.Kind.PIXEL, majority(faults), p0 % w, p0 / w,
                    tail, ""));
        }
        return out;
    }

    private static void runs(DefectMap map, int at, boolean vertical, boolean[] inLine, List<Defect> out) {
        PixelDefect[] k = map.kinds();
        int w = map.width();
        int n = vertical ? map.height() : w;
        int start = -1;
        int last = -1;
        for (int s = 0; s <= n; s++) {
            int p = vertical ? s * w + at : at * w + s;
            boolean bad = s < n && k[p] != null;
            if (bad) {
                start = start < 0 ? s : start;
                last = s;
            } else if (start >= 0 && (s == n || !map.isNoData(p))) {
                // a pixel without data does not end a line: it continues past a gap of zeros if defective beyond
                addLine(map, at, vertical, start, last, inLine, out);
                start = -1;
            }
        }
    }

    /** Adds the line [first, last] along line `at` when it is long enough; its length spans any gap of no data. */
    private static void addLine(DefectMap map, int at, boolean vertical, int first, int last, boolean[] inLine,
            List<Defect> out) {
        PixelDefect[] k = map.kinds();
        int w = map.width();
        int n = vertical ? map.height() : w;
        int len = last - first + 1;
        if (len < LineDefectFinder.MIN_LENGTH) {
            return;
        }
        EnumMap<PixelDefect, Integer> faults = new EnumMap<>(PixelDefect.class);
        for (int t = first; t <= last; t++) {
            int p = vertical ? t * w + at : at * w + t;
            if (k[p] != null) {
                inLine[p] = true;
                faults.merge(k[p], 1, Integer::sum);
            }
        }
        Defect.Kind kind = len >= WHOLE * n ? (vertical ? Defect.Kind.COLUMN : Defect.Kind.ROW) : Defect.Kind.SEGMENT;
        out.add(new Defect(kind, majority(faults), vertical ? at : first, vertical ? first : at, len,
                vertical ? "vertical" : "horizontal"));
    }

    private static PixelDefect majority(EnumMap<PixelDefect, Integer> faults) {
        PixelDefect best = null;
        int most = -1;
        for (var e : faults.entrySet()) {
            if (e.getValue() > most) {
                most = e.getValue();
                best = e.getKey();
            }
        }
        return best;
    }
}
