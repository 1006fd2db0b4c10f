package org.stackwright.psf;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Diffraction models of the PSF built from radial profiles per plane ({@link PupilIntegral}), sampled onto the
 * voxel grid with pixel-area integration ({@link RadialSampler}):
 * <ul>
 * <li>{@code widefield}: scalar Born & Wolf focus in the immersion medium, non-paraxial defocus, no aberration.</li>
 * <li>{@code gibson-lanni}: the same focus with the Gibson-Lanni optical path difference of sample, coverslip and
 * depth (index mismatch: focal shift and axial asymmetry).</li>
 * <li>{@code confocal}: excitation PSF times the emission PSF convolved laterally with the pinhole disc
 * (Wilson & Sheppard, Theory and Practice of Scanning Optical Microscopy, 1984). Pinhole 0 gives the product of
 * the two; a very large pinhole collects all emitted light and leaves the excitation PSF (widefield at the
 * excitation wavelength).</li>
 * <li>{@code two-photon}: the square of the excitation PSF at the two-photon laser wavelength, no pinhole.</li>
 * </ul>
 * The three last models use the Gibson-Lanni path difference too (it vanishes for matched optics). The volume is
 * centred on the intensity maximum along the axis: with index mismatch the maximum lies away from the nominal
 * focus, and {@link #focalOffset} tells by how much.
 */
public final class DiffractionPsf implements PsfModel {

    /** Which of the diffraction models. */
    public enum Kind {
        WIDEFIELD("widefield"), GIBSON_LANNI("gibson-lanni"), CONFOCAL("confocal"), TWO_PHOTON("two-photon");

        private final String word;

        Kind(String word) {
            this.word = word;
        }

        /** @return the command-line name */
        public String word() {
            return word;
        }
    }

    private final Kind kind;

    public DiffractionPsf(Kind kind) {
        this.kind = kind;
    }

    @Override
    public String name() {
        return kind.word();
    }

    /** @return which model this is */
    public Kind kind() {
        return kind;
    }

    @Override
    public Volume compute(PsfSettings s, Workers workers) {
        s.check(name());
        Plan plan = new Plan(this, s, workers, true);
        int nx = s.nx();
        int ny = s.ny();
        int nz = s.nz();
        float[] data = new float[nx * ny * nz];
        int threads = workers.threads();
        double[][] profile = new double[threads][plan.needed];
        double[][] scratch = new double[threads][plan.scratchLength()];
        double[][] re = new double[threads][plan.maxNodes()];
        double[][] im = new double[threads][plan.maxNodes()];
        workers.forSlots(nz, (slot, z0, z1) -> {
            for (int z = z0; z < z1; z++) {
                double dz = plan.peak + (z - nz / 2) * s.voxel().z();
                plan.profile(dz, profile[slot], scratch[slot], re[slot], im[slot]);
                plan.sampler.fill(profile[slot], data, z * nx * ny);
            }
        });
        double sum = 0;
        for (float v : data) {
            sum += v;
        }
        if (!(sum > 0)) {
            throw new IllegalStateException("the " + name() + " PSF came out empty for " + s);
        }
        float scale = (float) (1 / sum);
        for (int i = 0; i < data.length; i++) {
            data[i] *= scale;
        }
        return new Volume(nx, ny, nz, data, s.voxel());
    }

    /**
     * @return where the axial intensity maximum lies, micrometres of focus movement from the position where an
     *     index-matched sample would be in focus (positive = deeper); 0 for aberration-free optics
     */
    public double focalOffset(PsfSettings s, Workers workers) {
        s.check(name());
        return new Plan(this, s, workers, false).peak;
    }

    /** @return intensity on the axis at focus offset z (arbitrary units), for checks and plots */
    public double[] axialIntensity(PsfSettings s, double[] z, Workers workers) {
        s.check(name());
        Plan plan = new Plan(this, s, workers, false);
        double[] out = new double[z.length];
        for (int i = 0; i < z.length; i++) {
            out[i] = plan.onAxis(z[i]);
        }
        return out;
    }

    /**
     * @return in-focus-plane radial profile (arbitrary units) at r = 0, dr, ... for checks: samples up to the
     *     lateral half-diagonal of the grid, spacing {@code radialSpacing(s)}
     */
    public double[] radialProfile(PsfSettings s, double z, Workers workers) {
        s.check(name());
        Plan plan = new Plan(this, s, workers, true);
        double[] out = new double[plan.needed];
        plan.profile(z, out, new double[plan.scratchLength()], new double[plan.maxNodes()], new double[plan.maxNodes()]);
        return out;
    }

    /** @return the spacing of the radial profiles of this model, micrometres */
    public double radialSpacing(PsfSettings s) {
        return Math.min(Math.min(s.voxel().x(), s.voxel().y()) / 4, 0.05 * shortestWavelengthUm(s) / s.na());
    }

    /** @return the shortest wavelength this model uses, micrometres */
    private double shortestWavelengthUm(PsfSettings s) {
        return switch (kind) {
            case WIDEFIELD, GIBSON_LANNI -> s.wavelengthNm();
            case CONFOCAL -> Math.min(s.wavelengthNm(), s.excitationOrEmissionNm());
            case TWO_PHOTON -> s.excitationOrEmissionNm();
        } * 1e-3;
    }

    /**
     * Plain-word cautions about the optics for this model (effective NA cut by a low sample or coverslip index,
     * settings the model ignores).
     */
    public List<String> cautions(PsfSettings s) {
        List<String> out = new ArrayList<>();
        if (kind != Kind.WIDEFIELD) {
            double low = Math.min(s.sampleIndex(), s.coverslipIndex());
            if (low < s.na()) {
                out.add(String.format(Locale.ROOT, "na %.3g is above the sample or coverslip index %.3g: light beyond "
                        + "the critical angle cannot reach the objective, so the effective NA is %.3g", s.na(), low, low));
            }
        } else if (s.depthUm() > 0 || s.sampleIndex() != s.immersionIndex()) {
            out.add("model widefield ignores sample-index, coverslip and depth (no aberration); use gibson-lanni for "
                    + "index mismatch");
        }
        return out;
    }

    /** Everything computed once per PSF: the pupil integrals, the sampler, the pinhole, the peak position. */
    private static final class Plan {
        final Kind kind;
        final PupilIntegral emission;
        final PupilIntegral excitation;
        final PinholeFilter pinhole;
        final RadialSampler sampler;
        final int needed;
        final double peak;

        Plan(DiffractionPsf model, PsfSettings s, Workers workers, boolean lateral) {
            this.kind = model.kind;
            double dr = model.radialSpacing(s);
            double px = s.voxel().x();
            double py = s.voxel().y();
            double lambdaMin = model.shortestWavelengthUm(s);
            int sub = (int) Math.ceil(Math.max(px, py) / (0.1 * lambdaMin / s.na()));
            sub = Math.min(15, Math.max(1, sub % 2 == 0 ? sub + 1 : sub));
            sampler = lateral ? new RadialSampler(s.nx(), s.ny(), px, py, dr, sub) : null;
            needed = lateral ? sampler.neededRadii() : 1;
            boolean aberrated = kind != Kind.WIDEFIELD;
            double shift = aberrated ? paraxialShift(s) : 0;
            double lambdaMax = Math.max(s.wavelengthNm(), s.excitationOrEmissionNm()) * 1e-3;
            double range = 1.5 * Math.abs(shift) + 3 * s.immersionIndex() * lambdaMax / (s.na() * s.na());
            double zMax = range + (s.nz() / 2) * s.voxel().z();
            double rMax = needed * dr;
            double pinRadius = kind == Kind.CONFOCAL ? s.pinholeRadiusUm() : 0;
            pinhole = pinRadius >= 0.5 * dr ? new PinholeFilter(needed, dr, pinRadius) : null;
            double rEmission = pinhole != null ? pinhole.neededInputs() * dr : rMax;
            emission = kind == Kind.TWO_PHOTON ? null
                    : new PupilIntegral(s, s.wavelengthNm(), aberrated, rEmission, dr, zMax, workers);
            excitation = kind == Kind.CONFOCAL || kind == Kind.TWO_PHOTON
                    ? new PupilIntegral(s, s.excitationOrEmissionNm(), true, rMax, dr, zMax, workers) : null;
            peak = hasAberration(s, aberrated) ? findPeak(range) : 0;
        }

        int maxNodes() {
            return Math.max(emission == null ? 0 : emission.nodes(), excitation == null ? 0 : excitation.nodes());
        }

        int scratchLength() {
            return pinhole == null ? needed : Math.max(needed, pinhole.neededInputs());
        }

        void profile(double z, double[] out, double[] scratch, double[] re, double[] im) {
            switch (kind) {
                case WIDEFIELD, GIBSON_LANNI -> emission.profile(z, needed, out, re, im);
                case TWO_PHOTON -> {
                    excitation.profile(z, needed, out, re, im);
                    for (int i = 0; i < needed; i++) {
                        out[i] *= out[i];
                    }
                }
                case CONFOCAL -> {
                    if (pinhole != null) {
                        emission.profile(z, pinhole.neededInputs(), scratch, re, im);
                        pinhole.apply(scratch, out);
                    } else {
                        emission.profile(z, needed, out, re, im);
                    }
                    excitation.profile(z, needed, scratch, re, im);
                    for (int i = 0; i < needed; i++) {
                        out[i] *= scratch[i];
                    }
                }
                default -> throw new IllegalStateException(kind.toString());
            }
        }

        double onAxis(double z) {
            return switch (kind) {
                case WIDEFIELD, GIBSON_LANNI -> emission.onAxis(z);
                case TWO_PHOTON -> Math.pow(excitation.onAxis(z), 2);
                case CONFOCAL -> excitation.onAxis(z) * (pinhole == null ? emission.onAxis(z) : pinholeCentre(z));
            };
        }

        private double pinholeCentre(double z) {
            int n = pinhole.neededInputs();
            double[] buf = new double[n];
            emission.profile(z, n, buf, new double[emission.nodes()], new double[emission.nodes()]);
            return pinhole.atCentre(buf);
        }

        /** Dense scan of the axial intensity over [-range, range], then golden-section refinement. */
        private double findPeak(double range) {
            int n = 240;
            double step = 2 * range / n;
            double best = -range;
            double bestValue = -1;
            for (int i = 0; i <= n; i++) {
                double z = -range + i * step;
                double v = onAxis(z);
                if (v > bestValue) {
                    bestValue = v;
                    best = z;
                }
            }
            double a = best - step;
            double b = best + step;
            double g = (Math.sqrt(5) - 1) / 2;
            double c = b - g * (b - a);
            double d = a + g * (b - a);
            double fc = onAxis(c);
            double fd = onAxis(d);
            for (int it = 0; it < 40; it++) {
                if (fc > fd) {
                    b = d;
                    d = c;
                    fd = fc;
                    c = b - g * (b - a);
                    fc = onAxis(c);
                } else {
                    a = c;
                    c = d;
                    fc = fd;
                    d = a + g * (b - a);
                    fd = onAxis(d);
                }
            }
            return 0.5 * (a + b);
        }
    }

    /**
     * @return the paraxial focal shift, micrometres: depth (n_i / n_s - 1) + (t_g - t_g*) (n_i / n_g - 1), from the
     *     common-practice rule "actual focus moves by n_s / n_i times the stage movement"
     */
    public static double paraxialShift(PsfSettings s) {
        double ni = s.immersionIndex();
        return s.depthUm() * (ni / s.sampleIndex() - 1)
                + (s.coverslipThicknessUm() - s.coverslipDesignThicknessUm()) * (ni / s.coverslipIndex() - 1);
    }

    private static boolean hasAberration(PsfSettings s, boolean aberrated) {
        if (!aberrated) {
            return false;
        }
        boolean depth = s.depthUm() > 0 && s.sampleIndex() != s.immersionIndex();
        boolean glass = s.coverslipThicknessUm() != s.coverslipDesignThicknessUm()
                && s.coverslipIndex() != s.immersionIndex();
        return depth || glass;
    }
}
