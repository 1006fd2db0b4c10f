package org.stackwright.cli;

import static org.stackwright.cli.BadInputTable.cli;
import static org.stackwright.cli.BadInputTable.lib;
import static org.stackwright.cli.BadInputTable.op;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;

import org.stackwright.repair.TileLevelling;
import org.stackwright.solve.NumericalGuard;
import org.stackwright.solve.Solution;
import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The rows of {@link BadInputTable} for odd data and hostile file systems: links to inputs, folder-like and too
 * long output names, names with pattern characters, two runs writing one file, a full disk, a file appearing
 * during a write, numbers that are not plain decimals, values too large for float transforms, data below the
 * offset, 2D bead images, tiny images, clipping in the simulator and a non-finite solver result.
 */
final class TrustRows {

    private static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.3);

    private TrustRows() {
    }

    private static Path link(Path link, Path target) {
        try {
            Files.deleteIfExists(link);
            return Files.createSymbolicLink(link, target);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A 64x64 plane with four Gaussian beads (sigma 1.5 px) on a background of 100, no noise (the z margin of a
     * stack once rejected every bead of such an image as too close to the edge). */
    private static Volume beads2d() {
        float[] px = new float[64 * 64];
        for (int y = 0; y < 64; y++) {
            for (int x = 0; x < 64; x++) {
                double v = 100;
                for (int by = 16; by < 64; by += 32) {
                    for (int bx = 16; bx < 64; bx += 32) {
                        // peaks of different height: equal noise-free peaks would look like a clipping level
                        double a = 1000 + 3 * bx + by;
                        v += a * Math.exp(-((x - bx) * (x - bx) + (y - by) * (y - by)) / (2 * 1.5 * 1.5));
                    }
                }
                px[y * 64 + x] = (float) v;
            }
        }
        return new Volume(64, 64, 1, px, VOXEL);
    }

    static void add(List<BadInputTable.Case> t, Fixtures x) {
        ScaleOperation scale = new ScaleOperation();
        String good = x.path("good.tif").toString();
        String out = x.path("trust-out.tif").toString();

        // --- paths: links, folders, long names (volume.OutputPaths) ---
        Path toInput = link(x.path("link-to-good.tif"), x.path("good.tif"));
        t.add(op("output reached through a symbolic link to the input", scale, 2,
                "is the same file as --input (it leads to", "--input", good, "--output", toInput.toString(), "--overwrite"));
        Path folder = link(x.path("linked-folder"), x.dir);
        t.add(op("output in a folder linked to the input's folder", scale, 2, "is the same file as --input",
                "--input", good, "--output", folder.resolve("good.tif").toString(), "--overwrite"));
        try {
            Files.deleteIfExists(x.path("hard-good.tif"));
            Files.createLink(x.path("hard-good.tif"), x.path("good.tif"));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        t.add(op("output a hard link of the input", scale, 2, "is the same file as --input",
                "--input", good, "--output", x.path("hard-good.tif").toString(), "--overwrite"));
        t.add(cli("output ending with / names a folder", 2, "names a folder (it ends with /) that does not exist",
                "simulate", "--size", "8x8x2", "--output", x.path("newdir").toString() + "/"));
        t.add(cli("output empty", 2, "--output is empty; give a file name", "simulate", "--size", "8x8x2", "--output", ""));
        Path loop = x.path("loop-a.tif");
        link(x.path("loop-b.tif"), loop);
        link(loop, x.path("loop-b.tif"));
        t.add(cli("output a loop of symbolic links", 2, "is a symbolic link that leads nowhere (a loop of links)",
                "simulate", "--size", "8x8x2", "--output", loop.toString()));
        t.add(cli("comma in a number of an operation without input image", 2, "wavelength = '1,5' is not a number",
                "simulate", "--wavelength", "1,5", "--output", out));
        t.add(cli("output name longer than 255 bytes", 2, "the file name is 260 bytes long; allowed: at most 255 bytes",
                "simulate", "--size", "8x8x2", "--output", x.path("a".repeat(256) + ".tif").toString()));
        t.add(op("output name of 250 bytes: written, temporary name short", scale, 0, "",
                "--input", good, "--output", x.path("b".repeat(246) + ".tif").toString(),
                "--record", x.path("c".repeat(245) + ".json").toString()));

        // --- names with pattern characters are files; patterns only with glob: ---
        x.volume("psf [1].tif", beads2d().withData(Arrays.copyOf(beads2d().data(), 64 * 64)));
        x.volume("psf 1.tif", Volume.zeros(64, 64, 1, VOXEL));
        x.volume("psf {1}.tif", beads2d());
        t.add(cli("input name with [ ] is that file, not a pattern", 0, "",
                "measure-psf", "--input", x.path("psf [1].tif").toString()));
        t.add(cli("input name with { } is that file, not a pattern", 0, "",
                "measure-psf", "--input", x.path("psf {1}.tif").toString()));
        t.add(cli("missing name with pattern characters: a hint", 2, "write it as glob:",
                "measure-psf", "--input", x.path("psf [2].tif").toString()));
        t.add(op("batch by pattern only with glob:", scale, 0, "batch finished: 1 of 1 files done",
                "--input", "glob:" + x.path("goo?.tif"), "--output", x.path("a-folder").toString()));
        t.add(op("batch output folder is the input folder", scale, 2, "is the folder of the inputs",
                "--input", "glob:" + x.path("goo?.tif"), "--output", x.dir.toString()));

        // --- two runs writing one file at once; a full disk; a file appearing meanwhile (volume.OutputClaim,
        //     volume.OutputFiles) ---
        Path busy = x.path("busy.tif");
        t.add(BadInputTable.cliWhile("two runs writing one output at once", 2,
                "--output: another run is writing " + OutputPaths.real(busy),
                () -> OutputClaim.take("--output", OutputPaths.real(busy)),
                "simulate", "--size", "8x8x2", "--output", busy.toString(), "--overwrite"));
        t.add(lib("disk full while writing (a stream that fails like a full disk)", 1, "No space left on device",
                c -> OutputFiles.writeWhole(x.path("full.tif"), false, o -> o.write(new byte[4096]),
                        tmp -> new java.io.FilterOutputStream(OutputFiles.FILE.open(tmp)) {
                            @Override
                            public void write(byte[] b, int off, int len) throws IOException {
                                throw new IOException("No space left on device");
                            }
                        })));
        t.add(lib("a file appears at the output during the write", 1, "appeared while this run was writing it",
                c -> OutputFiles.writeWhole(x.path("appeared.tif"), false, o -> {
                    Files.writeString(x.path("appeared.tif"), "another program's file");
                    o.write(new byte[16]);
                }, OutputFiles.FILE)));

        // --- numbers: plain decimals only, ranges in words ---
        t.add(cli("number with a type suffix (520f)", 2, "wavelength = '520f' is not a number; give a decimal number",
                "simulate", "--wavelength", "520f", "--output", out));
        t.add(cli("hexadecimal floating point number", 2, "pixel = '0x1.04p-3' is not a number",
                "simulate", "--pixel", "0x1.04p-3", "--output", out));
        t.add(cli("data-range 0", 2, "data-range = 0 is out of range; allowed above 0",
                "compare", "--reference", good, "--input", good, "--data-range", "0"));

        // --- values too large for float transforms; a non-finite solver result ---
        String huge = x.volume("huge.tif", new Volume(16, 16, 5, filled(16 * 16 * 5, 10f, 3e38f), VOXEL)).toString();
        String data = x.tiff("trust-data.tif", 16, 16, 5).toString();
        String psf = x.volume("trust-psf.tif", new Volume(5, 5, 3, centre(5, 5, 3), VOXEL)).toString();
        t.add(cli("residuals estimate with a value of 3e38", 2, "estimate: pixel values up to 3.00000e+38 add up to",
                "residuals", "--input", data, "--estimate", huge, "--psf", psf, "--output", out));
        t.add(cli("compare with a value of 3e38", 2, "beyond what 32-bit Fourier transforms can hold",
                "compare", "--reference", data, "--input", huge));
        t.add(lib("sampling result not finite: the run stops", 1, "2 of 3 values of the posterior mean are NaN",
                c -> NumericalGuard.values("sampling", "the posterior mean", new float[] {Float.NaN, 1,
                        Float.POSITIVE_INFINITY}, "40 samples")));
        t.add(lib("solver result not finite: the run stops", 1, "1 of 3 values of the result are NaN or infinite",
                c -> NumericalGuard.estimate("richardson-lucy", new Solution(new float[] {1, Float.NaN, 2}, 4,
                        "maximum", new double[4], new double[4], 0))));

        // --- the camera offset above the data (op.InputChecks.checkOffset), seam levelling ---
        String tiles = x.volume("tiles.tif", new Volume(16, 16, 1, filled(256, 150f, 150f), VOXEL)).toString();
        t.add(cli("seam-mask --level with the offset above the data", 2, "offset = 1000 is above most of the data",
                "seam-mask", "--grid", "2x2", "--tile", "8x8", "--input", tiles, "--level", "--offset", "1000",
                "--output", out));
        float decimalOffset = 1660.23f; // a rounding step below the double 1660.23
        t.add(lib("data exactly at a decimal offset (0 photons) are not below it", 0, "",
                c -> {
                    org.stackwright.op.InputChecks.checkOffset("input", new Volume(16, 16, 1,
                            filled(256, decimalOffset, decimalOffset), VOXEL), 1660.23, 0, c);
                    if (!c.warnings().isEmpty()) {
                        throw new IllegalArgumentException("warned: " + c.warnings());
                    }
                }));
        String flat3d = x.volume("flat-3d.tif", new Volume(16, 16, 5, filled(16 * 16 * 5, 150f, 150f), VOXEL)).toString();
        t.add(cli("psf-refine with the offset above the data", 2, "offset = 1000 is above most of the data",
                "psf-refine", "--input", flat3d, "--size", "9x9x5", "--na", "1.2", "--wavelength", "520",
                "--immersion-index", "1.33", "--offset", "1000", "--output", out));
        t.add(lib("seam levelling with no tile pair above the offset", 2, "no pair of neighbouring tiles has signal",
                c -> TileLevelling.estimate(new Volume(16, 16, 1, filled(256, 150f, 150f), VOXEL),
                        List.of(new int[] {7, 9}), List.of(new int[] {7, 9}), 2, 200)));

        // --- images of odd shapes ---
        String beads = x.volume("beads-2d.tif", beads2d()).toString();
        t.add(cli("psf-from-beads on a 2D bead image", 0, "", "psf-from-beads", "--input", beads, "--size", "9x9x1",
                "--output", x.path("beads-2d-psf.tif").toString()));
        String one = x.volume("one-pixel.tif", new Volume(1, 1, 1, new float[] {5}, VOXEL)).toString();
        t.add(cli("find-defects on a 1x1 image", 2, "input: image is 1x1 pixels; allowed: at least 3x3",
                "find-defects", "--input", one, "--output", out));
        t.add(cli("simulate --bits 16 clips: warned", 0, "were clipped (saturated)", "simulate", "--size", "16x16x4",
                "--brightness", "1000", "--bits", "16", "--output", x.path("clipped.tif").toString()));
    }

    /** n values, all {@code value} except the first, which is {@code first}. */
    private static float[] filled(int n, float value, float first) {
        float[] px = new float[n];
        Arrays.fill(px, value);
        px[0] = first;
        return px;
    }

    /** A w x h x d PSF: 1 everywhere and 50 at the centre voxel. */
    private static float[] centre(int w, int h, int d) {
        float[] px = new float[w * h * d];
        Arrays.fill(px, 1f);
        px[(d / 2 * h + h / 2) * w + w / 2] = 50f;
        return px;
    }
}
