package org.stackwright.blocks;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Random-access reading of TIFF and BigTIFF stacks written by another library (tifffile 2023.2.3, made by
 * tools/reference/make_stream_references.py), and the in-place writer read back by our reader and by ImageJ.
 * Layout: Adobe, "TIFF Revision 6.0", 1992; BigTIFF as published by the libtiff project. The files our writer makes
 * here are also read by tifffile: run this test with -Dstackwright.stream.check.dir=DIR, then
 * {@code /usr/bin/python3 tools/reference/make_stream_references.py check DIR}.
 */
class StreamingTiffTest {

    @TempDir
    Path dir;

    private static final Path REF = Path.of(System.getProperty("stackwright.project.dir", "."),
            "src/test/resources/reference/stream");

    /** The values of the reference script: (x + 3 y + 7 z) mod 251, plus 0.25 for float stacks. */
    private static float value(int x, int y, int z, boolean fraction) {
        return (x + 3 * y + 7 * z) % 251 + (fraction ? 0.25f : 0f);
    }

    private static void assertValues(Volume v, Box b, boolean fraction) {
        for (int z = 0; z < b.d(); z++) {
            for (int y = 0; y < b.h(); y++) {
                for (int x = 0; x < b.w(); x++) {
                    float want = value(b.x() + x, b.y() + y, b.z() + z, fraction);
                    if (v.get(x, y, z) != want) {
                        throw new AssertionError("voxel (" + (b.x() + x) + ", " + (b.y() + y) + ", " + (b.z() + z)
                                + ") of " + b + ": " + v.get(x, y, z) + " instead of " + want);
                    }
                }
            }
        }
    }

    private static void readEverywhere(PlaneSource s, boolean fraction) {
        Box all = new Box(0, 0, 0, s.width(), s.height(), s.depth());
        assertValues(s.read(all), all, fraction);
        Random r = new Random(1);
        for (int i = 0; i < 20; i++) {
            int w = 1 + r.nextInt(s.width());
            int h = 1 + r.nextInt(s.height());
            int d = 1 + r.nextInt(s.depth());
            Box b = new Box(r.nextInt(s.width() - w + 1), r.nextInt(s.height() - h + 1), r.nextInt(s.depth() - d + 1), w, h, d);
            assertValues(s.read(b), b, fraction);
        }
    }

    @Test
    void readsStacksOfAnotherLibrary() {
        try (TiffPlaneSource s = TiffPlaneSource.open(REF.resolve("imagej-u16.tif"), "--input")) {
            assertEquals(37, s.width());
            assertEquals(29, s.height());
            assertEquals(3, s.depth());
            assertEquals(16, s.bitDepth());
            assertTrue(s.calibrated());
            assertEquals(0.2, s.voxel().x(), 1e-9);
            assertEquals(0.5, s.voxel().z(), 1e-9);
            readEverywhere(s, false);
        }
        try (TiffPlaneSource s = TiffPlaneSource.open(REF.resolve("bigtiff-f32.tif"), "--input")) {
            assertEquals(4, s.depth());
            assertEquals(0.1, s.voxel().x(), 1e-9);
            readEverywhere(s, true);
        }
        try (TiffPlaneSource s = TiffPlaneSource.open(REF.resolve("bigendian-u8.tif"), "--input")) {
            assertEquals(5, s.depth());
            assertEquals(8, s.bitDepth());
            readEverywhere(s, false);
        }
        try (FolderPlaneSource s = FolderPlaneSource.open(REF.resolve("planes"), "--input")) {
            assertEquals(4, s.depth());
            s.checkAll();
            readEverywhere(s, false);
        }
    }

