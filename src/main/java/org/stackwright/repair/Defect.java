package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * One defect of a sensor map, as reported to the user: a whole column or row, a segment of one, a cluster of
 * touching pixels, or a single pixel.
 *
 * @param kind column, row, segment, cluster or pixel
 * @param fault what most of its pixels do: hot, dead or stuck
 * @param x column of its first pixel (raster order)
 * @param y row of its first pixel
 * @param length pixels along the line (lines), or the number of pixels (clusters, pixels)
 * @param direction vertical or horizontal for lines, empty for clusters and pixels
 */
public record Defect(Kind kind, PixelDefect fault, int x, int y, int length, String direction) {

    /** Shapes of defects. */
    public enum Kind {
        COLUMN, ROW, SEGMENT, CLUSTER, PIXEL;

        /** @return the word used in tables and records */
        public String word() {
            return name().toLowerCase(java.util.Locale.ROOT);
        }
    }

    /** @return one table row or record entry: kind, fault, x, y, length, direction */
    public Map<String, Object> row() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("kind", kind.word());
        m.put("fault", fault.name().toLowerCase(java.util.Locale.ROOT));
        m.put("x", x);
        m.put("y", y);
        m.put("length", length);
        m.put("direction", direction);
        return m;
    }
}
