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
 * maximum projections of the data and the estimate; two projections of the normalised residual over the trusted
 * planes in a blue-white-red colour scale with its colour bar: at each x, y the value of largest magnitude along z
 * (finds isolated regions, but white noise also looks speckled there, as the largest of nz normal values is
 * typically 2 to 3) and the sum along z divided by sqrt(nz) (still N(0, 1) for white noise, so faint structure
 * that persists over z stands out); and plots of chi^2 per slice, the residual histogram against N(0, 1) and the
 * residual power spectrum. Every residual panel and plot shows the trusted region of the report; the border band
 * is shaded grey where it is not judged, and its planes are grey in the chi^2 plot. The colour scale is set from
 * the trusted area of the two residual maps (at least +-3), so a band that fits badly cannot saturate it. Works
 * headless.
 */
public final class SummaryPicture {

    /** The residual colour scale runs at least from -MIN_SCALE to +MIN_SCALE noise standard deviations. */
    public static final double MIN_SCALE = 3;

    private static final int MARGIN = 14;
    private static final int GAP = 16;
    private static final int PANEL = 236;
    private static final int BAR = 16;
    private static final Color INK = new Color(0x22, 0x22, 0x22);
    private static final Color BAND = new Color(0x99, 0x99, 0x99);
    private static final Font TITLE = new Font("SansSerif", Font.BOLD, 17);
    private static final Font TEXT = new Font("SansSerif", Font.PLAIN, 13);
    private static final Font SMALL = new Font("SansSerif", Font.PLAIN, 12);

    private SummaryPicture() {
    }

