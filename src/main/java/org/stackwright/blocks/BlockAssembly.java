package org.stackwright.blocks;

import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Puts the pieces of block outputs together: crops a read-box output to its core, pastes one-plane outputs into
 * whole planes, and adds up sums. Used by {@link BlockRunner} and by a cluster runner that collects the small parts
 * of each block's output.
 */
public final class BlockAssembly {

    private final int width;
    private final int height;
    private final VoxelSize voxel;
    private final Map<String, double[]> sums = new LinkedHashMap<>();
    private final Map<String, float[]> planes = new LinkedHashMap<>();

    public BlockAssembly(int width, int height, VoxelSize voxel) {
        this.width = width;
        this.height = height;
        this.voxel = voxel;
    }

    /** @return the core of a block's output over its read box, as a new volume */
    public static Volume core(Block b, Volume overRead) {
        Box c = b.core();
        Box r = b.read();
        if (overRead.width() != r.w() || overRead.height() != r.h() || overRead.depth() != r.d()) {
            throw new IllegalStateException("block output is " + overRead.shape() + " but its read box is " + r);
        }
        int[] o = b.coreOffset();
        float[] src = overRead.data();
        float[] dst = new float[(int) c.voxels()];
        for (int z = 0; z < c.d(); z++) {
            for (int y = 0; y < c.h(); y++) {
                System.arraycopy(src, ((z + o[2]) * r.h() + y + o[1]) * r.w() + o[0], dst, (z * c.h() + y) * c.w(), c.w());
            }
        }
        return new Volume(c.w(), c.h(), c.d(), dst, overRead.voxel());
    }

    /** Adds a block's one-plane outputs and sums. Safe from several threads. */
    public synchronized void add(Block b, BlockOutput out) {
        for (Map.Entry<String, double[]> e : out.sums().entrySet()) {
            double[] t = sums.computeIfAbsent(e.getKey(), k -> new double[e.getValue().length]);
            if (t.length != e.getValue().length) {
                throw new IllegalStateException("sum " + e.getKey() + " changes length between blocks");
            }
            for (int i = 0; i < t.length; i++) {
                t[i] += e.getValue()[i];
            }
        }
        for (Map.Entry<String, Volume> e : out.planes().entrySet()) {
            float[] p = planes.computeIfAbsent(e.getKey(), k -> new float[width * height]);
            Volume v = e.getValue();
            Box c = b.core();
            int[] o = b.coreOffset();
            for (int y = 0; y < c.h(); y++) {
                System.arraycopy(v.data(), (y + o[1]) * v.width() + o[0], p, (c.y() + y) * width + c.x(), c.w());
            }
        }
    }

    /** @return the totals so far */
    public synchronized BlockTotals totals(int blocks, double seconds) {
        Map<String, Volume> whole = new LinkedHashMap<>();
        planes.forEach((k, p) -> whole.put(k, new Volume(width, height, 1, p, voxel)));
        Map<String, double[]> s = new LinkedHashMap<>();
        sums.forEach((k, v) -> s.put(k, v.clone()));
        return new BlockTotals(s, whole, blocks, seconds);
    }
}
