package org.stackwright.psf;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * A measured PSF from a stack of sub-resolution beads: detect and screen the beads ({@link BeadFinder}),
 * localise each to sub-voxel precision ({@link BeadLocaliser}), align and average them and clean the average
 * ({@link BeadAverager}), optionally correct for the bead diameter ({@link BeadSizeCorrection}), and measure the
 * result ({@link Fwhm}). Beads much brighter or dimmer than the median (more than 2.5 times, or under 0.4 times)
 * are rejected as likely clusters or debris.
 */
public final class PsfFromBeads {

    /**
     * What the pipeline made.
     *
     * @param psf the PSF: requested size, unit sum, peak at the centre voxel, the stack's voxel size
     * @param beads every bead found, used or rejected with its reason, positions in voxels
     * @param fwhm widths of the PSF
     * @param notes what was done, in plain words (bead size correction, for instance)
     */
    public record Outcome(Volume psf, List<Bead> beads, Fwhm.Widths fwhm, List<String> notes) {

        /** @return the number of beads that went into the average */
        public long used() {
            return beads.stream().filter(Bead::used).count();
        }
    }

    private PsfFromBeads() {
    }

    /**
     * @param stack bead stack, not modified
     * @param nx PSF width, odd
     * @param ny PSF height, odd
     * @param nz PSF depth, odd
     * @param beadDiameterUm bead diameter for the size correction; 0 for none
     * @param saturation saturation level, NaN to detect it from the data
     * @throws IllegalArgumentException naming the setting when the size does not fit or no bead is usable
     */
    public static Outcome run(Volume stack, int nx, int ny, int nz, double beadDiameterUm, double saturation,
            Workers workers) {
        if (nx % 2 == 0 || ny % 2 == 0 || nz % 2 == 0) {
            throw new IllegalArgumentException("size = " + nx + "x" + ny + "x" + nz + ": every size must be odd so "
                    + "that the peak sits on the centre voxel");
        }
        int hx = nx / 2;
        int hy = ny / 2;
        int hz = nz / 2;
        if (nx + 2 * BeadFinder.MARGIN > stack.width() || ny + 2 * BeadFinder.MARGIN > stack.height()
                || (stack.depth() > 1 && nz + 2 * BeadFinder.MARGIN > stack.depth()) || (stack.depth() == 1 && nz != 1)) {
            throw new IllegalArgumentException("size = " + nx + "x" + ny + "x" + nz + " does not fit in the bead stack "
                    + stack.shape() + " with a " + BeadFinder.MARGIN + "-voxel margin; give a smaller size");
        }
        if (!(beadDiameterUm >= 0)) {
            throw new IllegalArgumentException("bead-diameter = " + beadDiameterUm + " must be zero (no correction) or positive");
        }
        List<Bead> found = BeadFinder.find(stack, hx, hy, hz, saturation);
        List<Bead> beads = new ArrayList<>();
        List<BeadLocaliser.Fit> fits = new ArrayList<>();
        for (Bead b : found) {
            if (!b.used()) {
                beads.add(b);
                continue;
            }
            BeadLocaliser.Fit f = BeadLocaliser.fit(stack, b);
            if (f == null) {
                beads.add(b.reject("the Gaussian fit did not converge near the peak"));
            } else {
                beads.add(b.at(f.x(), f.y(), f.z()));
                fits.add(f);
            }
        }
        screenBrightness(beads, fits);
        List<BeadLocaliser.Fit> usedFits = new ArrayList<>();
        for (Bead b : beads) {
            if (b.used()) {
                usedFits.add(fitFor(b, fits));
            }
        }
        if (usedFits.isEmpty()) {
            throw new IllegalArgumentException("input: no usable bead among " + found.size() + " found ("
                    + summary(beads) + "); give a stack with isolated, unsaturated beads away from the edges");
        }
        double background = background(stack, found, 2 * (hx + BeadFinder.MARGIN), 2 * (hy + BeadFinder.MARGIN),
                2 * (hz + BeadFinder.MARGIN));
        if (Double.isNaN(background)) {
            background = background(stack, found, hx + BeadFinder.MARGIN, hy + BeadFinder.MARGIN, hz + BeadFinder.MARGIN);
        }
        if (Double.isNaN(background)) {
            background = BeadFinder.backgroundAndNoise(stack.data())[0];
        }
        Volume psf = BeadAverager.average(stack, usedFits, background, nx, ny, nz, workers);
        List<String> notes = new ArrayList<>();
        notes.add(String.format(Locale.ROOT, "averaged %d of %d beads after sub-voxel alignment (Fourier shift); "
                + "background %.6g (mean of the stack away from the beads) subtracted", usedFits.size(),
                beads.size(), background));
        if (beadDiameterUm > 0) {
            if (BeadSizeCorrection.matters(beadDiameterUm, psf)) {
                psf = BeadSizeCorrection.correct(psf, beadDiameterUm, workers);
                notes.add(String.format(Locale.ROOT, "corrected for the bead diameter %.4g um: %d Richardson-Lucy "
                        + "iterations with a solid ball of that diameter as the blur", beadDiameterUm,
                        BeadSizeCorrection.ITERATIONS));
            } else {
                notes.add(String.format(Locale.ROOT, "bead diameter %.4g um is below half a voxel: no correction "
                        + "needed, none made", beadDiameterUm));
            }
        } else {
            notes.add("no bead diameter given: the PSF includes the (small) blur of the bead size");
        }
        return new Outcome(psf, beads, Fwhm.measure(psf), notes);
    }

