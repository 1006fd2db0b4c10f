package org.stackwright.repair;

import java.util.Locale;

/**
 * The tile grid of a stitched acquisition: rows x columns tiles of one size, placed with a fixed overlap, in
 * row-by-row or snake (serpentine) order. A tile placed later covers the overlap of the earlier one, so the
 * visible seam between two tiles is the border of the later tile: with row-by-row order the left border of the
 * right tile; in the odd rows of a snake the right border of the left tile (that row runs right to left); between
 * rows always the top border of the lower row.
 *
 * @param rows tile rows, >= 1
 * @param columns tile columns, >= 1
 * @param tileWidth tile width in pixels
 * @param tileHeight tile height in pixels
 * @param overlapX overlap of neighbouring columns in pixels, 0 <= overlapX < tileWidth
 * @param overlapY overlap of neighbouring rows in pixels, 0 <= overlapY < tileHeight
 * @param snake true for snake order, false for row-by-row
 */
public record TileLayout(int rows, int columns, int tileWidth, int tileHeight, int overlapX, int overlapY,
        boolean snake) {

    public TileLayout {
        if (rows < 1 || columns < 1) {
            throw new IllegalArgumentException("grid = " + rows + "x" + columns + " is not allowed; give ROWSxCOLUMNS, each at least 1");
        }
        if (tileWidth < 1 || tileHeight < 1) {
            throw new IllegalArgumentException("tile = " + tileWidth + "x" + tileHeight + " is not allowed; give WxH in pixels");
        }
        if (overlapX < 0 || overlapX >= tileWidth || overlapY < 0 || overlapY >= tileHeight) {
            throw new IllegalArgumentException("overlap = " + overlapX + "x" + overlapY + " px is not allowed; it must be "
                    + "at least 0 and smaller than the tile (" + tileWidth + "x" + tileHeight + ")");
        }
    }

    /**
     * Parses an overlap given in pixels ("12") or as a percentage of the tile ("10%").
     *
     * @return the overlap in pixels along an axis whose tile size is tile
     */
    public static int overlapPixels(String text, int tile) {
        String t = text == null ? "" : text.trim();
        try {
            if (t.endsWith("%")) {
                double pct = Double.parseDouble(t.substring(0, t.length() - 1).trim());
                if (pct >= 0 && pct < 100) {
                    return (int) Math.round(pct / 100 * tile);
                }
            } else {
                int px = Integer.parseInt(t);
                if (px >= 0) {
                    return px;
                }
            }
        } catch (NumberFormatException e) {
            // fall through to the message
        }
        throw new IllegalArgumentException("overlap = '" + t + "' is not allowed; give pixels (e.g. 32) or a "
                + "percentage of the tile from 0 to below 100 (e.g. 10%)");
    }

    /** @return width of the stitched image */
    public int width() {
        return columns * tileWidth - (columns - 1) * overlapX;
    }

    /** @return height of the stitched image */
    public int height() {
        return rows * tileHeight - (rows - 1) * overlapY;
    }

    /** @return y of the visible seams between rows (top borders of rows 1 .. rows-1) */
    public int[] rowSeams() {
        int[] s = new int[rows - 1];
        for (int r = 1; r < rows; r++) {
            s[r - 1] = r * (tileHeight - overlapY);
        }
        return s;
    }

    /** @return x of the visible seams between the columns of tile row r */
    public int[] columnSeams(int r) {
        int[] s = new int[columns - 1];
        boolean reversed = snake && r % 2 == 1;
        for (int c = 0; c < columns - 1; c++) {
            int left = c * (tileWidth - overlapX);
            s[c] = reversed ? left + tileWidth : left + tileWidth - overlapX;
        }
        return s;
    }

    /**
     * The seam mask of one plane: bands of seamWidth pixels centred on each visible seam, from start = seam -
     * seamWidth / 2 (the same convention as simulate.Damage).
     *
     * @return 255 on seams, 0 elsewhere, width() x height()
     */
    public byte[] mask(int seamWidth) {
        if (seamWidth < 1) {
            throw new IllegalArgumentException("seam-width = " + seamWidth + " is not allowed; give at least 1 pixel");
        }
        int w = width();
        int h = height();
        byte[] m = new byte[w * h];
        for (int y0 : rowSeams()) {
            for (int y = Math.max(0, y0 - seamWidth / 2); y < Math.min(h, y0 - seamWidth / 2 + seamWidth); y++) {
                for (int x = 0; x < w; x++) {
                    m[y * w + x] = (byte) 255;
                }
            }
        }
        for (int r = 0; r < rows; r++) {
            int top = r * (tileHeight - overlapY);
            int bottom = r == rows - 1 ? h : (r + 1) * (tileHeight - overlapY);
            for (int x0 : columnSeams(r)) {
                for (int x = Math.max(0, x0 - seamWidth / 2); x < Math.min(w, x0 - seamWidth / 2 + seamWidth); x++) {
                    for (int y = top; y < bottom; y++) {
                        m[y * w + x] = (byte) 255;
                    }
                }
            }
        }
        return m;
    }

    @Override
    public String toString() {
        return String.format(Locale.ROOT, "%dx%d tiles of %dx%d px, overlap %dx%d px, %s order", rows, columns,
                tileWidth, tileHeight, overlapX, overlapY, snake ? "snake" : "row-by-row");
    }
}
