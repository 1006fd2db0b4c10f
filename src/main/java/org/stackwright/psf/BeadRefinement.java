package org.stackwright.psf;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.model.Camera;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Refines optical parameters of the Gibson-Lanni PSF (depth, sample index, NA, coverslip thickness) to a bead
 * stack by maximum likelihood under the camera noise model. Every bead has its own centre, brightness and
 * background ({@link BeadBox}); the optics are shared. A coarse scan of the first fitted parameter over its range
 * ({@link RefinementSearch}, the brightest beads refitted at each point) finds the basin; then the optics are
 * refined on the profile likelihood (all beads refitted at each step): Brent's method for one parameter, BOBYQA
 * for several. The Fisher information of optics and beads together ({@link JointBeadFit}) gives the errors. Standard errors come from the Fisher information of all parameters
 * together ({@link FisherSummary}).
 *
 * <p>The Gibson-Lanni model (Gibson &amp; Lanni, JOSA A 8(10):1601-1613, 1991) ties depth to the shape of the
 * PSF through spherical aberration; the position of each bead along z is free, so the focal shift itself carries
 * no information (it is absorbed by the bead positions) and what identifies depth is the asymmetry and
 * stretching of the axial profile.
 */
public final class BeadRefinement {

    /** At most this many beads (the brightest usable ones) enter the fit. */
    static final int MAX_BEADS = 10;

    /** The coarse scan of the search uses this many of the brightest beads. */
    static final int SCAN_BEADS = 3;

    private BeadRefinement() {
    }

    /**
     * @param stack bead stack (ADU), calibrated; not modified
     * @param nominal start optics with the stack's voxel size (grid sizes unused)
     * @param free the parameters to fit
     * @param deepestUm the deepest depth searched
     * @param camera offset, gain, read noise
     * @param box half sizes of the fitting box around each bead, voxels {hx, hy, hz}
     * @param ctx threads, progress, cancel
     * @throws IllegalArgumentException when no bead is usable
     */
    public static Refinement run(Volume stack, PsfSettings nominal, List<OpticsParameter> free, double deepestUm,
            double offset, double gain, double readNoise, int[] box, RunContext ctx) {
        Camera camera = Camera.of(gain, offset, readNoise);
        int hx = box[0];
        int hy = box[1];
        int hz = box[2];
        ctx.progress(0.02, "psf-refine: finding beads");
        List<Bead> found = BeadFinder.find(stack, hx, hy, hz, Double.NaN);
        List<BeadBox> beads = new ArrayList<>();
        List<String> rejected = new ArrayList<>();
        for (Bead b : found) {
            if (b.used() && beads.size() < MAX_BEADS) {
                beads.add(new BeadBox(stack, b, hx, hy, hz, camera));
            } else if (!b.used()) {
                rejected.add(String.format(Locale.ROOT, "bead %d at (%.0f, %.0f, %.0f) voxels: %s", b.id(), b.x(),
                        b.y(), b.z(), b.reason()));
            }
        }
        if (beads.isEmpty()) {
            throw new IllegalArgumentException("input: no usable bead among " + found.size() + " found ("
                    + (rejected.isEmpty() ? "none stands out of the noise" : String.join("; ", rejected))
                    + "); give a stack with isolated, unsaturated point-like beads at least " + (hx + 2)
                    + " voxels from the edges, or use --source specimen");
        }
        double halfWidth = Math.hypot((hx + 3) * stack.voxel().x(), (hy + 3) * stack.voxel().y());
        double halfDepth = (hz + 3) * stack.voxel().z();
        double[][] bounds = new double[free.size()][];
        double[] start = new double[free.size()];
        for (int i = 0; i < free.size(); i++) {
            bounds[i] = free.get(i).bounds(nominal, deepestUm);
            start[i] = Math.max(bounds[i][0], Math.min(bounds[i][1], free.get(i).get(nominal)));
        }
        int nb = beads.size();
        double[][] initial = new double[nb][];
        for (int b = 0; b < nb; b++) {
            initial[b] = beads.get(b).parameters();
        }
        double[][] warm = copy(initial);
        double[] bestValue = {Double.POSITIVE_INFINITY};
        try (Workers workers = new Workers(ctx.threads())) {
            RefinementSearch.Objective objective = (theta, scanning) -> {
                PsfSettings s = apply(nominal, free, theta);
                FocusTable table = new FocusTable(s, halfWidth, halfDepth, workers);
                boolean fresh = scanning || bestValue[0] == Double.POSITIVE_INFINITY;
                double[][] from = fresh ? startsFor(initial, table) : warm;
                // the scan only picks the basin: the brightest beads suffice there
                int used = scanning ? Math.min(SCAN_BEADS, nb) : nb;
                double[] dev = new double[used];
                double[][] got = new double[used][];
                workers.forRange(used, (b0, b1) -> {
                    for (int b = b0; b < b1; b++) {
                        BeadBox bead = beads.get(b);
                        bead.setParameters(from[b]);
                        dev[b] = bead.fit(table, scanning);
                        got[b] = bead.parameters();
                    }
                });
                double total = 0;
                for (double d : dev) {
                    total += d;
                }
                if (!scanning && total < bestValue[0]) {
                    bestValue[0] = total;
                    for (int b = 0; b < nb; b++) {
                        warm[b] = got[b];
                    }
                }
                return total;
            };
            RefinementSearch.Outcome search = RefinementSearch.run(free, start, bounds, objective, true, ctx);
            for (int b = 0; b < nb; b++) {
                beads.get(b).setParameters(warm[b]);
            }
            JointBeadFit joint = new JointBeadFit(beads, nominal, free, halfWidth, halfDepth, workers);
            double[] point = joint.point(search.best());
            double[] best = java.util.Arrays.copyOf(point, free.size());
            PsfSettings refined = apply(nominal, free, best);
            ctx.progress(0.92, "psf-refine: standard errors");
            JointBeadFit.Derivatives at = joint.derivatives(point);
            FocusTable table = at.table();
            FisherSummary summary = new FisherSummary(joint.fisher(at), free, bounds, best);
            return result(nominal, refined, free, best, summary, beads, table, stack, search, rejected, box);
        }
    }