    @Test
    void refusesWhatCannotBeReadByRandomAccess() throws IOException {
        Path zip = Path.of(System.getProperty("stackwright.project.dir", "."), "src/test/resources/reference/tiff");
        try (var files = Files.list(zip)) {
            for (Path p : files.filter(f -> f.getFileName().toString().contains("zlib")).toList()) {
                IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                        () -> TiffPlaneSource.open(p, "--input"));
                assertTrue(e.getMessage().startsWith("--input: ") && e.getMessage().contains("compressed"), e.getMessage());
            }
        }
        Path cut = dir.resolve("cut.tif");
        byte[] all = Files.readAllBytes(REF.resolve("imagej-u16.tif"));
        Files.write(cut, java.util.Arrays.copyOf(all, all.length - 100));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> TiffPlaneSource.open(cut, "--input"));
        assertTrue(e.getMessage().startsWith("--input: ") && e.getMessage().contains("cut.tif")
                && (e.getMessage().contains("does not fit in the file") || e.getMessage().contains("truncated")),
                e.getMessage());
    }

    /** Writes the reference values in blocks, in a shuffled order, through a sink. */
    private static void fill(StackSink sink, int w, int h, int d, boolean fraction, int[] core) {
        BlockPlan plan = new BlockPlan(w, h, d, core, new int[3]);
        List<Block> order = new ArrayList<>(plan.blocks());
        Collections.shuffle(order, new Random(2));
        for (Block b : order) {
            Box c = b.core();
            float[] px = new float[(int) c.voxels()];
            for (int z = 0; z < c.d(); z++) {
                for (int y = 0; y < c.h(); y++) {
                    for (int x = 0; x < c.w(); x++) {
                        px[(z * c.h() + y) * c.w() + x] = value(c.x() + x, c.y() + y, c.z() + z, fraction);
                    }
                }
            }
            sink.write(c, new Volume(c.w(), c.h(), c.d(), px, VoxelSize.UNIT));
        }
    }

    private Path out(String name) throws IOException {
        String check = System.getProperty("stackwright.stream.check.dir");
        if (check == null) {
            return dir.resolve(name);
        }
        Files.createDirectories(Path.of(check));
        Path p = Path.of(check, name);
        Files.deleteIfExists(p);
        return p;
    }

    @Test
    void writtenStacksReadBackThroughOurReaderAndImageJ() throws IOException {
        VoxelSize vx = new VoxelSize(0.13, 0.13, 0.4);
        Path classic = out("written-f32.tif");
        TiffStackSink sink = new TiffStackSink(classic, 45, 31, 7, 32, vx, false, false);
        assertFalse(sink.big());
        fill(sink, 45, 31, 7, true, new int[] {20, 11, 3});
        assertFalse(Files.exists(classic), "nothing under the final name before commit");
        sink.commit();
        try (TiffPlaneSource s = TiffPlaneSource.open(classic, "out")) {
            readEverywhere(s, true);
            assertEquals(0.13, s.voxel().x(), 1e-6);
            assertEquals(0.4, s.voxel().z(), 1e-9);
        }
        ImagePlus imp = TiffFiles.open(classic, "out");
        assertEquals(7, imp.getStackSize());
        assertEquals(0.13, imp.getCalibration().pixelWidth, 1e-6);
        assertEquals(0.4, imp.getCalibration().pixelDepth, 1e-9);
        assertValues(ImagePlusAdapter.toVolume(imp), new Box(0, 0, 0, 45, 31, 7), true);

        Path bytes = out("written-u8.tif");
        TiffStackSink b8 = new TiffStackSink(bytes, 30, 20, 3, 8, vx, false, false);
        fill(b8, 30, 20, 3, false, new int[] {7, 20, 1});
        b8.commit();
        ImagePlus imp8 = TiffFiles.open(bytes, "out");
        assertEquals(8, imp8.getBitDepth());
        assertValues(ImagePlusAdapter.toVolume(imp8), new Box(0, 0, 0, 30, 20, 3), false);

        Path big = out("written-bigtiff.tif");
        TiffStackSink bt = new TiffStackSink(big, 26, 18, 5, 32, vx, false, true);
        assertTrue(bt.big());
        fill(bt, 26, 18, 5, true, new int[] {9, 9, 2});
        bt.commit();
        byte[] head = Files.readAllBytes(big);
        assertEquals(43, head[2]);
        try (TiffPlaneSource s = TiffPlaneSource.open(big, "out")) {
            readEverywhere(s, true);
        }
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> TiffFiles.open(big, "out"));
        assertTrue(e.getMessage().contains("BigTIFF"), e.getMessage());
    }

    @Test
    void abortLeavesNothingAndAFolderOfPlanesAppearsWhole() throws IOException {
        Path f = dir.resolve("never.tif");
        TiffStackSink s = new TiffStackSink(f, 10, 10, 2, 32, VoxelSize.UNIT, false, false);
        fill(s, 10, 10, 2, true, new int[] {5, 5, 1});
        s.abort();
        try (var list = Files.list(dir)) {
            assertEquals(0, list.count(), "no file and no temporary left");
        }
        Path folder = dir.resolve("planes");
        PlaneFolderSink p = new PlaneFolderSink(folder, 22, 13, 4, 32, new VoxelSize(0.2, 0.2, 0.6));
        fill(p, 22, 13, 4, true, new int[] {11, 13, 1});
        for (int z = 0; z < 4; z++) {
            p.planeDone(z);
        }
        assertFalse(Files.exists(folder));
        p.commit();
        assertTrue(Files.exists(folder.resolve("plane-00003.tif")));
        try (FolderPlaneSource src = FolderPlaneSource.open(folder, "in")) {
            assertTrue(src.zStepKnown());
            assertEquals(0.6, src.voxel().z(), 1e-9);
            readEverywhere(src, true);
        }
    }

    /**
     * Two writers of one streamed output: the second is refused at once, naming the option, whether the output is a
     * file or a folder of planes (volume.OutputClaim, as every other output of a run); after a commit or abort the
     * name is free again and no claim file is left.
     */
    @Test
    void aSecondWriterOfTheSameOutputIsRefused() throws IOException {
        Path f = dir.resolve("busy.tif");
        TiffStackSink first = new TiffStackSink("--output", f, 10, 10, 2, 32, VoxelSize.UNIT, false, false);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new TiffStackSink("--output", f, 10, 10, 2, 32, VoxelSize.UNIT, true, false));
        assertTrue(e.getMessage().startsWith("--output: another run is writing"), e.getMessage());
        fill(first, 10, 10, 2, true, new int[] {10, 10, 2});
        first.commit();
        Path folder = dir.resolve("busy-planes");
        PlaneFolderSink planes = new PlaneFolderSink("--output", folder, 8, 8, 2, 32, VoxelSize.UNIT);
        e = assertThrows(IllegalArgumentException.class,
                () -> new PlaneFolderSink("--output", folder, 8, 8, 2, 32, VoxelSize.UNIT));
        assertTrue(e.getMessage().startsWith("--output: another run is writing"), e.getMessage());
        planes.abort();
        TiffStackSink again = new TiffStackSink("--output", f, 10, 10, 2, 32, VoxelSize.UNIT, true, false);
        again.abort();
        try (var list = Files.list(dir)) {
            assertEquals(List.of("busy.tif"), list.map(p -> p.getFileName().toString()).toList(),
                    "no claim, temporary or folder left");
        }
    }

    /**
     * A run that dies while writing (the process halts, no clean-up runs) leaves nothing under the output's name,
     * and its claim dies with it: the next run writes the output.
     */
    @Test
    void aCrashedWriterLeavesNothingUnderTheName() throws Exception {
        Path f = dir.resolve("crashed.tif");
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-cp",
                System.getProperty("java.class.path"), CrashingWriter.class.getName(), f.toString())
                .redirectErrorStream(true).start();
        String said = new String(p.getInputStream().readAllBytes(), java.nio.charset.StandardCharsets.UTF_8);
        assertTrue(p.waitFor(120, java.util.concurrent.TimeUnit.SECONDS));
        assertEquals(CrashingWriter.HALT, p.exitValue(), said);
        assertTrue(said.contains("half written"), said);
        assertFalse(Files.exists(f), "nothing under the output's name");
        TiffStackSink next = new TiffStackSink("--output", f, 10, 10, 2, 32, VoxelSize.UNIT, false, false);
        fill(next, 10, 10, 2, true, new int[] {10, 10, 2});
        next.commit();
        try (TiffPlaneSource s = TiffPlaneSource.open(f, "out")) {
            readEverywhere(s, true);
        }
    }

    /** Starts writing a stack, then halts the JVM as a crash would (no shutdown hooks, no abort). */
    static final class CrashingWriter {
        static final int HALT = 37;

        public static void main(String[] args) {
            TiffStackSink s = new TiffStackSink("--output", Path.of(args[0]), 10, 10, 2, 32, VoxelSize.UNIT, false,
                    false);
            fill(s, 10, 10, 1, true, new int[] {10, 10, 1});
            System.out.println("half written");
            System.out.flush();
            Runtime.getRuntime().halt(HALT);
        }
    }

    /**
     * A stack over 4 GB written as BigTIFF and read back (2048 x 2048 x 260 float, 4.36 GB of pixels; takes a few
     * minutes and needs 4.4 GB of disk): {@code mvn test -Dtest=StreamingTiffTest -Dstackwright.big=DIR}.
     */
    @Test
    void stackOverFourGigabytes() throws IOException {
        String where = System.getProperty("stackwright.big");
        org.junit.jupiter.api.Assumptions.assumeTrue(where != null, "set -Dstackwright.big=DIR to run");
        Path f = Path.of(where, "over-4gb.tif");
        Files.deleteIfExists(f);
        int w = 2048;
        int h = 2048;
        int d = 260;
        TiffStackSink s = new TiffStackSink(f, w, h, d, 32, VoxelSize.UNIT, false, false);
        assertTrue(s.big(), "over 4 GB must be BigTIFF");
        fill(s, w, h, d, true, new int[] {1024, 2048, 20});
        s.commit();
        assertTrue(Files.size(f) > 4L << 30);
        try (TiffPlaneSource src = TiffPlaneSource.open(f, "big")) {
            assertEquals(d, src.depth());
            Random r = new Random(3);
            for (int i = 0; i < 30; i++) {
                Box b = new Box(r.nextInt(w - 64), r.nextInt(h - 64), r.nextInt(d - 4), 64, 64, 4);
                assertValues(src.read(b), b, true);
            }
            Box last = new Box(w - 100, h - 3, d - 1, 100, 3, 1);
            assertValues(src.read(last), last, true);
        } finally {
            Files.deleteIfExists(f);
        }
    }
}