    /**
     * @param title name of the data set, shown in the heading (shortened in the middle when too long)
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
        int[] box = report.region().analysisBox();
        ImageProcessor[] plots = {
            plotImage(InspectPlots.chi2PerSlice(report.chi2PerPlane(), box[2], box[2] + box[5] - 1)),
            plotImage(InspectPlots.histogram(report.histogram())),
            plotImage(InspectPlots.spectrum(report.spectrum())) };
        int col = PANEL;
        int barSpace = 50;
        int width = 2 * MARGIN + 4 * col + 3 * GAP + barSpace;
        int textWidth = width - 2 * MARGIN;
        int plotCol = (width - 2 * MARGIN - 2 * GAP) / 3;
        String head = fit("Residual view: " + title, TITLE, textWidth);
        List<String> lines = new ArrayList<>(wrap(String.format(Locale.ROOT, "verdict: %s   chi\u00b2 per voxel %.3f"
                + " over %s%s", report.verdict().code(), report.chi2Trusted(), report.region().describe(),
                Double.isFinite(report.chi2Band()) ? String.format(Locale.ROOT, "; border band %.3f",
                        report.chi2Band()) : ""), TEXT, textWidth));
        lines.addAll(wrap(report.verdict().text(), TEXT, textWidth));
        int headH = 30 + 18 * lines.size() + 8;
        int rowTop = MARGIN + headH + 22;
        int plotTop = rowTop + PANEL + GAP + 22;
        int plotH = plots[0].getHeight();
        List<String> foot = wrap("r = (data - prediction) / noise standard deviation; residual maps over the trusted"
                + " planes " + (box[2] + 1) + " to " + (box[2] + box[5]) + (report.region().bandExcluded()
                ? "; grey: the border band, not judged" : "; outside the rectangle: the border band, judged and"
                + " reported apart") + ". Deconvolved pixels are estimates; not for diagnostic use.", SMALL, textWidth);
        int height = plotTop + plotH + 14 + 16 * foot.size();
        ColorProcessor cp = new ColorProcessor(width, height);
        cp.setColor(Color.WHITE);
        cp.fill();
        cp.setAntialiasedText(true);
        cp.setColor(INK);
        cp.setFont(TITLE);
        cp.drawString(head, MARGIN, MARGIN + 20);
        cp.setFont(TEXT);
        for (int i = 0; i < lines.size(); i++) {
            cp.drawString(lines.get(i), MARGIN, MARGIN + 42 + 18 * i);
        }
        // row of projections
        Volume r = report.maps().normalised();
        Volume extreme = extremeProjection(r, box[2], box[5]);
        Volume sum = sumProjection(r, box[2], box[5]);
        double scale = scale(new Volume[] {extreme, sum}, box);
        String[] captions = {"data (max projection)", "estimate (max projection)", "residual r: largest |r| along z",
            "residual r: sum along z / \u221anz"};
        ImageProcessor[] panels = {grey(Pictures.maxProjection(data), pw, ph),
            grey(Pictures.maxProjection(estimate), pw, ph), residual(extreme, scale, report.region(), pw, ph),
            residual(sum, scale, report.region(), pw, ph)};
        cp.setFont(SMALL);
        int[] in = report.region().interior();
        for (int i = 0; i < 4; i++) {
            int x0 = MARGIN + i * (col + GAP);
            cp.setColor(INK);
            cp.drawString(captions[i], x0, rowTop - 6);
            int px = x0 + (col - pw) / 2;
            int py = rowTop + (PANEL - ph) / 2;
            cp.insert(panels[i], px, py);
            if (i >= 2 && (in[0] > 0 || in[1] > 0)) {
                cp.setColor(new Color(0x55, 0x55, 0x55));
                cp.drawRect(px + (int) Math.round(in[0] * zoom), py + (int) Math.round(in[1] * zoom),
                        (int) Math.round(in[3] * zoom), (int) Math.round(in[4] * zoom));
            }
        }
        colourBar(cp, MARGIN + 4 * col + 3 * GAP + 6, rowTop, PANEL, scale);
        // row of plots
        for (int i = 0; i < 3; i++) {
            int x0 = MARGIN + i * (plotCol + GAP);
            cp.insert(plots[i], x0 + (plotCol - plots[i].getWidth()) / 2, plotTop);
        }
        cp.setColor(new Color(0x66, 0x66, 0x66));
        cp.setFont(SMALL);
        for (int i = 0; i < foot.size(); i++) {
            cp.drawString(foot.get(i), MARGIN, plotTop + plotH + 22 + 16 * i);
        }
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
        return extremeProjection(r, 0, r.depth());
    }

    /** @return at each x, y the value of largest magnitude over the planes z0 to z0 + n - 1 */
    public static Volume extremeProjection(Volume r, int z0, int n) {
        int plane = r.width() * r.height();
        float[] out = new float[plane];
        float[] d = r.data();
        for (int z = z0; z < z0 + n; z++) {
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
        return sumProjection(r, 0, r.depth());
    }

    /** @return at each x, y the sum over the planes z0 to z0 + n - 1 divided by sqrt(n) */
    public static Volume sumProjection(Volume r, int z0, int n) {
        int plane = r.width() * r.height();
        float[] out = new float[plane];
        float[] d = r.data();
        double f = 1 / Math.sqrt(n);
        for (int i = 0; i < plane; i++) {
            double s = 0;
            for (int z = z0; z < z0 + n; z++) {
                s += d[z * plane + i];
            }
            out[i] = (float) (s * f);
        }
        return new Volume(r.width(), r.height(), 1, out, r.voxel());
    }

    /**
     * The colour scale from the trusted area: the 99.5th percentile of |r| over the box's lateral extent of the
     * given maps, rounded up to 3, 4, 5, 6, 8 or 10 times a power of ten, at least {@value #MIN_SCALE}.
     */
    static double scale(Volume[] maps, int[] box) {
        int w = maps[0].width();
        List<Float> values = new ArrayList<>();
        for (Volume m : maps) {
            for (int y = box[1]; y < box[1] + box[4]; y++) {
                for (int x = box[0]; x < box[0] + box[3]; x++) {
                    values.add(Math.abs(m.data()[y * w + x]));
                }
            }
        }
        float[] a = new float[values.size()];
        for (int i = 0; i < a.length; i++) {
            a[i] = values.get(i);
        }
        double q = a.length == 0 ? 0 : Pictures.percentiles(a, 0, 0.995)[1];
        return nice(Math.max(MIN_SCALE, q));
    }

    /** @return the smallest of 3, 4, 5, 6, 8, 10 times a power of ten that is at least v (v &gt; 0) */
    static double nice(double v) {
        double p = Math.pow(10, Math.floor(Math.log10(v)));
        for (double m : new double[] {1, 1.5, 2, 3, 4, 5, 6, 8, 10}) {
            if (m * p >= v - 1e-12) {
                return m * p;
            }
        }
        return 10 * p;
    }

    private static ImageProcessor residual(Volume e, double scale, TrustedRegion region, int pw, int ph) {
        ColorProcessor c = new ColorProcessor(e.width(), e.height());
        int[] in = region.interior();
        for (int y = 0; y < e.height(); y++) {
            for (int x = 0; x < e.width(); x++) {
                int i = y * e.width() + x;
                int rgb = colour(e.data()[i] / scale);
                boolean band = x < in[0] || y < in[1] || x >= in[0] + in[3] || y >= in[1] + in[4];
                if (region.bandExcluded() && band) {
                    rgb = shade(rgb);
                }
                c.set(i, rgb);
            }
        }
        c.setInterpolationMethod(ImageProcessor.NONE);
        return c.resize(pw, ph);
    }

    /** @return the colour blended half with the band grey */
    static int shade(int rgb) {
        int r = (((rgb >> 16) & 0xff) + BAND.getRed()) / 2;
        int g = (((rgb >> 8) & 0xff) + BAND.getGreen()) / 2;
        int b = ((rgb & 0xff) + BAND.getBlue()) / 2;
        return (r << 16) | (g << 8) | b;
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

    private static void colourBar(ColorProcessor cp, int x0, int y0, int height, double scale) {
        for (int y = 0; y < height; y++) {
            double t = 1 - 2.0 * y / (height - 1);
            cp.setColor(new Color(colour(t)));
            cp.drawLine(x0, y0 + y, x0 + BAR - 1, y0 + y);
        }
        cp.setColor(INK);
        cp.drawRect(x0, y0, BAR, height);
        cp.setFont(SMALL);
        for (int k = -1; k <= 1; k++) {
            double v = k * scale;
            int y = y0 + (int) Math.round((1 - (k + 1) / 2.0) * (height - 1));
            cp.drawLine(x0 + BAR, y, x0 + BAR + 3, y);
            String label = k == 0 ? "0" : (k > 0 ? "+" : "-") + number(scale);
            cp.drawString(label, x0 + BAR + 5, y + 5);
        }
        cp.drawString("r", x0 + 3, y0 - 6);
    }

    private static String number(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }

    /**
     * @return the text, shortened in the middle with an ellipsis until it fits the width in the font (a long file
     *     name keeps its start and its end)
     */
    static String fit(String text, Font font, int width) {
        FontMetrics fm = metrics(font);
        if (fm.stringWidth(text) <= width) {
            return text;
        }
        int keep = text.length();
        String out = text;
        while (keep > 2 && fm.stringWidth(out) > width) {
            keep--;
            int a = (keep + 1) / 2;
            int b = keep / 2;
            out = text.substring(0, a) + "\u2026" + text.substring(text.length() - b);
        }
        return out;
    }

    /** @return the pixel width of the text in the font (as the page draws it) */
    static int textWidth(String text, Font font) {
        return metrics(font).stringWidth(text);
    }

    private static FontMetrics metrics(Font font) {
        ColorProcessor probe = new ColorProcessor(1, 1);
        probe.setFont(font);
        probe.setAntialiasedText(true);
        return probe.getFontMetrics();
    }

    /** Greedy word wrap to a pixel width; a word wider than the line is shortened to fit. */
    static List<String> wrap(String text, Font font, int width) {
        FontMetrics fm = metrics(font);
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
            if (fm.stringWidth(line.toString()) > width) {
                line = new StringBuilder(fit(line.toString(), font, width));
            }
        }
        if (line.length() > 0) {
            out.add(line.toString());
        }
        return out;
    }
}
