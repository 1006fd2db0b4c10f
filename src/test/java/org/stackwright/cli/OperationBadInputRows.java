package org.stackwright.cli;

import static org.stackwright.cli.BadInputTable.cli;

import java.util.Arrays;
import java.util.List;
import java.util.function.Consumer;

import ij.IJ;

import org.stackwright.imagej.ChannelRunner;
import org.stackwright.imagej.DoorSettings;
import org.stackwright.inspect.ResidualsOperation;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The rows of {@link BadInputTable} for the registered operations (residuals, measure-psf, inpaint, compare,
 * seam-mask, find-defects, psf, psf-from-beads), run through the command line as a user would. Inputs are small
 * (16x16x5 at most) so every row runs in well under a second.
 */
final class OperationBadInputRows {

    private static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.3);

    private OperationBadInputRows() {
    }

    /** A w x h x d volume with every pixel {@code value}, then changed by {@code edit}. */
    private static Volume filled(int w, int h, int d, float value, VoxelSize voxel, Consumer<float[]> edit) {
        float[] px = new float[w * h * d];
        Arrays.fill(px, value);
        edit.accept(px);
        return new Volume(w, h, d, px, voxel);
    }

    /** A w x h x d PSF: 1 everywhere and 50 at the centre voxel, then changed by {@code edit}. */
    private static Volume psf(int w, int h, int d, VoxelSize voxel, Consumer<float[]> edit) {
        return filled(w, h, d, 1f, voxel, px -> {
            px[(d / 2 * h + h / 2) * w + w / 2] = 50f;
            edit.accept(px);
        });
    }

    private static String[] concat(String[] a, String... b) {
        String[] c = Arrays.copyOf(a, a.length + b.length);
        System.arraycopy(b, 0, c, a.length, b.length);
        return c;
    }

    static void add(List<BadInputTable.Case> t, Fixtures x) {
        String data = x.tiff("data.tif", 16, 16, 5).toString();
        String small = x.path("good.tif").toString();
        String dataNan = x.volume("data-nan.tif", filled(16, 16, 5, 20f, VOXEL, px -> px[100] = Float.NaN)).toString();
        String allNan = x.volume("data-allnan.tif", filled(16, 16, 5, Float.NaN, VOXEL, px -> { })).toString();
        String flat2d = x.tiff("data-2d.tif", 16, 16, 1).toString();
        String good = x.volume("psf-good.tif", psf(5, 5, 3, VOXEL, px -> { })).toString();
        String zeros = x.volume("psf-zeros.tif", psf(5, 5, 3, VOXEL, px -> Arrays.fill(px, 0f))).toString();
        String negative = x.volume("psf-negative.tif", psf(5, 5, 3, VOXEL, px -> {
            for (int i = 0; i < px.length; i++) {
                px[i] = -px[i];
            }
            px[37] = 60f;
        })).toString();
        String allNegative = x.volume("psf-all-negative.tif", psf(5, 5, 3, VOXEL, px -> {
            for (int i = 0; i < px.length; i++) {
                px[i] = -px[i];
            }
        })).toString();
        String nan = x.volume("psf-nan.tif", psf(5, 5, 3, VOXEL, px -> px[3] = Float.NaN)).toString();
        String even = x.volume("psf-even.tif", psf(6, 5, 3, VOXEL, px -> { })).toString();
        String offCentre = x.volume("psf-off-centre.tif", psf(5, 5, 3, VOXEL, px -> px[0] = 99f)).toString();
        String large = x.volume("psf-large.tif", psf(17, 5, 3, VOXEL, px -> { })).toString();
        String coarse = x.volume("psf-coarse.tif", psf(5, 5, 3, new VoxelSize(0.2, 0.2, 0.3), px -> { })).toString();
        String psf2d = x.volume("psf-2d.tif", psf(5, 5, 1, VOXEL, px -> { })).toString();
        String maskOne = x.volume("mask-one.tif", filled(16, 16, 1, 0f, VOXEL, px -> px[40] = 255f)).toString();
        String maskEmpty = x.volume("mask-empty.tif", filled(16, 16, 1, 0f, VOXEL, px -> { })).toString();
        String maskAll = x.volume("mask-all.tif", filled(16, 16, 1, 255f, VOXEL, px -> { })).toString();
        String out = x.path("op-out.tif").toString();
        String res = "residuals";

        // --- every IMAGE input: missing, not a TIFF, truncated, empty, colour, 64-bit (the door names the key) ---
        t.add(cli("residuals --psf missing", 2, "--psf: file " + x.path("no-psf.tif") + " does not exist",
                res, "--input", data, "--estimate", data, "--psf", x.path("no-psf.tif").toString(), "--output", out));
        t.add(cli("residuals --estimate truncated", 2, "truncated.tif is truncated or damaged",
                res, "--input", data, "--estimate", x.path("truncated.tif").toString(), "--psf", good, "--output", out));
        t.add(cli("inpaint --mask not a TIFF", 2, "notes.tif is not a TIFF file",
                "inpaint", "--input", data, "--mask", x.path("notes.tif").toString(), "--output", out));
        t.add(cli("compare --reference empty file", 2, "empty.tif is not a TIFF file",
                "compare", "--reference", x.path("empty.tif").toString(), "--input", data));
        t.add(cli("find-defects --dark RGB", 2, "is RGB colour; use a grayscale 8, 16 or 32-bit image",
                "find-defects", "--input", data, "--dark", x.path("colour.tif").toString(), "--output", out));
        t.add(cli("find-defects --flat 64-bit", 2, "double.tif is of a kind that cannot be read",
                "find-defects", "--input", data, "--flat", x.path("double.tif").toString(), "--output", out));
        t.add(cli("find-defects --dark of another camera size", 2, "dark frames are 8x8 but input is 16x16",
                "find-defects", "--input", data, "--dark", small, "--output", out));
        t.add(cli("find-defects in blocks", 2, "block-size = '8x8x1' is not possible for find-defects",
                "find-defects", "--input", data, "--block-size", "8x8x1", "--output", out));

        // --- residuals: the PSF through PsfChecks ---
        t.add(cli("residuals PSF all zeros", 2, "psf has no positive value",
                res, "--input", data, "--estimate", data, "--psf", zeros, "--output", out));
        t.add(cli("residuals PSF negative", 2, "psf has 74 negative values totalling",
                res, "--input", data, "--estimate", data, "--psf", negative, "--output", out));
        t.add(cli("residuals PSF NaN", 2, "psf has 1 NaN or infinite values",
                res, "--input", data, "--estimate", data, "--psf", nan, "--output", out));
        t.add(cli("residuals PSF even-sized", 2, "psf is 6x5x3; allowed: odd sizes only",
                res, "--input", data, "--estimate", data, "--psf", even, "--output", out));
        t.add(cli("residuals PSF off-centre", 2, "psf has its peak at voxel (0, 0, 0) but its centre voxel is (2, 2, 1)",
                res, "--input", data, "--estimate", data, "--psf", offCentre, "--output", out));
        t.add(cli("residuals PSF larger than the image", 2, "psf is 17x5x3 at the image's voxel size but the image is only 16x16x5",
                res, "--input", data, "--estimate", data, "--psf", large, "--output", out));
        t.add(cli("residuals PSF of another voxel size: resampled", 0, "resampled from 5x5x3 to 11x11x3",
                res, "--input", data, "--estimate", data, "--psf", coarse, "--output", x.path("res-coarse.tif").toString()));
        t.add(cli("residuals 2D PSF for a 3D stack", 2, "psf is 2D (5x5x1) but the image is a 3D stack (16x16x5)",
                res, "--input", data, "--estimate", data, "--psf", psf2d, "--output", out));
        t.add(cli("residuals 3D PSF for a 2D image: centre plane", 0, "its centre plane (the in-focus plane of a thin specimen) is used",
                res, "--input", flat2d, "--estimate", flat2d, "--psf", good, "--output", x.path("res-2d.tif").toString()));
        t.add(cli("residuals estimate of another size", 2, "estimate is 8x8x3 but input is 16x16x5",
                res, "--input", data, "--estimate", small, "--psf", good, "--output", out));
        t.add(cli("residuals NaN in the estimate", 2, "estimate: 1 of 1280 pixels are NaN or infinite; allowed: finite values only",
                res, "--input", data, "--estimate", dataNan, "--psf", good, "--output", out));
        t.add(cli("residuals NaN in the data: untrusted, residual 0", 0, "input: the 1 NaN or infinite pixels carry no"
                + " data; they are left out of chi^2, the histogram and the verdict, and get residual 0",
                res, "--input", dataNan, "--estimate", data, "--psf", good, "--output", x.path("res-nan.tif").toString()));
        t.add(cli("residuals data all NaN", 2, "input: every one of the 1280 pixels is NaN or infinite",
                res, "--input", allNan, "--estimate", data, "--psf", good, "--output", out));
        t.add(cli("residuals boundary not a choice", 2, "boundary = 'wrap' is not allowed; choose one of exclude,"
                + " mirror, zero", res, "--input", data, "--estimate", data, "--psf", good, "--boundary", "wrap",
                "--output", out));

        // --- measure-psf: the value rules of PsfChecks (a bead image may be off-centre, even-sized) ---
        t.add(cli("measure-psf all zeros", 2, "input has no positive value", "measure-psf", "--input", zeros));
        t.add(cli("measure-psf all negative", 2, "input has no positive value", "measure-psf", "--input", allNegative));
        t.add(cli("measure-psf NaN", 2, "input has 1 NaN or infinite values", "measure-psf", "--input", nan));

        // --- inpaint: the mask through MaskChecks, the pixels through InputChecks ---
        t.add(cli("inpaint mask of the wrong size", 2, "mask is 8x8x3 but the image is 16x16x5; allowed: the same size, or 16x16x1",
                "inpaint", "--input", data, "--mask", small, "--output", out));
        t.add(cli("inpaint empty mask", 0, "mask marks no pixel (all 0); nothing is excluded or repaired",
                "inpaint", "--input", data, "--mask", maskEmpty, "--output", x.path("inpaint-empty.tif").toString()));
        t.add(cli("inpaint mask covering everything", 2, "mask marks all 1280 pixels as untrusted",
                "inpaint", "--input", data, "--mask", maskAll, "--output", out));
        t.add(cli("inpaint mask with 2 channels", 2, "mask has 2 channels and 1 time points",
                "inpaint", "--input", small, "--mask", x.path("channels2.tif").toString(), "--output", out));
        t.add(cli("inpaint NaN pixels: filled and listed", 0, "input: 1 NaN or infinite pixels outside the mask were treated as untrusted and filled too",
                "inpaint", "--input", dataNan, "--mask", maskOne, "--output", x.path("inpaint-nan.tif").toString()));
        t.add(cli("inpaint every pixel NaN", 2, "input: every one of the 1280 pixels is NaN or infinite",
                "inpaint", "--input", allNan, "--mask", maskOne, "--output", out));
        t.add(cli("inpaint iterations 0", 2, "iterations = 0 is out of range",
                "inpaint", "--input", data, "--mask", maskOne, "--iterations", "0", "--output", out));

        // --- compare ---
        t.add(cli("compare images of different sizes", 2, "input is 8x8x3 but reference is 16x16x5; allowed: images of the same size",
                "compare", "--reference", data, "--input", small));
        t.add(cli("compare NaN in the input", 2, "input: 1 of 1280 pixels are NaN or infinite; allowed: finite values only",
                "compare", "--reference", data, "--input", dataNan));
        t.add(cli("compare NaN in the reference", 2, "reference: 1 of 1280 pixels are NaN or infinite",
                "compare", "--reference", dataNan, "--input", data));
        t.add(cli("compare constant reference", 2, "data-range = 0.0 is not allowed: give a positive number",
                "compare", "--reference", x.path("constant.tif").toString(), "--input", x.path("constant.tif").toString()));

        // --- seam-mask ---
        t.add(cli("seam-mask layout does not match the image", 2, "grid, tile and overlap give a 16x16 image but input is 8x8",
                "seam-mask", "--grid", "2x2", "--tile", "8x8", "--input", small, "--level", "--output", out));
        t.add(cli("seam-mask grid without tile", 2, "grid and tile are required unless detect is given",
                "seam-mask", "--grid", "2x2", "--output", out));
        t.add(cli("seam-mask overlap as large as the tile", 2, "overlap = 8x8 px is not allowed; it must be at least 0 and smaller than the tile (8x8)",
                "seam-mask", "--grid", "2x2", "--tile", "8x8", "--overlap", "8", "--output", out));
        t.add(cli("seam-mask grid with a 0", 2, "grid = '0x2': each size must be from 1 to 100000", "seam-mask", "--grid", "0x2", "--tile", "8x8", "--output", out));
        t.add(cli("seam-mask detect without input", 2, "input is required with detect", "seam-mask", "--detect", "--output", out));
        t.add(cli("seam-mask flat-field without level-tiles", 2, "flat-field needs level-tiles: add --level-tiles",
                "seam-mask", "--grid", "2x2", "--tile", "4x4", "--input", small, "--level", "--flat-field", x.path("op-flat.tif").toString(),
                "--output", out));
        t.add(cli("seam-mask levelled-output without levelling", 2, "levelled-output needs level-tiles",
                "seam-mask", "--grid", "2x2", "--tile", "4x4", "--input", small, "--levelled-output",
                x.path("op-levelled.tif").toString(), "--output", out));

        // --- psf ---
        String[] optics = {"psf", "--model", "widefield", "--pixel", "0.1", "--step", "0.3", "--output", out};
        t.add(cli("psf NA equal to immersion index", 2, "na = 1.33 must be smaller than immersion-index = 1.33",
                with(optics, "--na", "1.33", "--wavelength", "520", "--immersion-index", "1.33", "--size", "5x5x3")));
        t.add(cli("psf wavelength 0", 2, "wavelength = 0 is out of range; allowed 200 to 2000 nm",
                with(optics, "--na", "1.2", "--wavelength", "0", "--immersion-index", "1.33", "--size", "5x5x3")));
        t.add(cli("psf even size", 2, "size = 4x5x3: every size must be odd",
                with(optics, "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33", "--size", "4x5x3")));
        t.add(cli("psf negative depth", 2, "depth = -1 is out of range",
                with(optics, "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33", "--size", "5x5x3", "--depth", "-1")));
        t.add(cli("psf larger than the heap", 2, "psf --size 1501x1501x901 needs about",
                with(optics, "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33", "--size", "1501x1501x901")));
        t.add(cli("psf two-photon without excitation", 2, "excitation is required for model two-photon",
                "psf", "--model", "two-photon", "--pixel", "0.1", "--step", "0.3", "--output", out,
                "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33", "--size", "5x5x3"));

        // --- hyperstacks: the command line takes one channel and time point; ImageJ runs each channel in turn ---
        String channels2 = x.path("channels2.tif").toString();
        t.add(cli("measure-psf hyperstack with 2 channels: each channel in turn", 0, "channel 2: the image has no spatial"
                + " calibration", "measure-psf", "--input", channels2));
        t.add(cli("compare reference with 2 channels", 2, "reference: image 'channels2' has 2 channel(s)",
                "compare", "--reference", channels2, "--input", small));
        t.add(cli("residuals PSF with 2 channels", 2, "psf: image 'channels2' has 2 channel(s)",
                res, "--input", data, "--estimate", data, "--psf", channels2, "--output", out));
        t.add(BadInputTable.lib("ImageJ door: PSF with 3 channels for a 2-channel input", 2,
                "psf = 'psf3' has 3 channels but input has 2; give one channel (used for all) or one per channel",
                c -> ChannelRunner.run(new ResidualsOperation(), hyperstacks(3, null), 1, (f, m) -> { }, w -> { }, () -> false)));
        t.add(BadInputTable.lib("ImageJ door: per-channel list of the wrong length", 2,
                "offset = '1,2,3' gives 3 values; give one value, or one per channel (2)",
                c -> ChannelRunner.run(new ResidualsOperation(), hyperstacks(2, "1,2,3"), 1, (f, m) -> { }, w -> { }, () -> false)));

        // --- psf-refine ---
        String flat = x.volume("refine-flat.tif", filled(32, 32, 9, 20f, VOXEL, px -> { })).toString();
        String[] refineArgs = {"psf-refine", "--input", flat, "--na", "1.2", "--wavelength", "520", "--immersion-index",
            "1.518", "--size", "9x9x5", "--output", out};
        t.add(cli("psf-refine --fit with a word it cannot fit", 2, "'colour' cannot be fitted; choose from depth, "
                + "sample-index, na, coverslip-thickness", concat(refineArgs, "--fit", "depth,colour")));
        t.add(cli("psf-refine --fit naming a value twice", 2, "names depth twice", concat(refineArgs, "--fit", "depth,depth")));
        t.add(cli("psf-refine start depth below the deepest searched", 2, "depth = 80 lies below deepest = 50",
                concat(refineArgs, "--depth", "80")));
        t.add(cli("psf-refine on a stack without beads", 2, "input: no usable bead", refineArgs));

        // --- psf-from-beads ---
        t.add(cli("psf-from-beads on an image without beads", 2, "input: no usable bead",
                "psf-from-beads", "--input", data, "--size", "3x3x1", "--output", out));
        t.add(cli("psf-from-beads even size", 2, "size = 4x5x3: every size must be odd",
                "psf-from-beads", "--input", data, "--size", "4x5x3", "--output", out));
        t.add(cli("psf-from-beads size larger than the stack", 2, "does not fit in the bead stack 16x16x5",
                "psf-from-beads", "--input", data, "--size", "31x31x5", "--output", out));
        t.add(cli("psf-from-beads NaN pixels", 2, "input: 1 of 1280 pixels are NaN or infinite; allowed: finite values only",
                "psf-from-beads", "--input", dataNan, "--size", "3x3x1", "--output", out));
    }

    /** Door settings for residuals: a 2-channel input and estimate, a PSF of {@code psfChannels} channels. */
    private static DoorSettings hyperstacks(int psfChannels, String offset) {
        DoorSettings s = new DoorSettings();
        s.images().put("input", IJ.createImage("in2", "32-bit ramp", 16, 16, 2, 5, 1));
        s.images().put("estimate", IJ.createImage("est2", "32-bit ramp", 16, 16, 2, 5, 1));
        s.images().put("psf", IJ.createImage("psf" + psfChannels, "32-bit ramp", 5, 5, psfChannels, 3, 1));
        if (offset != null) {
            s.text().put("offset", offset);
        }
        return s;
    }

    private static String[] with(String[] base, String... more) {
        String[] all = Arrays.copyOf(base, base.length + more.length);
        System.arraycopy(more, 0, all, base.length, more.length);
        return all;
    }
}
