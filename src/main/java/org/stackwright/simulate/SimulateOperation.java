package org.stackwright.simulate;

import java.util.List;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ByteProcessor;

import org.stackwright.model.Camera;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.VoxelSize;
import org.stackwright.volume.Volume;

/**
 * {@code simulate}: makes an invented specimen and its camera image, for demos, tests and for trying settings on
 * data whose truth is known. Outputs the camera data and optionally the truth, the PSF used and the damage mask.
 */
public final class SimulateOperation implements Operation {

    @Override
    public String name() {
        return "simulate";
    }

    @Override
    public String summary() {
        return "make an invented specimen (beads, filaments, vesicles) and its blurred, noisy camera image";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.choice("specimen", "cells", List.of("cells", "beads"), "what the field holds"),
                Param.text("size", "128x128x32", "image size in voxels, WxHxD (D = 1 for a 2D image)"),
                Param.number("pixel", 0.08, 1e-4, 100, "um", "pixel width and height"),
                Param.number("step", 0.2, 1e-4, 100, "um", "z step"),
                Param.number("na", 1.0, 0.01, 1.7, "", "numerical aperture of the objective"),
                Param.number("wavelength", 520.0, 200, 2000, "nm", "emission wavelength"),
                Param.number("immersion-index", 1.33, 1.0, 2.0, "", "refractive index of the immersion medium"),
                Param.number("brightness", 1.0, 1e-6, 1e6, "", "scales all photon counts of the specimen"),
                Param.integer("beads", 20, 0, 100_000, "number of beads (specimen=beads)"),
                Param.number("background", 10.0, 0, 1e6, "photons", "uniform background per voxel"),
                Param.number("gain", 1.0, 1e-6, 1e6, "ADU/e-", "camera gain"),
                Param.number("offset", 100.0, -1e6, 1e6, "ADU", "camera offset"),
                Param.number("read-noise", 2.0, 0, 1e6, "ADU", "camera read noise (standard deviation)"),
                Param.integer("defects", 0, 0, 1_000_000, "defective pixels to plant, of each kind (hot, dead, stuck)"),
                Param.text("grid", "1x1", "tile grid ROWSxCOLS for planted seams (1x1 = none)"),
                Param.integer("seam-width", 4, 1, 1000, "seam band width in pixels"),
                Param.integer("seed", 1, 0, Integer.MAX_VALUE, "random seed; the same seed gives the same files"),
                Param.choice("bits", "32", List.of("16", "32"),
                        "bit depth of the camera image: 16 rounds to whole ADU like a real camera"),
                Param.outputImage("output", true, "the camera image (TIFF)"),
                Param.outputImage("truth", false, "the specimen before blur and noise (TIFF)"),
                Param.outputImage("psf-output", false, "the PSF used for the blur (TIFF)"),
                Param.outputImage("mask-output", false, "the planted defects and seams, 255 = damaged (TIFF)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        int[] size = v.dims("size", 3);
        int[] grid = v.dims("grid", 2);
        VoxelSize voxel = new VoxelSize(v.number("pixel"), v.number("pixel"), v.number("step"));
        double na = v.number("na");
        double n = v.number("immersion-index");
        if (na >= n) {
            throw new IllegalArgumentException("na = " + na + " must be smaller than immersion-index = " + n);
        }
        double lambda = v.number("wavelength");
        double sxy = GaussianPsf.sigmaLateral(lambda, na);
        double sz = GaussianPsf.sigmaAxial(lambda, na, n);
        int hx = Math.max(1, (int) Math.ceil(4 * sxy / voxel.x()));
        int hz = size[2] == 1 ? 0 : Math.max(1, (int) Math.ceil(4 * sz / voxel.z()));
        // the drawn field is the view plus a PSF margin; about ten float copies of it are alive at the peak
        // (field, blurred field, FFT grid and spectrum, truth, expected, data, output images)
        long field = (long) (size[0] + 2 * hx) * (size[1] + 2 * hx) * (size[2] + 2 * hz);
        MemoryCheck.require("simulate --size " + size[0] + "x" + size[1] + "x" + size[2], MemoryCheck.floats(field, 10));
        Volume psf = GaussianPsf.sampled(sxy, sz, voxel, 2 * hx + 1, 2 * hx + 1, 2 * hz + 1);
        double b = v.number("brightness");
        Specimen.Contents c = v.choice("specimen").equals("beads")
                ? Specimen.Contents.beadsOnly(v.integer("beads"), 2000 * b)
                : scaled(Specimen.Contents.cellField(), b);
        Camera camera = new Camera(v.number("gain"), v.number("offset"), v.number("read-noise"), 65535);
        Simulation.Plan plan = new Simulation.Plan(size[0], size[1], size[2], voxel, c, psf, v.number("background"),
                camera, v.integer("defects"), grid[0], grid[1], v.integer("seam-width"), v.integer("seed"));
        ctx.progress(0.1, "simulating " + size[0] + "x" + size[1] + "x" + size[2]);
        Simulation.Outcome out;
        try (Workers w = new Workers(ctx.threads())) {
            out = Simulation.run(plan, w);
        }
        ctx.progress(1, "simulated");
        Result r = new Result();
        ImagePlus data = ImagePlusAdapter.toImagePlus(out.data(), "simulated");
        boolean bits16 = v.choice("bits").equals("16");
        warnClipped(out.data(), camera.fullScale(), bits16, ctx);
        if (bits16) {
            data = to16bit(data);
        }
        r.image("output", data);
        r.image("truth", ImagePlusAdapter.toImagePlus(out.truth(), "simulated-truth"));
        r.image("psf-output", ImagePlusAdapter.toImagePlus(psf, "simulated-psf"));
        if (out.damageMask() != null) {
            ImageStack st = new ImageStack(size[0], size[1]);
            st.addSlice(new ByteProcessor(size[0], size[1], out.damageMask().clone()));
            ImagePlus m = new ImagePlus("simulated-mask", st);
            ImagePlusAdapter.setCalibration(m, voxel);
            r.image("mask-output", m);
        }
        r.record("operation", "simulate");
        r.record("settings", v.effective());
        r.record("psf_sigma_xy_um", sxy);
        r.record("psf_sigma_z_um", sz);
        r.line(String.format(java.util.Locale.ROOT, "simulated %s voxels of %s; PSF Gaussian sigma_xy %.4f um, sigma_z %.4f um",
                out.data().shape(), voxel, sxy, sz));
        return r;
    }

    /**
     * Says how many pixels the camera clipped: at its full scale (saturated, in either bit depth) and, for 16-bit
     * output, below 0 ADU (an unsigned converter has no negative values). Clipped pixels are no longer Poisson data.
     */
    static void warnClipped(Volume adu, double fullScale, boolean bits16, RunContext ctx) {
        long high = 0;
        long low = 0;
        for (float f : adu.data()) {
            if (f >= fullScale) {
                high++;
            } else if (bits16 && Math.round(f) < 0) {
                low++;
            }
        }
        if (high > 0) {
            ctx.warn(String.format(java.util.Locale.ROOT, "output: %d pixels (%.3g %%) reached the camera's full scale"
                    + " %.0f ADU and were clipped (saturated); lower brightness or background to avoid it", high,
                    100.0 * high / adu.size(), fullScale));
        }
        if (low > 0) {
            ctx.warn(String.format(java.util.Locale.ROOT, "output: %d pixels (%.3g %%) fell below 0 ADU and were set"
                    + " to 0 (16-bit has no negative values); raise offset to avoid it", low, 100.0 * low / adu.size()));
        }
    }

    /** Rounds to whole ADU and clips to 0..65535, like a 16-bit camera's converter. */
    static ImagePlus to16bit(ImagePlus imp) {
        ImageStack in = imp.getStack();
        ImageStack st = new ImageStack(imp.getWidth(), imp.getHeight());
        for (int i = 1; i <= in.getSize(); i++) {
            float[] f = (float[]) in.getPixels(i);
            short[] s = new short[f.length];
            for (int k = 0; k < f.length; k++) {
                s[k] = (short) Math.max(0, Math.min(65535, Math.round(f[k])));
            }
            st.addSlice(new ij.process.ShortProcessor(imp.getWidth(), imp.getHeight(), s, null));
        }
        ImagePlus out = new ImagePlus(imp.getTitle(), st);
        out.setDimensions(1, in.getSize(), 1);
        out.setCalibration(imp.getCalibration().copy());
        return out;
    }

    private static Specimen.Contents scaled(Specimen.Contents c, double f) {
        return new Specimen.Contents(c.beads(), c.filaments(), c.vesicles(), c.beadPhotons() * f,
                c.filamentPhotons() * f, c.vesiclePhotons() * f, c.hazePhotons() * f);
    }
}
