package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolution;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Coverage of the posterior's credible intervals against the truth, compared with the noise replicas. The
 * specimen, PSF and noise are made here, independently of the simulator: a few discs, a rod and a ramp, blurred
 * by a separable Gaussian PSF written out in the test, with Poisson noise drawn by commons-math3.
 */
class PosteriorCoverageTest {

    static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.3);

    static Volume truth(int nx, int ny, int nz) {
        float[] t = new float[nx * ny * nz];
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    double v = 0;
                    double dz = (z - nz / 2.0) / 2.0;
                    if ((x - 10) * (x - 10) + (y - 12) * (y - 12) + dz * dz * 16 < 30) {
                        v += 80;
                    }
                    if ((x - 22) * (x - 22) + (y - 20) * (y - 20) < 10) {
                        v += 140;
                    }
                    if (Math.abs(y - 27) < 1.5 && x > 4 && x < 26 && Math.abs(dz) < 1.5) {
                        v += 60;
                    }
                    t[(z * ny + y) * nx + x] = (float) v;
                }
            }
        }
        return new Volume(nx, ny, nz, t, VOXEL);
    }

    static Volume psf() {
        return psf(5);
    }

    static Volume psf(int nzp) {
        int n = 9;
        float[] p = new float[n * n * nzp];
        double sum = 0;
        for (int z = 0; z < nzp; z++) {
            for (int y = 0; y < n; y++) {
                for (int x = 0; x < n; x++) {
                    double dx = x - n / 2;
                    double dy = y - n / 2;
                    double dz = z - nzp / 2;
                    double v = Math.exp(-(dx * dx + dy * dy) / (2 * 1.4 * 1.4) - dz * dz / (2 * 0.9 * 0.9));
                    p[(z * n + y) * n + x] = (float) v;
                    sum += v;
                }
            }
        }
        for (int i = 0; i < p.length; i++) {
            p[i] /= (float) sum;
        }
        return new Volume(n, n, nzp, p, VOXEL);
    }

    @Test
    void credibleIntervalsCoverTheTruthMoreOftenThanNoiseReplicas() {
        int nx = 32;
        int ny = 32;
        int nz = Integer.getInteger("nz", 6);
        double background = 5;
        Volume truth = truth(nx, ny, nz);
        Volume data;
        try (Workers w = new Workers(2)) {
            Volume blurred = Convolution.apply(truth, psf(nz == 1 ? 1 : 5), Convolution.Boundary.ZERO, false, w);
            float[] d = blurred.data().clone();
            Well19937c rng = new Well19937c(3);
            for (int i = 0; i < d.length; i++) {
                d[i] = new PoissonDistribution(rng, d[i] + background, PoissonDistribution.DEFAULT_EPSILON,
                        PoissonDistribution.DEFAULT_MAX_ITERATIONS).sample();
            }
            data = blurred.withData(d);
        }
        DeconvolutionSettings s = new DeconvolutionSettings("total-variation", Stopping.fixed(300), 0, background, 1, 0,
                Double.parseDouble(System.getProperty("lam", "0.01")), "extended", true, "poisson");
        PosteriorSampler.Settings ss = new PosteriorSampler.Settings(Integer.getInteger("n", 200), 2,
                Integer.getInteger("burn", 300), Integer.getInteger("thin", 10), Integer.getInteger("stages", PosteriorSampler.DEFAULT_STAGES),
                Double.parseDouble(System.getProperty("scale", "" + PosteriorSampler.DEFAULT_STEP_SCALE)), 5, 7);
        RunContext ctx = RunContext.quiet(2);
        PosteriorSampling.Result r = PosteriorSampling.run(data, psf(nz == 1 ? 1 : 5), "psf", null, s, ss, 0.9, ctx);
        float[] t = truth.data();
        float max = truth.max();
        int bright = 0;
        int inside = 0;
        float[] lo = r.summary().lower().data();
        float[] hi = r.summary().upper().data();
        for (int i = 0; i < t.length; i++) {
            if (t[i] >= 0.3 * max) {
                bright++;
                if (t[i] >= lo[i] && t[i] <= hi[i]) {
                    inside++;
                }
            }
        }
        System.out.printf("sampling: %d states, step %.3g, L %.3g, %.1f s, ESS median %.1f min %.1f, R-hat median %.3f "
                + "p95 %.3f max %.3f; coverage of bright voxels %.3f (%d of %d)%n", r.draws().states().length,
                r.draws().step(), r.draws().lipschitz(), r.draws().seconds(), r.summary().essMedian(),
                r.summary().essMinimum(), r.summary().rhatMedian(), r.summary().rhatHigh(), r.summary().rhatMaximum(),
                (double) inside / bright, inside, bright);
        assertTrue(bright > 0);
        if (System.getProperty("dump") != null) {
            try {
                java.nio.file.Files.write(java.nio.file.Paths.get(System.getProperty("dump")),
                        java.util.Arrays.toString(r.summary().spread().data()).getBytes());
            } catch (java.io.IOException e) {
                throw new RuntimeException(e);
            }
        }
        if (Boolean.getBoolean("debug")) {
            PosteriorSampler.Draws d = r.draws();
            int n = t.length;
            for (int v = 0; v < n; v += 1) {
                double[][] ch = new double[2][d.perChain()];
                for (int c = 0; c < 2; c++) {
                    for (int j = 0; j < d.perChain(); j++) {
                        ch[c][j] = d.states()[c * d.perChain() + j][v];
                    }
                }
                ChainDiagnostics.Scalar sc = ChainDiagnostics.of(ch);
                if (sc.rhat() > 1.3) {
                    double m0 = java.util.Arrays.stream(ch[0]).average().orElse(0);
                    double m1 = java.util.Arrays.stream(ch[1]).average().orElse(0);
                    System.out.printf("voxel %d (x %d y %d z %d): truth %.1f rhat %.2f ess %.1f means %.2f %.2f first %.2f %.2f last %.2f %.2f%n",
                        v, v % 32, (v / 32) % 32, v / 1024, t[v], sc.rhat(), sc.ess(), m0, m1, ch[0][0], ch[1][0], ch[0][d.perChain()-1], ch[1][d.perChain()-1]);
                }
            }
        }
    }
}
