package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.OutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.Consumer;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.stackwright.op.MemoryCheck;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The bad-input cases of the data-safety issue for {@code deconvolve}, through the command line, in the row form
 * of {@link BadInputTable} (exit code and message fragment naming the parameter, the value and what is allowed, or
 * the warning of a documented safe behaviour); then: no input file changed, no temporary file left. Also a cancel
 * at a random iteration of a real deconvolution leaves no file, and 1 and 2 threads write bit-identical files.
 */
class DeconvolveBadInputTest {

    private static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.3);
    private static final Fixtures FILES = new Fixtures();
    private static final Map<Path, String> HASHES = new LinkedHashMap<>();
    private static final Volume GOOD = cells(32, 32, 12, 5);

    private static String input(String name, Volume v) {
        Path p = FILES.path(name);
        if (!Files.exists(p)) {
            TiffFiles.write(v, p, false);
            HASHES.put(p, Fixtures.sha256(p));
        }
        return p.toString();
    }

    /** As {@link #input(String, Volume)} for an image with its own calibration (or none). */
    private static String inputImage(String name, ij.ImagePlus imp) {
        Path p = FILES.path(name);
        if (!Files.exists(p)) {
            TiffFiles.write(imp, p, false);
            HASHES.put(p, Fixtures.sha256(p));
        }
        return p.toString();
    }

    /** A TIFF file written by hand (kinds our writer never makes), recorded like the other inputs. */
    private static String inputBytes(String name, java.util.function.Consumer<Path> write) {
        Path p = FILES.path(name);
        if (!Files.exists(p)) {
            write.accept(p);
            HASHES.put(p, Fixtures.sha256(p));
        }
        return p.toString();
    }

    /** Invented cells blurred by a Gaussian PSF, offset 100 ADU, Poisson noise and read noise 2 ADU. */
    private static Volume cells(int nx, int ny, int nz, long seed) {
        try (Workers w = new Workers(1)) {
            return Simulation.run(new Simulation.Plan(nx, ny, nz, VOXEL, Specimen.Contents.cellField(), psfVolume(),
                    10, new Camera(1, 100, 2, 65535), 0, 1, 1, 4, seed), w).data();
        }
    }

    private static Volume psfVolume() {
        return GaussianPsf.sampled(0.15, 0.35, VOXEL, 9, 9, 7);
    }

    private static Volume psf(int w, int h, int d, VoxelSize voxel, Consumer<float[]> edit) {
        Volume p = GaussianPsf.sampled(0.15, 0.35, voxel, w, h, d);
        float[] copy = p.data().clone();
        edit.accept(copy);
        return p.withData(copy);
    }

    private static Volume constant(int w, int h, int d, float value) {
        Volume v = Volume.zeros(w, h, d, VOXEL);
        java.util.Arrays.fill(v.data(), value);
        return v;
    }

    private static Volume noisy(int w, int h, int d, float mean) {
        Volume v = Volume.zeros(w, h, d, VOXEL);
        SplittableRandom r = new SplittableRandom(3);
        for (int i = 0; i < v.size(); i++) {
            v.data()[i] = (float) Math.rint(mean + Math.sqrt(mean) * r.nextGaussian());
        }
        return v;
    }

    private static String out(String name) {
        return FILES.path(name).toString();
    }

    /** A deconvolve row: 4 fixed iterations on the good stack; the extra options replace or add to those. */
    private static BadInputTable.Case row(String name, int exit, String fragment, String... extra) {
        return BadInputTable.cli(name, exit, fragment, args(name, extra));
    }

    /** A deconvolve row run while another run holds the claim on {@code busy} (volume.OutputClaim). */
    private static BadInputTable.Case rowWhile(String name, Path busy, String fragment, String... extra) {
        return BadInputTable.cliWhile(name, 2, fragment, () -> OutputClaim.take("--output", OutputPaths.real(busy)),
                args(name, extra));
    }

    private static String[] args(String name, String... extra) {
        Map<String, String> o = new LinkedHashMap<>();
        o.put("--input", input("cells.tif", GOOD));
        o.put("--psf", input("psf.tif", psfVolume()));
        o.put("--output", out(name.replaceAll("[^A-Za-z0-9]+", "-") + ".tif"));
        o.put("--iterations", "4");
        o.put("--stop", "fixed");
        o.put("--offset", "100");
        for (int i = 0; i < extra.length; i++) {
            boolean flag = i + 1 == extra.length || extra[i + 1].startsWith("--");
            o.put(extra[i], flag ? null : extra[++i]);
        }
        List<String> a = new ArrayList<>(List.of("deconvolve"));
        o.forEach((k, v) -> {
            a.add(k);
            if (v != null) {
                a.add(v);
            }
        });
        return a.toArray(String[]::new);
    }

    private static String[] concatenate(String[] a, String... b) {
        String[] c = java.util.Arrays.copyOf(a, a.length + b.length);
        System.arraycopy(b, 0, c, a.length, b.length);
        return c;
    }

    static Stream<BadInputTable.Case> rows() {
        Volume good = GOOD;
        List<BadInputTable.Case> t = new ArrayList<>();
        // iterations and regularization (op.Limits, Param ranges)
        t.add(row("iterations 0", 2, "iterations = 0 is out of range; allowed 1 to 10000", "--iterations", "0"));
        t.add(row("iterations negative", 2, "iterations = -3 is out of range; allowed 1 to 10000", "--iterations", "-3"));
        t.add(row("iterations above the cap", 2, "iterations = 10001 is out of range; allowed 1 to 10000",
                "--iterations", "10001"));
        t.add(row("regularization negative", 2, "regularization = '-0.1' is not allowed; give a number (0 or more) or"
                + " auto", "--method", "richardson-lucy-tv", "--regularization", "-0.1"));
        // automatic camera values: a number or auto; calibration frames of the image's plane size
        t.add(row("gain neither a number nor auto", 2, "gain = 'high' is not allowed; give a positive number of ADU per"
                + " photo-electron or auto", "--gain", "high"));
        t.add(row("gain 0", 2, "gain = '0' is not allowed; give a positive number", "--gain", "0"));
        t.add(row("read noise negative", 2, "read-noise = '-1' is not allowed; give a number of ADU (0 or more) or auto",
                "--read-noise", "-1"));
        t.add(row("dark frames of another size", 2, "dark: frames of 16x16 pixels do not match the image's 32x32",
                "--dark", input("dark-small.tif", Volume.zeros(16, 16, 4, VOXEL))));
        t.add(row("dark frames without noise", 2, "dark: the dark frames show no noise at all",
                "--dark", input("dark-flat.tif", constant(32, 32, 4, 100))));
        t.add(row("flat frames at one level without the read noise", 2, "flat: the flat frames hold one light level only",
                "--flat", input("flat-one.tif", noisy(32, 32, 3, 500))));
        t.add(row("dark and flat frames beside given camera values: not used, with a note", 0, "dark, flat: not used",
                "--gain", "1", "--read-noise", "2", "--dark", input("dark-small2.tif", constant(32, 32, 4, 100))));
        t.add(row("regularization 0 for wiener", 2, "regularization = 0.0 is not allowed for wiener; give a positive number",
                "--method", "wiener", "--regularization", "0"));
        // depth-variant deconvolution (Gibson-Lanni PSFs modelled at several depths)
        String[] dv = {"--depth-variant", "on", "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.518"};
        t.add(row("depth-variant without sample-index", 2, "sample-index is required with depth-variant on", dv));
        t.add(row("depth-variant with wiener", 2, "depth-variant on works with method richardson-lucy only",
                concatenate(dv, "--sample-index", "1.33", "--method", "wiener")));
        t.add(row("depth-variant with more strata than planes", 2, "strata = 20 is not allowed for a stack of 12 planes",
                concatenate(dv, "--sample-index", "1.33", "--strata", "20")));
        t.add(row("depth-variant with replicas", 2, "uncertainty = replicas needs one PSF; give uncertainty none with depth-variant on",
                concatenate(dv, "--sample-index", "1.33", "--replicas", "2")));
        t.add(row("depth-variant: a given PSF is not used", 0, "is not used: depth-variant on models the PSFs from the optics",
                concatenate(dv, "--sample-index", "1.33", "--strata", "2")));
        t.add(BadInputTable.cli("no PSF and depth-variant off", 2, "image 'psf' is required for deconvolve: give the PSF, "
                + "or depth-variant on", "deconvolve", "--input", input("cells.tif", GOOD), "--output", out("no-psf.tif")));
        // the PSF (psf.PsfChecks)
        t.add(row("PSF all zeros", 2, "psf has no positive value",
                "--psf", input("psf-zero.tif", psf(9, 9, 7, VOXEL, d -> java.util.Arrays.fill(d, 0)))));
        t.add(row("PSF negative", 2, "psf has 566 negative values totalling",
                "--psf", input("psf-negative.tif", psf(9, 9, 7, VOXEL, d -> {
                    for (int i = 0; i < d.length; i++) {
                        d[i] = i == d.length / 2 ? d[i] : -d[i] - 1e-3f;
                    }
                }))));
        t.add(row("PSF small negative values: set to 0", 0, "psf: 1 small negative values set to 0",
                "--psf", input("psf-small-negative.tif", psf(9, 9, 7, VOXEL, d -> d[0] = -1e-6f))));
        t.add(row("PSF NaN", 2, "psf has 1 NaN or infinite values",
                "--psf", input("psf-nan.tif", psf(9, 9, 7, VOXEL, d -> d[5] = Float.NaN))));
        t.add(row("PSF even-sized", 2, "psf is 8x9x7; allowed: odd sizes only",
                "--psf", input("psf-even.tif", psf(8, 9, 7, VOXEL, d -> { }))));
        t.add(row("PSF off-centre", 2, "psf has its peak at voxel (0, 0, 0) but its centre voxel is (4, 4, 3)",
                "--psf", input("psf-off.tif", psf(9, 9, 7, VOXEL, d -> d[0] = 1))));
        t.add(row("PSF larger than the image, periodic boundary", 2, "psf is 33x9x7 at the image's voxel size but the"
                + " image is only 32x32x12; allowed: at most the image size in every direction (crop the PSF, or use the"
                + " extended boundary)", "--boundary", "periodic", "--psf", input("psf-large.tif", psf(33, 9, 7, VOXEL, d -> { }))));
        t.add(row("PSF larger than the image, extended boundary: used whole, with a note", 0,
                "psf: 33x9x7 is larger than the image 32x32x12; used whole",
                "--psf", input("psf-large.tif", psf(33, 9, 7, VOXEL, d -> { }))));
        t.add(row("PSF much larger than the image, extended boundary: cropped where it is faint, with a note", 0,
                "psf: 41x9x7 is larger than the image 32x32x12; cropped to 33x9x7, which keeps all but",
                "--psf", input("psf-larger.tif", psf(41, 9, 7, VOXEL, d -> { }))));
        t.add(row("PSF with another voxel size: resampled with a note", 0, "psf: voxel size",
                "--psf", input("psf-fine.tif", psf(17, 17, 13, new VoxelSize(0.05, 0.05, 0.15), d -> { }))));
        t.add(row("2D PSF for a 3D stack", 2, "psf is 2D (9x9x1) but the image is a 3D stack (32x32x12)",
                "--psf", input("psf-2d.tif", psf(9, 9, 1, VOXEL, d -> { }))));
        t.add(row("3D PSF for a 2D image", 2, "psf is 3D (9x9x7) but the image is 2D (32x32x1)",
                "--input", input("cells-2d.tif", Volume.zeros(32, 32, 1, VOXEL).withData(
                        java.util.Arrays.copyOf(good.data(), 32 * 32)))));
        // the mask (op.MaskChecks)
        t.add(row("mask of the wrong size", 2, "mask is 8x8x1 but the image is 32x32x12; allowed: the same size, or 32x32x1",
                "--mask", input("mask-small.tif", Volume.zeros(8, 8, 1, VOXEL))));
        t.add(row("empty mask: nothing excluded", 0, "mask marks no pixel (all 0); nothing is excluded",
                "--mask", input("mask-empty.tif", Volume.zeros(32, 32, 1, VOXEL))));
        Volume all = Volume.zeros(32, 32, 1, VOXEL);
        java.util.Arrays.fill(all.data(), 255);
        t.add(row("mask covering everything", 2, "mask marks all 12288 pixels as untrusted",
                "--mask", input("mask-all.tif", all)));
        // the pixels (op.InputChecks)
        float[] nan = good.data().clone();
        nan[100] = Float.NaN;
        nan[2000] = Float.POSITIVE_INFINITY;
        t.add(row("NaN and infinite pixels: masked with a warning", 0,
                "input: 2 of 12288 pixels are NaN or infinite; they are treated as untrusted",
                "--input", input("cells-nan.tif", good.withData(nan))));
        // camera settings
        t.add(row("background negative", 2, "background = '-5' is not allowed; give a number of ADU (0 or more) or auto",
                "--background", "-5"));
        t.add(row("background not a number", 2, "background = 'dark' is not allowed", "--background", "dark"));
        // uncertainty (solve.UncertaintyStep, solve.PosteriorSampler)
        t.add(row("interval output without sampling", 2, "lower-output is not made with uncertainty = none; give "
                + "uncertainty sampling", "--lower-output", out("lower.tif")));
        t.add(row("replica bias output with sampling", 2, "bias-output is not made with uncertainty = sampling; give "
                + "uncertainty replicas", "--uncertainty", "sampling", "--bias-output", out("bias.tif")));
        t.add(row("too few samples for the chains", 2, "samples = 5 is not allowed with 4 chains", "--uncertainty",
                "sampling", "--samples", "5", "--chains", "4"));
        t.add(row("credible level out of range", 2, "level", "--uncertainty", "sampling", "--level", "1.5"));
        t.add(row("gaussian sampling without read noise", 2, "read-noise = 0.0 is not allowed with likelihood gaussian "
                + "and sampling", "--uncertainty", "sampling", "--likelihood", "gaussian", "--read-noise", "0"));
        // optics for the sampling check
        t.add(row("NA above the immersion index", 2, "na = 1.4 must be smaller than immersion-index = 1.33",
                "--na", "1.4", "--wavelength", "520", "--immersion-index", "1.33"));
        t.add(row("undersampled stack: a warning", 0, "the z step 0.3 um is larger than the Nyquist limit",
                "--na", "1.4", "--wavelength", "520", "--immersion-index", "1.518"));
        t.add(row("optics given in part: sampling not checked", 0, "sampling not checked: give na, wavelength and"
                + " immersion-index together", "--na", "1.4"));
        // files
        t.add(row("output equal to input", 2, "is the same file as --input; the input is never overwritten",
                "--output", input("cells.tif", good), "--overwrite"));
        // the run's own residuals (solve.RunResiduals)
        t.add(row("residuals with likelihood gaussian and no read noise", 2, "read-noise = 0.0 is not allowed with"
                + " likelihood gaussian and residuals", "--method", "total-variation", "--likelihood", "gaussian",
                "--read-noise", "0", "--residuals", out("own-residuals.tif")));
        t.add(row("residuals with NaN pixels: left out, residual 0", 0, "residuals of the run's own prediction",
                "--input", input("cells-nan.tif", good.withData(nan)), "--residuals",
                out("own-residuals-nan.tif")));
        t.add(row("residuals with depth-variant", 2, "residuals is not made with depth-variant on", dv[0], dv[1], dv[2],
                dv[3], dv[4], dv[5], dv[6], dv[7], "--sample-index", "1.33", "--residuals", out("own-dv.tif")));
        t.add(row("residuals with sampling", 2, "residuals is not made with uncertainty = sampling", "--uncertainty",
                "sampling", "--residuals-summary", out("own-sampling.png")));
        t.add(row("residuals-summary named like the output", 2, "--residuals-summary and --output name the same file",
                "--residuals-summary", out("residuals-summary-named-like-the-output.tif")));
        t.add(memoryRow());
        // blocks (blocks.BlockSettings, solve.DeconvolveBlocks)
        t.add(row("block-size of the wrong form", 2, "block-size = '16x16' has the wrong form; give WxHxD, e.g. 65x65x41,"
                + " or auto", "--block-size", "16x16"));
        t.add(row("block-size with a 0", 2, "block-size = '0x16x12': each size must be from 1 to 100000, or auto",
                "--block-size", "0x16x12"));
        t.add(row("memory without a unit", 2, "memory = '700' is not a size; give a number with k, m, g or t, e.g. 700m"
                + " or 4g", "--memory", "700"));
        t.add(row("wiener in blocks", 2, "method = wiener is one filter over the whole stack", "--method", "wiener",
                "--block-size", "16x16x12"));
        t.add(row("noise replicas in blocks", 2, "replicas: noise replicas need the whole stack in memory", "--replicas",
                "2", "--block-size", "16x16x12"));
        t.add(row("posterior sampling in blocks", 2, "uncertainty = sampling needs the whole stack in memory and cannot"
                + " run in blocks", "--uncertainty", "sampling", "--block-size", "16x16x12"));
        t.add(row("depth-variant in blocks", 2, "depth-variant = on models the PSF over the whole depth and cannot run in"
                + " blocks", concatenate(dv, "--sample-index", "1.33", "--block-size", "16x16x12")));
        t.add(row("the run's own residuals in blocks", 2, "residuals and residuals-summary compare the whole stack",
                "--residuals", out("own-residuals-blocks.tif"), "--block-size", "16x16x12"));
        t.add(row("dark frames in blocks", 2, "dark: calibration frames are not used in blocks", "--dark",
                input("dark-blocks.tif", constant(32, 32, 4, 100)), "--block-size", "16x16x12"));
        t.add(row("blocks in an explicit size run", 0, "global settings for 4 blocks (2x2x1)", "--block-size", "16x16x12",
                "--iterations", "3", "--stop", "fixed"));
        // a streamed output is claimed by its sink, the record beside it by the block path (blocks.TiffStackSink,
        // blocks.PlaneFolderSink, cli.StreamingRun): a second run is refused before any work
        Path busy = FILES.path("busy-blocks.tif");
        t.add(rowWhile("two runs writing one streamed output at once", busy, "--output: another run is writing "
                + OutputPaths.real(busy), "--block-size", "16x16x12", "--output", busy.toString(), "--overwrite"));
        Path busyPlanes = FILES.path("busy-planes");
        t.add(rowWhile("two runs writing one folder of planes at once", busyPlanes, "--output: another run is writing "
                + OutputPaths.real(busyPlanes), "--block-size", "16x16x12", "--output", busyPlanes + "/"));
        Path busyRecord = FILES.path("busy-blocks.json");
        t.add(rowWhile("two runs writing one record of a block run at once", busyRecord, "--record: another run is"
                + " writing " + OutputPaths.real(busyRecord), "--block-size", "16x16x12", "--record",
                busyRecord.toString()));
        trustRows(t, good);
        return t.stream();
    }

    /** Odd data: very bright counts, the offset above the data, missing or odd calibration, hyperstacks. */
    private static void trustRows(List<BadInputTable.Case> t, Volume good) {
        // very bright beads: the ratio of the Richardson-Lucy update once blew up to NaN with exit code 0
        Volume[] bright = org.stackwright.testing.IndependentStacks.generate(new org.stackwright.testing.IndependentStacks
                .Spec(77, 48, 40, 16, 5e4, true, 0, 100, 1, 2, 1.2, 1.5, 13, 9));
        Volume[] brighter = org.stackwright.testing.IndependentStacks.generate(new org.stackwright.testing.IndependentStacks
                .Spec(78, 48, 40, 16, 1e6, true, 0, 100, 1, 2, 1.2, 1.5, 13, 9));
        String brightPsf = input("bright-psf.tif", bright[1]);
        for (String method : List.of("richardson-lucy", "richardson-lucy-tv", "total-variation")) {
            t.add(row("very bright data (5e4 photons per voxel), " + method + ": finite result", 0, "",
                    "--input", input("bright.tif", bright[0]), "--psf", brightPsf, "--method", method,
                    "--iterations", "50", "--stop", "noise", "--read-noise", "2"));
        }
        t.add(row("very bright data (1e6 photons per voxel): finite result", 0, "",
                "--input", input("brighter.tif", brighter[0]), "--psf", brightPsf, "--iterations", "50",
                "--stop", "noise", "--read-noise", "2"));
        // the offset against the data (op.InputChecks.checkOffset)
        t.add(row("offset above most of the data", 2, "offset = 150 is above most of the data",
                "--offset", "150"));
        t.add(row("offset above some of the data: a warning", 0, "lie below the offset 112 ADU",
                "--offset", "112"));
        short[] negative = new short[32 * 32];
        for (int i = 0; i < negative.length; i++) {
            negative[i] = (short) (-300 + (i * 37) % 100);
        }
        t.add(row("signed 16-bit TIFF read with its negative values", 2, "offset = 0 is above most of the data",
                "--input", inputBytes("signed.tif", p -> {
                    try {
                        org.stackwright.testing.TinyTiff.writeInt16(p, 32, 32, negative);
                    } catch (java.io.IOException e) {
                        throw new java.io.UncheckedIOException(e);
                    }
                }), "--psf", input("psf-2d-for-2d.tif", psf(9, 9, 1, VOXEL, d -> { })), "--offset", "0"));
        // calibration
        ij.ImagePlus plain = org.stackwright.volume.ImagePlusAdapter.toImagePlus(good, "plain");
        plain.setCalibration(new ij.measure.Calibration());
        t.add(row("input without spatial calibration: a warning, the PSF's voxel size", 0,
                "input: 'uncalibrated' has no spatial calibration (unit 'pixel'), so its voxel size is unknown; taken to"
                        + " have the PSF's voxel size", "--input", inputImage("uncalibrated.tif", plain)));
        ij.ImagePlus inches = org.stackwright.volume.ImagePlusAdapter.toImagePlus(good, "inches");
        ij.measure.Calibration cal = inches.getCalibration().copy();
        cal.setUnit("inch");
        cal.pixelWidth = 0.1 / 25400;
        cal.pixelHeight = 0.1 / 25400;
        cal.pixelDepth = 0.3 / 25400;
        inches.setCalibration(cal);
        t.add(row("input calibrated in inches: converted, with a warning", 0, "is calibrated in inches",
                "--input", inputImage("inches.tif", inches)));
        t.add(row("PSF that resamples to one plane", 2, "has a single plane",
                "--psf", input("psf-thin.tif", psf(9, 9, 3, new VoxelSize(0.1, 0.1, 0.05), d -> { }))));
        // hyperstacks on the command line (cli.PerChannel through imagej.ChannelRunner)
        ij.ImagePlus h = ij.IJ.createImage("h", "32-bit ramp", 32, 32, 2, 12, 2);
        org.stackwright.volume.ImagePlusAdapter.setCalibration(h, VOXEL);
        String hyper = inputImage("hyper.tif", h);
        t.add(row("hyperstack: each channel and time point in turn, values per channel", 0, "channel 2, time 2: ",
                "--input", hyper, "--offset", "0", "--na", "1.2,1.2", "--wavelength", "520,610",
                "--immersion-index", "1.33"));
        t.add(row("per-channel list of the wrong length", 2, "offset = '0,0,0' gives 3 values; give one value, or one"
                + " per channel (2)", "--input", hyper, "--offset", "0,0,0"));
    }

    /**
     * A stack larger than the memory a run may use ({@link MemoryCheck#LIMIT_PROPERTY} lowers it to 2 MB, below the
     * estimate of this 64x64x16 run, about 5 MB) no longer fails: it runs in the blocks of least work that fit
     * (blocks.BlockSizing: 8 blocks; the earlier rule of the largest cores made 60).
     */
    private static BadInputTable.Case memoryRow() {
        BadInputTable.Case inner = row("stack larger than the memory: runs in blocks", 0,
                "global settings for 8 blocks (4x2x1)", "--input", input("cells-64.tif", cells(64, 64, 16, 6)));
        return new BadInputTable.Case(inner.name(), () -> {
            System.setProperty(MemoryCheck.LIMIT_PROPERTY, "2");
            try {
                return inner.action().get();
            } finally {
                System.clearProperty(MemoryCheck.LIMIT_PROPERTY);
            }
        }, inner.exit(), inner.fragment());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rows")
    void badInput(BadInputTable.Case c) {
        BadInputTable.Outcome o = c.action().get();
        assertEquals(c.exit(), o.exit(), c.name() + ": exit code; messages:\n" + o.messages());
        assertTrue(o.messages().contains(c.fragment()), c.name() + ": message should contain\n  " + c.fragment()
                + "\nbut was\n  " + o.messages());
        assertFalse(o.messages().contains("Exception") || o.messages().contains("\tat "),
                c.name() + ": an exception reached the user: " + o.messages());
    }

    /** Reports, to a test, the highest iteration the command line's progress lines have named so far. */
    private static final class IterationWatch extends OutputStream {
        private static final Pattern ITERATION = Pattern.compile("iteration (\\d+) of");
        private final StringBuilder text = new StringBuilder();
        private final AtomicInteger last = new AtomicInteger();

        @Override
        public synchronized void write(int b) {
            text.append((char) b);
            if (b == '\n') {
                Matcher m = ITERATION.matcher(text);
                while (m.find()) {
                    last.set(Math.max(last.get(), Integer.parseInt(m.group(1))));
                }
            }
        }

        synchronized String text() {
            return text.toString();
        }
    }

    @Test
    void cancelAtARandomIterationLeavesNoFile() throws Exception {
        String in = input("cancel-cells.tif", cells(48, 48, 16, 7));
        SplittableRandom r = new SplittableRandom(12);
        for (int trial = 0; trial < 3; trial++) {
            Path out = FILES.path("cancelled-" + trial + ".tif");
            Path record = FILES.path("cancelled-" + trial + ".json");
            IterationWatch watch = new IterationWatch();
            AtomicInteger code = new AtomicInteger(-1);
            Thread t = new Thread(() -> code.set(Main.run(new String[] {"deconvolve", "--input", in, "--psf",
                input("psf.tif", psfVolume()), "--output", out.toString(), "--record", record.toString(),
                "--iterations", "5000", "--stop", "fixed", "--offset", "100", "--acceleration", "off",
                "--threads", "2"}, new PrintStream(new ByteArrayOutputStream()),
                    new PrintStream(watch, true, StandardCharsets.UTF_8))));
            t.start();
            long until = System.nanoTime() + 60_000_000_000L;
            while (watch.last.get() < 1 && t.isAlive() && System.nanoTime() < until) {
                Thread.sleep(2);
            }
            Thread.sleep(r.nextInt(500));
            int at = watch.last.get();
            t.interrupt();
            t.join(30_000);
            assertFalse(t.isAlive(), "the run did not stop");
            assertTrue(at >= 1 && at < 5000, "the cancel should come mid-run, came after iteration " + at);
            assertEquals(Main.FAILED, code.get(), watch.text());
            assertTrue(watch.text().contains("cancelled; no output written"), watch.text());
            assertFalse(Files.exists(out), "output written after cancel at iteration " + at);
            assertFalse(Files.exists(record), "record written after cancel at iteration " + at);
            assertEquals(List.of(), Fixtures.temporaryFiles(FILES.dir));
        }
    }

    /** The determinism rule: fixed-block reductions make 1 and 2 threads give the same bytes, for every method. */
    @Test
    void oneAndTwoThreadsWriteBitIdenticalFiles() throws Exception {
        String in = input("cells.tif", GOOD);
        String psf = input("psf.tif", psfVolume());
        for (String method : List.of("richardson-lucy", "richardson-lucy-tv", "total-variation", "wiener")) {
            byte[][] files = new byte[2][];
            for (int threads = 1; threads <= 2; threads++) {
                Path out = FILES.path("threads-" + method + "-" + threads + ".tif");
                ByteArrayOutputStream err = new ByteArrayOutputStream();
                int code = Main.run(new String[] {"deconvolve", "--input", in, "--psf", psf, "--output", out.toString(),
                    "--method", method, "--iterations", "6", "--stop", "fixed", "--offset", "100", "--threads",
                    Integer.toString(threads)}, new PrintStream(new ByteArrayOutputStream()),
                        new PrintStream(err, true, StandardCharsets.UTF_8));
                assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
                files[threads - 1] = Files.readAllBytes(out);
            }
            assertArrayEquals(files[0], files[1], method + ": 1 and 2 threads wrote different files");
        }
    }

    @AfterAll
    static void nothingChangedNothingLeft() {
        try (Fixtures x = FILES) {
            Map<Path, String> changed = new LinkedHashMap<>();
            HASHES.forEach((p, h) -> {
                String now = Files.exists(p) ? Fixtures.sha256(p) : "missing";
                if (!now.equals(h)) {
                    changed.put(p, h + " -> " + now);
                }
            });
            assertTrue(changed.isEmpty(), "inputs modified: " + changed);
            assertTrue(Fixtures.temporaryFiles(x.dir).isEmpty(), "temporary files left: " + Fixtures.temporaryFiles(x.dir));
        }
    }
}