    /**
     * @return half sizes {hx, hy, hz} of the fitting box around each bead: laterally 2.5 lambda / NA (the Airy
     *     core and its first rings), axially 5 n lambda / NA^2 (the focus and the side lobes that spherical
     *     aberration makes), neither larger than half the requested PSF size
     */
    public static int[] box(PsfSettings s) {
        double lambda = s.wavelengthNm() * 1e-3;
        int hx = (int) Math.ceil(2.5 * lambda / s.na() / s.voxel().x());
        int hz = (int) Math.ceil(5 * s.immersionIndex() * lambda / (s.na() * s.na()) / s.voxel().z());
        return new int[] {Math.max(1, Math.min(hx, s.nx() / 2)), Math.max(1, Math.min(hx, s.ny() / 2)),
            Math.max(1, Math.min(hz, s.nz() / 2))};
    }

    /** @return the nominal optics with the fitted values put in */
    public static PsfSettings apply(PsfSettings nominal, List<OpticsParameter> free, double[] theta) {
        PsfSettings s = nominal;
        for (int i = 0; i < free.size(); i++) {
            s = free.get(i).with(s, theta[i]);
        }
        return s;
    }

    /**
     * @return the start parameters for a table: the beads were found at their intensity maximum, and the model's
     *     z is the paraxial focus, which lies {@link FocusTable#maximumOffsetPlanes} planes before it
     */
    private static double[][] startsFor(double[][] initial, FocusTable table) {
        double[][] out = copy(initial);
        for (double[] p : out) {
            p[BeadBox.Z] -= table.maximumOffsetPlanes();
        }
        return out;
    }

