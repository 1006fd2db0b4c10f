package org.stackwright.repair;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.stream.Collectors;

import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/**
 * What {@code seam-mask} tells the user about seams: the seams found and the tiling they imply, the lines that are
 * not seams, and whether a given tile layout matches the image.
 */
final class SeamReport {

    /** a layout matches when at least this share of its seams is seen in the image */
    static final double MATCH_SHARE = 0.8;

    private SeamReport() {
    }

    /**
     * @return where the tiles start along an axis, modulo the step: the centre of the first seam band found (the comb's
     *     phase is the border its edges gave, which for a dimmed band of a few pixels is the band's far edge, 2 px
     *     past the border on the demo mosaic), else the comb's phase, else 0
     */
    static int origin(List<SeamDetector.Band> seams, int step, int phase) {
        if (step <= 0) {
            return 0;
        }
        if (!seams.isEmpty()) {
            return Math.floorMod(seams.get(0).centre(), step);
        }
        return phase >= 0 ? Math.floorMod(phase, step) : 0;
    }

    /** Records and reports a detection in an image of w x h x depth. */
    static void detected(SeamDetector.Found f, int w, int h, int depth, Result r, RunContext ctx) {
        SeamDetector.Tiling t = f.tiling();
        r.record("vertical_seams", describe(f.columns()));
        r.record("horizontal_seams", describe(f.rows()));
        r.record("regular", f.regular());
        Map<String, Object> tiling = new LinkedHashMap<>();
        tiling.put("step_x", t.stepX());
        tiling.put("step_y", t.stepY());
        tiling.put("origin_x", origin(f.columns().stream().filter(b -> b.from() == 0).toList(), t.stepX(),
                t.phaseX().length > 0 ? t.phaseX()[0] : -1));
        tiling.put("origin_y", origin(f.rows(), t.stepY(), t.phaseY()));
        String order = t.overlapX() > 0 ? "snake" : t.blendX() > 0 || t.blendY() > 0
                ? "row-by-row or snake (blending looks the same in both)" : "row-by-row or snake without overlap";
        tiling.put("order", order);
        int overlap = t.overlapX() > 0 ? t.overlapX() : Math.max(t.blendX(), t.blendY());
        tiling.put("overlap", overlap > 0 ? overlap : null);
        tiling.put("tile_width", t.stepX() > 0 && overlap > 0 ? t.stepX() + overlap : t.stepX());
        tiling.put("tile_height", t.stepY() > 0 && overlap > 0 ? t.stepY() + overlap : t.stepY());
        tiling.put("step_from_other_axis", t.borrowed().isEmpty() ? null : t.borrowed());
        String cornered = t.folded().contains("xy=corners") ? "xy" : (t.folded().contains("x=corners") ? "x" : "")
                + (t.folded().contains("y=corners") ? "y" : "");
        String shaded = t.folded().replace("xy=corners", "").replace("x=corners", "").replace("y=corners", "")
                .replace("x=gaps", "").replace("y=gaps", "")
                .replace("x=2", "").replace("y=2", "").replace("x=3", "").replace("y=3", "");
        String gapped = (t.folded().contains("x=gaps") ? "x" : "") + (t.folded().contains("y=gaps") ? "y" : "");
        String halved = (t.folded().contains("x=2") || t.folded().contains("x=3") ? "x" : "")
                + (t.folded().contains("y=2") || t.folded().contains("y=3") ? "y" : "");
        tiling.put("step_from_shading", shaded.isEmpty() ? null : shaded);
        tiling.put("step_from_one_seam", halved.isEmpty() ? null : halved);
        tiling.put("step_from_gaps", gapped.isEmpty() ? null : gapped);
        tiling.put("step_from_square_tiles", cornered.isEmpty() ? null : cornered);
        String noise = (f.columns().stream().anyMatch(b -> b.looks().contains("noise")) ? "x" : "")
                + (f.rows().stream().anyMatch(b -> b.looks().contains("noise")) ? "y" : "");
        tiling.put("blend_from_noise", noise.isEmpty() ? null : noise);
        tiling.put("read_as_trimmed", t.trimmed());
        r.record("tiling", tiling);
        r.record("lines_not_seams", Map.of("vertical", lines(f.columnLines()), "horizontal", lines(f.rowLines())));
        int[] cx = SeamDetector.centres(f.columns());
        int[] cy = SeamDetector.centres(f.rows());
        r.line(String.format(Locale.ROOT, "found %d vertical seams at x = %s and %d horizontal seams at y = %s",
                f.columns().size(), describeShort(f.columns(), h), f.rows().size(), describeShort(f.rows(), w)));
        if (depth > 1) {
            int[] read = SeamSlices.read(depth);
            r.record("slices_read", Arrays.stream(read).map(z -> z + 1).boxed().toList());
            if (read.length < depth) {
                r.line(String.format(Locale.ROOT, "seams looked for on %d of the %d slices (%s), spread evenly: the "
                        + "tiles of a z-stack are placed once for every slice, so the one mask found holds for all of them",
                        read.length, depth, Arrays.stream(read).mapToObj(z -> Integer.toString(z + 1))
                        .collect(Collectors.joining(", "))));
            }
        }
        if (t.stepX() > 0 || t.stepY() > 0) {
            r.line(String.format(Locale.ROOT, "tile step %d x %d px (seams repeat every %d px along x, %d px along y), "
                    + "origin (%s, %s); %s%s", t.stepX(), t.stepY(), t.stepX(), t.stepY(), tiling.get("origin_x"),
                    tiling.get("origin_y"), order, overlap > 0 ? String.format(Locale.ROOT, ", overlap %d px: tiles of "
                    + "%s x %s px", overlap, tiling.get("tile_width"), tiling.get("tile_height"))
                    : "; an overlap covered by the later tile is not visible: the tiles may be larger than the step"));
        }
        if (t.trimmed()) {
            r.line("no tiling runs whole from the image's first pixel to its last: read as a trimmed mosaic (end tiles "
                    + "partial, origin free); seams near the image's ends are the least certain, check them or give the "
                    + "layout (--grid, --tile, --overlap)");
        }
        if (!t.borrowed().isEmpty()) {
            boolean y = t.borrowed().equals("y");
            r.line(String.format(Locale.ROOT, "the %s seams show no period of their own: the step of the %s seams (%d "
                    + "px) fits them with weaker evidence per seam (square tiles); check the mask there",
                    y ? "horizontal" : "vertical", y ? "vertical" : "horizontal", y ? t.stepY() : t.stepX()));
        }
        if (!noise.isEmpty()) {
            r.line(String.format(Locale.ROOT, "the seams along %s are blend bands, found from the noise: inside a band "
                    + "the tiles' independent exposures are averaged, so the noise drops (to half its variance in the "
                    + "middle) with the tile step", noise.length() == 2 ? "x and y" : noise));
        }
        if (!shaded.isEmpty()) {
            r.line(String.format(Locale.ROOT, "the seams along %s are too faint at each border: their step comes from "
                    + "the shading every tile shares, and the seams from where that shading is darkest; check the mask "
                    + "there", shaded.length() == 2 ? "x and y" : shaded));
        }
        for (String axis : new String[] {"x", "y"}) {
            if (t.folded().contains(axis + "=2")) {
                r.line(String.format(Locale.ROOT, "two tiles along %s: the one seam cuts the image into two whole "
                        + "tiles, so its position is taken as the step (an uncropped mosaic)", axis));
            }
            if (t.folded().contains(axis + "=3")) {
                r.line(String.format(Locale.ROOT, "three tiles along %s: one of the two seams shows, the other not (the "
                        + "tiles' gains and their vignetting cancel there); the one that shows fixes the step of three "
                        + "whole tiles (an uncropped mosaic); check the mask at the other", axis));
            }
        }
        if (!cornered.isEmpty()) {
            r.line(String.format(Locale.ROOT, "the seams along %s show no period of their own in this trimmed mosaic: "
                    + "the tiles are taken as square, and the step is the one whose seams through the gaps of zeros all "
                    + "show the shading's darkest corner; check the mask, and give the layout (--grid, --tile) if the "
                    + "tiles are not square", cornered.length() == 2 ? "x and y" : cornered));
        }
        if (!gapped.isEmpty()) {
            r.line(String.format(Locale.ROOT, "the seams along %s show no period of their own: the gaps of zeros and "
                    + "the image's length leave one coarsest tiling of whole tiles (an uncropped mosaic), whose other "
                    + "seams are marked where it puts them; check the mask there", gapped.length() == 2 ? "x and y"
                    : gapped));
        }
        List<Integer> bare = rowsWithoutSeams(f, h);
        if (!bare.isEmpty()) {
            r.record("tile_rows_without_seams", bare);
            r.line(String.format(Locale.ROOT, "tile row%s %s (from the top) show%s no vertical seams while the others "
                    + "do: nothing was marked there rather than a guess (a snake's shifted row whose own seams show no "
                    + "phase is left out so); check the mask there or give the layout (--grid, --tile, --overlap, "
                    + "--order)", bare.size() > 1 ? "s" : "", bare, bare.size() > 1 ? "" : "s"));
        }
        if (!f.columnLines().isEmpty() || !f.rowLines().isEmpty()) {
            r.line(String.format(Locale.ROOT, "not seams (they do not repeat with the tile step): vertical lines at x = "
                    + "%s, horizontal lines at y = %s; check them with find-defects (defective columns and rows)",
                    positions(f.columnLines()), positions(f.rowLines())));
        }
        if (!f.regular()) {
            ctx.warn("no tile period was found along " + (t.stepX() == 0 && !f.columns().isEmpty() ? "x" : "y")
                    + ": the seams reported there are the strongest edges; check the mask against the tile layout");
        }
        if (cx.length == 0 && cy.length == 0) {
            r.line("no seams found");
        }
    }

