package org.stackwright.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.blocks.FolderPlaneSource;
import org.stackwright.blocks.TiffPlaneSource;
import org.stackwright.blocks.Box;
import org.stackwright.cli.Main;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The Spark runner in local mode against the single-machine block run with the same blocks: the same result (the
 * same block processor from the same global settings; within 1e-6), a block task forced to fail once is retried
 * and the output is complete, a folder output gets one TIFF per plane, and nothing of the staging is left.
 */
class SparkLocalTest {

    @TempDir
    Path dir;

    private static final VoxelSize VX = new VoxelSize(0.1, 0.1, 0.25);

    /** Blobs on a background, Gaussian noise around it (an invented stack; no simulator needed for agreement). */
    private Path stack() {
        int w = 60;
        int h = 52;
        int d = 12;
        java.util.SplittableRandom r = new java.util.SplittableRandom(8);
        float[] v = new float[w * h * d];
        double[][] blobs = new double[12][4];
        for (double[] b : blobs) {
            b[0] = w * r.nextDouble();
            b[1] = h * r.nextDouble();
            b[2] = d * r.nextDouble();
            b[3] = 300 + 2000 * r.nextDouble();
        }
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double mu = 20;
                    for (double[] b : blobs) {
                        double q = ((x - b[0]) * (x - b[0]) + (y - b[1]) * (y - b[1])) / 8 + (z - b[2]) * (z - b[2]) / 3;
                        mu += b[3] * Math.exp(-q);
                    }
                    v[(z * h + y) * w + x] = (float) Math.rint(100 + mu + Math.sqrt(mu) * (r.nextDouble() - 0.5) * 3.4);
                }
            }
        }
        Path p = dir.resolve("stack.tif");
        TiffFiles.write(new Volume(w, h, d, v, VX), p, true);
        return p;
    }

    private static int cli(String... args) {
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(args, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        return code;
    }

    private static void spark(String... args) {
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = SparkMain.run(args, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(SparkMain.OK, code, err.toString(StandardCharsets.UTF_8));
    }

    private static float[] read(Path p) {
        if (Files.isDirectory(p)) {
            try (FolderPlaneSource s = FolderPlaneSource.open(p, "out")) {
                return s.read(new Box(0, 0, 0, s.width(), s.height(), s.depth())).data();
            }
        }
        try (TiffPlaneSource s = TiffPlaneSource.open(p, "out")) {
            return s.read(new Box(0, 0, 0, s.width(), s.height(), s.depth())).data();
        }
    }

    @Test
    void sparkLocalModeGivesTheSingleMachineBlockResult() throws IOException {
        Path in = stack();
        Path psf = dir.resolve("psf.tif");
        TiffFiles.write(GaussianPsf.sampled(0.15, 0.3, VX, 11, 11, 7), psf, true);
        byte[] before = Files.readAllBytes(in);
        List<String> common = List.of("--input", in.toString(), "--psf", psf.toString(), "--block-size", "30x26x6",
                "--iterations", "8", "--stop", "fixed", "--offset", "100", "--background", "20");
        Path one = dir.resolve("one.tif");
        cli(Stream.concat(Stream.of("deconvolve", "--output", one.toString(), "--threads", "2"), common.stream())
                .toArray(String[]::new));
        Path viaSpark = dir.resolve("spark.tif");
        Path record = dir.resolve("spark.json");
        System.setProperty(SparkMain.FAIL_ONCE, "3");
        try {
            spark(Stream.concat(Stream.of("--master", "local[2]", "deconvolve", "--output", viaSpark.toString(),
                    "--record", record.toString()), common.stream()).toArray(String[]::new));
        } finally {
            System.clearProperty(SparkMain.FAIL_ONCE);
        }
        float[] a = read(one);
        float[] b = read(viaSpark);
        double max = 0;
        double diff = 0;
        for (int i = 0; i < a.length; i++) {
            max = Math.max(max, Math.abs(a[i]));
            diff = Math.max(diff, Math.abs(a[i] - b[i]));
        }
        System.out.printf("spark local mode against one machine: largest difference %.3g (maximum %.3g)%n", diff, max);
        assertTrue(diff <= 1e-6 * max, "difference " + diff);
        String json = Files.readString(record);
        assertTrue(json.contains("\"blocks_retried\": 1") || json.contains("\"blocks_retried\":1"), json);
        assertArrayEquals(before, Files.readAllBytes(in), "the input is unchanged");
        try (Stream<Path> s = Files.list(dir)) {
            List<String> hidden = s.map(p -> p.getFileName().toString()).filter(n -> n.startsWith(".")).toList();
            assertTrue(hidden.isEmpty(), "left behind: " + hidden);
        }
    }

    @Test
    void aFolderOutputGetsOneTiffPerPlane() {
        Path in = stack();
        float[] m = new float[60 * 52];
        for (int i = 0; i < m.length; i += 37) {
            m[i] = 255;
        }
        Path mask = dir.resolve("mask.tif");
        TiffFiles.write(new Volume(60, 52, 1, m, VX), mask, true);
        Path one = dir.resolve("one.tif");
        cli("inpaint", "--input", in.toString(), "--mask", mask.toString(), "--method", "median", "--block-size",
                "20x52x12", "--output", one.toString());
        Path planes = dir.resolve("planes");
        spark("--master", "local[2]", "inpaint", "--input", in.toString(), "--mask", mask.toString(), "--method",
                "median", "--block-size", "20x52x12", "--output", planes + "/");
        assertTrue(Files.exists(planes.resolve("plane-00011.tif")));
        assertArrayEquals(read(one), read(planes));
    }

    /**
     * Several tasks share one heap: the budget of a block task is the heap shared among the task slots in local
     * mode, the memory setting or an executor's share on a cluster (arithmetic of the rule in SparkMain.taskBudget;
     * the 300 MB reserve is Spark's documented reserved memory, "Memory Management Overview", Spark 4.0 tuning guide).
     */
    @Test
    void aTaskGetsItsShareOfTheMemory() {
        org.stackwright.op.Operation op = org.stackwright.registry.Operations.byName("deconvolve").orElseThrow();
        org.stackwright.op.Values none = org.stackwright.op.Values.parse("deconvolve", op.params(), java.util.Map.of());
        org.stackwright.op.Values given = org.stackwright.op.Values.parse("deconvolve", op.params(),
                java.util.Map.of("memory", "2m"));
        org.stackwright.op.RunContext ctx = org.stackwright.op.RunContext.quiet(1);
        long free = org.stackwright.op.MemoryCheck.available();
        long one = SparkMain.taskBudget(new org.apache.spark.SparkConf().setMaster("local[1,4]"), none, ctx);
        long four = SparkMain.taskBudget(new org.apache.spark.SparkConf().setMaster("local[4,4]"), none, ctx);
        // the free heap moves a little between calls (garbage collection): within 20 %
        assertTrue(one < free * 1.2 && one > free * 0.8, one + " of " + free);
        assertTrue(Math.abs(four - one / 4.0) < 0.1 * one, "four slots share the heap: " + four + " against " + one);
        assertEquals(2L << 20, SparkMain.taskBudget(new org.apache.spark.SparkConf().setMaster("local[4,4]"), given,
                ctx));
        org.apache.spark.SparkConf cluster = new org.apache.spark.SparkConf().setMaster("spark://head:7077")
                .set("spark.executor.memory", "8g").set("spark.executor.cores", "4");
        assertEquals(((8L << 30) - (300L << 20)) / 4, SparkMain.taskBudget(cluster, none, ctx));
        assertEquals(2L << 20, SparkMain.taskBudget(cluster, given, ctx));
    }
}
