package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.URISyntaxException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Stream;

import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import org.stackwright.op.InputChecks;
import org.stackwright.testing.ReferenceFiles;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * {@code seam-mask --detect} on invented mosaics made OUTSIDE the project by {@code tools/reference/make_mosaics.py}
 * (numpy/scipy, its own specimen of ellipses, filaments and puncta, cos^4 vignetting, log-normal gains, Poisson and
 * Gaussian read noise per tile exposure, its own stitcher), not by {@link InventedMosaic}, on which the detector was
 * tuned. Each file is read as the command line reads it ({@link TiffFiles#open}, {@link InputChecks#oneVolume}) and
 * detected with the command's defaults (threshold 8, seam width 4, see {@link SeamMaskOperation}).
 *
 * <p>Goals of the issue (ours, no published benchmark): every true seam found within 2 px (a lone border at the
 * centre of its band, a gap covered by its band, a blend band's two ends each within 2 px), no band elsewhere, and
 * the tile step exact: tile width/height minus the overlap along an axis with more than one tile, 0 along an axis
 * with one tile. The tile size then follows where the overlap shows: snake order with the later tile covering the
 * overlap (the shift of the odd tile rows must equal the overlap), a linear blend (the band width must equal it).
 * Lines of defects and filaments ({@code line_x}) must never be inside a seam band.
 *
 * <p>Files on which the detector is measured to miss the goals are listed in {@link #MEASURED_MISSES} with what it
 * found; for them the test asserts only what holds (the list of problems is exactly the measured one, so a change
 * that fixes or worsens them shows), the others are held to the goals.
 */
class IndependentMosaicSeamTest {

    /**
     * one committed draw per layout (the first variant; the sweep draws both variants) and three trimmed draws: a
     * trimmed 3x4 mosaic (the trimmed reading and its report), a trimmed snake (its shifted rows searched, {@link
     * TileRowSeams#shiftedRows}) and a trimmed single tile (a lone fold must predict every tile, or nothing is found);
     * a trimmed 3x3 mosaic of shading only with gaps (square tiles from the shading's corners, {@link
     * TrimmedShadingGrid}: before, 118 x 191 for 118 x 118); and two whole draws whose horizontal seams show only in the shading's fold, which scored best 3-4 px off the
     * step, while one seam shows as a lone step edge ({@link FoldEdges}: before, 87 for 90 and 92 for 88)
     */
    static final String[] NAMES = {"a-steps-1", "b-shading-1", "c-snake-1", "d-blend-1", "e-lines-1", "f-single-1",
        "a-steps-trimmed-1", "b-shading-trimmed-1", "c-snake-trimmed-1", "f-single-trimmed-1", "a-steps-edge-1",
        "c-snake-edge-1"};

    /**
     * The misses measured on the committed files (file -> problems as printed), NOT goals: the detector fails the
     * issue's goals on these independent mosaics, measured 2026-12-05 and reported; a change to the detector that
     * fixes (or worsens) one changes its list here. No committed file misses now; all are held to all the goals
     * (f-single-1 since a fold of the shading must bend the image at its teeth: before, it got 13 horizontal bands
     * every 26 px folded from its smooth vignetting; a-steps-1 and e-lines-1 since the seams of three or more whole
     * tiles are weighed in blocks of single tiles, {@link GridBlocks}: before, nothing was found on either, as the
     * gain steps of the tile rows cancel over the whole height and no comb of two strong teeth existed; c-snake-1
     * since its shifted tile row 1, whose faint seams form no comb, takes the phase the width gives,
     * TileRowSeams.snakeRows: before, it took a single wrong tooth at 91).
     */
    static final Map<String, List<String>> MEASURED_MISSES = Map.of();

    /** How a problem list names a defect line (column or filament) that lies inside a seam band. */
    static final String LINE_IN_BAND = "defect line";

    /** The truth of one mosaic, from {@code mosaics/truth.txt}. */
    record Truth(String name, int width, int height, int stepX, int stepY, int overlap, boolean snake, boolean blend,
            List<int[]> seamsY, Map<Integer, List<int[]>> seamsX, Map<Integer, Integer> probeY, List<Integer> linesX) {
        @Override
        public String toString() {
            return name;
        }
    }

    static Stream<Truth> mosaics() {
        List<String[]> table = ReferenceFiles.table("mosaics/truth.txt");
        return Stream.of(NAMES).map(n -> truth(n, table));
    }

    static Truth truth(String name, List<String[]> table) {
        Truth t = null;
        List<int[]> seamsY = new ArrayList<>();
        Map<Integer, List<int[]>> seamsX = new TreeMap<>();
        Map<Integer, Integer> probe = new TreeMap<>();
        List<Integer> lines = new ArrayList<>();
        String[] size = null;
        for (String[] r : table) {
            if (!r[1].equals(name)) {
                continue;
            }
            switch (r[0]) {
                case "size" -> size = r;
                case "seam_y" -> seamsY.add(new int[] {i(r[2]), i(r[3]), i(r[4])});
                case "seam_x" -> {
                    seamsX.computeIfAbsent(i(r[2]), k -> new ArrayList<>()).add(new int[] {i(r[4]), i(r[5]), i(r[6])});
                    probe.put(i(r[2]), i(r[3]));
                }
                case "row_x" -> {
                    seamsX.computeIfAbsent(i(r[2]), k -> new ArrayList<>());
                    probe.put(i(r[2]), i(r[3]));
                }
                case "line_x" -> lines.add(i(r[2]));
                default -> throw new IllegalStateException("unknown line " + r[0]);
            }
        }
        if (size == null) {
            throw new IllegalStateException("no size line for " + name);
        }
        t = new Truth(name, i(size[2]), i(size[3]), i(size[4]), i(size[5]), i(size[6]), size[9].equals("snake"),
                size[10].equals("blend"), seamsY, seamsX, probe, lines);
        return t;
    }

    @ParameterizedTest
    @MethodSource("mosaics")
    void seamsOfAnIndependentGenerator(Truth t) throws URISyntaxException {
        Path file = Path.of(IndependentMosaicSeamTest.class.getResource("/reference/mosaics/" + t.name() + ".tif")
                .toURI());
        List<String> problems = detect(file, t);
        // defect columns and filaments are never inside a seam band (held on every committed file)
        assertTrue(problems.stream().noneMatch(p -> p.startsWith(LINE_IN_BAND)), t.name() + ": " + problems);
        assertEquals(MEASURED_MISSES.getOrDefault(t.name(), List.of()), problems, t.name());
    }

    /**
     * Fresh draws of the same layouts, made by {@code make_mosaics.py --sweep N DIR} (not committed): how often each
     * layout meets the goals. A measurement for README, off by default ({@code -Dstackwright.independentmosaics=DIR}).
     * A defect line inside a seam band is counted and printed here (the committed files assert it never happens), so
     * one such draw does not end the measurement of the others.
     */
    @Test
    void sweepOverFreshDraws() throws IOException {
        String dir = System.getProperty("stackwright.independentmosaics");
        Assumptions.assumeTrue(dir != null, "sweep off; make_mosaics.py --sweep N DIR, then "
                + "-Dstackwright.independentmosaics=DIR");
        List<String[]> table = new ArrayList<>();
        for (String line : Files.readAllLines(Path.of(dir, "truth.txt"))) {
            String l = line.trim();
            if (!l.isEmpty() && !l.startsWith("#")) {
                table.add(l.split("\\s+"));
            }
        }
        // per layout (the name before "-s"): draws, all goals met, seams, seams found, false bands, steps exact
        Map<String, int[]> tally = new TreeMap<>();
        List<String> linesInBands = new ArrayList<>();
        for (String[] r : table) {
            if (!r[0].equals("size")) {
                continue;
            }
            Truth t = truth(r[1], table);
            List<String> problems = detect(Path.of(dir, t.name() + ".tif"), t);
            int[] c = tally.computeIfAbsent(t.name().substring(0, t.name().lastIndexOf("-s")), k -> new int[6]);
            int seams = t.seamsY().size() + t.seamsX().values().stream().mapToInt(List::size).sum();
            long missed = problems.stream().filter(p -> p.contains("not found")).count();
            c[0]++;
            c[1] += problems.isEmpty() ? 1 : 0;
            c[2] += seams;
            c[3] += seams - missed;
            c[4] += problems.stream().filter(p -> p.contains("extra band")).count();
            c[5] += problems.stream().noneMatch(p -> p.startsWith("step")) ? 1 : 0;
            problems.stream().filter(p -> p.startsWith(LINE_IN_BAND)).forEach(p -> linesInBands.add(t.name() + ": " + p));
        }
        tally.forEach((k, c) -> System.out.printf(Locale.ROOT, "%-10s %d draws: all goals met in %d; seams found "
                + "within 2 px %d of %d; false bands %d; tile step exact on both axes in %d%n", k, c[0], c[1], c[3],
                c[2], c[4], c[5]));
        System.out.printf(Locale.ROOT, "defect lines inside seam bands: %d %s%n", linesInBands.size(), linesInBands);
    }

    /**
     * Reads the file as the command line does, detects with the command's defaults and prints what was found.
     * @return the departures from the goals, a defect line inside a seam band among them
     */
    static List<String> detect(Path file, Truth t) {
        Volume img = InputChecks.oneVolume("input", TiffFiles.open(file, "--input"));
        assertEquals(t.width(), img.width(), "width");
        assertEquals(t.height(), img.height(), "height");
        // the command's defaults: --threshold 8, --seam-width 4
        SeamDetector.Found f = SeamDetector.detect(img, 8, 4);
        List<String> problems = problems(t, f);
        for (int x : t.linesX()) {
            for (SeamDetector.Band b : f.columns()) {
                if (x >= b.start() - 2 && x < b.end() + 2) {
                    problems.add(LINE_IN_BAND + " at x=" + x + " inside seam band " + b);
                }
            }
        }
        SeamDetector.Tiling tl = f.tiling();
        System.out.printf(Locale.ROOT, "%-12s step %dx%d (true %dx%d), overlap seen %d (true %d), blend %dx%d, "
                + "step from the other axis '%s', from the shading '%s', read as trimmed %s, looks x=%s y=%s, lines not seams x=%s; %s%n",
                t.name(), tl.stepX(), tl.stepY(), t.stepX(), t.stepY(), tl.overlapX(), t.overlap(), tl.blendX(),
                tl.blendY(), tl.borrowed(), tl.folded(), tl.trimmed(), looks(f.columns()), looks(f.rows()),
                f.columnLines().stream().map(SeamDetector.Line::position).toList(),
                problems.isEmpty() ? "all seams within 2 px, nothing else, step exact" : problems);
        return problems;
    }

    /** @return every departure from the goals, in words (empty when all hold) */
    static List<String> problems(Truth t, SeamDetector.Found f) {
        List<String> problems = new ArrayList<>();
        int blend = t.blend() ? t.overlap() : 0;
        int gap = Math.max(maxGap(t.seamsY()), t.seamsX().values().stream().mapToInt(IndependentMosaicSeamTest::maxGap)
                .max().orElse(0));
        MosaicSeamTest.match("y", at(t.seamsY()), f.rows(), blend, gap, problems, -1);
        for (Map.Entry<Integer, List<int[]>> e : t.seamsX().entrySet()) {
            int y = t.probeY().get(e.getKey());
            MosaicSeamTest.match("x (tile row " + e.getKey() + ")", at(e.getValue()), MosaicSeamTest.across(f.columns(),
                    y), blend, gap, problems, e.getKey());
        }
        SeamDetector.Tiling tl = f.tiling();
        if (tl.stepX() != t.stepX()) {
            problems.add("step x " + tl.stepX() + " for " + t.stepX());
        }
        if (tl.stepY() != t.stepY()) {
            problems.add("step y " + tl.stepY() + " for " + t.stepY());
        }
        if (t.snake() && !t.blend() && t.overlap() > 0 && tl.overlapX() != t.overlap()) {
            problems.add("overlap from the snake shift " + tl.overlapX() + " for " + t.overlap());
        }
        if (t.blend()) {
            if (t.stepX() > 0 && tl.blendX() != t.overlap()) {
                problems.add("blend width x " + tl.blendX() + " for " + t.overlap());
            }
            if (t.stepY() > 0 && tl.blendY() != t.overlap()) {
                problems.add("blend width y " + tl.blendY() + " for " + t.overlap());
            }
        }
        return problems;
    }

    /** @return the looks of the bands found, without repeats */
    private static List<String> looks(List<SeamDetector.Band> bands) {
        return bands.stream().flatMap(b -> b.looks().stream()).distinct().toList();
    }

    private static int maxGap(List<int[]> seams) {
        return seams.stream().mapToInt(s -> s[1]).max().orElse(0);
    }

    private static int[] at(List<int[]> seams) {
        return seams.stream().mapToInt(s -> s[0]).toArray();
    }

    private static int i(String s) {
        return Integer.parseInt(s);
    }
}