    /**
     * @return the background: the clipped mean ({@link #clippedMean}) of the stack outside boxes of the given half sizes around all found
     *     beads (assumed uniform), or NaN when fewer than 1000 voxels lie outside. The caller first tries boxes
     *     twice the PSF box, because the faint wings of widefield beads reach far beyond the PSF box and raise
     *     the level there.
     */
    static double background(Volume stack, List<Bead> beads, int rx, int ry, int rz) {
        boolean[] covered = new boolean[stack.size()];
        for (Bead b : beads) {
            int bx = (int) Math.round(b.x());
            int by = (int) Math.round(b.y());
            int bz = (int) Math.round(b.z());
            for (int z = Math.max(0, bz - rz); z <= Math.min(stack.depth() - 1, bz + rz); z++) {
                for (int y = Math.max(0, by - ry); y <= Math.min(stack.height() - 1, by + ry); y++) {
                    for (int x = Math.max(0, bx - rx); x <= Math.min(stack.width() - 1, bx + rx); x++) {
                        covered[stack.index(x, y, z)] = true;
                    }
                }
            }
        }
        float[] d = stack.data();
        float[] outside = new float[d.length];
        int n = 0;
        for (int i = 0; i < d.length; i++) {
            if (!covered[i]) {
                outside[n++] = d[i];
            }
        }
        return n >= 1000 ? clippedMean(java.util.Arrays.copyOf(outside, n)) : Double.NaN;
    }

    /**
     * The mean of the values within 4 robust standard deviations of their median. Why not the median: the median
     * of Poisson counts (and of integer camera values) can lie up to half a count from their mean, and a bias of
     * 0.1 count summed over a 25x25x15 PSF box is already half the photons of a typical bead, left as a floor
     * under the PSF. The clipped mean is unbiased for symmetric noise and ignores the wings of other beads.
     */
    static double clippedMean(float[] values) {
        double[] mn = BeadFinder.backgroundAndNoise(values.clone());
        double lo = mn[0] - 4 * mn[1];
        double hi = mn[0] + 4 * mn[1];
        double sum = 0;
        long count = 0;
        for (float v : values) {
            if (v >= lo && v <= hi) {
                sum += v;
                count++;
            }
        }
        return count > 0 ? sum / count : mn[0];
    }

    private static BeadLocaliser.Fit fitFor(Bead b, List<BeadLocaliser.Fit> fits) {
        for (BeadLocaliser.Fit f : fits) {
            if (f.x() == b.x() && f.y() == b.y() && f.z() == b.z()) {
                return f;
            }
        }
        throw new IllegalStateException("no fit for bead " + b.id());
    }

    /** Rejects beads far brighter or dimmer than the median fitted amplitude (modifies beads). */
    private static void screenBrightness(List<Bead> beads, List<BeadLocaliser.Fit> fits) {
        if (fits.size() < 3) {
            return;
        }
        double[] amp = fits.stream().mapToDouble(BeadLocaliser.Fit::amplitude).sorted().toArray();
        double median = amp[amp.length / 2];
        for (int i = 0; i < beads.size(); i++) {
            Bead b = beads.get(i);
            if (!b.used()) {
                continue;
            }
            double a = fitFor(b, fits).amplitude();
            if (a > 2.5 * median) {
                beads.set(i, b.reject(String.format(Locale.ROOT, "%.1f times brighter than the median bead "
                        + "(likely a cluster)", a / median)));
            } else if (a < 0.4 * median) {
                beads.set(i, b.reject(String.format(Locale.ROOT, "%.2f times the median brightness (likely debris or "
                        + "noise)", a / median)));
            }
        }
    }

    private static String summary(List<Bead> beads) {
        StringBuilder sb = new StringBuilder();
        for (Bead b : beads) {
            if (!b.used()) {
                sb.append(sb.length() > 0 ? "; " : "").append("bead ").append(b.id()).append(": ").append(b.reason());
            }
        }
        return sb.length() == 0 ? "none rejected" : sb.toString();
    }
}
