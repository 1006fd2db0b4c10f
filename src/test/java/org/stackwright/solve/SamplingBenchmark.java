package org.stackwright.solve;

import java.awt.Color;
import java.awt.Font;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import javax.imageio.ImageIO;

import ij.IJ;
import ij.ImagePlus;
import ij.process.ColorProcessor;
import ij.process.ImageProcessor;

import org.stackwright.cli.Main;

/**
 * Benchmark (not a test) of credible intervals by sampling on the demo stack: wall time of one most-likely
 * deconvolution (the default accelerated Richardson-Lucy, and total variation at the sampler's lambda), of the
 * sampling run with its defaults, the effective sample size it reached and the time per effective sample. With
 * {@code --figure FILE.png} it also draws the README picture: a plane of the posterior mean, the width of the 90%
 * interval on the same plane, and the mean with its band along a line.
 * Run from the repository root: {@code tools/benchmark.sh org.stackwright.solve.SamplingBenchmark [threads]
 * [--figure docs/sampling-demo.png]}; redraw the picture from an earlier run's outputs with
 * {@code --from FOLDER --figure FILE.png}.
 */
public final class SamplingBenchmark {

    private static final String DATA = "test-images/demo-cells.tif";
    private static final String PSF = "test-images/demo-psf.tif";
    /** The plane and line of the figure: through a bright cell of the demo field and the background beside it. */
    private static final int PLANE = 13;
    private static final String LINE = "40,52,106,52";

    private SamplingBenchmark() {
    }

    public static void main(String[] args) throws IOException {
        String threads = args.length > 0 && !args[0].startsWith("--") ? args[0] : "2";
        Path figure = null;
        Path from = null;
        for (int i = 0; i < args.length - 1; i++) {
            if (args[i].equals("--figure")) {
                figure = Path.of(args[i + 1]);
            } else if (args[i].equals("--from")) {
                from = Path.of(args[i + 1]);
            }
        }
        if (from != null && figure != null) {
            drawFigure(from, figure); // redraw from the outputs of an earlier run (folder printed by it)
            return;
        }
        Path dir = Files.createTempDirectory("sampling-bench");
        List<String> common = List.of("--input", DATA, "--psf", PSF, "--offset", "100", "--read-noise", "2",
                "--threads", threads);

        double ml = timed(dir, "ml", common, List.of());
        String mlRecord = Files.readString(dir.resolve("ml.json"));
        double tv = timed(dir, "tv", common, List.of("--method", "total-variation", "--regularization", "0.01"));
        String tvRecord = Files.readString(dir.resolve("tv.json"));
        double sampling = timed(dir, "sampling", common, List.of("--uncertainty", "sampling",
                "--lower-output", dir.resolve("lower.tif").toString(), "--upper-output", dir.resolve("upper.tif").toString(),
                "--width-output", dir.resolve("width.tif").toString(), "--spread-output", dir.resolve("sd.tif").toString()));
        String rec = Files.readString(dir.resolve("sampling.json"));

        double ess = number(rec, "ess_median");
        double essMin = number(rec, "ess_minimum");
        // the record's first "seconds" is the most likely run's; the chains' time follows from their ESS rate
        double chainSeconds = ess / number(rec, "ess_per_second");
        System.out.printf(Locale.ROOT, "demo stack 128x128x32, %s threads%n", threads);
        System.out.printf(Locale.ROOT, "most likely, default (accelerated RL, %s iterations): %.1f s%n",
                text(mlRecord, "iterations"), ml);
        System.out.printf(Locale.ROOT, "most likely, total variation lambda 0.01 (%s iterations): %.1f s%n",
                text(tvRecord, "iterations"), tv);
        System.out.printf(Locale.ROOT, "sampling, defaults (%s samples, %s chains, burn-in %s, thinning %s, %s stages): "
                + "%.1f s in all, chains %.1f s%n", text(rec, "samples"), text(rec, "chains"), text(rec, "burn_in_steps"),
                text(rec, "thinning_steps"), text(rec, "stages"), sampling, chainSeconds);
        System.out.printf(Locale.ROOT, "effective sample size median %.1f (smallest %.1f); %.2f s per effective sample "
                + "(median); R-hat p95 %s, converged %s%n", ess, essMin, chainSeconds / ess,
                text(rec, "rhat_95th_percentile"), text(rec, "converged"));
        System.out.printf(Locale.ROOT, "sampling / default most likely: %.1f x; / total-variation most likely: %.1f x%n",
                sampling / ml, sampling / tv);
        System.out.println("load average: " + Files.readString(Path.of("/proc/loadavg")).trim());
        System.out.println("outputs: " + dir);
        if (figure != null) {
            drawFigure(dir, figure);
            System.out.println("figure: " + figure);
        }
    }

