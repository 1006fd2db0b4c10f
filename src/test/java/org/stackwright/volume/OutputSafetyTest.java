package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.awt.image.BufferedImage;
import java.io.BufferedReader;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.FilterOutputStream;
import java.io.IOException;
import java.io.InputStreamReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;

import javax.imageio.ImageIO;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The output side of data safety, below the command line: every writer fails loudly on a full disk (a stream that
 * fails after some bytes, and where the machine allows it a real, small tmpfs) and leaves neither a partial file
 * nor a temporary one; TIFFs keep ImageJ's exact bytes; links are resolved; a file that appears during a write is
 * not replaced; output claims exclude a second writer in the same process and in another process, and die with
 * their process; long names get short temporary names.
 */
class OutputSafetyTest {

    @TempDir
    Path dir;

    private static ImagePlus stack() {
        return IJ.createImage("s", "32-bit ramp", 64, 48, 5);
    }

    /** A stream that takes {@code limit} bytes and then fails as a full disk does. */
    static OutputFiles.Sink fullAfter(long limit) {
        return tmp -> new FilterOutputStream(OutputFiles.FILE.open(tmp)) {
            private long written;

            @Override
            public void write(int b) throws IOException {
                write(new byte[] {(byte) b}, 0, 1);
            }

            @Override
            public void write(byte[] b, int off, int len) throws IOException {
                if (written + len > limit) {
                    throw new IOException("No space left on device");
                }
                written += len;
                out.write(b, off, len);
            }
        };
    }

