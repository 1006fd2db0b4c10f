package org.stackwright.repair;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ByteProcessor;

import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Conversions between 8-bit mask images (255 = untrusted) and the repair classes, for the operations. */
final class MaskImages {

    private MaskImages() {
    }

    /** @return a new 8-bit image of planes (each width*height, 0 or 255), calibrated */
    static ImagePlus toImage(byte[] planes, int w, int h, int depth, VoxelSize voxel, String title) {
        ImageStack st = new ImageStack(w, h);
        int plane = w * h;
        for (int z = 0; z < depth; z++) {
            byte[] p = new byte[plane];
            System.arraycopy(planes, z * plane, p, 0, plane);
            st.addSlice(new ByteProcessor(w, h, p));
        }
        ImagePlus imp = new ImagePlus(title, st);
        ImagePlusAdapter.setCalibration(imp, voxel);
        return imp;
    }

    /**
     * Every plane of channel 1 (all slices of all time points) as one volume, for detection that looks for
     * defects at the same sensor position through z and time.
     */
    static Volume allPlanes(ImagePlus imp) {
        int nz = imp.getNSlices();
        int nt = imp.getNFrames();
        if (nt == 1) {
            return ImagePlusAdapter.toVolume(imp);
        }
        int w = imp.getWidth();
        int h = imp.getHeight();
        Volume.checkSize(w, h, nz * nt);
        float[] all = new float[w * h * nz * nt];
        for (int t = 0; t < nt; t++) {
            Volume v = ImagePlusAdapter.toVolume(imp, 1, t + 1);
            System.arraycopy(v.data(), 0, all, t * w * h * nz, v.size());
        }
        return new Volume(w, h, nz * nt, all, ImagePlusAdapter.voxelSize(imp));
    }
}
