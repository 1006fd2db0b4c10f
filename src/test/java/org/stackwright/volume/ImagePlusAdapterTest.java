package org.stackwright.volume;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.ByteProcessor;
import ij.process.ColorProcessor;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;
import ij.process.ShortProcessor;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * ImagePlus and TIFF round trips: pixel values of 8, 16 and 32-bit images, stacks and hyperstacks (one channel and
 * time point selected), calibration (voxel size and unit) through ImageJ 1.x's own TIFF writer and reader.
 * Expected values are the definitions themselves: 1 nm = 1e-3 um, 1 mm = 1e3 um (SI prefixes).
 */
class ImagePlusAdapterTest {

    @TempDir
    Path dir;

    /** A w x h x (c*z*t) image whose pixel at (x, y) of plane (c, z, t) holds a value from all five. */
    static ImagePlus image(int bits, int w, int h, int c, int z, int t) {
        ImageStack st = new ImageStack(w, h);
        for (int ti = 1; ti <= t; ti++) {
            for (int zi = 1; zi <= z; zi++) {
                for (int ci = 1; ci <= c; ci++) {
                    ImageProcessor ip = switch (bits) {
                        case 8 -> new ByteProcessor(w, h);
                        case 16 -> new ShortProcessor(w, h);
                        default -> new FloatProcessor(w, h);
                    };
                    for (int y = 0; y < h; y++) {
                        for (int x = 0; x < w; x++) {
                            ip.putPixelValue(x, y, value(bits, x, y, ci, zi, ti));
                        }
                    }
                    st.addSlice(ip);
                }
            }
        }
        ImagePlus imp = new ImagePlus("test", st);
        imp.setDimensions(c, z, t);
        if (c > 1 || t > 1) {
            imp.setOpenAsHyperStack(true);
        }
        return imp;
    }

    /** The value stored at a voxel: uses the type's full range (above 127 for 8-bit, above 32767 for 16-bit). */
    static double value(int bits, int x, int y, int c, int z, int t) {
        return switch (bits) {
            case 8 -> (x * 7 + y * 13 + c * 31 + z * 17 + t * 53) % 256;
            case 16 -> (x * 977 + y * 1223 + c * 4099 + z * 7919 + t * 15073) % 65536;
            default -> (x - 2.5) * 0.37 + y * 1.5e-3 - c * 1e4 + z * 3.25 + t * 1e-5;
        };
    }

