package org.stackwright.inspect;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Locale;

import org.stackwright.fft.Convolver;
import org.stackwright.fft.RealFft3D;
import org.stackwright.model.PoissonNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Speed of the residual analysis and of SSIM (not a unit test). Run from the repository root after
 * {@code mvn -q -o test-compile}:
 *
 * <pre>
 * mvn -q -o dependency:build-classpath -Dmdep.outputFile=target/cp.txt
 * java -cp target/classes:target/test-classes:$(cat target/cp.txt) org.stackwright.inspect.InspectBenchmark [threads]
 * </pre>
 *
 * The residual analysis is compared with its FFT floor (the transforms it cannot avoid: the OTF, one forward and
 * one inverse transform on the padded grid, one forward transform of the residual for the spectrum), SSIM with
 * scikit-image's structural_similarity on the same stack (tools/benchmark/ssim_time.py via /usr/bin/python3).
 */
public final class InspectBenchmark {

    private InspectBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2;
        VoxelSize voxel = new VoxelSize(0.08, 0.08, 0.2);
        int nx = 256;
        int ny = 256;
        int nz = 64;
        Volume truth = Specimen.draw(nx, ny, nz, voxel, Specimen.Contents.cellField(), 1);
        Volume psf = GaussianPsf.sampled(0.109, 0.456, voxel, 13, 13, 21);
        try (Workers w = new Workers(threads)) {
            Volume mean = ForwardBlur.blur(truth, psf, w);
            float[] m = mean.data();
            for (int i = 0; i < m.length; i++) {
                m[i] = Math.max(0, m[i]) + 10;
            }
            Volume data = Camera.photonCounting().record(mean, 2);
            ResidualModel model = new ResidualModel(0, 10, new PoissonNoise());
            double analysis = median(5, () -> ResidualReport.analyse(data, truth, psf, model, w));
            int gx = ForwardBlur.gridSize(nx, 6);
            int gy = ForwardBlur.gridSize(ny, 6);
            int gz = ForwardBlur.gridSize(nz, 10);
            float[] grid = new float[gx * gy * gz];
            RealFft3D plain = new RealFft3D(nx, ny, nz, w);
            float[] spec = plain.newSpectrum();
            double floor = median(5, () -> {
                Convolver c = new Convolver(psf, gx, gy, gz, w);
                c.convolve(grid, grid);
                plain.forward(data.data(), spec);
            });
            System.out.printf(Locale.ROOT, "residual analysis %dx%dx%d, PSF 13x13x21, %d threads: %.3f s; FFT floor"
                    + " (grid %dx%dx%d) %.3f s; ratio %.2f%n", nx, ny, nz, threads, analysis, gx, gy, gz, floor,
                    analysis / floor);
            Volume est = ForwardBlur.blur(truth, GaussianPsf.sampled(0.03, 0.1, voxel, 5, 5, 5), w);
            double range = truth.max() - 0;
            double[] value = new double[1];
            double ssim = median(5, () -> value[0] = Ssim.mean(truth, est, range));
            Path dir = Files.createTempDirectory("ssim-bench");
            Path a = dir.resolve("a.tif");
            Path b = dir.resolve("b.tif");
            TiffFiles.write(truth, a, true);
            TiffFiles.write(est, b, true);
            Process p = new ProcessBuilder("/usr/bin/python3", "tools/benchmark/ssim_time.py", a.toString(),
                    b.toString(), Double.toString(range), "3").redirectErrorStream(true).start();
            String line;
            try (BufferedReader r = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8))) {
                line = r.readLine();
            }
            p.waitFor();
            System.out.printf(Locale.ROOT, "SSIM %dx%dx%d (3D window), 1 thread: %.3f s (value %.8f)%n", nx, ny, nz,
                    ssim, value[0]);
            if (line != null && line.matches("[0-9.]+ [0-9.]+")) {
                String[] f = line.split(" ");
                double py = Double.parseDouble(f[0]);
                System.out.printf(Locale.ROOT, "scikit-image 0.19 SSIM same stack: %.3f s (value %s); ratio ours/theirs"
                        + " %.2f%n", py, f[1], ssim / py);
            } else {
                System.out.println("scikit-image reference not run: " + line);
            }
            Files.deleteIfExists(a);
            Files.deleteIfExists(b);
            Files.deleteIfExists(dir);
        }
    }

    private static double median(int repeats, Runnable r) {
        r.run(); // warm-up
        double[] t = new double[repeats];
        for (int i = 0; i < repeats; i++) {
            long t0 = System.nanoTime();
            r.run();
            t[i] = (System.nanoTime() - t0) * 1e-9;
        }
        Arrays.sort(t);
        return t[repeats / 2];
    }
}
