package org.stackwright.repair;

import java.awt.Color;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.io.FileSaver;
import ij.process.ByteProcessor;
import ij.process.ColorProcessor;

import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * The README's pictures of shading and gain correction, made from the invented mosaic of the issue
 * ({@link InventedMosaic}, not simulate). Two steps, so that the correction itself runs through the command line as
 * a user runs it:
 * <pre>
 * java -cp CLASSPATH org.stackwright.repair.MosaicFigures mosaic DIR      # writes DIR/mosaic.tif
 * stackwright seam-mask --grid 3x4 --tile 200x200 --input DIR/mosaic.tif --level-tiles --offset 100 \
 *     --output DIR/seams.tif --levelled-output DIR/levelled.tif --flat-field DIR/flat.tif
 * java -cp CLASSPATH org.stackwright.repair.MosaicFigures pictures DIR    # writes DIR/mosaic-before-after.png
 *                                                                          # and DIR/mosaic-profile.png
 * </pre>
 * Test helper, not part of the main jar.
 */
public final class MosaicFigures {

    private MosaicFigures() {
    }

    public static void main(String[] args) throws Exception {
        Path dir = Path.of(args[1]);
        Files.createDirectories(dir);
        if (args[0].equals("mosaic")) {
            InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
            InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, 41);
            TiffFiles.write(m.image, dir.resolve("mosaic.tif"), true);
            return;
        }
        Volume before = TiffFiles.read(dir.resolve("mosaic.tif"), "mosaic");
        Volume after = TiffFiles.read(dir.resolve("levelled.tif"), "levelled");
        // same display range for both: offset to the 99.5th percentile of the input
        double lo = InventedMosaic.OFFSET;
        float[] sorted = before.data().clone();
        java.util.Arrays.sort(sorted);
        double hi = sorted[(int) (0.995 * sorted.length)];
        int w = before.width();
        int h = before.height();
        int scale = 2;
        int pw = w / scale;
        int ph = h / scale;
        ColorProcessor pic = new ColorProcessor(2 * pw + 10, ph);
        pic.setColor(Color.WHITE);
        pic.fill();
        pic.insert(gray(before, lo, hi, scale), 0, 0);
        pic.insert(gray(after, lo, hi, scale), pw + 10, 0);
        new FileSaver(new ImagePlus("before-after", pic)).saveAsPng(dir.resolve("mosaic-before-after.png").toString());
        Plot plot = new Plot("Column profile", "x (px)", "column median - offset");
        plot.setLineWidth(1);
        plot.setColor(Color.GRAY);
        plot.addPoints(xs(w), columnMeans(before), Plot.LINE);
        plot.setColor(Color.BLUE);
        plot.addPoints(xs(w), columnMeans(after), Plot.LINE);
        plot.setColor(Color.BLACK);
        plot.addLegend("before\tafter shading and gain correction");
        plot.setSize(700, 260);
        new FileSaver(plot.getImagePlus()).saveAsPng(dir.resolve("mosaic-profile.png").toString());
    }

    private static ByteProcessor gray(Volume v, double lo, double hi, int scale) {
        int pw = v.width() / scale;
        int ph = v.height() / scale;
        ByteProcessor bp = new ByteProcessor(pw, ph);
        for (int y = 0; y < ph; y++) {
            for (int x = 0; x < pw; x++) {
                double s = 0;
                for (int dy = 0; dy < scale; dy++) {
                    for (int dx = 0; dx < scale; dx++) {
                        s += v.get(x * scale + dx, y * scale + dy, 0);
                    }
                }
                double g = 255 * (s / (scale * scale) - lo) / (hi - lo);
                bp.set(x, y, (int) Math.max(0, Math.min(255, g)));
            }
        }
        return bp;
    }

    /** median of each column above the offset (gaps of zeros left out): the tiles' shading shows as arches */
    private static double[] columnMeans(Volume v) {
        double[] out = new double[v.width()];
        double[] col = new double[v.height()];
        for (int x = 0; x < v.width(); x++) {
            int n = 0;
            for (int y = 0; y < v.height(); y++) {
                float p = v.get(x, y, 0);
                if (p != 0) {
                    col[n++] = p - InventedMosaic.OFFSET;
                }
            }
            out[x] = n == 0 ? Double.NaN : RobustStats.median(col, n);
        }
        return out;
    }

    private static double[] xs(int n) {
        double[] x = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = i;
        }
        return x;
    }
}