    private static double[][] copy(double[][] a) {
        double[][] c = new double[a.length][];
        for (int i = 0; i < a.length; i++) {
            c[i] = a[i].clone();
        }
        return c;
    }

    private static Refinement result(PsfSettings nominal, PsfSettings refined, List<OpticsParameter> free,
            double[] best, FisherSummary summary, List<BeadBox> beads, FocusTable table, Volume stack,
            RefinementSearch.Outcome search, List<String> rejected, int[] box) {
        long voxels = 0;
        double deviance = 0;
        double expected = 0;
        List<Map<String, Object>> rows = new ArrayList<>();
        for (BeadBox b : beads) {
            double[] m = b.expected(table);
            double e = 0;
            for (double v : m) {
                e += ExpectedDeviance.poisson(v);
            }
            double d = b.deviance(table);
            double[] p = b.parameters();
            Map<String, Object> row = new LinkedHashMap<>();
            row.put("bead", b.id);
            row.put("x_um", p[BeadBox.X] * stack.voxel().x());
            row.put("y_um", p[BeadBox.Y] * stack.voxel().y());
            // the model's z is the paraxial focus; report where the bead's intensity maximum lies
            row.put("z_um", (p[BeadBox.Z] + table.maximumOffsetPlanes()) * stack.voxel().z());
            row.put("brightness_e_per_plane", p[BeadBox.BRIGHTNESS]);
            row.put("background_e", p[BeadBox.BACKGROUND]);
            row.put("deviance_ratio", d / e);
            rows.add(row);
            voxels += b.size();
            deviance += d;
            expected += e;
        }
        Map<String, Object> quality = new LinkedHashMap<>();
        quality.put("statistic", "Poisson deviance (shifted-Poisson units) summed over the bead boxes");
        quality.put("deviance", deviance);
        quality.put("expected_deviance", expected);
        quality.put("deviance_ratio", deviance / expected);
        // 2 x deviance per voxel is close to chi-square with one degree of freedom: variance 1/2 per voxel
        double z = (deviance - expected) / Math.sqrt(0.5 * voxels);
        quality.put("deviance_z", z);
        quality.put("voxels", voxels);
        List<String> notes = new ArrayList<>(summary.notes());
        if (z > 5) {
            notes.add(String.format(Locale.ROOT, "the beads differ from the model by more than the noise (deviance %.4g, "
                    + "expected %.4g for a perfect model): the standard errors are then too small; bead size, other "
                    + "aberrations or wrong camera values (offset, gain, read-noise) are likely", deviance, expected));
        }
        Map<String, Object> details = new LinkedHashMap<>();
        details.put("source", "beads");
        details.put("beads_used", beads.size());
        details.put("beads_rejected", rejected);
        details.put("box_voxels", (2 * box[0] + 1) + "x" + (2 * box[1] + 1) + "x" + (2 * box[2] + 1));
        details.put("scan_evaluations", search.evaluations());
        details.put("scan", scanRecord(free, search.scan()));
        details.put("beads", rows);
        details.put("focal_offset_um", table.peak());
        details.put("condition_number", summary.conditionNumber());
        return new Refinement(nominal, refined, free, best, summary.standardErrors(), summary.identifiable(),
                summary.correlationRecord(), notes, quality, details);
    }

    /** @return the coarse scan as rows {value, objective above its minimum} */
    public static List<Map<String, Object>> scanRecord(List<OpticsParameter> free, List<double[]> scan) {
        double min = Double.POSITIVE_INFINITY;
        for (double[] s : scan) {
            min = Math.min(min, s[1]);
        }
        List<Map<String, Object>> out = new ArrayList<>();
        for (double[] s : scan) {
            Map<String, Object> row = new LinkedHashMap<>();
            row.put(free.get(0).recordName(), s[0]);
            if (s.length > 2) {
                row.put(free.get(1).recordName(), s[2]);
            }
            row.put("objective_above_minimum", s[1] - min);
            out.add(row);
        }
        return out;
    }
}
