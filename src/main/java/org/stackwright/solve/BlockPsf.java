package org.stackwright.solve;

import ij.ImagePlus;

import org.stackwright.blocks.PlaneSource;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The PSF of a deconvolution in blocks, prepared once at the main input's voxel size as the whole-stack path prepares
 * it ({@link PsfChecks#prepare}) and kept for the blocks that follow; and its size before that, for the halo and the
 * memory of a block.
 */
final class BlockPsf {

    private ImagePlus cachedFor;
    private VoxelSize cachedVoxel;
    private Volume cachedPsf;

    /** @return the PSF checked and prepared at the main input's voxel size (kept for repeated calls) */
    synchronized Volume prepare(Values v, int w, int h, int d, VoxelSize voxel, RunContext ctx) {
        ImagePlus imp = v.image("psf");
        if (imp == cachedFor && voxel.equals(cachedVoxel) && ctx == null) {
            return cachedPsf;
        }
        Volume psf = ImagePlusAdapter.toVolume(imp);
        RunContext c = ctx == null ? RunContext.quiet(1) : ctx;
        if (!ImagePlusAdapter.isCalibrated(imp)) {
            psf = psf.withVoxel(voxel);
            if (ctx != null) {
                ctx.warn("psf: '" + imp.getTitle() + "' has no calibration; taken to have the image's voxel size " + voxel);
            }
        }
        // a stand-in for the image: PsfChecks only looks at its size and voxel size; sizes beyond the PSF's reach
        // cannot change its verdict, so the stand-in stays small
        int reach = 2 * Math.max(psf.width(), Math.max(psf.height(), psf.depth()))
                * (int) Math.ceil(Math.max(psf.voxel().x() / voxel.x(), Math.max(psf.voxel().y() / voxel.y(),
                        psf.voxel().z() / voxel.z()))) + 3;
        Volume proxy = Volume.zeros(Math.min(w, reach), Math.min(h, reach), Math.min(d, reach), voxel);
        // the extended boundary allows a PSF larger than the image, as on the whole-stack path
        boolean extended = !DeconvolveOperation.settings(v).boundary().equals("periodic");
        Volume p = PsfChecks.prepare("psf", psf, proxy, extended, c).psf();
        cachedFor = imp;
        cachedVoxel = voxel;
        cachedPsf = p;
        return p;
    }

    /**
     * @return the PSF's size at the main input's voxel size, as {@link PsfChecks#prepare} will make it (without
     *     its checks: they run in the global step, so a stack that fits in memory sees the usual messages)
     */
    static int[] size(Values v, PlaneSource main) {
        ImagePlus imp = v.image("psf");
        int[] n = {imp.getWidth(), imp.getHeight(), imp.getNSlices()};
        if (ImagePlusAdapter.isCalibrated(imp)) {
            VoxelSize pv = ImagePlusAdapter.voxelSize(imp);
            double[] r = {pv.x() / main.voxel().x(), pv.y() / main.voxel().y(), pv.z() / main.voxel().z()};
            for (int a = 0; a < 3; a++) {
                if (n[a] > 1 && Math.abs(r[a] - 1) > 1e-6) {
                    int m = (int) Math.round(n[a] * r[a]);
                    n[a] = Math.max(1, m % 2 == 0 ? m + 1 : m);
                }
            }
        }
        return n;
    }
}
