package org.stackwright.psf;

import org.stackwright.parallel.Workers;

/**
 * The Gibson-Lanni focus of one set of optics as a table I(r, z) that can be rendered at any sub-voxel position:
 * what a bead fit needs, since each bead sits at its own (x, y, z) and the optics change during the fit.
 *
 * <p>Rows are radial profiles ({@link PupilIntegral}) at focus offsets spaced {@code dz} around the axial intensity
 * maximum, columns the radii spaced as in {@link DiffractionPsf}. A voxel's value is the mean over its area
 * (s x s midpoint sub-samples, s as in {@link DiffractionPsf}) of the table interpolated with the Keys cubic in z
 * and in r. Intensities are scaled so that every plane carries unit power: by the Parseval relation of the Hankel
 * transform the plane integral of |integral J0(k NA r rho) P(rho) rho d rho|^2 is pi rho_max^2 / (k NA)^2 for a
 * uniform pupil of radius rho_max, at every focus offset. A bead's brightness is then its photons per plane.
 *
 * <p>Axial coordinate: a bead at stack position cz (voxels) has its paraxial focus there (the focal shift of the
 * paraxial rule, {@link DiffractionPsf#paraxialShift}), so the plane k sees the focus offset
 * shift + (k - cz) step. Not the intensity maximum, on purpose: with strong aberration the axial profile has side
 * maxima of nearly equal height, the maximum can jump from one to another as the optics change, and the model
 * would jump with it; the paraxial shift moves smoothly. {@link #maximumOffsetPlanes} tells where the maximum lies.
 * Immutable; safe for several threads.
 */
final class FocusTable {

    /** Radial upsampling of a plane's profile before linear interpolation. */
    private static final int UPSAMPLE = 8;
    /** Keys weights of the four taps at each upsampled offset. */
    private static final double[][] KERNEL = new double[UPSAMPLE][4];

    static {
        for (int q = 0; q < UPSAMPLE; q++) {
            double f = q / (double) UPSAMPLE;
            for (int tap = -1; tap <= 2; tap++) {
                KERNEL[q][tap + 1] = KeysCubic.kernel(tap - f);
            }
        }
    }

    private final double dr;
    private final double dz;
    private final double zFirst;
    private final int rows;
    private final int radii;
    private final double[] table;
    private final double peak;
    private final double reference;
    private final double px;
    private final double py;
    private final double step;
    private final int sub;

