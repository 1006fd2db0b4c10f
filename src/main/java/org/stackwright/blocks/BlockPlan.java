package org.stackwright.blocks;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * How a volume is cut into blocks: cores of (about) one size that tile the volume, each read with a halo on every
 * side (clipped at the volume's faces). Blocks are ordered plane slab by plane slab (z outer, then y, then x), so
 * the planes of one slab are finished before the next slab starts.
 *
 * <p>Core sizes are evened out: a volume of 1000 columns cut at most 400 wide gets three cores of 333, 333 and 334
 * columns rather than 400, 400 and 200, so no block is a sliver whose halo costs more than its core. Automatic
 * plans ({@link BlockSizing}) give their cores by {@link #ofStarts}: the cores at the volume's faces are one halo
 * wider than the others, so every block reads a box of the same size (a face needs no halo).
 */
public final class BlockPlan implements Serializable {

    private final int width;
    private final int height;
    private final int depth;
    private final int[] halo;
    private final int[] counts;
    private final List<Block> blocks;

    /**
     * @param width volume columns
     * @param height volume rows
     * @param depth volume planes
     * @param core largest core size per axis (x, y, z); larger than the volume means the whole axis
     * @param halo halo per axis (x, y, z), 0 or more
     */
    public BlockPlan(int width, int height, int depth, int[] core, int[] halo) {
        this(width, height, depth, evenStarts(new int[] {width, height, depth}, core), halo);
    }

    /**
     * A plan whose cores start where given.
     *
     * @param starts per axis (x, y, z), the first voxel of each core and, last, the axis length: 0 = s0 < s1 < ... < n
     * @param halo halo per axis (x, y, z), 0 or more
     */
    public static BlockPlan ofStarts(int width, int height, int depth, int[][] starts, int[] halo) {
        return new BlockPlan(width, height, depth, starts, halo);
    }

    private BlockPlan(int width, int height, int depth, int[][] starts, int[] halo) {
        if (width < 1 || height < 1 || depth < 1) {
            throw new IllegalArgumentException("volume size must be at least 1x1x1 (given " + width + "x" + height + "x" + depth + ")");
        }
        int[] n = {width, height, depth};
        for (int a = 0; a < 3; a++) {
            if (halo[a] < 0) {
                throw new IllegalArgumentException("halo must be 0 or more (given " + halo[a] + ")");
            }
            int[] s = starts[a];
            if (s.length < 2 || s[0] != 0 || s[s.length - 1] != n[a]) {
                throw new IllegalArgumentException("core starts must run from 0 to " + n[a]);
            }
            for (int i = 1; i < s.length; i++) {
                if (s[i] <= s[i - 1]) {
                    throw new IllegalArgumentException("core starts must increase (axis " + a + ")");
                }
            }
        }
        this.width = width;
        this.height = height;
        this.depth = depth;
        this.halo = halo.clone();
        this.counts = new int[] {starts[0].length - 1, starts[1].length - 1, starts[2].length - 1};
        List<Block> list = new ArrayList<>();
        for (int k = 0; k < counts[2]; k++) {
            for (int j = 0; j < counts[1]; j++) {
                for (int i = 0; i < counts[0]; i++) {
                    int x0 = starts[0][i];
                    int y0 = starts[1][j];
                    int z0 = starts[2][k];
                    Box c = new Box(x0, y0, z0, starts[0][i + 1] - x0, starts[1][j + 1] - y0, starts[2][k + 1] - z0);
                    list.add(new Block(list.size(), c, grow(c)));
                }
            }
        }
        this.blocks = Collections.unmodifiableList(list);
    }

    /** @return per axis, the starts of cores of at most {@code core} voxels, evened out */
    private static int[][] evenStarts(int[] n, int[] core) {
        int[][] starts = new int[3][];
        for (int a = 0; a < 3; a++) {
            if (core[a] < 1) {
                throw new IllegalArgumentException("block-size: each size must be at least 1 (given " + core[a] + ")");
            }
            int count = (n[a] + Math.min(core[a], n[a]) - 1) / Math.min(core[a], n[a]);
            starts[a] = new int[count + 1];
            for (int i = 0; i <= count; i++) {
                starts[a][i] = (int) ((long) n[a] * i / count);
            }
        }
        return starts;
    }

    /** A plan of one block: the whole volume. */
    public static BlockPlan whole(int width, int height, int depth) {
        return new BlockPlan(width, height, depth, new int[] {width, height, depth}, new int[3]);
    }

    private Box grow(Box c) {
        int x0 = Math.max(0, c.x() - halo[0]);
        int y0 = Math.max(0, c.y() - halo[1]);
        int z0 = Math.max(0, c.z() - halo[2]);
        int x1 = Math.min(width, c.x() + c.w() + halo[0]);
        int y1 = Math.min(height, c.y() + c.h() + halo[1]);
        int z1 = Math.min(depth, c.z() + c.d() + halo[2]);
        return new Box(x0, y0, z0, x1 - x0, y1 - y0, z1 - z0);
    }

    public int width() {
        return width;
    }

    public int height() {
        return height;
    }

    public int depth() {
        return depth;
    }

    /** @return the halo per axis (x, y, z) */
    public int[] halo() {
        return halo.clone();
    }

    /** @return the number of blocks per axis (x, y, z) */
    public int[] counts() {
        return counts.clone();
    }

    /** @return the blocks in processing order */
    public List<Block> blocks() {
        return blocks;
    }

    /** @return the largest read box (core plus halo) of the plan, as its size w, h, d */
    public int[] largestRead() {
        return largest(Block::read);
    }

    /** @return the largest core of the plan, as its size w, h, d */
    public int[] largestCore() {
        return largest(Block::core);
    }

    private int[] largest(java.util.function.Function<Block, Box> box) {
        int[] m = new int[3];
        for (Block b : blocks) {
            Box x = box.apply(b);
            m[0] = Math.max(m[0], x.w());
            m[1] = Math.max(m[1], x.h());
            m[2] = Math.max(m[2], x.d());
        }
        return m;
    }

    /**
     * @param work the work of one block for the size of its read box (for deconvolution, the voxels of its FFT grid)
     * @return the work of all blocks divided by the work of the whole volume as one block: the expected cost of
     *     running in blocks (1 for one block)
     */
    public double workFactor(BlockSizing.BlockBytes work) {
        double sum = 0;
        for (Block b : blocks) {
            sum += work.of(b.read().w(), b.read().h(), b.read().d());
        }
        return sum / work.of(width, height, depth);
    }

    /** @return voxels read over all blocks divided by the voxels of the volume: the cost of the halos */
    public double readFactor() {
        long read = 0;
        for (Block b : blocks) {
            read += b.read().voxels();
        }
        return read / ((double) width * height * depth);
    }

    /** @return for each plane, the number of blocks whose core holds it */
    public int[] blocksPerPlane() {
        int[] n = new int[depth];
        for (Block b : blocks) {
            for (int z = b.core().z(); z < b.core().z() + b.core().d(); z++) {
                n[z]++;
            }
        }
        return n;
    }

    /** @return "WxHxD blocks of at most ... with halo ..." for records and messages */
    public String describe() {
        int[] c = largestCore();
        return blocks.size() + " block" + (blocks.size() == 1 ? "" : "s") + " (" + counts[0] + "x" + counts[1] + "x"
                + counts[2] + "), cores up to " + c[0] + "x" + c[1] + "x" + c[2] + ", halo " + halo[0] + "x" + halo[1]
                + "x" + halo[2];
    }
}
