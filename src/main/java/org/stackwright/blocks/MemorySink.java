package org.stackwright.blocks;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ByteProcessor;
import ij.process.FloatProcessor;

import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Block cores collected in memory, one array per plane, for outputs that are shown as images (ImageJ, tests). */
public final class MemorySink implements StackSink {

    private final int width;
    private final int height;
    private final int bits;
    private final VoxelSize voxel;
    private final float[][] planes;

    /** @param bits 8 or 32 */
    public MemorySink(int width, int height, int depth, int bits, VoxelSize voxel) {
        this.width = width;
        this.height = height;
        this.bits = bits;
        this.voxel = voxel;
        this.planes = new float[depth][width * height];
    }

    @Override
    public void write(Box core, Volume pixels) {
        float[] v = pixels.data();
        for (int k = 0; k < core.d(); k++) {
            float[] p = planes[core.z() + k];
            for (int y = 0; y < core.h(); y++) {
                System.arraycopy(v, (k * core.h() + y) * core.w(), p, (core.y() + y) * width + core.x(), core.w());
            }
        }
    }

    @Override
    public void commit() {
        // nothing to move
    }

    @Override
    public void abort() {
        // nothing on disk
    }

    /** @return the whole stack as a volume (a copy) */
    public Volume volume() {
        int plane = width * height;
        float[] all = new float[plane * planes.length];
        for (int z = 0; z < planes.length; z++) {
            System.arraycopy(planes[z], 0, all, z * plane, plane);
        }
        return new Volume(width, height, planes.length, all, voxel);
    }

    /** @return a new 32-bit (or 8-bit) ImageJ stack of the output, calibrated */
    public ImagePlus image(String title) {
        ImageStack st = new ImageStack(width, height);
        for (float[] p : planes) {
            if (bits == 8) {
                byte[] b = new byte[p.length];
                for (int i = 0; i < p.length; i++) {
                    b[i] = (byte) Math.max(0, Math.min(255, Math.round(p[i])));
                }
                st.addSlice(new ByteProcessor(width, height, b));
            } else {
                st.addSlice(new FloatProcessor(width, height, p));
            }
        }
        ImagePlus imp = new ImagePlus(title, st);
        imp.setDimensions(1, planes.length, 1);
        ImagePlusAdapter.setCalibration(imp, voxel);
        imp.resetDisplayRange();
        return imp;
    }
}
