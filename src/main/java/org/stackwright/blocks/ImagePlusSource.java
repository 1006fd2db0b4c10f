package org.stackwright.blocks;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ImageProcessor;

import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * An ImageJ image (one channel, one time point) read block by block. A virtual stack reads each plane from disk
 * when a block asks for it, so it is never loaded whole. The image is not modified.
 */
public final class ImagePlusSource implements PlaneSource {

    private final ImagePlus imp;
    private final int channel;
    private final int frame;

    /** Channel 1, time point 1 of the image. */
    public ImagePlusSource(ImagePlus imp) {
        this(imp, 1, 1);
    }

    public ImagePlusSource(ImagePlus imp, int channel, int frame) {
        int type = imp.getType();
        if (type == ImagePlus.COLOR_RGB || type == ImagePlus.COLOR_256) {
            throw new IllegalArgumentException("image '" + imp.getTitle() + "' is colour; use a grayscale 8, 16 or"
                    + " 32-bit image (Image>Color>Split Channels, then process each channel)");
        }
        this.imp = imp;
        this.channel = channel;
        this.frame = frame;
    }

    /** @return true when the image is a virtual stack (planes read from disk on demand) */
    public static boolean isVirtual(ImagePlus imp) {
        return imp != null && imp.getStack() != null && imp.getStack().isVirtual();
    }

    @Override
    public int width() {
        return imp.getWidth();
    }

    @Override
    public int height() {
        return imp.getHeight();
    }

    @Override
    public int depth() {
        return imp.getNSlices();
    }

    @Override
    public VoxelSize voxel() {
        return ImagePlusAdapter.voxelSize(imp);
    }

    @Override
    public boolean calibrated() {
        return ImagePlusAdapter.isCalibrated(imp);
    }

    @Override
    public int bitDepth() {
        return imp.getBitDepth();
    }

    @Override
    public String title() {
        return imp.getTitle();
    }

    @Override
    public Volume read(Box box) {
        int d = depth() == 1 ? 1 : box.d();
        int w = width();
        float[] out = new float[box.w() * box.h() * d];
        ImageStack st = imp.getStack();
        for (int k = 0; k < d; k++) {
            int z = depth() == 1 ? 0 : box.z() + k;
            ImageProcessor ip;
            synchronized (st) {
                ip = st.getProcessor(imp.getStackIndex(channel, z + 1, frame));
            }
            Object px = ip.getPixels();
            for (int y = 0; y < box.h(); y++) {
                int src = (box.y() + y) * w + box.x();
                int dst = (k * box.h() + y) * box.w();
                if (px instanceof float[] f) {
                    System.arraycopy(f, src, out, dst, box.w());
                } else if (px instanceof short[] s) {
                    for (int i = 0; i < box.w(); i++) {
                        out[dst + i] = s[src + i] & 0xffff;
                    }
                } else if (px instanceof byte[] b) {
                    for (int i = 0; i < box.w(); i++) {
                        out[dst + i] = b[src + i] & 0xff;
                    }
                } else {
                    throw new IllegalArgumentException("image '" + imp.getTitle() + "': unsupported pixel type");
                }
            }
        }
        return new Volume(box.w(), box.h(), d, out, voxel());
    }

    @Override
    public void close() {
        // the image belongs to the caller
    }
}
