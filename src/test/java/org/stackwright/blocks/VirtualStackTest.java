package org.stackwright.blocks;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.nio.file.Path;
import java.util.Map;

import ij.ImagePlus;
import ij.io.FileInfo;
import ij.io.TiffDecoder;
import ij.plugin.FileInfoVirtualStack;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.registry.Operations;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * In ImageJ a virtual stack (planes read from disk on demand) takes the block path without being loaded, and gives
 * the result of the loaded stack.
 */
class VirtualStackTest {

    @TempDir
    Path dir;

    @Test
    void aVirtualStackRunsInBlocksAndGivesTheLoadedResult() throws Exception {
        int w = 48;
        int h = 40;
        int d = 6;
        float[] v = new float[w * h * d];
        for (int i = 0; i < v.length; i++) {
            v[i] = 100 + (i * 31 % 97);
        }
        Path f = dir.resolve("stack.tif");
        TiffFiles.write(new Volume(w, h, d, v, new VoxelSize(0.1, 0.1, 0.3)), f, true);
        float[] m = new float[w * h];
        m[5 * w + 7] = 255;
        m[20 * w + 30] = 255;
        ImagePlus mask = ImagePlusAdapter.toImagePlus(new Volume(w, h, 1, m, new VoxelSize(0.1, 0.1, 0.3)), "mask");
        FileInfo[] fi = new TiffDecoder(dir.toString() + File.separator, "stack.tif").getTiffInfo();
        ImagePlus virtual = new ImagePlus("stack", new FileInfoVirtualStack(fi[0], false));
        virtual.setDimensions(1, d, 1);
        assertTrue(ImagePlusSource.isVirtual(virtual));
        ImagePlus loaded = TiffFiles.open(f, "stack");
        var op = Operations.byName("inpaint").orElseThrow();
        Result[] r = new Result[2];
        ImagePlus[] in = {virtual, loaded};
        for (int k = 0; k < 2; k++) {
            Values values = Values.parse("inpaint", op.params(), Map.of("method", "harmonic"));
            values.withImage("input", in[k]).withImage("mask", mask);
            r[k] = op.run(values, RunContext.quiet(2));
        }
        assertTrue(r[0].record().containsKey("blocks"), "the virtual stack ran in blocks");
        assertTrue(!r[1].record().containsKey("blocks"), "the loaded stack ran as a whole");
        for (int z = 1; z <= d; z++) {
            float[] a = (float[]) r[0].images().get("output").getStack().getPixels(z);
            float[] b = (float[]) r[1].images().get("output").getStack().getPixels(z);
            for (int i = 0; i < a.length; i++) {
                // one block covers the stack: the same solve, so the same values to float rounding of the order
                assertTrue(Math.abs(a[i] - b[i]) <= 1e-3, "plane " + z + " pixel " + i + ": " + a[i] + " vs " + b[i]);
            }
        }
        assertArrayEquals(new int[] {w, h, d}, new int[] {r[0].images().get("output").getWidth(),
            r[0].images().get("output").getHeight(), r[0].images().get("output").getStackSize()});
    }
}
