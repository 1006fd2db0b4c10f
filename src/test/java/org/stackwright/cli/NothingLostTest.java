package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.atomic.AtomicInteger;

import ij.ImagePlus;
import ij.VirtualStack;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * Nothing lost, nothing altered: inputs keep their hash, outputs appear complete or not at all (also after a
 * failed write or a cancel), an existing output is replaced only with --overwrite, and batch runs continue past a
 * bad file and name it at the end.
 */
class NothingLostTest {

    private final Fixtures files = new Fixtures();
    private final ByteArrayOutputStream errBuf = new ByteArrayOutputStream();

    @AfterEach
    void clean() {
        files.close();
    }

    private int scale(String... args) {
        errBuf.reset();
        return OperationRunner.run(new ScaleOperation(), args, new PrintStream(new ByteArrayOutputStream()),
                new PrintStream(errBuf, true, StandardCharsets.UTF_8));
    }

    private String err() {
        return errBuf.toString(StandardCharsets.UTF_8);
    }

    @Test
    void inputKeepsItsHashAndOutputIsComplete() {
        Path in = files.tiff("in.tif", 8, 6, 3);
        Path out = files.path("out.tif");
        Path record = files.path("out.json");
        assertEquals(Main.OK, scale("--input", in.toString(), "--factor", "3", "--output", out.toString(),
                "--record", record.toString()), err());
        assertTrue(files.changedInputs().isEmpty(), "input changed: " + files.changedInputs());
        Volume a = TiffFiles.read(in, "in");
        Volume b = TiffFiles.read(out, "out");
        for (int i = 0; i < a.size(); i++) {
            assertEquals(3 * a.data()[i], b.data()[i], 0f, "voxel " + i);
        }
        assertTrue(a.voxel().sameAs(b.voxel()), "calibration kept: " + b.voxel());
        assertTrue(new String(readAll(record), StandardCharsets.UTF_8).contains("\"factor\": \"3\""), "record");
        assertEquals(List.of(), Fixtures.temporaryFiles(files.dir));
    }

    @Test
    void existingOutputIsReplacedOnlyWithOverwrite() {
        Path in = files.tiff("in.tif", 4, 4, 1);
        Path out = files.tiff("out.tif", 4, 4, 1, 42);
        String before = Fixtures.sha256(out);
        assertEquals(Main.BAD_INPUT, scale("--input", in.toString(), "--output", out.toString()));
        assertTrue(err().contains("exists; choose another name or allow overwriting (--overwrite)"), err());
        assertEquals(before, Fixtures.sha256(out), "output replaced without --overwrite");
        assertEquals(Main.OK, scale("--input", in.toString(), "--output", out.toString(), "--overwrite"), err());
        assertNotEquals(before, Fixtures.sha256(out), "--overwrite should replace the file");
        assertEquals(2 * TiffFiles.read(in, "in").data()[0], TiffFiles.read(out, "out").data()[0], 0f);
    }

    /** A stack whose third plane cannot be produced: the write fails half-way, as on a full disk. */
    private static ImagePlus failingStack(int w, int h, int n) {
        VirtualStack st = new VirtualStack(w, h, null, null) {
            @Override
            public ImageProcessor getProcessor(int i) {
                if (i >= 3) {
                    throw new UncheckedIOException(new java.io.IOException("no space left on device (simulated)"));
                }
                return new FloatProcessor(w, h);
            }

            @Override
            public int getSize() {
                return n;
            }

            @Override
            public String getSliceLabel(int i) {
                return null;
            }
        };
        return new ImagePlus("failing", st);
    }

    @Test
    void failedWriteLeavesNeitherPartialNorTemporaryFile() {
        Path out = files.path("never.tif");
        RuntimeException e = assertThrows(RuntimeException.class, () -> TiffFiles.write(failingStack(16, 16, 6), out, false));
        assertTrue(String.valueOf(e.getMessage()).contains("no space left on device (simulated)")
                || String.valueOf(e.getMessage()).contains("could not write"), "the write should fail mid-way: " + e);
        assertFalse(Files.exists(out), "a partial output was left");
        assertEquals(List.of(), Fixtures.temporaryFiles(files.dir));

        Path old = files.tiff("old.tif", 4, 4, 1, 5);
        String before = Fixtures.sha256(old);
        assertThrows(RuntimeException.class, () -> TiffFiles.write(failingStack(16, 16, 6), old, true));
        assertEquals(before, Fixtures.sha256(old), "a failed overwrite damaged the existing file");
        assertEquals(List.of(), Fixtures.temporaryFiles(files.dir));
    }

