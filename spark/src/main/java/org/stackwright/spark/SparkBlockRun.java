package org.stackwright.spark;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import java.util.stream.Stream;

import org.apache.spark.api.java.JavaSparkContext;
import org.stackwright.blocks.BlockAssembly;
import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockRun;
import org.stackwright.blocks.BlockTotals;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneFolderSink;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.blocks.TiffPlaneSource;
import org.stackwright.blocks.TiffStackSink;
import org.stackwright.cli.StreamingRun;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.OutputFiles;

/**
 * The driver of a block run on Spark. The global step and the plan are made here exactly as on one machine
 * ({@link BlockRun#prepare}); then the blocks become tasks (one per block) that write their cores as pieces into a
 * staging folder beside the output; the planes become tasks that put each output plane together as a one-plane TIFF;
 * and finally the planes are moved into place as a folder, or assembled into one TIFF (BigTIFF over 4 GB) when the
 * output names a file. A failed task is retried by Spark: pieces and planes are written under temporary names and
 * renamed when complete, so no partial piece or plane is ever read. The staging folder is removed at the end, also
 * after a failure.
 */
final class SparkBlockRun {

    private SparkBlockRun() {
    }

    static Result run(JavaSparkContext sc, Operation op, Values values, Map<String, String> raw,
            StreamingRun.BlockFiles files, boolean overwrite, int failOnce, long taskBudget, RunContext ctx) {
        BlockOperation b = files.blocks();
        BlockRun.Prepared p = BlockRun.prepare(op, b, values, files.inputs(), ctx, taskBudget);
        PlaneSource main = files.inputs().get(b.streamedInputs().get(0));
        Path anchor = files.streamed().isEmpty() ? files.others().values().stream().findFirst()
                .orElse(Path.of("stackwright-run")) : files.streamed().values().iterator().next();
        Path staging = anchor.toAbsolutePath().getParent().resolve("." + anchor.getFileName() + ".spark-"
                + UUID.randomUUID());
        try {
            Files.createDirectories(staging);
            TaskSpec spec = spec(op, values, raw, files, p, staging, failOnce, b);
            long t0 = System.nanoTime();
            List<Integer> ids = new ArrayList<>();
            for (int i = 0; i < p.plan().blocks().size(); i++) {
                ids.add(i);
            }
            ctx.progress(0.05, p.plan().blocks().size() + " block tasks on " + sc.master());
            List<SmallParts> parts = sc.parallelize(ids, ids.size()).map(i -> BlockTask.run(spec, i)).collect();
            BlockAssembly assembly = new BlockAssembly(main.width(), main.height(), main.voxel());
            int retried = 0;
            for (SmallParts s : parts) {
                assembly.add(p.plan().blocks().get(s.index()), s.toOutput());
                retried += s.attempt() > 0 ? 1 : 0;
            }
            BlockTotals totals = assembly.totals(ids.size(), (System.nanoTime() - t0) * 1e-9);
            Result r = b.finish(p.resolved(), p.globals(), totals, files.inputs(), ctx);
            BlockRun.record(r, p, totals);
            double[] voxel = {main.voxel().x(), main.voxel().y(), main.voxel().z()};
            List<Integer> planes = new ArrayList<>();
            for (int z = 0; z < main.depth(); z++) {
                planes.add(z);
            }
            for (String key : files.streamed().keySet()) {
                ctx.progress(0.8, "planes of " + key);
                sc.parallelize(planes, Math.min(planes.size(), Math.max(1, sc.defaultParallelism() * 4)))
                        .foreach(z -> PlaneTask.run(spec, key, z, voxel));
            }
            for (Map.Entry<String, Path> e : files.streamed().entrySet()) {
                place(staging, e.getKey(), e.getValue(), files.folders().contains(e.getKey()), spec, main, overwrite);
            }
            Map<String, Object> spark = new LinkedHashMap<>();
            spark.put("master", sc.master());
            spark.put("block_tasks", ids.size());
            spark.put("blocks_retried", retried);
            spark.put("seconds", (System.nanoTime() - t0) * 1e-9);
            r.record("spark", spark);
            sc.parallelize(List.of(0), 1).foreach(x -> BlockTask.forget(spec.id()));
            return r;
        } catch (IOException e) {
            throw new UncheckedIOException("could not use the staging folder " + staging + ": " + e.getMessage(), e);
        } finally {
            deleteTree(staging);
        }
    }

    private static TaskSpec spec(Operation op, Values values, Map<String, String> raw, StreamingRun.BlockFiles files,
            BlockRun.Prepared p, Path staging, int failOnce, BlockOperation b) {
        Map<String, String> settings = new LinkedHashMap<>();
        Map<String, String> small = new LinkedHashMap<>();
        Map<String, String> streamed = new LinkedHashMap<>();
        for (Param q : op.params()) {
            String v = raw.get(q.key());
            if (v == null) {
                continue;
            }
            if (q.kind() == Param.Kind.IMAGE) {
                (b.streamedInputs().contains(q.key()) ? streamed : small).put(q.key(), Path.of(v).toAbsolutePath().toString());
            } else if (!q.isImageOrFile()) {
                settings.put(q.key(), v);
            }
        }
        settings.putAll(p.globals().settings());
        Map<String, Integer> outputs = new LinkedHashMap<>();
        b.streamedOutputs(p.resolved()).forEach((k, bits) -> {
            if (files.streamed().containsKey(k)) {
                outputs.put(k, bits);
            }
        });
        Globals g = new Globals(p.globals().settings(), p.globals().numbers(), Map.of());
        return new TaskSpec(UUID.randomUUID().toString(), op.name(), settings, small, streamed, g, p.plan(),
                staging.toString(), outputs, failOnce);
    }

    /** Moves the planes of one output into place: as a folder of planes, or assembled into one file. */
    private static void place(Path staging, String key, Path target, boolean folder, TaskSpec spec,
            PlaneSource main, boolean overwrite) throws IOException {
        Path planes = staging.resolve("planes-" + key);
        if (folder || BlockRun.isFolder(target)) {
            PlaneFolderSink.checkTarget(target);
            if (Files.isDirectory(target)) {
                Files.delete(target);
            }
            OutputFiles.moveIntoPlace(planes, target.toAbsolutePath());
            return;
        }
        int d = main.depth();
        TiffStackSink sink = new TiffStackSink(target, main.width(), main.height(), d, spec.outputs().get(key),
                main.voxel(), overwrite, false);
        try {
            for (int z = 0; z < d; z++) {
                try (TiffPlaneSource s = TiffPlaneSource.open(PlaneTask.planePath(staging, key, z, d), "plane " + z)) {
                    sink.write(new Box(0, 0, z, main.width(), main.height(), 1),
                            s.read(new Box(0, 0, 0, main.width(), main.height(), 1)));
                }
            }
            sink.commit();
        } catch (RuntimeException e) {
            sink.abort();
            throw e;
        }
    }

    static void deleteTree(Path dir) {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> s = Files.walk(dir)) {
            s.sorted(java.util.Comparator.reverseOrder()).forEach(f -> {
                try {
                    Files.deleteIfExists(f);
                } catch (IOException ignored) {
                    // best effort: a hidden staging folder
                }
            });
        } catch (IOException ignored) {
            // nothing more to do
        }
    }
}
