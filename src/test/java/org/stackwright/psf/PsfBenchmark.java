package org.stackwright.psf;

import java.util.Arrays;
import java.util.Locale;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Benchmark (not a test): time to model a Gibson-Lanni PSF of 257x257x129 voxels (the odd size covering the
 * issue's 256x256x128) and a confocal PSF of 65x65x65, with the thread count given as the first argument
 * (default 2). Prints the median of five runs after two warm-up runs. Beside it, as yardsticks in the same run:
 * one forward plus one inverse real FFT of a 256x256x128 grid (what a deconvolution iteration does at
 * least once per blur), and the same Gibson-Lanni computation written with NumPy/SciPy
 * (tools/reference/psf_speed_reference.py, run with /usr/bin/python3 when present; it skips the pixel-area
 * integration). Run from the project folder after {@code mvn -q -o test-compile}:
 *
 * <pre>
 * java -cp target/classes:target/test-classes:$(mvn -q -o dependency:build-classpath -Dmdep.outputFile=/dev/stdout) \
 *      org.stackwright.psf.PsfBenchmark 2
 * </pre>
 */
public final class PsfBenchmark {

    private PsfBenchmark() {
    }

    public static void main(String[] args) {
        int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2;
        PsfSettings gl = PsfSettings.matched(1.4, 520, 1.518, new VoxelSize(0.065, 0.065, 0.16), 257, 257, 129)
                .withSample(1.33, 10);
        PsfSettings confocal = PsfSettings.matched(1.4, 520, 1.518, new VoxelSize(0.05, 0.05, 0.15), 65, 65, 65)
                .withExcitation(488, 1);
        try (Workers w = new Workers(threads)) {
            double fft = fftSeconds(w);
            System.out.printf(Locale.ROOT, "yardstick: forward + inverse real FFT of 256x256x128: %.3f s%n", fft);
            double glSeconds = report("gibson-lanni 257x257x129, NA 1.4 oil into water at 10 um, 0.065/0.16 um", gl,
                    new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI), w);
            System.out.printf(Locale.ROOT, "gibson-lanni / FFT round trip = %.1f%n", glSeconds / fft);
            double python = pythonSeconds();
            if (python > 0) {
                System.out.printf(Locale.ROOT, "NumPy/SciPy version of the same Gibson-Lanni PSF: %.3f s; Java / NumPy "
                        + "= %.2f%n", python, glSeconds / python);
            }
            report("confocal 65x65x65, NA 1.4, 488/520 nm, pinhole 1 AU, 0.05/0.15 um", confocal,
                    new DiffractionPsf(DiffractionPsf.Kind.CONFOCAL), w);
            report("widefield 257x257x129, NA 1.4, 0.065/0.16 um", gl.withSample(1.518, 0),
                    new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD), w);
        }
    }

    private static double fftSeconds(Workers w) {
        org.stackwright.fft.RealFft3D fft = new org.stackwright.fft.RealFft3D(256, 256, 128, w);
        float[] real = new float[fft.realLength()];
        float[] spectrum = fft.newSpectrum();
        real[real.length / 2] = 1;
        double[] t = new double[7];
        for (int i = 0; i < t.length; i++) {
            long t0 = System.nanoTime();
            fft.forward(real, spectrum);
            fft.inverse(spectrum, real);
            t[i] = (System.nanoTime() - t0) * 1e-9;
        }
        double[] timed = Arrays.copyOfRange(t, 2, t.length);
        Arrays.sort(timed);
        return timed[timed.length / 2];
    }

    /** @return seconds of the NumPy reference, or -1 when Python or the script is missing */
    private static double pythonSeconds() {
        java.nio.file.Path script = java.nio.file.Paths.get("tools", "reference", "psf_speed_reference.py");
        java.nio.file.Path python = java.nio.file.Paths.get("/usr/bin/python3");
        if (!java.nio.file.Files.exists(script) || !java.nio.file.Files.exists(python)) {
            return -1;
        }
        try {
            Process p = new ProcessBuilder(python.toString(), script.toString(), "257", "257", "129", "0.065", "0.16")
                    .redirectErrorStream(true).start();
            String out = new String(p.getInputStream().readAllBytes(), java.nio.charset.StandardCharsets.UTF_8).trim();
            return p.waitFor() == 0 ? Double.parseDouble(out) : -1;
        } catch (java.io.IOException | NumberFormatException e) {
            return -1;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return -1;
        }
    }

    private static double report(String what, PsfSettings s, PsfModel model, Workers w) {
        double[] seconds = new double[7];
        Volume v = null;
        for (int i = 0; i < seconds.length; i++) {
            long t0 = System.nanoTime();
            v = model.compute(s, w);
            seconds[i] = (System.nanoTime() - t0) * 1e-9;
        }
        double[] timed = Arrays.copyOfRange(seconds, 2, seconds.length);
        Arrays.sort(timed);
        System.out.printf(Locale.ROOT, "%s: median %.3f s (min %.3f, max %.3f) with %d threads; sum %.6f%n", what,
                timed[timed.length / 2], timed[0], timed[timed.length - 1], w.threads(), v.sum());
        return timed[timed.length / 2];
    }
}
