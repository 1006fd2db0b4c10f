package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.FolderPlaneSource;
import org.stackwright.blocks.PlaneFolderSink;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The command line's block path: a small --memory makes a stack that would fit run in blocks, read from the file
 * by random access and written block by block; the input file is unchanged; a folder of planes is an input and an
 * output; the result agrees with the whole-stack run.
 */
class StreamingCommandLineTest {

    @TempDir
    Path dir;

    private static final VoxelSize VX = new VoxelSize(0.1, 0.1, 0.25);

    private String[] run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        return new String[] {out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8)};
    }

    /** Smooth blobs on a background (an invented stack). */
    private static Volume stack(int w, int h, int d) {
        float[] v = new float[w * h * d];
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double a = Math.sin(x * 0.21) * Math.cos(y * 0.17) * Math.cos(z * 0.4);
                    v[(z * h + y) * w + x] = (float) (110 + 400 * a * a + ((x * 7 + y * 13 + z * 3) % 5));
                }
            }
        }
        return new Volume(w, h, d, v, VX);
    }

    @Test
    void aSmallMemoryBudgetRunsInBlocksFromAndToDisk() throws Exception {
        Path in = dir.resolve("stack.tif");
        Path psf = dir.resolve("psf.tif");
        TiffFiles.write(stack(80, 72, 14), in, true);
        TiffFiles.write(GaussianPsf.sampled(0.15, 0.3, VX, 9, 9, 7), psf, true);
        byte[] before = Files.readAllBytes(in);
        Path whole = dir.resolve("whole.tif");
        Path blocks = dir.resolve("blocks.tif");
        Path record = dir.resolve("blocks.json");
        String[] common = {"--input", in.toString(), "--psf", psf.toString(), "--iterations", "6", "--stop", "fixed",
            "--offset", "100", "--gain", "1", "--read-noise", "2", "--background", "5", "--acceleration", "off",
            "--threads", "2"};
        run(concat(new String[] {"deconvolve", "--output", whole.toString()}, common));
        String[] o = run(concat(new String[] {"deconvolve", "--output", blocks.toString(), "--memory", "3m", "--record",
            record.toString()}, common));
        assertTrue(o[0].contains(" blocks: 6 iteration(s) each"), o[0]);
        String json = Files.readString(record);
        assertTrue(json.contains("\"blocks\""), json);
        assertArrayEquals(before, Files.readAllBytes(in), "the input file is unchanged");
        ImagePlus a = TiffFiles.open(whole, "whole");
        ImagePlus b = TiffFiles.open(blocks, "blocks");
        assertEquals(14, b.getStackSize());
        assertEquals(0.25, b.getCalibration().pixelDepth, 1e-9);
        double max = 0;
        double diff = 0;
        for (int z = 1; z <= 14; z++) {
            float[] pa = (float[]) a.getStack().getPixels(z);
            float[] pb = (float[]) b.getStack().getPixels(z);
            for (int i = 0; i < pa.length; i++) {
                max = Math.max(max, Math.abs(pa[i]));
                diff = Math.max(diff, Math.abs(pa[i] - pb[i]));
            }
        }
        // Bertero & Boccacci 2005 boundary per block, halo one PSF: see solve.DeconvolveBlocksTest
        assertTrue(diff < 1e-2 * max, "difference " + diff + " of maximum " + max);
        try (var list = Files.list(dir)) {
            assertTrue(list.noneMatch(p -> p.getFileName().toString().startsWith(".")), "no temporary left");
        }
    }

    @Test
    void aFolderOfPlanesInAndOut() throws Exception {
        Path planes = dir.resolve("in-planes");
        Files.createDirectories(planes);
        Volume v = stack(50, 40, 5);
        for (int z = 0; z < 5; z++) {
            float[] p = new float[50 * 40];
            System.arraycopy(v.data(), z * p.length, p, 0, p.length);
            TiffFiles.write(new Volume(50, 40, 1, p, VX), planes.resolve(PlaneFolderSink.planeName(z, 5)), true);
        }
        float[] m = new float[50 * 40];
        m[123] = 255;
        m[1500] = 255;
        Path mask = dir.resolve("mask.tif");
        TiffFiles.write(new Volume(50, 40, 1, m, VX), mask, true);
        Path out = dir.resolve("out-planes");
        run("inpaint", "--input", planes.toString(), "--mask", mask.toString(), "--block-size", "25x40x5", "--output",
                out + "/");
        try (FolderPlaneSource s = FolderPlaneSource.open(out, "out")) {
            assertEquals(5, s.depth());
            Volume r = s.read(new Box(0, 0, 0, 50, 40, 5));
            assertEquals(v.data()[0], r.data()[0]);
            assertTrue(Math.abs(r.data()[123] - v.data()[123]) < 200);
        }
    }

    private static String[] concat(String[] a, String[] b) {
        String[] c = new String[a.length + b.length];
        System.arraycopy(a, 0, c, 0, a.length);
        System.arraycopy(b, 0, c, a.length, b.length);
        return c;
    }
}
