package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** TIFF files: clear messages naming the parameter for bad input, and writes that are complete or absent. */
class TiffFilesTest {

    @TempDir
    Path dir;

    private static Volume sample() {
        Volume v = Volume.zeros(16, 12, 6, new VoxelSize(0.1, 0.1, 0.2));
        for (int i = 0; i < v.size(); i++) {
            v.data()[i] = i * 0.5f;
        }
        return v;
    }

    private static String message(Runnable r) {
        return assertThrows(IllegalArgumentException.class, r::run).getMessage();
    }

    @Test
    void missingFileIsNamed() {
        String m = message(() -> TiffFiles.open(dir.resolve("nothere.tif"), "--input"));
        assertTrue(m.startsWith("--input") && m.contains("nothere.tif") && m.contains("does not exist"), m);
    }

    @Test
    void folderIsRefused() {
        String m = message(() -> TiffFiles.open(dir, "--psf"));
        assertTrue(m.startsWith("--psf") && m.contains("is a folder"), m);
    }

    @Test
    void otherFormatsAndEmptyFilesAreNotTiff() throws IOException {
        Path png = dir.resolve("picture.tif");
        Files.write(png, new byte[] {(byte) 0x89, 'P', 'N', 'G', 13, 10, 26, 10, 0, 0});
        String m = message(() -> TiffFiles.open(png, "--input"));
        assertTrue(m.startsWith("--input") && m.contains("is not a TIFF file"), m);
        Path empty = dir.resolve("empty.tif");
        Files.write(empty, new byte[0]);
        m = message(() -> TiffFiles.open(empty, "--mask"));
        assertTrue(m.startsWith("--mask") && m.contains("is not a TIFF file"), m);
        // BigTIFF header (version 43 instead of 42)
        Path big = dir.resolve("big.tif");
        Files.write(big, new byte[] {'I', 'I', 43, 0, 8, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0});
        m = message(() -> TiffFiles.open(big, "--input"));
        assertTrue(m.startsWith("--input") && m.contains("BigTIFF"), m);
    }

    @Test
    void truncatedTiffIsReportedAsDamaged() throws IOException {
        Path whole = dir.resolve("whole.tif");
        TiffFiles.write(sample(), whole, false);
        byte[] bytes = Files.readAllBytes(whole);
        // inside the header, the first plane, the middle of the stack and its last quarter: ImageJ itself would
        // open most of these silently, with zeros or missing planes
        for (int keep : new int[] {8, 200, bytes.length / 2, bytes.length * 3 / 4}) {
            Path cut = dir.resolve("cut-" + keep + ".tif");
            Files.write(cut, java.util.Arrays.copyOf(bytes, keep));
            String m = message(() -> TiffFiles.open(cut, "--input"));
            assertTrue(m.startsWith("--input") && (m.contains("damaged") || m.contains("truncated")),
                    "cut at " + keep + " bytes: " + m);
        }
    }

    /** Copies a reference TIFF (made by tools/reference/make_tiff_references.py with tifffile 2023.2.3). */
    private Path reference(String name) throws IOException {
        Path p = dir.resolve(name);
        try (java.io.InputStream in = getClass().getResourceAsStream("/reference/tiff/" + name)) {
            Files.copy(in, p);
        }
        return p;
    }

    @Test
    void multipageFilesFromAnotherLibraryAreRead() throws IOException {
        for (String name : new String[] {"multipage.tif", "multipage-zlib.tif"}) {
            Volume v = TiffFiles.read(reference(name), "--input");
            assertEquals("16x12x5", v.shape(), name);
            for (int z = 0; z < 5; z++) {
                for (int y = 0; y < 12; y++) {
                    for (int x = 0; x < 16; x++) {
                        assertEquals((16 * 12 * z + 16 * y + x) % 251, v.get(x, y, z), 0, name);
                    }
                }
            }
        }
        // ImageJ 1.x stacks only the first page when the pages differ in size: refused, not silently cut to 1 plane
        Path thumb = reference("with-thumbnail.tif");
        String m = message(() -> TiffFiles.open(thumb, "--input"));
        assertTrue(m.startsWith("--input") && m.contains("describes 5 images") && m.contains("read only 1"), m);
    }

    @Test
    void signedSixteenBitIsReadWithItsTrueValues() throws IOException {
        // SampleFormat 2: ImageJ stores the values shifted by +32768 and notes the shift as a calibration function
        Volume v = TiffFiles.read(reference("signed16.tif"), "--input");
        assertEquals("16x12x3", v.shape());
        for (int z = 0; z < 3; z++) {
            for (int y = 0; y < 12; y++) {
                for (int x = 0; x < 16; x++) {
                    assertEquals((16 * 12 * z + 16 * y + x) % 251 - 125, v.get(x, y, z), 0, "at " + x + "," + y + "," + z);
                }
            }
        }
    }