    private List<String> names() throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).sorted().toList();
        }
    }

    @Test
    void aFullDiskFailsTheWriteAndLeavesNothing() throws IOException {
        Path out = dir.resolve("out.tif");
        UncheckedIOException e = assertThrows(UncheckedIOException.class, () -> OutputFiles.writeWhole(out, false,
                o -> TiffWriting.encode(stack(), o), fullAfter(20_000)));
        assertTrue(e.getMessage().contains("No space left on device"), e.getMessage());
        assertEquals(List.of(), names());
        // an existing file that was to be replaced stays as it was
        Files.writeString(out, "the previous result");
        assertThrows(UncheckedIOException.class, () -> OutputFiles.writeWhole(out, true,
                o -> OutputFiles.png(stack(), o), fullAfter(100)));
        assertEquals("the previous result", Files.readString(out));
        assertEquals(List.of("out.tif"), names());
    }

    @Test
    void aRealFullDiskOnASmallTmpfs() throws Exception {
        // needs root and permission to mount (a container may refuse); the stream stub above covers the rest
        Path mnt = Files.createDirectory(dir.resolve("small"));
        boolean mounted = run("mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", mnt.toString()) == 0;
        assumeTrue(mounted, "cannot mount a small tmpfs here (needs root and mount permission); the full disk is"
                + " covered by the failing-stream test");
        try {
            Path tif = mnt.resolve("big.tif");
            UncheckedIOException e = assertThrows(UncheckedIOException.class,
                    () -> TiffFiles.write(IJ.createImage("b", "32-bit ramp", 256, 256, 2), tif, false));
            assertTrue(e.getMessage().contains("No space left on device"), e.getMessage());
            ImagePlus noise = IJ.createImage("n", "RGB noise", 256, 256, 1);
            Path png = mnt.resolve("big.png");
            e = assertThrows(UncheckedIOException.class, () -> OutputFiles.writePng(noise, png, false));
            assertTrue(e.getMessage().contains("No space left on device"), e.getMessage());
            try (Stream<Path> s = Files.list(mnt)) {
                assertEquals(List.of(), s.toList());
            }
            // a file that fits is written whole
            TiffFiles.write(IJ.createImage("s", "32-bit ramp", 16, 16, 2), mnt.resolve("small.tif"), false);
            assertEquals(16, TiffFiles.read(mnt.resolve("small.tif"), "t").width());
        } finally {
            run("umount", mnt.toString());
        }
    }

    private static int run(String... cmd) throws Exception {
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        p.getInputStream().readAllBytes();
        return p.waitFor(30, TimeUnit.SECONDS) ? p.exitValue() : -1;
    }

    @Test
    void tiffBytesAreThoseOfImageJsOwnWriter() throws IOException {
        ImagePlus composite = IJ.createImage("c", "16-bit ramp", 32, 24, 2, 3, 1);
        composite = new ij.CompositeImage(composite, ij.CompositeImage.COLOR);
        ij.gui.Plot plot = new ij.gui.Plot("plot", "x", "y");
        plot.add("line", new double[] {0, 1, 2, 3}, new double[] {1, 3, 2, 5});
        ImagePlus plotted = plot.getImagePlus(); // carries its plot data, which ImageJ's writer stores too
        for (ImagePlus imp : new ImagePlus[] {stack(), IJ.createImage("one", "8-bit ramp", 20, 10, 1), composite,
                plotted}) {
            Path theirs = dir.resolve("imagej-" + imp.getTitle() + ".tif");
            boolean ok = imp.getStackSize() > 1 ? new FileSaver(imp).saveAsTiffStack(theirs.toString())
                    : new FileSaver(imp).saveAsTiff(theirs.toString());
            assertTrue(ok);
            ByteArrayOutputStream ours = new ByteArrayOutputStream();
            TiffWriting.encode(imp, ours);
            assertArrayEquals(Files.readAllBytes(theirs), ours.toByteArray(), imp.getTitle());
        }
    }

    @Test
    void pngIsWrittenByImageIoAndReadsBack() throws IOException {
        ImagePlus rgb = IJ.createImage("rgb", "RGB ramp", 40, 30, 1);
        Path out = dir.resolve("p.png");
        OutputFiles.writePng(rgb, out, false);
        BufferedImage back = ImageIO.read(new ByteArrayInputStream(Files.readAllBytes(out)));
        BufferedImage want = rgb.getBufferedImage();
        for (int y = 0; y < 30; y++) {
            for (int x = 0; x < 40; x++) {
                assertEquals(want.getRGB(x, y), back.getRGB(x, y));
            }
        }
        assertEquals(List.of("p.png"), names());
    }

    @Test
    void linksAreResolvedBeforeWriting() throws IOException {
        Path real = Files.createDirectory(dir.resolve("real"));
        Path target = real.resolve("data.tif");
        TiffFiles.write(stack(), target, false);
        Path link = Files.createSymbolicLink(dir.resolve("link.tif"), target);
        Path folderLink = Files.createSymbolicLink(dir.resolve("folder"), real);
        assertTrue(OutputPaths.sameFile(link, target));
        assertTrue(OutputPaths.sameFile(folderLink.resolve("data.tif"), target));
        assertTrue(OutputPaths.sameFile(Files.createLink(dir.resolve("hard.tif"), target), target));
        // writing through a link replaces the file it leads to; the link stays a link
        TiffFiles.write(IJ.createImage("o", "8-bit black", 8, 8, 1), link, true);
        assertTrue(Files.isSymbolicLink(link));
        assertEquals(8, TiffFiles.read(target, "t").width());
        // a link to a file not yet there creates that file
        Path dangling = Files.createSymbolicLink(dir.resolve("later.tif"), real.resolve("later.tif"));
        TiffFiles.write(IJ.createImage("o", "8-bit black", 8, 8, 1), dangling, false);
        assertTrue(Files.isSymbolicLink(dangling) && Files.isRegularFile(real.resolve("later.tif")));
    }

    @Test
    void aFileThatAppearsDuringTheWriteIsKept() throws IOException {
        Path out = dir.resolve("race.tif");
        UncheckedIOException e = assertThrows(UncheckedIOException.class, () -> OutputFiles.writeWhole(out, false, o -> {
            Files.writeString(out, "written by another program meanwhile");
            o.write(new byte[100]);
        }, OutputFiles.FILE));
        assertTrue(e.getMessage().contains("appeared while this run was writing it"), e.getMessage());
        assertEquals("written by another program meanwhile", Files.readString(out));
        assertEquals(List.of("race.tif"), names());
    }

    @Test
    void aClaimExcludesASecondWriterOfTheSameProcess() throws IOException {
        Path out = dir.resolve("claimed.tif");
        try (OutputClaim first = OutputClaim.take("--output", out)) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                    () -> OutputClaim.take("--output", out));
            assertTrue(e.getMessage().startsWith("--output: another run is writing"), e.getMessage());
            OutputClaim.take("--record", dir.resolve("other.json")).close();
        }
        OutputClaim.take("--output", out).close();
        assertEquals(List.of(), names());
    }

    @Test
    void aClaimExcludesAnotherProcessAndEndsWithIt() throws Exception {
        Path out = dir.resolve("shared.tif");
        Process holder = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-cp",
                System.getProperty("java.class.path"), ClaimHolder.class.getName(), out.toString())
                .redirectErrorStream(true).start();
        try {
            BufferedReader r = new BufferedReader(new InputStreamReader(holder.getInputStream(), StandardCharsets.UTF_8));
            assertEquals("claimed", r.readLine());
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                    () -> OutputClaim.take("--output", out));
            assertTrue(e.getMessage().contains("another run is writing"), e.getMessage());
        } finally {
            // killed, as by kill -9 or a crash: the system releases its lock, and the claim file left behind is reused
            holder.destroyForcibly();
            holder.waitFor(30, TimeUnit.SECONDS);
        }
        OutputClaim.take("--output", out).close();
    }

    @Test
    void longNamesGetShortTemporaryNamesAndTooLongNamesAreRefused() throws IOException {
        String name = "µ".repeat(100) + "x".repeat(46) + ".tif"; // 250 bytes in UTF-8
        assertEquals(250, name.getBytes(StandardCharsets.UTF_8).length);
        Path out = dir.resolve(name);
        TiffFiles.write(stack(), out, false);
        assertTrue(OutputPaths.hiddenSibling(out, ".part-123456789-12").getFileName().toString()
                .getBytes(StandardCharsets.UTF_8).length < 100);
        assertEquals(List.of(name), names());
        String tooLong = "y".repeat(252) + ".tif";
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> TiffFiles.write(stack(), dir.resolve(tooLong), false));
        assertTrue(e.getMessage().contains("256 bytes long; allowed: at most 255 bytes"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> OutputPaths.parseOutput("--output", "newdir/"));
        assertTrue(e.getMessage().contains("names a folder"), e.getMessage());
    }
}