    /**
     * @return the tile rows (1-based, between the horizontal seams found) that no vertical seam crosses while another
     *     tile row has one: their seams were left out, and the mask is thinner there than the tiling
     */
    static List<Integer> rowsWithoutSeams(SeamDetector.Found f, int h) {
        List<Integer> bare = new ArrayList<>();
        if (f.columns().isEmpty()) {
            return bare;
        }
        int[] cy = SeamDetector.centres(f.rows());
        for (int s = 0; s <= cy.length; s++) {
            int mid = ((s == 0 ? 0 : cy[s - 1]) + (s == cy.length ? h : cy[s])) / 2;
            if (f.columns().stream().noneMatch(b -> b.from() <= mid && mid < b.to())) {
                bare.add(s + 1);
            }
        }
        return bare.size() == cy.length + 1 ? List.of() : bare;
    }

    /** Checks a layout against the image: is there seam evidence within 2 px of each of the layout's seams? */
    static void checkLayout(Volume stack, TileLayout layout, double threshold, int stepWidth, Result r,
            RunContext ctx) {
        Volume img = SeamSlices.of(stack);
        double tooth = threshold / 2;
        int seen = 0;
        int total = 0;
        SeamEvidence ey = SeamEvidence.of(img, false, 0, img.width());
        for (int y : layout.rowSeams()) {
            total++;
            seen += near(ey, y) > tooth ? 1 : 0;
        }
        int step = layout.tileHeight() - layout.overlapY();
        for (int row = 0; row < layout.rows(); row++) {
            int y0 = row * step + 3;
            int y1 = Math.min(img.height(), row == layout.rows() - 1 ? img.height() : (row + 1) * step) - 3;
            if (y1 <= y0 || layout.columns() < 2) {
                continue;
            }
            SeamEvidence ex = SeamEvidence.of(img, true, y0, y1);
            for (int x : layout.columnSeams(row)) {
                total++;
                seen += near(ex, x) > tooth ? 1 : 0;
            }
        }
        boolean matches = total == 0 || seen >= MATCH_SHARE * total;
        Map<String, Object> check = new LinkedHashMap<>();
        check.put("layout_seams", total);
        check.put("seen_within_2_px", seen);
        check.put("matches", matches);
        SeamDetector.Found f = SeamDetector.detect(img, threshold, stepWidth);
        check.put("detected_step_x", f.tiling().stepX());
        check.put("detected_step_y", f.tiling().stepY());
        r.record("layout_check", check);
        int lx = layout.tileWidth() - layout.overlapX();
        int ly = layout.tileHeight() - layout.overlapY();
        if (matches) {
            r.line(String.format(Locale.ROOT, "the layout matches the image: %d of %d seams seen within 2 px", seen,
                    total));
        } else {
            ctx.warn(String.format(Locale.ROOT, "the layout does not match the image: %d of %d of its seams seen within"
                    + " 2 px, and the image's seams repeat every %d px along x and %d px along y (the layout's step is "
                    + "%d x %d); check grid, tile and overlap, or use detect", seen, total, f.tiling().stepX(),
                    f.tiling().stepY(), lx, ly));
        }
    }

