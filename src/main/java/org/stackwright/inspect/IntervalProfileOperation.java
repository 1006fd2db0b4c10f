package org.stackwright.inspect;

import java.awt.Color;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.process.FloatProcessor;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code interval-profile}: the posterior mean with its credible interval along a line, from the mean, lower and
 * upper images that {@code deconvolve --uncertainty sampling} writes. Values are read every pixel along the line
 * by bilinear interpolation (ImageJ's line profile, {@code ImageProcessor.getLine}); the plot shades the interval
 * and draws the mean. In ImageJ the line defaults to the line selection on the current image and the plane to its
 * current slice.
 */
public final class IntervalProfileOperation implements Operation {

    @Override
    public String name() {
        return "interval-profile";
    }

    @Override
    public String summary() {
        return "plot the posterior mean with its credible interval along a line (after deconvolve --uncertainty sampling)";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("mean", true, "the posterior mean (deconvolve --output with uncertainty sampling)"),
                Param.image("lower", true, "lower end of the interval (deconvolve --lower-output)"),
                Param.image("upper", true, "upper end of the interval (deconvolve --upper-output)"),
                Param.text("line", null, "the line as x0,y0,x1,y1 in pixels (ImageJ: the line selection)"),
                Param.integer("plane", 1, 1, Integer.MAX_VALUE, "plane (z slice) of the line, from 1"),
                Param.outputImage("output", false, "the plot (PNG on the command line)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        Volume mean = ImagePlusAdapter.toVolume(v.image("mean"));
        Volume lower = ImagePlusAdapter.toVolume(v.image("lower"));
        Volume upper = ImagePlusAdapter.toVolume(v.image("upper"));
        for (Map.Entry<String, Volume> e : Map.of("lower", lower, "upper", upper).entrySet()) {
            if (!e.getValue().shape().equals(mean.shape())) {
                throw new IllegalArgumentException(e.getKey() + " is " + e.getValue().shape() + " but mean is "
                        + mean.shape() + "; give the three images of one sampling run");
            }
        }
        double[] line = line(v.text("line"), mean);
        int plane = v.integer("plane");
        if (plane > mean.depth()) {
            throw new IllegalArgumentException("plane = " + plane + " is not allowed; the images have " + mean.depth()
                    + " plane(s)");
        }
        double[] m = profile(mean, plane, line);
        double[] lo = profile(lower, plane, line);
        double[] hi = profile(upper, plane, line);
        double px = mean.voxel().x();
        double[] x = new double[m.length];
        Result r = new Result();
        for (int i = 0; i < m.length; i++) {
            x[i] = i * px;
            Map<String, Object> row = new LinkedHashMap<>();
            row.put("distance_um", x[i]);
            row.put("mean", m[i]);
            row.put("lower", lo[i]);
            row.put("upper", hi[i]);
            r.row(row);
        }
        String title = v.image("mean").getTitle();
        r.record("operation", "interval-profile");
        r.record("settings", v.effective());
        r.record("points", m.length);
        r.image("output", plot(title, x, m, lo, hi, line, plane).getImagePlus());
        double widest = 0;
        for (int i = 0; i < m.length; i++) {
            widest = Math.max(widest, hi[i] - lo[i]);
        }
        r.record("widest_interval", widest);
        r.line(String.format(Locale.ROOT, "profile of %d points along (%.1f, %.1f)-(%.1f, %.1f), plane %d; widest "
                + "interval %.4g (a credible interval under the prior, an estimate)", m.length, line[0], line[1],
                line[2], line[3], plane, widest));
        return r;
    }

    /** Reads "x0,y0,x1,y1" and checks that both ends lie in the image. */
    static double[] line(String text, Volume like) {
        if (text == null || text.isBlank()) {
            throw new IllegalArgumentException("line is missing; give x0,y0,x1,y1 in pixels (in ImageJ: draw a line "
                    + "selection on the mean image)");
        }
        String[] p = text.split(",");
        if (p.length != 4) {
            throw new IllegalArgumentException("line = '" + text + "' is not allowed; give four numbers x0,y0,x1,y1 in pixels");
        }
        double[] l = new double[4];
        for (int i = 0; i < 4; i++) {
            try {
                l[i] = Double.parseDouble(p[i].trim());
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException("line = '" + text + "' is not allowed; give four numbers x0,y0,x1,y1 in pixels");
            }
            double limit = i % 2 == 0 ? like.width() - 1 : like.height() - 1;
            if (!(l[i] >= 0 && l[i] <= limit)) {
                throw new IllegalArgumentException("line = '" + text + "' leaves the image (" + like.width() + "x"
                        + like.height() + " pixels); give ends inside it");
            }
        }
        return l;
    }

    /** @return values every pixel along the line on one plane, bilinear (ImageJ's line profile) */
    static double[] profile(Volume v, int plane, double[] line) {
        int n = v.width() * v.height();
        float[] slice = new float[n];
        System.arraycopy(v.data(), (plane - 1) * n, slice, 0, n);
        FloatProcessor fp = new FloatProcessor(v.width(), v.height(), slice);
        fp.setInterpolationMethod(ij.process.ImageProcessor.BILINEAR);
        return fp.getLine(line[0], line[1], line[2], line[3]);
    }

    private static Plot plot(String title, double[] x, double[] m, double[] lo, double[] hi, double[] line, int plane) {
        Plot plot = new Plot(String.format(Locale.ROOT, "%s interval profile", title), "distance (um)",
                "ADU above offset");
        double top = 0;
        for (double h : hi) {
            top = Math.max(top, h);
        }
        plot.setLimits(0, x.length > 1 ? x[x.length - 1] : 1, 0, top > 0 ? 1.05 * top : 1);
        // the band: close vertical strokes, interpolated between the points (finer than the plot's pixels)
        plot.setColor(new Color(170, 200, 235));
        plot.setLineWidth(2);
        int strokes = 1200;
        for (int k = 0; k <= strokes && x.length > 1; k++) {
            double t = (double) k / strokes * (x.length - 1);
            int i = Math.min((int) t, x.length - 2);
            double f = t - i;
            double xx = x[i] + f * (x[i + 1] - x[i]);
            plot.drawLine(xx, lo[i] + f * (lo[i + 1] - lo[i]), xx, hi[i] + f * (hi[i + 1] - hi[i]));
        }
        plot.setLineWidth(1);
        plot.setColor(new Color(60, 110, 180));
        plot.addPoints(x, lo, Plot.LINE);
        plot.addPoints(x, hi, Plot.LINE);
        plot.setColor(Color.BLACK);
        plot.setLineWidth(2);
        plot.addPoints(x, m, Plot.LINE);
        plot.setLineWidth(1);
        plot.addLegend("lower\tupper\tposterior mean");
        plot.addLabel(0, 0, String.format(Locale.ROOT, "line (%.0f,%.0f)-(%.0f,%.0f), plane %d; shaded: credible "
                + "interval (an estimate under the prior)", line[0], line[1], line[2], line[3], plane));
        return plot;
    }
}