    private static double timed(Path dir, String name, List<String> common, List<String> extra) {
        List<String> a = new ArrayList<>(List.of("deconvolve"));
        a.addAll(common);
        a.addAll(extra);
        a.addAll(List.of("--output", dir.resolve(name + ".tif").toString(), "--record",
                dir.resolve(name + ".json").toString()));
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        long t0 = System.nanoTime();
        int code = Main.run(a.toArray(String[]::new), new PrintStream(new ByteArrayOutputStream(), true,
                StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8));
        double s = (System.nanoTime() - t0) / 1e9;
        if (code != Main.OK) {
            throw new IllegalStateException(name + " failed: " + err.toString(StandardCharsets.UTF_8));
        }
        return s;
    }

    private static String text(String json, String key) {
        Matcher m = Pattern.compile("\"" + key + "\"\\s*:\\s*\"?([^,\"}\\n]+)").matcher(json);
        return m.find() ? m.group(1).trim() : "?";
    }

    private static double number(String json, String key) {
        return Double.parseDouble(text(json, key));
    }

    /** Three panels side by side: mean plane, interval width plane (both 3x, grey, own range), line profile. */
    private static void drawFigure(Path dir, Path figure) throws IOException {
        Path profile = dir.resolve("profile.png");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"interval-profile", "--mean", dir.resolve("sampling.tif").toString(),
            "--lower", dir.resolve("lower.tif").toString(), "--upper", dir.resolve("upper.tif").toString(), "--line", LINE,
            "--plane", Integer.toString(PLANE), "--output", profile.toString(), "--overwrite"},
                new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        if (code != Main.OK) {
            throw new IllegalStateException("interval-profile failed: " + err.toString(StandardCharsets.UTF_8));
        }
        ImageProcessor mean = panel(dir.resolve("sampling.tif"), "posterior mean, plane " + PLANE, true);
        ImageProcessor width = panel(dir.resolve("width.tif"), "width of the 90% interval", false);
        ImageProcessor plot = new ColorProcessor(ImageIO.read(profile.toFile()));
        int h = Math.max(mean.getHeight(), plot.getHeight());
        ColorProcessor out = new ColorProcessor(mean.getWidth() + width.getWidth() + plot.getWidth() + 20, h);
        out.setColor(Color.WHITE);
        out.fill();
        out.insert(mean, 0, 0);
        out.insert(width, mean.getWidth() + 10, 0);
        out.insert(plot, mean.getWidth() + width.getWidth() + 20, 0);
        ImageIO.write(out.getBufferedImage(), "png", figure.toFile());
    }

    private static ImageProcessor panel(Path tif, String title, boolean withLine) {
        ImagePlus imp = IJ.openImage(tif.toString());
        ImageProcessor ip = imp.getStack().getProcessor(PLANE).duplicate();
        ip.resetMinAndMax();
        ImageProcessor grey = ip.convertToByte(true).resize(ip.getWidth() * 3, ip.getHeight() * 3);
        ColorProcessor c = new ColorProcessor(grey.getWidth(), grey.getHeight() + 24);
        c.setColor(Color.WHITE);
        c.fill();
        c.insert(grey.convertToRGB(), 0, 24);
        c.setColor(Color.BLACK);
        c.setFont(new Font(Font.SANS_SERIF, Font.PLAIN, 14));
        c.setAntialiasedText(true);
        c.drawString(title, 4, 19);
        if (withLine) {
            String[] p = LINE.split(",");
            c.setColor(new Color(240, 180, 40));
            c.setLineWidth(2);
            c.drawLine(3 * Integer.parseInt(p[0]), 24 + 3 * Integer.parseInt(p[1]), 3 * Integer.parseInt(p[2]),
                    24 + 3 * Integer.parseInt(p[3]));
        }
        return c;
    }
}