    static void assertVoxels(Volume v, int bits, int c, int t) {
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    assertEquals((float) value(bits, x, y, c, z + 1, t), v.get(x, y, z),
                            "voxel " + x + "," + y + "," + z + " of channel " + c + ", time point " + t);
                }
            }
        }
    }

    static void calibrate(ImagePlus imp, String unit, double pw, double ph, double pd) {
        Calibration cal = imp.getCalibration();
        cal.setUnit(unit);
        cal.pixelWidth = pw;
        cal.pixelHeight = ph;
        cal.pixelDepth = pd;
    }

    @ParameterizedTest(name = "{0}-bit")
    @ValueSource(ints = {8, 16, 32})
    void stackPixelsAndCalibrationSurviveTiff(int bits) {
        ImagePlus imp = image(bits, 9, 7, 1, 5, 1);
        calibrate(imp, "micron", 0.065, 0.07, 0.25);
        Volume v = ImagePlusAdapter.toVolume(imp);
        assertEquals("9x7x5", v.shape());
        assertVoxels(v, bits, 1, 1);
        assertTrue(v.voxel().sameAs(new VoxelSize(0.065, 0.07, 0.25)), v.voxel().toString());

        Path file = dir.resolve("stack-" + bits + ".tif");
        TiffFiles.write(imp, file, false);
        ImagePlus back = TiffFiles.open(file, "--input");
        assertEquals(bits, back.getBitDepth(), "bit depth kept by the TIFF");
        assertEquals(5, back.getNSlices());
        Volume v2 = ImagePlusAdapter.toVolume(back);
        assertVoxels(v2, bits, 1, 1);
        assertTrue(v2.voxel().sameAs(v.voxel()), v2.voxel().toString());
        assertTrue(ImagePlusAdapter.isCalibrated(back));
    }

    @ParameterizedTest(name = "{0}-bit hyperstack")
    @ValueSource(ints = {8, 16, 32})
    void hyperstackChannelAndTimePointSelection(int bits) {
        ImagePlus imp = image(bits, 6, 5, 3, 4, 2);
        calibrate(imp, "µm", 0.1, 0.1, 0.3);
        Path file = dir.resolve("hyper-" + bits + ".tif");
        TiffFiles.write(imp, file, false);
        ImagePlus back = TiffFiles.open(file, "--input");
        assertEquals(3, back.getNChannels());
        assertEquals(4, back.getNSlices());
        assertEquals(2, back.getNFrames());
        for (ImagePlus source : new ImagePlus[] {imp, back}) {
            for (int c = 1; c <= 3; c++) {
                for (int t = 1; t <= 2; t++) {
                    Volume v = ImagePlusAdapter.toVolume(source, c, t);
                    assertEquals("6x5x4", v.shape());
                    assertVoxels(v, bits, c, t);
                    assertTrue(v.voxel().sameAs(new VoxelSize(0.1, 0.1, 0.3)), v.voxel().toString());
                }
            }
        }
    }

    @ParameterizedTest(name = "{0}")
    @CsvSource({"nm, 80, 80, 200, 0.08, 0.08, 0.2", "micron, 0.08, 0.09, 0.2, 0.08, 0.09, 0.2",
        "um, 0.1, 0.1, 0.5, 0.1, 0.1, 0.5", "mm, 0.0002, 0.0002, 0.001, 0.2, 0.2, 1.0"})
    void unitsAreConvertedToMicrometres(String unit, double pw, double ph, double pd, double ux, double uy, double uz) {
        ImagePlus imp = image(16, 4, 3, 1, 2, 1);
        calibrate(imp, unit, pw, ph, pd);
        VoxelSize expected = new VoxelSize(ux, uy, uz);
        assertTrue(ImagePlusAdapter.voxelSize(imp).sameAs(expected), ImagePlusAdapter.voxelSize(imp).toString());
        Path file = dir.resolve("unit-" + unit + ".tif");
        TiffFiles.write(imp, file, false);
        ImagePlus back = TiffFiles.open(file, "--input");
        assertTrue(ImagePlusAdapter.voxelSize(back).sameAs(expected), ImagePlusAdapter.voxelSize(back).toString());
        // a volume written by us is always in micrometres
        Path ours = dir.resolve("ours-" + unit + ".tif");
        TiffFiles.write(ImagePlusAdapter.toVolume(imp), ours, false);
        Volume read = TiffFiles.read(ours, "--input");
        assertTrue(read.voxel().sameAs(expected), read.voxel().toString());
        assertEquals("micron", TiffFiles.open(ours, "--input").getCalibration().getUnit());
    }

    @Test
    void uncalibratedImagesGetUnitVoxelsAndSayso() {
        ImagePlus imp = image(8, 4, 4, 1, 3, 1);
        assertFalse(ImagePlusAdapter.isCalibrated(imp));
        assertEquals(VoxelSize.UNIT, ImagePlusAdapter.voxelSize(imp));
        Path file = dir.resolve("plain.tif");
        TiffFiles.write(imp, file, false);
        ImagePlus back = TiffFiles.open(file, "--input");
        assertFalse(ImagePlusAdapter.isCalibrated(back));
        assertEquals(VoxelSize.UNIT, ImagePlusAdapter.voxelSize(back));
        // a calibrated 2D image without a z step takes the pixel width as depth
        ImagePlus flat = image(8, 4, 4, 1, 1, 1);
        calibrate(flat, "micron", 0.2, 0.2, 0);
        assertTrue(ImagePlusAdapter.voxelSize(flat).sameAs(new VoxelSize(0.2, 0.2, 0.2)));
    }

    @Test
    void volumeToImagePlusAndBackIsExact() {
        Volume v = Volume.zeros(5, 4, 3, new VoxelSize(0.05, 0.06, 0.3));
        for (int i = 0; i < v.size(); i++) {
            v.data()[i] = (float) Math.sin(i * 0.7) * 1e3f;
        }
        ImagePlus imp = ImagePlusAdapter.toImagePlus(v, "x");
        assertEquals(32, imp.getBitDepth());
        assertEquals(3, imp.getNSlices());
        Volume back = ImagePlusAdapter.toVolume(imp);
        assertEquals(v, back);
        Path file = dir.resolve("v.tif");
        TiffFiles.write(v, file, false);
        Volume read = TiffFiles.read(file, "--input");
        assertTrue(java.util.Arrays.equals(v.data(), read.data()));
        assertTrue(read.voxel().sameAs(v.voxel()));
        // the ImagePlus does not share the volume's pixels
        ((float[]) imp.getStack().getPixels(1))[0] = -1;
        assertEquals((float) Math.sin(0) * 1e3f, v.get(0, 0, 0));
    }

    @Test
    void refusesBadChannelsFramesAndColour() {
        ImagePlus imp = image(16, 4, 4, 2, 3, 2);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ImagePlusAdapter.toVolume(imp, 3, 1));
        assertTrue(e.getMessage().contains("channel 3") && e.getMessage().contains("allowed 1 to 2"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> ImagePlusAdapter.toVolume(imp, 1, 0));
        assertTrue(e.getMessage().contains("time point 0") && e.getMessage().contains("allowed 1 to 2"), e.getMessage());
        ImagePlus rgb = new ImagePlus("rgb", new ColorProcessor(4, 4));
        e = assertThrows(IllegalArgumentException.class, () -> ImagePlusAdapter.toVolume(rgb));
        assertTrue(e.getMessage().contains("RGB"), e.getMessage());
    }
}
