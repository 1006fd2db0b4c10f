package org.stackwright.cli;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

import ij.IJ;

import org.stackwright.op.InputChecks;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.RunContext;
import org.stackwright.op.RunFailedException;
import org.stackwright.op.Values;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The table of bad inputs: one row per case, with what the user does (command-line arguments or a library call)
 * and what must happen (exit code and a fragment of the message). Exit codes are the command line's: 2 = refused
 * as bad input (a library call throws IllegalArgumentException), 1 = failed, 0 = done (for documented safe
 * behaviours the fragment is then the warning); a library call that fails with {@link RunFailedException} or an
 * I/O error counts as 1.
 *
 * <p>To add rows for an operation: append {@code cli(...)} rows with its arguments (files from {@link #FILES}) or
 * {@code lib(...)} rows calling its checks, in {@link #rows()}.
 */
final class BadInputTable {

    /** What happened: exit code and every message (stderr, or the exception message and warnings). */
    record Outcome(int exit, String messages) {
    }

    /** One row. */
    record Case(String name, java.util.function.Supplier<Outcome> action, int exit, String fragment) {
        @Override
        public String toString() {
            return name;
        }
    }

    static final Fixtures FILES = new Fixtures();

    private BadInputTable() {
    }

    static Case cli(String name, int exit, String fragment, String... args) {
        return new Case(name, () -> capture(err -> Main.run(args, new PrintStream(new ByteArrayOutputStream()), err)),
                exit, fragment);
    }

    static Case op(String name, Operation op, int exit, String fragment, String... args) {
        return new Case(name, () -> capture(err -> OperationRunner.run(op, args, new PrintStream(new ByteArrayOutputStream()), err)),
                exit, fragment);
    }

    static Case lib(String name, int exit, String fragment, Consumer<RunContext> call) {
        return new Case(name, () -> {
            RunContext ctx = RunContext.quiet(1);
            try {
                call.accept(ctx);
                return new Outcome(Main.OK, String.join("\n", ctx.warnings()));
            } catch (IllegalArgumentException e) {
                return new Outcome(Main.BAD_INPUT, e.getMessage());
            } catch (RunFailedException | java.io.UncheckedIOException e) {
                return new Outcome(Main.FAILED, e.getMessage());
            }
        }, exit, fragment);
    }

    /**
     * A command-line row run while something is held (an output claim of another run, say), released afterwards.
     */
    static Case cliWhile(String name, int exit, String fragment, java.util.function.Supplier<AutoCloseable> hold,
            String... args) {
        return new Case(name, () -> {
            try (AutoCloseable held = hold.get()) {
                return capture(err -> Main.run(args, new PrintStream(new ByteArrayOutputStream()), err));
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        }, exit, fragment);
    }

    private interface Door {
        int run(PrintStream err);
    }

    private static Outcome capture(Door door) {
        ByteArrayOutputStream buf = new ByteArrayOutputStream();
        int code;
        try (PrintStream err = new PrintStream(buf, true, StandardCharsets.UTF_8)) {
            code = door.run(err);
        }
        return new Outcome(code, buf.toString(StandardCharsets.UTF_8));
    }

    private static String f(String name) {
        return FILES.path(name).toString();
    }

    private static Volume vol(int w, int h, int d, float... values) {
        float[] px = new float[w * h * d];
        for (int i = 0; i < px.length; i++) {
            px[i] = values.length == 0 ? 1 + (i % 7) : values[i % values.length];
        }
        return new Volume(w, h, d, px, new VoxelSize(0.1, 0.1, 0.3));
    }

    /** A centred 5x5x5 PSF with a peak at (2,2,2), optionally changed by {@code edit}. */
    private static Volume psf(int w, int h, int d, Consumer<float[]> edit) {
        Volume p = vol(w, h, d, 1f);
        p.set(w / 2, h / 2, d / 2, 50f);
        edit.accept(p.data());
        return p;
    }

    static List<Case> rows() {
        Fixtures x = FILES;
        x.tiff("good.tif", 8, 8, 3);
        x.tiff("exists.tif", 4, 4, 1);
        x.tiff("nan.tif", 4, 4, 1, 1, Float.NaN, 3, Float.POSITIVE_INFINITY);
        x.tiff("allnan.tif", 4, 4, 1, Float.NaN);
        x.tiff("negative.tif", 4, 4, 1, 5, -2, 7);
        x.tiff("constant.tif", 4, 4, 2, 7);
        x.hyperstack("channels2.tif", 2, 3, 1);
        x.text("notes.tif", "this is a text file, not an image\n");
        x.text("empty.tif", "");
        x.truncated("truncated.tif", 0.6);
        x.truncated("truncated-plane.tif", 0.6, 1);
        x.damagedHeader("damaged.tif");
        x.rgb("colour.tif");
        x.float64("double.tif", 1.5, -2.25, 1e-3, 12345.678);
        x.folder("a-folder");
        x.folder("no-tiffs");
        x.text("no-tiffs/readme.txt", "nothing here");
        String out = f("out.tif");
        ScaleOperation scale = new ScaleOperation();
        SlowOperation slow = new SlowOperation();
        List<Case> t = new ArrayList<>();

        // --- command line, simulate: settings ---
        t.add(cli("unknown option", 2, "Unknown options: '--bogus'", "simulate", "--bogus", "1", "--output", out));
        t.add(cli("NA above immersion index", 2, "na = 1.4 must be smaller than immersion-index = 1.33",
                "simulate", "--na", "1.4", "--immersion-index", "1.33", "--output", out));
        t.add(cli("NA equal to immersion index", 2, "na = 1.33 must be smaller than immersion-index = 1.33",
                "simulate", "--na", "1.33", "--output", out));
        t.add(cli("wavelength 0", 2, "wavelength = 0 is out of range; allowed 200 to 2000 nm",
                "simulate", "--wavelength", "0", "--output", out));
        t.add(cli("wavelength NaN", 2, "wavelength = NaN is not a finite number", "simulate", "--wavelength", "NaN", "--output", out));
        t.add(cli("negative pixel size", 2, "pixel = -0.1 is out of range", "simulate", "--pixel", "-0.1", "--output", out));
        t.add(cli("size with a zero", 2, "size = '0x5x5': each size must be from 1 to 100000", "simulate", "--size", "0x5x5", "--output", out));
        t.add(cli("size not WxHxD", 2, "size = 'abc' has the wrong form; give WxHxD", "simulate", "--size", "abc", "--output", out));
        t.add(cli("allocation larger than the heap", 2, "MB are free for Java",
                "simulate", "--size", "4000x4000x400", "--output", out));
        t.add(cli("seed not a whole number", 2, "seed = '1.5' is not a whole number", "simulate", "--seed", "1.5", "--output", out));
        t.add(cli("specimen not a choice", 2, "specimen = 'cats' is not allowed; choose one of cells, beads",
                "simulate", "--specimen", "cats", "--output", out));
        t.add(cli("threads 0", 2, "--threads = '0' is not allowed; give a whole number from 1 to 1024",
                "simulate", "--threads", "0", "--output", out));
        t.add(cli("output required", 2, "--output is required", "simulate"));
        // --- command line: output paths ---
        t.add(cli("output in a missing folder", 2, "--output: output folder " + f("missing") + " does not exist",
                "simulate", "--output", f("missing/out.tif")));
        t.add(cli("output folder read-only", 2, "is not writable", "simulate", "--output", f("read-only/out.tif")));
        t.add(cli("output exists, no --overwrite", 2, "exists; choose another name or allow overwriting (--overwrite)",
                "simulate", "--size", "8x8x2", "--output", f("exists.tif")));
        t.add(cli("output is a folder", 2, "is a folder; give a file name", "simulate", "--output", f("a-folder")));
        t.add(cli("two outputs, one file", 2, "--truth and --output name the same file",
                "simulate", "--output", out, "--truth", out));
        t.add(op("output equal to input", scale, 2, "is the same file as --input; the input is never overwritten",
                "--input", f("good.tif"), "--output", f("good.tif"), "--overwrite"));
        // --- command line: input files ---
        t.add(op("input missing", scale, 2, "--input: file " + f("nothing.tif") + " does not exist",
                "--input", f("nothing.tif"), "--output", out));
        t.add(op("input unreadable", scale, 2, "cannot be read (check its permissions)",
                "--input", f("locked.tif"), "--output", out));
        t.add(op("input path with a NUL character", scale, 2, "input contains a NUL character", "--input", "in\0.tif", "--output", out));
        t.add(cli("output path with a NUL character", 2, "output contains a NUL character", "simulate", "--output", "o\0.tif"));
        t.add(op("input not a TIFF", scale, 2, "notes.tif is not a TIFF file", "--input", f("notes.tif"), "--output", out));
        t.add(op("input empty file", scale, 2, "empty.tif is not a TIFF file", "--input", f("empty.tif"), "--output", out));
        t.add(op("input truncated TIFF stack", scale, 2, "truncated.tif is truncated or damaged: image directory 2 would start at byte",
                "--input", f("truncated.tif"), "--output", out));
        t.add(op("input truncated TIFF plane", scale, 2, "truncated-plane.tif is truncated or damaged: its pixel data would end at byte",
                "--input", f("truncated-plane.tif"), "--output", out));
        t.add(op("input TIFF header damaged", scale, 2, "damaged.tif is truncated or damaged: image directory 1 would start at byte",
                "--input", f("damaged.tif"), "--output", out));
        t.add(op("input RGB", scale, 2, "is RGB colour; use a grayscale 8, 16 or 32-bit image",
                "--input", f("colour.tif"), "--output", out));
        t.add(op("input 64-bit float", scale, 2, "double.tif is of a kind that cannot be read (Unsupported BitsPerSample: 64);"
                + " allowed: 8, 16 or 32-bit grayscale", "--input", f("double.tif"), "--output", out));
        t.add(lib("hyperstack channel that does not exist", 2, "channel 3 does not exist: image 'h' has 2 channels",
                c -> ImagePlusAdapter.toVolume(IJ.createImage("h", "8-bit black", 4, 4, 2, 2, 1), 3, 1)));
        t.add(op("factor 1e400", scale, 2, "factor = 1e400 is not a finite number", "--input", f("good.tif"), "--factor", "1e400",
                "--output", out));
        // --- command line: pixel values (documented safe behaviours) ---
        t.add(op("NaN and infinite pixels: masked with a warning", scale, 0,
                "input: 8 of 16 pixels are NaN or infinite; they are treated as untrusted", "--input", f("nan.tif"), "--output", f("nan-out.tif")));
        t.add(op("every pixel NaN", scale, 2, "input: every one of the 16 pixels is NaN or infinite",
                "--input", f("allnan.tif"), "--output", out));
        t.add(op("negative pixels: kept with a warning", scale, 0, "pixels are negative (smallest -2)",
                "--input", f("negative.tif"), "--output", f("negative-out.tif")));
        t.add(op("constant image: a warning", scale, 0, "every finite pixel has the value 7; there is no structure",
                "--input", f("constant.tif"), "--output", f("constant-out.tif")));
        // --- command line: batch ---
        t.add(op("batch folder without TIFFs", scale, 2, "matches no file", "--input", f("no-tiffs"), "--output", f("a-folder")));
        t.add(op("batch output not a folder", scale, 2, "is not a folder; in batch mode", "--input", "glob:" + f("*.tif"), "--output", out));
        t.add(op("batch pattern in a missing folder", scale, 2, "does not exist", "--input", "glob:" + f("missing") + "/*.tif",
                "--output", f("a-folder")));
        // --- iterations (any iterative operation uses Limits.iterations) ---
        t.add(op("iterations 0", slow, 2, "iterations = 0 is out of range; allowed 1 to 10000", "--iterations", "0", "--output", out));
        t.add(op("iterations negative", slow, 2, "iterations = -3 is out of range; allowed 1 to 10000", "--iterations", "-3", "--output", out));
        t.add(op("iterations above the maximum", slow, 2, "iterations = 10001 is out of range; allowed 1 to 10000",
                "--iterations", "10001", "--output", out));
        // --- library: images ---
        t.add(lib("1-pixel image where 3x3 is needed", 2, "input: image is 1x1x1 pixels; allowed: at least 3x3x1",
                c -> InputChecks.requireMinSize("input", vol(1, 1, 1), 3, 3, 1)));
        t.add(lib("empty image (size 0)", 2, "image size must be at least 1x1x1 (given 0x5x5)", c -> Volume.zeros(0, 5, 5, VoxelSize.UNIT)));
        t.add(lib("image too large for one array", 2, "one volume can hold at most", c -> Volume.checkSize(100_000, 100_000, 1)));
        t.add(lib("time point that does not exist", 2, "time point 5 does not exist: image 'h' has 1 time point (allowed 1 to 1)",
                c -> ImagePlusAdapter.toVolume(IJ.createImage("h", "8-bit black", 4, 4, 2, 2, 1), 1, 5)));
        t.add(lib("memory estimate above the free heap", 2, "needs about 8192 MB of memory but only 1024 MB are free for Java (maximum heap 2048 MB)",
                c -> MemoryCheck.require("test", 8L << 30, 1L << 30, 2L << 30)));
        t.add(lib("unknown setting", 2, "unknown setting 'bogus' for simulate",
                c -> Values.parse("simulate", new org.stackwright.simulate.SimulateOperation().params(), Map.of("bogus", "1"))));
        // --- library: PSF (PsfChecks, for deconvolve and residuals) ---
        Volume img = vol(32, 32, 16);
        t.add(lib("PSF all zeros", 2, "psf has no positive value", c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> java.util.Arrays.fill(d, 0)), img, c)));
        t.add(lib("PSF negative", 2, "psf has 124 negative values totalling", c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> {
            for (int i = 0; i < d.length; i++) {
                d[i] = -d[i];
            }
            d[62] = 500;
        }), img, c)));
        t.add(lib("PSF small negative values: set to 0", 0, "psf: 1 small negative values set to 0",
                c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> d[0] = -0.01f), img, c)));
        t.add(lib("PSF not finite", 2, "psf has 1 NaN or infinite values", c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> d[3] = Float.NaN), img, c)));
        t.add(lib("PSF even-sized", 2, "psf is 6x5x5; allowed: odd sizes only", c -> PsfChecks.prepare("psf", psf(6, 5, 5, d -> { }), img, c)));
        t.add(lib("PSF off-centre", 2, "psf has its peak at voxel (0, 0, 0) but its centre voxel is (2, 2, 2)",
                c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> d[0] = 99), img, c)));
        t.add(lib("PSF larger than the image", 2, "psf is 33x5x5 at the image's voxel size but the image is only 32x32x16",
                c -> PsfChecks.prepare("psf", psf(33, 5, 5, d -> { }), img, c)));
        t.add(lib("PSF with another voxel size: resampled", 0, "resampled from 5x5x5 to 11x11x5",
                c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> { }).withVoxel(new VoxelSize(0.2, 0.2, 0.3)), img, c)));
        t.add(lib("2D PSF for a 3D stack", 2, "psf is 2D (5x5x1) but the image is a 3D stack (32x32x16)",
                c -> PsfChecks.prepare("psf", psf(5, 5, 1, d -> { }), img, c)));
        t.add(lib("3D PSF for a 2D image", 2, "psf is 3D (5x5x5) but the image is 2D (32x32x1)",
                c -> PsfChecks.prepare("psf", psf(5, 5, 5, d -> { }), vol(32, 32, 1), c)));
        // --- library: masks (MaskChecks, for inpaint and masked deconvolution) ---
        t.add(lib("mask of the wrong size", 2, "mask is 8x8x1 but the image is 32x32x16; allowed: the same size, or 32x32x1",
                c -> MaskChecks.check("mask", vol(8, 8, 1, 0, 255), img, c)));
        t.add(lib("empty mask: nothing repaired", 0, "mask marks no pixel (all 0); nothing is excluded or repaired",
                c -> MaskChecks.check("mask", vol(32, 32, 1, 0), img, c)));
        t.add(lib("mask covering everything", 2, "mask marks all 16384 pixels as untrusted",
                c -> MaskChecks.check("mask", vol(32, 32, 1, 255), img, c)));
        TrustRows.add(t, x);
        OperationBadInputRows.add(t, x);
        return t;
    }
}
