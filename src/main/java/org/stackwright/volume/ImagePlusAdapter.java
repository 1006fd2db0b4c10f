package org.stackwright.volume;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

/**
 * Conversion between ImageJ 1.x images and {@link Volume}s. 8, 16 and 32-bit images become float (signed 16-bit
 * TIFFs with their true, possibly negative values, not ImageJ's stored values shifted by 32768); one channel
 * and one time point of a hyperstack make one volume. Lengths are converted to micrometres from the image's unit
 * (nm, um/micron, mm, cm, m, and inches, which TIFF resolution tags may carry); an uncalibrated image gets 1 um
 * voxels and {@link #isCalibrated} says so; {@link #calibrationNote} words what is unusual about a calibration.
 */
public final class ImagePlusAdapter {

    /** Image property set by {@link TiffFiles#open} when a stack's file records no z step. */
    public static final String Z_STEP_UNKNOWN = "stackwright.z-step-unknown";

    private ImagePlusAdapter() {
    }

    /** Reads channel 1, time point 1. */
    public static Volume toVolume(ImagePlus imp) {
        return toVolume(imp, 1, 1);
    }

    /**
     * @param imp the image, not modified
     * @param channel channel number from 1 to the number of channels
     * @param frame time point from 1 to the number of frames
     * @throws IllegalArgumentException for RGB or other unsupported types and channels/frames out of range
     */
    public static Volume toVolume(ImagePlus imp, int channel, int frame) {
        if (imp == null) {
            throw new IllegalArgumentException("no image given");
        }
        int type = imp.getType();
        if (type == ImagePlus.COLOR_RGB || type == ImagePlus.COLOR_256) {
            throw new IllegalArgumentException("image '" + imp.getTitle() + "' is " + (type == ImagePlus.COLOR_RGB
                    ? "RGB colour" : "8-bit indexed colour") + "; use a grayscale 8, 16 or 32-bit image "
                    + "(Image>Color>Split Channels, then process each channel)");
        }
        int nc = imp.getNChannels();
        int nt = imp.getNFrames();
        if (channel < 1 || channel > nc) {
            throw new IllegalArgumentException("channel " + channel + " does not exist: image '" + imp.getTitle()
                    + "' has " + nc + " channel" + (nc == 1 ? "" : "s") + " (allowed 1 to " + nc + ")");
        }
        if (frame < 1 || frame > nt) {
            throw new IllegalArgumentException("time point " + frame + " does not exist: image '" + imp.getTitle()
                    + "' has " + nt + " time point" + (nt == 1 ? "" : "s") + " (allowed 1 to " + nt + ")");
        }
        int w = imp.getWidth();
        int h = imp.getHeight();
        int d = imp.getNSlices();
        Volume.checkSize(w, h, d);
        float[] data = new float[w * h * d];
        ImageStack stack = imp.getStack();
        // ImageJ stores a signed 16-bit TIFF (SampleFormat 2) shifted by +32768 and records the shift as a
        // calibration function; the values the user sees (and the camera wrote) are the raw values minus 32768
        float shift = imp.getBitDepth() == 16 && imp.getCalibration().isSigned16Bit() ? -32768f : 0f;
        for (int z = 0; z < d; z++) {
            ImageProcessor ip = stack.getProcessor(imp.getStackIndex(channel, z + 1, frame));
            copyPlane(ip, data, z * w * h, w * h, shift);
        }
        return new Volume(w, h, d, data, voxelSize(imp));
    }

    private static void copyPlane(ImageProcessor ip, float[] dst, int off, int n, float shift16) {
        Object px = ip.getPixels();
        if (px instanceof float[] f) {
            System.arraycopy(f, 0, dst, off, n);
        } else if (px instanceof short[] s) {
            for (int i = 0; i < n; i++) {
                dst[off + i] = (s[i] & 0xffff) + shift16;
            }
        } else if (px instanceof byte[] b) {
            for (int i = 0; i < n; i++) {
                dst[off + i] = b[i] & 0xff;
            }
        } else {
            throw new IllegalArgumentException("unsupported pixel type " + px.getClass().getSimpleName());
        }
    }

