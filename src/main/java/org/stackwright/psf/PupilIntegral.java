package org.stackwright.psf;

import org.apache.commons.math3.special.BesselJ;
import org.stackwright.parallel.Workers;

/**
 * Radial intensity profiles of a scalar, rotationally symmetric focus, one per defocus, by numerical integration
 * of the pupil over the aperture:
 *
 * <pre>
 *   I(r, z) = | integral_0^rhoMax  J0(k NA r rho) exp(i k W(rho, z)) rho d rho |^2,   k = 2 pi / lambda
 *   W(rho, z) = depth (n_s c_s - n_i c_i) + (t_g - t_g*) (n_g c_g - n_i c_i) - z n_i c_i,   c_m = sqrt(1 - (NA rho / n_m)^2)
 * </pre>
 *
 * W is the Gibson-Lanni optical path difference (Gibson & Lanni, JOSA A 8(10):1601-1613, 1991) for an emitter at
 * the given depth in a sample of index n_s, behind a coverslip of index n_g and thickness t_g (design t_g*; the
 * extra glass takes the place of immersion medium), with the focus moved by z (positive = deeper into the sample) from the position where an index-matched sample would
 * be in focus. With matched indices, depth 0 and the design coverslip, W reduces to the non-paraxial defocus term
 * -z n_i cos(theta), i.e. the scalar Born & Wolf (Principles of Optics, 7th ed., 1999, sec. 8.8) focus without
 * the paraxial approximation of the defocus phase; the pupil amplitude is uniform in rho (as in Gibson & Lanni),
 * so the in-focus profile is exactly the Airy pattern [2 J1(v)/v]^2 at any NA.
 *
 * <p>The Bessel factors J0(k NA r_i rho_j) on a fixed radial grid r_i = i dr do not depend on z and are tabulated
 * once (commons-math3 {@link BesselJ}); each profile then costs one complex matrix-vector product. Integration is
 * Simpson's rule with enough nodes for 16 per oscillation of the integrand. Rays beyond the critical angle of the
 * sample or coverslip (NA rho above their index) cannot reach the objective; the aperture is cut there.
 *
 * <p>Immutable after construction; {@link #profile} is safe to call from several threads with their own buffers.
 */
final class PupilIntegral {

    private final int nodes;
    private final int radii;
    private final double dr;
    private final double[] table;
    private final double[] weights;
    private final double[] fixedPhase;
    private final double[] defocusPhase;

    /**
     * @param s optics
     * @param wavelengthNm the vacuum wavelength of this focus
     * @param aberrated true to include the sample, coverslip and depth terms (Gibson-Lanni), false for the
     *     aberration-free scalar focus in the immersion medium
     * @param rMax largest radius needed, micrometres
     * @param dr radial grid spacing, micrometres
     * @param zMax largest |z| that will be asked for, micrometres (sets the number of nodes)
     */
    PupilIntegral(PsfSettings s, double wavelengthNm, boolean aberrated, double rMax, double dr, double zMax,
            Workers workers) {
        double k = 2 * Math.PI / (wavelengthNm * 1e-3);
        double na = s.na();
        double rhoMax = 1;
        if (aberrated) {
            rhoMax = Math.min(1, Math.min(s.sampleIndex(), s.coverslipIndex()) / na * (1 - 1e-9));
        }
        this.dr = dr;
        this.radii = (int) Math.ceil(rMax / dr) + 4;
        double besselCycles = k * na * rhoMax * (radii * dr) / (2 * Math.PI);
        double[] up = phaseVariation(s, k, aberrated, rhoMax, zMax);
        double[] down = phaseVariation(s, k, aberrated, rhoMax, -zMax);
        double[] fixed = phaseVariation(s, k, aberrated, rhoMax, 0);
        // cycles over the aperture: the total phase change; the aberration term of a deep emitter in a sample of
        // lower index oscillates much faster near the rim than on average, so its fastest local rate (at most
        // five times its total) counts when it is larger
        double total = Math.max(up[0], down[0]);
        double phaseCycles = Math.max(total, Math.min(fixed[1], 5 * fixed[0])) / (2 * Math.PI);
        int n = (int) Math.ceil(16 * (besselCycles + phaseCycles)) + 64;
        this.nodes = n + (n % 2) + 1;
        weights = new double[nodes];
        fixedPhase = new double[nodes];
        defocusPhase = new double[nodes];
        double h = rhoMax / (nodes - 1);
        for (int j = 0; j < nodes; j++) {
            double rho = j * h;
            double simpson = (j == 0 || j == nodes - 1) ? 1 : (j % 2 == 1 ? 4 : 2);
            weights[j] = simpson * h / 3 * rho;
            double[] w = pathTerms(s, rho, aberrated);
            fixedPhase[j] = k * w[0];
            defocusPhase[j] = k * w[1];
        }
        table = new double[radii * nodes];
        double a = k * na * h;
        workers.forRange(radii, (i0, i1) -> {
            for (int i = i0; i < i1; i++) {
                double ar = a * i * dr;
                int row = i * nodes;
                for (int j = 0; j < nodes; j++) {
                    table[row + j] = BesselJ.value(0, ar * j) * weights[j];
                }
            }
        });
    }

