package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Defective pixels of a sensor, one plane: the kind of each pixel (null = good) and the counts per kind.
 *
 * @param width plane width
 * @param height plane height
 * @param kinds one entry per pixel, row-major; null for good pixels
 * @param source how the defects were found (for the record)
 * @param noData pixels without data (gaps of zeros between mosaic tiles), never defects themselves; a line defect
 *     interrupted by them is still one line ({@link DefectGrouping}); null when there are none
 */
public record DefectMap(int width, int height, PixelDefect[] kinds, String source, boolean[] noData) {

    /** A map of an image without gaps of missing data. */
    public DefectMap(int width, int height, PixelDefect[] kinds, String source) {
        this(width, height, kinds, source, null);
    }

    /** @return whether pixel p carries no data */
    boolean isNoData(int p) {
        return noData != null && noData[p];
    }

    /** @return number of pixels of that kind */
    public int count(PixelDefect kind) {
        int n = 0;
        for (PixelDefect k : kinds) {
            if (k == kind) {
                n++;
            }
        }
        return n;
    }

    /** @return total number of defective pixels */
    public int total() {
        int n = 0;
        for (PixelDefect k : kinds) {
            if (k != null) {
                n++;
            }
        }
        return n;
    }

    /** @return an 8-bit mask of one plane: 255 = defective, 0 = good */
    public byte[] mask() {
        byte[] m = new byte[kinds.length];
        for (int i = 0; i < kinds.length; i++) {
            if (kinds[i] != null) {
                m[i] = (byte) 255;
            }
        }
        return m;
    }

    /** @return the defects as a user sees them: lines, clusters and single pixels ({@link DefectGrouping}) */
    public java.util.List<Defect> defects() {
        return DefectGrouping.group(this);
    }

    /** @return counts per kind, for run records */
    public Map<String, Integer> counts() {
        Map<String, Integer> m = new LinkedHashMap<>();
        m.put("hot", count(PixelDefect.HOT));
        m.put("dead", count(PixelDefect.DEAD));
        m.put("stuck", count(PixelDefect.STUCK));
        m.put("total", total());
        return m;
    }
}