    private static double near(SeamEvidence e, int b) {
        double m = 0;
        for (int d = -2; d <= 2; d++) {
            m = Math.max(m, e.strength(b + d));
        }
        return m;
    }

    private static List<Map<String, Object>> describe(List<SeamDetector.Band> bands) {
        List<Map<String, Object>> out = new ArrayList<>();
        for (SeamDetector.Band b : bands) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("start", b.start());
            m.put("end", b.end());
            m.put("centre", b.centre());
            m.put("from", b.from());
            m.put("to", b.to());
            m.put("looks", b.looks());
            m.put("sign_test_z", b.strength());
            out.add(m);
        }
        return out;
    }

    private static List<Map<String, Object>> lines(List<SeamDetector.Line> lines) {
        List<Map<String, Object>> out = new ArrayList<>();
        for (SeamDetector.Line l : lines) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("position", l.position());
            m.put("width", l.width());
            m.put("sign_test_z", l.strength());
            out.add(m);
        }
        return out;
    }

    private static String positions(List<SeamDetector.Line> lines) {
        StringBuilder sb = new StringBuilder("[");
        for (SeamDetector.Line l : lines) {
            sb.append(sb.length() > 1 ? ", " : "").append(l.position());
        }
        return sb.append(']').toString();
    }

    private static String describeShort(List<SeamDetector.Band> bands, int lines) {
        StringBuilder sb = new StringBuilder("[");
        for (SeamDetector.Band b : bands) {
            sb.append(sb.length() > 1 ? ", " : "").append(b.centre()).append(" (").append(b.start()).append("..")
                    .append(b.end() - 1);
            if (b.from() > 0 || b.to() < lines) {
                sb.append(", lines ").append(b.from()).append("..").append(b.to() - 1);
            }
            sb.append(' ').append(String.join("+", b.looks())).append(')');
        }
        return sb.append(']').toString();
    }
}
