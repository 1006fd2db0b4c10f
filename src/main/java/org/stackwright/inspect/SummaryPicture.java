package org.stackwright.inspect;

import java.awt.Color;
import java.awt.Font;
import java.awt.FontMetrics;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.process.ColorProcessor;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import org.stackwright.volume.Volume;

/**
 * The one-page summary of a residual analysis as an RGB image (the CLI saves it as PNG): the verdict in words;
 * maximum projections of the data and the estimate; two projections of the normalised residual in a blue-white-red
 * colour scale from -{@value #SCALE} to +{@value #SCALE} with its colour bar: at each x, y the value of largest
 * magnitude along z (finds isolated regions, but white noise also looks speckled there, as the largest of nz normal
 * values is typically 2 to 3) and the sum along z divided by sqrt(nz) (still N(0, 1) for white noise, so faint
 * structure that persists over z stands out); and plots of chi^2 per slice, the residual histogram against N(0, 1)
 * and the residual power spectrum. Works headless.
 */
public final class SummaryPicture {

    /** The residual colour scale runs from -SCALE to +SCALE noise standard deviations. */
    public static final double SCALE = 5;

    private static final int MARGIN = 14;
    private static final int GAP = 16;
    private static final int PANEL = 236;
    private static final int BAR = 16;
    private static final Color INK = new Color(0x22, 0x22, 0x22);
    private static final Font TITLE = new Font("SansSerif", Font.BOLD, 17);
    private static final Font TEXT = new Font("SansSerif", Font.PLAIN, 13);
    private static final Font SMALL = new Font("SansSerif", Font.PLAIN, 12);

    private SummaryPicture() {
    }

    /**
     * @param title name of the data set, shown in the heading
     * @param data the data, not modified
     * @param estimate the estimate, not modified
     * @param report the analysis of data and estimate
     * @return an RGB image titled "title-summary"
     */
    public static ImagePlus render(String title, Volume data, Volume estimate, ResidualReport report) {
        int w = data.width();
        int h = data.height();
        double zoom = Math.min(PANEL / (double) w, PANEL / (double) h);
        int pw = Math.max(1, (int) Math.round(w * zoom));
        int ph = Math.max(1, (int) Math.round(h * zoom));
        ImageProcessor[] plots = {
            plotImage(InspectPlots.chi2PerSlice(report.maps().chi2PerSlice())),
            plotImage(InspectPlots.histogram(report.histogram())),
            plotImage(InspectPlots.spectrum(report.spectrum())) };
        int col = PANEL;
        int barSpace = 50;
        int width = 2 * MARGIN + 4 * col + 3 * GAP + barSpace;
        int plotCol = (width - 2 * MARGIN - 2 * GAP) / 3;
        List<String> lines = wrap(report.verdict().text(), TEXT, width - 2 * MARGIN);
        int headH = 30 + 18 * lines.size() + 8;
        int rowTop = MARGIN + headH + 22;
        int plotTop = rowTop + PANEL + GAP + 22;
        int plotH = plots[0].getHeight();
        int height = plotTop + plotH + 30;
        ColorProcessor cp = new ColorProcessor(width, height);
        cp.setColor(Color.WHITE);
        cp.fill();
        cp.setAntialiasedText(true);
        cp.setColor(INK);
        cp.setFont(TITLE);
        String head = "Residual view: " + title + "   verdict: " + report.verdict().code() + "   chi\u00b2 per voxel "
                + String.format(Locale.ROOT, "%.3f", report.chi2Interior()) + (Double.isFinite(report.chi2Band())
                ? String.format(Locale.ROOT, " in the interior (whole stack %.3f)", report.maps().chi2PerVoxel())
                : "");
        cp.drawString(head, MARGIN, MARGIN + 20);
        cp.setFont(TEXT);
        for (int i = 0; i < lines.size(); i++) {
            cp.drawString(lines.get(i), MARGIN, MARGIN + 42 + 18 * i);
        }
        // row of projections
        String[] captions = {"data (max projection)", "estimate (max projection)", "residual r: largest |r| along z",
            "residual r: sum along z / \u221anz"};
        ImageProcessor[] panels = {grey(Pictures.maxProjection(data), pw, ph),
            grey(Pictures.maxProjection(estimate), pw, ph),
            residual(extremeProjection(report.maps().normalised()), pw, ph),
            residual(sumProjection(report.maps().normalised()), pw, ph)};
        cp.setFont(SMALL);
        for (int i = 0; i < 4; i++) {
            int x0 = MARGIN + i * (col + GAP);
            cp.setColor(INK);
            cp.drawString(captions[i], x0, rowTop - 6);
            int px = x0 + (col - pw) / 2;
            int py = rowTop + (PANEL - ph) / 2;
            cp.insert(panels[i], px, py);
            int[] box = report.interior();
            if (i >= 2 && (box[0] > 0 || box[1] > 0)) {
                // the interior the verdict uses
                cp.setColor(new Color(0x55, 0x55, 0x55));
                cp.drawRect(px + (int) Math.round(box[0] * zoom), py + (int) Math.round(box[1] * zoom),
                        (int) Math.round(box[3] * zoom), (int) Math.round(box[4] * zoom));
            }
        }
        colourBar(cp, MARGIN + 4 * col + 3 * GAP + 6, rowTop, PANEL);
        // row of plots
        for (int i = 0; i < 3; i++) {
            int x0 = MARGIN + i * (plotCol + GAP);
            cp.insert(plots[i], x0 + (plotCol - plots[i].getWidth()) / 2, plotTop);
        }
        cp.setColor(new Color(0x66, 0x66, 0x66));
        cp.setFont(SMALL);
        cp.drawString("r = (data - prediction) / noise standard deviation. Grey box: the interior the verdict uses."
                + " Deconvolved pixels are estimates; not for diagnostic use.", MARGIN, height - 10);
        return new ImagePlus(title + "-summary", cp);
    }