    /**
     * @param s optics and voxel size (the grid sizes are not used)
     * @param halfWidthUm largest lateral distance from a bead centre that will be rendered, micrometres
     * @param halfDepthUm largest axial distance from a bead centre that will be rendered, micrometres
     */
    FocusTable(PsfSettings s, double halfWidthUm, double halfDepthUm, Workers workers) {
        DiffractionPsf model = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI);
        s.check(model.name());
        this.px = s.voxel().x();
        this.py = s.voxel().y();
        this.step = s.voxel().z();
        this.dr = model.radialSpacing(s);
        double lambda = s.wavelengthNm() * 1e-3;
        int n = (int) Math.ceil(Math.max(px, py) / (0.1 * lambda / s.na()));
        this.sub = Math.min(15, Math.max(1, n % 2 == 0 ? n + 1 : n));
        // axial spacing: 1/20 of n lambda / NA^2 (about a tenth of the depth of field) keeps the cubic error
        // well below 1e-4 of the peak
        this.dz = 0.05 * s.immersionIndex() * lambda / (s.na() * s.na());
        this.peak = model.focalOffset(s, workers);
        this.reference = DiffractionPsf.paraxialShift(s);
        // the rendered range is centred on the paraxial reference; the maximum lies within about half the
        // paraxial shift of it (plus a micrometre at low depth)
        double reach = halfDepthUm + 3 * dz + 0.5 * Math.abs(reference) + 1 + Math.abs(peak - reference);
        this.rows = (int) Math.ceil(2 * reach / dz) + 1;
        this.zFirst = reference - reach;
        this.radii = (int) Math.ceil(halfWidthUm / dr) + 4;
        double zMax = Math.abs(reference) + reach;
        PupilIntegral pupil = new PupilIntegral(s, s.wavelengthNm(), true, radii * dr, dr, zMax, workers);
        double k = 2 * Math.PI / lambda;
        double rhoMax = Math.min(1, Math.min(s.sampleIndex(), s.coverslipIndex()) / s.na() * (1 - 1e-9));
        double power = Math.PI * rhoMax * rhoMax / (k * s.na() * k * s.na());
        double scale = px * py / power;
        this.table = new double[rows * radii];
        int threads = workers.threads();
        double[][] re = new double[threads][pupil.nodes()];
        double[][] im = new double[threads][pupil.nodes()];
        double[][] out = new double[threads][radii];
        workers.forSlots(rows, (slot, r0, r1) -> {
            for (int r = r0; r < r1; r++) {
                pupil.profile(zFirst + r * dz, radii, out[slot], re[slot], im[slot]);
                for (int i = 0; i < radii; i++) {
                    table[r * radii + i] = out[slot][i] * scale;
                }
            }
        });
    }

    /** @return where the axial maximum lies, micrometres of focus movement from the matched-sample focus */
    double peak() {
        return peak;
    }

    /**
     * @return how far the axial intensity maximum lies from the rendering's reference (the paraxial focus), in
     *     planes: a bead centred at cz has its maximum at cz + this
     */
    double maximumOffsetPlanes() {
        return (peak - reference) / step;
    }

    /**
     * Renders a bead of unit power per plane into a box, optionally with the derivatives of every voxel with
     * respect to the bead centre (analytic: derivatives of the Keys cubic in r and z).
     *
     * @param cx bead centre x in box voxels (may be fractional, may lie outside the box)
     * @param cy bead centre y
     * @param cz bead centre z (its paraxial focus)
     * @param nx box width
     * @param ny box height
     * @param nz box depth
     * @param out nx*ny*nz values, x fastest (modified)
     * @param grad null, or three arrays like out receiving d/dcx, d/dcy, d/dcz (modified)
     * @param work work buffer of {@link #workLength()} values (modified)
     */
    void render(double cx, double cy, double cz, int nx, int ny, int nz, double[] out, double[][] grad,
            double[] work) {
        double share = 1.0 / (sub * sub);
        boolean withGrad = grad != null;
        int fine = fineLength();
        int zPart = 2 * radii + fine;
        double invH = UPSAMPLE / dr;
        for (int z = 0; z < nz; z++) {
            planeProfile(reference + (z - cz) * step, work, withGrad);
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    double v = 0;
                    double gx = 0;
                    double gy = 0;
                    double gz = 0;
                    for (int b = 0; b < sub; b++) {
                        double ys = (y - cy + (b - (sub - 1) / 2.0) / sub) * py;
                        for (int a = 0; a < sub; a++) {
                            double xs = (x - cx + (a - (sub - 1) / 2.0) / sub) * px;
                            double rho = Math.sqrt(xs * xs + ys * ys);
                            double t = rho * invH;
                            int i = (int) t;
                            if (i + 1 >= fine) {
                                continue;
                            }
                            double f = t - i;
                            int k = 2 * radii + i;
                            double lo = work[k];
                            double slope = work[k + 1] - lo;
                            v += lo + f * slope;
                            if (withGrad) {
                                if (rho > 0) {
                                    // d/dcx of f(rho(x - cx)) = -f'(rho) xs / rho * px
                                    double dfdrho = slope * invH / rho;
                                    gx -= dfdrho * xs * px;
                                    gy -= dfdrho * ys * py;
                                }
                                double zl = work[zPart + i];
                                gz += zl + f * (work[zPart + i + 1] - zl);
                            }
                        }
                    }
                    int i = (z * ny + y) * nx + x;
                    out[i] = Math.max(0, v * share);
                    if (withGrad) {
                        boolean clamped = v < 0;
                        grad[0][i] = clamped ? 0 : gx * share;
                        grad[1][i] = clamped ? 0 : gy * share;
                        // d zf / d cz = -step
                        grad[2][i] = clamped ? 0 : -gz * share * step;
                    }
                }
            }
        }
    }

    /** @return length of the work buffer of {@link #render} */
    int workLength() {
        return 2 * radii + 2 * fineLength();
    }

    /** @return samples of the upsampled plane profile (radii - 3 coarse intervals) */
    private int fineLength() {
        return (radii - 3) * UPSAMPLE + 1;
    }

    /**
     * Interpolates the table at focus offset zf (Keys cubic over four rows), clamped to the table's range: the
     * profile goes to work[0, radii), its derivative in zf (per micrometre) to work[radii, 2 radii) when asked;
     * then both are upsampled {@link #UPSAMPLE} times in r with the Keys cubic, for linear interpolation per
     * sub-sample (the Keys curve itself sampled at dr / 8: linear interpolation adds an error of h^2/8 |f''|,
     * about 2e-4 of the peak).
     */
    private void planeProfile(double zf, double[] work, boolean derivative) {
        double t = (zf - zFirst) / dz;
        t = Math.max(1, Math.min(rows - 3, t));
        int j = (int) Math.floor(t);
        double f = t - j;
        double w0 = KeysCubic.kernel(1 + f);
        double w1 = KeysCubic.kernel(f);
        double w2 = KeysCubic.kernel(1 - f);
        double w3 = KeysCubic.kernel(2 - f);
        int a = (j - 1) * radii;
        for (int i = 0; i < radii; i++) {
            work[i] = w0 * table[a + i] + w1 * table[a + radii + i] + w2 * table[a + 2 * radii + i]
                    + w3 * table[a + 3 * radii + i];
        }
        int fine = fineLength();
        upsample(work, 0, work, 2 * radii, fine);
        if (derivative) {
            double d0 = KeysCubic.derivative(1 + f) / dz;
            double d1 = KeysCubic.derivative(f) / dz;
            double d2 = -KeysCubic.derivative(1 - f) / dz;
            double d3 = -KeysCubic.derivative(2 - f) / dz;
            for (int i = 0; i < radii; i++) {
                work[radii + i] = d0 * table[a + i] + d1 * table[a + radii + i] + d2 * table[a + 2 * radii + i]
                        + d3 * table[a + 3 * radii + i];
            }
            upsample(work, radii, work, 2 * radii + fine, fine);
        }
    }

    /** Keys cubic (mirror at r = 0) from coarse samples at src[from..] to count samples at dr / UPSAMPLE. */
    private void upsample(double[] src, int from, double[] dst, int to, int count) {
        for (int q = 0; q < count; q++) {
            int i = q / UPSAMPLE;
            double v = 0;
            for (int tap = -1; tap <= 2; tap++) {
                v += src[from + Math.abs(i + tap)] * KERNEL[q % UPSAMPLE][tap + 1];
            }
            dst[to + q] = v;
        }
    }
}
