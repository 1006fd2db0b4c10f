package org.stackwright.solve;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.parallel.Workers;
import org.stackwright.psf.DiffractionPsf;
import org.stackwright.psf.PsfSettings;
import org.stackwright.volume.Volume;

/**
 * The PSFs of a depth-variant deconvolution: K Gibson-Lanni PSFs at depths spread evenly over the stack (the
 * first and last at the first and last plane), for {@link org.stackwright.model.DepthVariantBlur}. The depth of the
 * emitters in focus at plane p follows the paraxial rule: first-depth + p step n_s / n_i (the focus moves n_s / n_i
 * times the stage step in a sample of index n_s; common practice, approximate at high NA). Each PSF is centred on
 * its intensity maximum, so the result stays in the stack's own (apparent) z coordinates.
 *
 * @param optics the optics; depth = the depth of the first plane, grid = the PSF size
 * @param psfs the K PSFs, unit sum
 * @param planes the plane of each PSF
 * @param depthsUm the emitter depth of each PSF, micrometres
 */
public record DepthStrata(PsfSettings optics, List<Volume> psfs, double[] planes, double[] depthsUm) {

    /** Fewest and most strata. */
    public static final int MIN_STRATA = 2;
    public static final int MAX_STRATA = 32;

    /**
     * @param optics the optics at the first plane (depth = depth of the first plane), any grid (replaced)
     * @param data the stack to deconvolve (its voxel size and depth count)
     * @param strata K, from {@link #MIN_STRATA} to {@link #MAX_STRATA} and at most the number of planes
     */
    public static DepthStrata build(PsfSettings optics, Volume data, int strata, Workers workers) {
        int d = data.depth();
        if (strata < MIN_STRATA || strata > MAX_STRATA || strata > d) {
            throw new IllegalArgumentException("strata = " + strata + " is not allowed for a stack of " + d + " planes; "
                    + "give " + MIN_STRATA + " to " + Math.min(MAX_STRATA, Math.max(MIN_STRATA, d)) + " (and a stack of at least 2 planes)");
        }
        int[] size = psfSize(optics, data);
        PsfSettings grid = optics.withGrid(data.voxel(), size[0], size[1], size[2]);
        DiffractionPsf model = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI);
        List<Volume> psfs = new ArrayList<>();
        double[] planes = new double[strata];
        double[] depths = new double[strata];
        double rate = data.voxel().z() * optics.sampleIndex() / optics.immersionIndex();
        for (int k = 0; k < strata; k++) {
            planes[k] = (double) k * (d - 1) / (strata - 1);
            depths[k] = optics.depthUm() + planes[k] * rate;
            psfs.add(model.compute(grid.withSample(optics.sampleIndex(), depths[k]), workers));
        }
        return new DepthStrata(grid, List.copyOf(psfs), planes, depths);
    }

    /**
     * @return the PSF size {x, y, z}, odd: laterally 2 ceil(max(1.5 um, 4 lambda / NA) / pixel) + 1, axially
     *     2 ceil(max(3 um, 8 n lambda / NA^2) / step) + 1 (the focus, its aberrated side lobes and part of the
     *     defocus cone), neither beyond the stack (common practice, no source)
     */
    static int[] psfSize(PsfSettings o, Volume data) {
        double lambda = o.wavelengthNm() * 1e-3;
        int hx = (int) Math.ceil(Math.max(1.5, 4 * lambda / o.na()) / data.voxel().x());
        int hy = (int) Math.ceil(Math.max(1.5, 4 * lambda / o.na()) / data.voxel().y());
        int hz = (int) Math.ceil(Math.max(3, 8 * o.immersionIndex() * lambda / (o.na() * o.na())) / data.voxel().z());
        return new int[] {odd(Math.min(2 * hx + 1, data.width())), odd(Math.min(2 * hy + 1, data.height())),
            odd(Math.min(2 * hz + 1, data.depth()))};
    }

    private static int odd(int n) {
        return n % 2 == 1 ? n : n - 1;
    }

    /** @return float arrays of the grid's size the depth-variant blur holds: K transfer functions, 2 spectra, 1 buffer */
    public double gridArrays() {
        return psfs.size() + 3;
    }

    /** @return the record entry: strata, depths, planes, PSF size, optics */
    public Map<String, Object> record() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("strata", psfs.size());
        m.put("depths_um", toList(depthsUm));
        m.put("planes", toList(planes));
        m.put("psf_shape", psfs.get(0).shape());
        m.put("na", optics.na());
        m.put("wavelength_nm", optics.wavelengthNm());
        m.put("immersion_index", optics.immersionIndex());
        m.put("sample_index", optics.sampleIndex());
        m.put("plane_depths", "paraxial: first-depth + plane x step x sample-index / immersion-index");
        return m;
    }

    private static List<Double> toList(double[] a) {
        List<Double> l = new ArrayList<>();
        for (double v : a) {
            l.add(v);
        }
        return l;
    }
}