    @Test
    void omeTiffGetsItsVoxelSizeAndChannelsFromTheOmeXml() throws IOException {
        // both plane orders of the OME data model: channel by channel (XYZCT) and interleaved (XYCZT)
        for (String name : new String[] {"czyx.ome.tif", "zcyx.ome.tif"}) {
            ij.ImagePlus imp = TiffFiles.open(reference(name), "--input");
            assertEquals(2, imp.getNChannels(), name);
            assertEquals(3, imp.getNSlices(), name);
            assertEquals(1, imp.getNFrames(), name);
            VoxelSize vs = ImagePlusAdapter.voxelSize(imp);
            assertEquals(0.065, vs.x(), 1e-9, name);
            assertEquals(0.065, vs.y(), 1e-9, name + " (65 nm)");
            assertEquals(0.2, vs.z(), 1e-9, name);
            for (int c = 1; c <= 2; c++) {
                Volume v = ImagePlusAdapter.toVolume(imp, c, 1);
                for (int z = 0; z < 3; z++) {
                    assertEquals(100 * (c - 1) + 10 * z + (5 + 7) % 7, v.get(5, 7, z), 0, name + " c" + c + " z" + z);
                }
            }
        }
    }

    @Test
    void aStackWithoutAZStepSaysSo() throws IOException {
        // the pixel size comes from the resolution tags; the z step is nowhere in a plain TIFF
        ij.ImagePlus imp = TiffFiles.open(reference("no-z-step.tif"), "--input");
        assertEquals(0.1, ImagePlusAdapter.voxelSize(imp).x(), 1e-9);
        String note = ImagePlusAdapter.calibrationNote(imp);
        assertTrue(note != null && note.contains("records no z step"), note);
        // our own files and OME-TIFFs record it
        assertEquals(null, ImagePlusAdapter.calibrationNote(TiffFiles.open(reference("czyx.ome.tif"), "--input")));
        Path own = dir.resolve("own.tif");
        TiffFiles.write(sample(), own, false);
        assertEquals(null, ImagePlusAdapter.calibrationNote(TiffFiles.open(own, "--input")));
    }

    @Test
    void omeXmlIsParsedWithoutExternalEntities() {
        // a DOCTYPE (the way to external entities and entity expansion) makes the parser refuse the document
        String hostile = "<?xml version=\"1.0\"?><!DOCTYPE OME [<!ENTITY x SYSTEM \"file:///etc/passwd\">]>"
                + "<OME><Image><Pixels PhysicalSizeX=\"&x;\" SizeC=\"2\"/></Image></OME>";
        assertEquals(null, OmeMetadata.parse(hostile));
        OmeMetadata.Pixels p = OmeMetadata.parse("<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\">"
                + "<Image><Pixels DimensionOrder=\"XYZCT\" SizeC=\"2\" SizeZ=\"4\" PhysicalSizeX=\"0.1\""
                + " PhysicalSizeZ=\"250\" PhysicalSizeZUnit=\"nm\"/></Image></OME>");
        assertEquals(0.1, p.sizeX(), 1e-12);
        assertEquals(0.25, p.sizeZ(), 1e-12);
        assertEquals(2, p.channels());
        assertEquals(4, p.slices());
    }

    @Test
    void writeRoundTripsAndLeavesNoTemporaryFile() throws IOException {
        Volume v = sample();
        Path out = dir.resolve("out.tif");
        TiffFiles.write(v, out, false);
        Volume back = TiffFiles.read(out, "--input");
        assertArrayEquals(v.data(), back.data());
        assertEquals(List.of(out.getFileName().toString()), names());
    }

    @Test
    void existingFileIsKeptUnlessOverwriteIsAllowed() throws IOException {
        Path out = dir.resolve("out.tif");
        Files.writeString(out, "precious");
        String m = message(() -> TiffFiles.write(sample(), out, false));
        assertTrue(m.contains("exists") && m.contains("--overwrite"), m);
        assertEquals("precious", Files.readString(out));
        TiffFiles.write(sample(), out, true);
        assertArrayEquals(sample().data(), TiffFiles.read(out, "--input").data());
        assertEquals(List.of("out.tif"), names());
    }

    @Test
    void missingFolderOrFolderAsTargetIsRefusedBeforeWriting() throws IOException {
        String m = message(() -> TiffFiles.write(sample(), dir.resolve("no/such/folder/out.tif"), false));
        assertTrue(m.contains("does not exist"), m);
        Files.createDirectory(dir.resolve("sub.tif"));
        m = message(() -> TiffFiles.write(sample(), dir.resolve("sub.tif"), true));
        assertTrue(m.contains("is a folder"), m);
        assertEquals(List.of("sub.tif"), names());
    }

    @Test
    void failedWriteLeavesNeitherFileNorTemporary() throws IOException {
        // an image without pixels cannot be written: nothing must appear, not even the hidden temporary file
        Path out = dir.resolve("broken.tif");
        assertThrows(RuntimeException.class, () -> TiffFiles.write(new ij.ImagePlus(), out, false));
        assertEquals(List.of(), names());
    }

    private List<String> names() throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).sorted().toList();
        }
    }
}