    private static ImageProcessor plotImage(Plot p) {
        p.setFrameSize(260, 150);
        p.setFont(new Font("SansSerif", Font.PLAIN, 12));
        p.setAxisLabelFont(Font.PLAIN, 12);
        return p.getProcessor().convertToRGB();
    }

    /** Grey panel scaled from the 0.1 to 99.9 percentile. */
    private static ImageProcessor grey(Volume mip, int pw, int ph) {
        FloatProcessor fp = new FloatProcessor(mip.width(), mip.height(), mip.data().clone());
        double[] r = Pictures.percentiles(mip.data(), 0.001, 0.999);
        fp.setMinAndMax(r[0], r[1]);
        ImageProcessor g = fp.convertToByteProcessor(true);
        g.setInterpolationMethod(ImageProcessor.BILINEAR);
        return g.resize(pw, ph).convertToColorProcessor();
    }

    /** @return at each x, y the value of largest magnitude along z */
    public static Volume extremeProjection(Volume r) {
        int plane = r.width() * r.height();
        float[] out = new float[plane];
        float[] d = r.data();
        for (int z = 0; z < r.depth(); z++) {
            for (int i = 0; i < plane; i++) {
                float v = d[z * plane + i];
                if (Math.abs(v) > Math.abs(out[i])) {
                    out[i] = v;
                }
            }
        }
        return new Volume(r.width(), r.height(), 1, out, r.voxel());
    }

    /** @return at each x, y the sum along z divided by sqrt(depth): N(0, 1) again for white noise */
    public static Volume sumProjection(Volume r) {
        int plane = r.width() * r.height();
        float[] out = new float[plane];
        float[] d = r.data();
        double f = 1 / Math.sqrt(r.depth());
        for (int i = 0; i < plane; i++) {
            double s = 0;
            for (int z = 0; z < r.depth(); z++) {
                s += d[z * plane + i];
            }
            out[i] = (float) (s * f);
        }
        return new Volume(r.width(), r.height(), 1, out, r.voxel());
    }

    private static ImageProcessor residual(Volume e, int pw, int ph) {
        ColorProcessor c = new ColorProcessor(e.width(), e.height());
        for (int i = 0; i < e.size(); i++) {
            c.set(i, colour(e.data()[i] / SCALE));
        }
        c.setInterpolationMethod(ImageProcessor.NONE);
        return c.resize(pw, ph);
    }

    /** Blue (-1) - white (0) - red (+1) diverging scale, clipped; @return packed RGB */
    static int colour(double t) {
        double u = Math.max(-1, Math.min(1, t));
        int[] lo = {0x21, 0x66, 0xac};
        int[] hi = {0xb2, 0x18, 0x2b};
        int[] end = u < 0 ? lo : hi;
        double a = Math.abs(u);
        int rr = (int) Math.round(255 + a * (end[0] - 255));
        int gg = (int) Math.round(255 + a * (end[1] - 255));
        int bb = (int) Math.round(255 + a * (end[2] - 255));
        return (rr << 16) | (gg << 8) | bb;
    }

    private static void colourBar(ColorProcessor cp, int x0, int y0, int height) {
        for (int y = 0; y < height; y++) {
            double t = 1 - 2.0 * y / (height - 1);
            cp.setColor(new Color(colour(t)));
            cp.drawLine(x0, y0 + y, x0 + BAR - 1, y0 + y);
        }
        cp.setColor(INK);
        cp.drawRect(x0, y0, BAR, height);
        cp.setFont(SMALL);
        for (int v = -5; v <= 5; v += 5) {
            int y = y0 + (int) Math.round((1 - (v + SCALE) / (2 * SCALE)) * (height - 1));
            cp.drawLine(x0 + BAR, y, x0 + BAR + 3, y);
            cp.drawString(v > 0 ? "+" + v : Integer.toString(v), x0 + BAR + 5, y + 5);
        }
        cp.drawString("r", x0 + 3, y0 - 6);
    }

    /** Greedy word wrap to a pixel width. */
    static List<String> wrap(String text, Font font, int width) {
        ColorProcessor probe = new ColorProcessor(1, 1);
        probe.setFont(font);
        FontMetrics fm = probe.getFontMetrics();
        List<String> out = new ArrayList<>();
        StringBuilder line = new StringBuilder();
        for (String word : text.split(" ")) {
            String tryLine = line.length() == 0 ? word : line + " " + word;
            if (fm.stringWidth(tryLine) > width && line.length() > 0) {
                out.add(line.toString());
                line = new StringBuilder(word);
            } else {
                line = new StringBuilder(tryLine);
            }
        }
        if (line.length() > 0) {
            out.add(line.toString());
        }
        return out;
    }
}
