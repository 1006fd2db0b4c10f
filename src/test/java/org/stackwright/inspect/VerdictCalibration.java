package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.DoubleFunction;

import org.stackwright.model.Camera;
import org.stackwright.model.NoiseModel;
import org.stackwright.model.PoissonGaussianNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.simulate.Simulation;
import org.stackwright.simulate.Specimen;
import org.stackwright.testing.IndependentAcquisition;
import org.stackwright.testing.IndependentAcquisition.Layout;
import org.stackwright.testing.IndependentAcquisition.Optics;
import org.stackwright.testing.IndependentAcquisition.Sensor;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The simulated true-model cases the residual verdict is calibrated on: a table of acquisitions (specimens that
 * cross the edges, end inside or fill the stack; thin and thick stacks; dim, medium and bright; photon counting
 * and a camera with read noise), most made by {@link IndependentAcquisition} (its own PSF formula, blur and noise)
 * and a part by our own {@link Simulation} (Gaussian PSF, {@link Camera}). Each case can be analysed with the
 * exact model, with a PSF whose widths are scaled, or with a background that is off.
 */
final class VerdictCalibration {

    /** One acquisition of the table and the exact model it was made with. */
    record Case(String source, String layout, int depth, double peak, double background, String sensor,
            Volume data, Volume truthAdu, Volume psf, DoubleFunction<Volume> scaledPsf, double offset, double gain,
            double readNoise, double backgroundAdu) {

        /** @return the residual model with a background scaled by the factor */
        ResidualModel model(double backgroundFactor) {
            NoiseModel noise = new PoissonGaussianNoise(gain, readNoise);
            return new ResidualModel(offset, backgroundAdu * backgroundFactor, noise);
        }

        ResidualReport analyse(Volume psfUsed, double backgroundFactor, Workers w) {
            return ResidualReport.analyse(data, truthAdu, psfUsed, model(backgroundFactor), w);
        }

        @Override
        public String toString() {
            return String.format(Locale.ROOT, "%s %s nz=%d peak=%.0f bg=%.0f %s", source, layout, depth, peak,
                    background, sensor);
        }
    }

    static final int WIDTH = 48;
    static final double[][] BRIGHTNESS = {{30, 2}, {500, 10}, {3000, 40}};
    static final VoxelSize OURS = new VoxelSize(0.08, 0.08, 0.2);

    private VerdictCalibration() {
    }

    /**
     * @param seeds seeds per combination of the independent generator
     * @return the table: 3 layouts x 2 depths x 3 brightness levels x 2 sensors x seeds from the independent
     *     generator, and 2 depths x 3 brightness levels x 2 sensors from our own simulator
     */
    static List<Case> table(int seeds, Workers w) {
        List<Case> cases = new ArrayList<>();
        long seed = 100;
        for (Layout layout : Layout.values()) {
            for (int thick = 0; thick < 2; thick++) {
                for (double[] b : BRIGHTNESS) {
                    for (int cam = 0; cam < 2; cam++) {
                        for (int s = 0; s < seeds; s++) {
                            seed++;
                            // thick stacks alternate the widefield-like axial fall-off (q = 1) and q = 2
                            Optics o = thick == 0 ? new Optics(1.2, 1.5, 6, 6, 2)
                                    : new Optics(1.5, 2.5, 7, 12, (int) (seed % 2) + 1);
                            cases.add(independent(layout, thick == 0 ? 16 : 32, b[0], b[1], o,
                                    cam == 0 ? Sensor.photonCounting() : Sensor.camera(), seed));
                        }
                    }
                }
            }
        }
        for (int thick = 0; thick < 2; thick++) {
            for (double[] b : BRIGHTNESS) {
                for (int cam = 0; cam < 2; cam++) {
                    seed++;
                    cases.add(ours(thick == 0 ? 16 : 32, b[0], b[1], cam == 0 ? Camera.photonCounting()
                            : Camera.scientific16bit(), seed, w));
                }
            }
        }
        return cases;
    }

    static Case independent(Layout layout, int nz, double peak, double bg, Optics o, Sensor sensor, long seed) {
        IndependentAcquisition.Acquisition a = IndependentAcquisition.acquire(new IndependentAcquisition.Plan(WIDTH,
                WIDTH, nz, layout, peak, bg, o, sensor, seed));
        return new Case("independent" + (o.axialPower() == 1 ? " (q=1)" : ""), layout.name().toLowerCase(Locale.ROOT),
                nz, peak, bg, sensor.counting() ? "photon counting" : "camera", a.data(), a.truthAdu(), a.psf(),
                f -> IndependentAcquisition.psf(o.scaled(f, f)), sensor.offset(), sensor.gain(), sensor.readNoise(),
                a.backgroundAdu());
    }

    /** Our own simulator: Gaussian PSF (NA 1.0, 520 nm, water), invented cell field, scaled to the peak. */
    static Case ours(int nz, double peak, double bg, Camera camera, long seed, Workers w) {
        double sxy = GaussianPsf.sigmaLateral(520, 1.0);
        double sz = GaussianPsf.sigmaAxial(520, 1.0, 1.33);
        int pz = nz <= 16 ? 15 : 21;
        DoubleFunction<Volume> psfOf = f -> GaussianPsf.sampled(sxy * f, sz * f, OURS, 13, 13, pz);
        Volume psf = psfOf.apply(1);
        Specimen.Contents c = Specimen.Contents.cellField();
        Simulation.Outcome probe = Simulation.run(plan(nz, c, psf, 0, Camera.photonCounting(), seed), w);
        double scale = peak / probe.expected().max();
        Specimen.Contents scaled = new Specimen.Contents(c.beads(), c.filaments(), c.vesicles(), scale * c.beadPhotons(),
                scale * c.filamentPhotons(), scale * c.vesiclePhotons(), scale * c.hazePhotons());
        Simulation.Outcome o = Simulation.run(plan(nz, scaled, psf, bg, camera, seed), w);
        Volume truthAdu = o.truth().copy();
        float[] t = truthAdu.data();
        for (int i = 0; i < t.length; i++) {
            t[i] = (float) (t[i] * camera.gain());
        }
        return new Case("ours", "crossing", nz, peak, bg, camera.readNoise() > 0 ? "camera" : "photon counting",
                o.data(), truthAdu, psf, psfOf, camera.offset(), camera.gain(), camera.readNoise(),
                bg * camera.gain());
    }

    private static Simulation.Plan plan(int nz, Specimen.Contents c, Volume psf, double bg, Camera camera, long seed) {
        return new Simulation.Plan(WIDTH, WIDTH, nz, OURS, c, psf, bg, camera, 0, 1, 1, 0, seed);
    }

    /** What one analysis gave. */
    record Outcome(Case c, String kind, String verdict, double chi2, long trusted, double widthRatioXy,
            double widthRatioZ, ResidualReport report) {
    }

    /**
     * Clopper-Pearson exact binomial interval (Clopper &amp; Pearson, "The use of confidence or fiducial limits
     * illustrated in the case of the binomial", Biometrika 26(4):404-413, 1934), from the beta distribution of
     * commons-math3.
     *
     * @return {lower, upper} of the two-sided 95 % interval for k successes in n
     */
    static double[] clopperPearson(int k, int n) {
        double lo = k == 0 ? 0 : new org.apache.commons.math3.distribution.BetaDistribution(k, n - k + 1)
                .inverseCumulativeProbability(0.025);
        double hi = k == n ? 1 : new org.apache.commons.math3.distribution.BetaDistribution(k + 1, n - k)
                .inverseCumulativeProbability(0.975);
        return new double[] {lo, hi};
    }
}