    /** @return true when the image carries a spatial unit we can convert to micrometres */
    public static boolean isCalibrated(ImagePlus imp) {
        return unitToMicrometres(imp.getCalibration().getUnit()) > 0;
    }

    /**
     * @return null for an image calibrated in metric lengths, else a sentence for a warning: no spatial calibration
     *     (taken as 1 um voxels unless the caller chooses otherwise), or a calibration in inches (converted)
     */
    public static String calibrationNote(ImagePlus imp) {
        String unit = imp.getCalibration().getUnit();
        double f = unitToMicrometres(unit);
        if (f <= 0) {
            return "'" + imp.getTitle() + "' has no spatial calibration (unit '" + (unit == null ? "" : unit.trim())
                    + "'), so its voxel size is unknown";
        }
        if ("true".equals(imp.getProp(Z_STEP_UNKNOWN))) {
            return "'" + imp.getTitle() + "' records no z step (a TIFF from another program stores only the pixel"
                    + " size): the z step is taken as " + String.format(java.util.Locale.ROOT, "%.4g",
                    voxelSize(imp).z()) + " um; if that is wrong, set the voxel depth (a calibrated TIFF, or"
                    + " Image>Properties in ImageJ)";
        }
        if (f == 25400) {
            VoxelSize v = voxelSize(imp);
            return "'" + imp.getTitle() + "' is calibrated in inches (as TIFF resolution tags allow): taken as "
                    + v + "; check that this is the real voxel size, as a program's default dots-per-inch is not a"
                    + " calibration";
        }
        return null;
    }

    /** Voxel size in micrometres; 1 um when the image is uncalibrated. */
    public static VoxelSize voxelSize(ImagePlus imp) {
        Calibration cal = imp.getCalibration();
        double f = unitToMicrometres(cal.getUnit());
        if (f <= 0) {
            return VoxelSize.UNIT;
        }
        double dz = cal.pixelDepth > 0 ? cal.pixelDepth : cal.pixelWidth;
        return new VoxelSize(cal.pixelWidth * f, cal.pixelHeight * f, dz * f);
    }

    /** @return micrometres per unit, or -1 when the unit is not a known length */
    public static double unitToMicrometres(String unit) {
        if (unit == null) {
            return -1;
        }
        return switch (unit.trim().toLowerCase(java.util.Locale.ROOT)) {
            case "um", "µm", "μm", "micron", "microns", "micrometer", "micrometre", "micrometers", "micrometres" -> 1;
            case "nm", "nanometer", "nanometre", "nanometers", "nanometres" -> 1e-3;
            case "mm", "millimeter", "millimetre" -> 1e3;
            case "cm", "centimeter", "centimetre" -> 1e4;
            case "m", "meter", "metre" -> 1e6;
            case "in", "inch", "inches" -> 25400;
            default -> -1;
        };
    }

    /** A new 32-bit image (a stack when depth > 1) with the volume's pixels copied and its voxel size in um. */
    public static ImagePlus toImagePlus(Volume v, String title) {
        ImageStack stack = new ImageStack(v.width(), v.height());
        int plane = v.width() * v.height();
        for (int z = 0; z < v.depth(); z++) {
            float[] px = new float[plane];
            System.arraycopy(v.data(), z * plane, px, 0, plane);
            stack.addSlice(new FloatProcessor(v.width(), v.height(), px));
        }
        ImagePlus imp = new ImagePlus(title, stack);
        imp.setDimensions(1, v.depth(), 1);
        setCalibration(imp, v.voxel());
        imp.resetDisplayRange();
        return imp;
    }

    /** Writes a voxel size in micrometres into the image's calibration. */
    public static void setCalibration(ImagePlus imp, VoxelSize vs) {
        Calibration cal = imp.getCalibration().copy();
        cal.setUnit("micron");
        cal.pixelWidth = vs.x();
        cal.pixelHeight = vs.y();
        cal.pixelDepth = vs.z();
        imp.setCalibration(cal);
    }
}