    @Test
    void cancelAtARandomIterationLeavesNoFile() throws Exception {
        SplittableRandom r = new SplittableRandom(8);
        for (int trial = 0; trial < 3; trial++) {
            Path out = files.path("slow-" + trial + ".tif");
            AtomicInteger code = new AtomicInteger(-1);
            ByteArrayOutputStream buf = new ByteArrayOutputStream();
            Thread t = new Thread(() -> code.set(OperationRunner.run(new SlowOperation(),
                    new String[] {"--iterations", "40", "--delay", "25", "--output", out.toString()},
                    new PrintStream(new ByteArrayOutputStream()), new PrintStream(buf, true, StandardCharsets.UTF_8))));
            t.start();
            Thread.sleep(50 + r.nextInt(600));
            t.interrupt();
            t.join(10_000);
            assertFalse(t.isAlive(), "the run did not stop");
            assertEquals(Main.FAILED, code.get(), buf.toString(StandardCharsets.UTF_8));
            assertTrue(buf.toString(StandardCharsets.UTF_8).contains("cancelled; no output written"));
            assertFalse(Files.exists(out), "output written after cancel");
            assertEquals(List.of(), Fixtures.temporaryFiles(files.dir));
        }
    }

    @Test
    void batchOfFiveWithOneBadFileWritesFourAndNamesTheBadOne() {
        Path in = files.folder("in");
        Path outDir = files.folder("out");
        for (int i = 1; i <= 5; i++) {
            if (i == 3) {
                files.truncated("in/c3.tif", 0.5);
            } else {
                files.tiff("in/c" + i + ".tif", 6, 5, 2, i, 2 * i);
            }
        }
        int code = scale("--input", in.toString(), "--output", outDir.toString(), "--record", outDir.toString());
        assertEquals(Main.FAILED, code, err());
        assertTrue(err().contains("batch finished: 4 of 5 files done, 1 failed"), err());
        assertTrue(err().contains("failed: " + in.resolve("c3.tif") + ": --input: TIFF file"), err());
        for (int i = 1; i <= 5; i++) {
            assertEquals(i != 3, Files.exists(outDir.resolve("c" + i + "-test-scale.tif")), "output of c" + i);
            assertEquals(i != 3, Files.exists(outDir.resolve("c" + i + "-record.json")), "record of c" + i);
            if (i != 3) {
                assertEquals(2f * i, TiffFiles.read(outDir.resolve("c" + i + "-test-scale.tif"), "out").data()[0], 0f);
            }
        }
        assertTrue(files.changedInputs().isEmpty(), "inputs changed: " + files.changedInputs());
        assertEquals(List.of(), Fixtures.temporaryFiles(outDir));
    }

    @Test
    void batchByPatternAndRerunWithoutOverwrite() {
        Path in = files.folder("in");
        Path outDir = files.folder("out");
        files.tiff("in/a1.tif", 4, 4, 1, 1);
        files.tiff("in/a2.tif", 4, 4, 1, 2);
        files.tiff("in/b1.tif", 4, 4, 1, 3);
        assertEquals(Main.OK, scale("--input", "glob:" + in + "/a*.tif", "--output", outDir.toString()), err());
        assertTrue(err().contains("batch finished: 2 of 2 files done, 0 failed"), err());
        assertFalse(Files.exists(outDir.resolve("b1-test-scale.tif")));
        assertEquals(Main.FAILED, scale("--input", "glob:" + in + "/a*.tif", "--output", outDir.toString()));
        assertTrue(err().contains("batch finished: 0 of 2 files done, 2 failed"), err());
        assertTrue(err().contains("a1-test-scale.tif exists"), err());
        assertEquals(Main.OK, scale("--input", "glob:" + in + "/a*.tif", "--output", outDir.toString(), "--overwrite"), err());
    }

    private static byte[] readAll(Path p) {
        try {
            return Files.readAllBytes(p);
        } catch (java.io.IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