    /** @return {fixed path (depth and coverslip terms), path per micrometre of defocus} at rho, micrometres */
    private static double[] pathTerms(PsfSettings s, double rho, boolean aberrated) {
        double na = s.na();
        double ni = s.immersionIndex();
        double ci = cosine(na * rho / ni);
        double fixed = 0;
        if (aberrated) {
            double cs = cosine(na * rho / s.sampleIndex());
            double cg = cosine(na * rho / s.coverslipIndex());
            fixed = s.depthUm() * (s.sampleIndex() * cs - ni * ci)
                    + (s.coverslipThicknessUm() - s.coverslipDesignThicknessUm()) * (s.coverslipIndex() * cg - ni * ci);
        }
        return new double[] {fixed, -ni * ci};
    }

    private static double cosine(double sin) {
        return Math.sqrt(Math.max(0, 1 - sin * sin));
    }

    /**
     * @return {total phase change over the aperture, the largest local rate of change times the aperture width}
     *     (radians), probed on 2048 intervals; the last interval is left out of the rate (square-root edge)
     */
    private static double[] phaseVariation(PsfSettings s, double k, boolean aberrated, double rhoMax, double z) {
        int probes = 2048;
        double total = 0;
        double fastest = 0;
        double prev = 0;
        for (int j = 0; j <= probes; j++) {
            double[] w = pathTerms(s, rhoMax * j / probes, aberrated);
            double ph = k * (w[0] + z * w[1]);
            if (j > 0) {
                double step = Math.abs(ph - prev);
                total += step;
                if (j < probes) {
                    fastest = Math.max(fastest, step * probes);
                }
            }
            prev = ph;
        }
        return new double[] {total, fastest};
    }

    /** @return number of radial samples available (r = 0, dr, 2 dr, ...) */
    int radii() {
        return radii;
    }

    /** @return radial spacing in micrometres */
    double dr() {
        return dr;
    }

    /** @return number of pupil nodes (for work buffer sizes) */
    int nodes() {
        return nodes;
    }

    /**
     * Intensity at r = 0, dr, ..., (count - 1) dr for defocus z.
     *
     * @param out receives count values (modified)
     * @param re work buffer of length {@link #nodes()} (modified)
     * @param im work buffer of length {@link #nodes()} (modified)
     */
    void profile(double z, int count, double[] out, double[] re, double[] im) {
        if (count > radii) {
            throw new IllegalArgumentException("asked for " + count + " radii, table holds " + radii);
        }
        for (int j = 0; j < nodes; j++) {
            double ph = fixedPhase[j] + z * defocusPhase[j];
            re[j] = Math.cos(ph);
            im[j] = Math.sin(ph);
        }
        for (int i = 0; i < count; i++) {
            int row = i * nodes;
            double sr = 0;
            double si = 0;
            for (int j = 0; j < nodes; j++) {
                double b = table[row + j];
                sr += b * re[j];
                si += b * im[j];
            }
            out[i] = sr * sr + si * si;
        }
    }

    /** @return the intensity on the optical axis at defocus z */
    double onAxis(double z) {
        double sr = 0;
        double si = 0;
        for (int j = 0; j < nodes; j++) {
            double ph = fixedPhase[j] + z * defocusPhase[j];
            sr += weights[j] * Math.cos(ph);
            si += weights[j] * Math.sin(ph);
        }
        return sr * sr + si * si;
    }
}
