package org.stackwright.spark;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

import org.apache.spark.TaskContext;
import org.stackwright.blocks.Block;
import org.stackwright.blocks.BlockAssembly;
import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockOutput;
import org.stackwright.blocks.BlockProcessor;
import org.stackwright.blocks.Blockwise;
import org.stackwright.blocks.FolderPlaneSource;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.blocks.TiffPlaneSource;
import org.stackwright.op.Operation;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.registry.Operations;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * One block as a Spark task, on any node: reads the block's read box from the shared input files, processes it with
 * the operation's block processor (built once per node and run from the same fixed settings as on one machine),
 * writes the core of each streamed output as a piece ({@link Pieces}) and returns the small parts. Tasks use one
 * thread each; Spark runs as many at once as the node has task slots.
 */
final class BlockTask {

    /** What a node prepares once per run: the processor and the open inputs. */
    private record Node(BlockProcessor processor, Map<String, PlaneSource> inputs) {
    }

    private static final Map<String, Node> NODES = new ConcurrentHashMap<>();

    private BlockTask() {
    }

    static SmallParts run(TaskSpec spec, int index) {
        Node node = NODES.computeIfAbsent(spec.id(), id -> prepare(spec));
        Block b = spec.plan().blocks().get(index);
        Map<String, Volume> in = new LinkedHashMap<>();
        for (Map.Entry<String, PlaneSource> e : node.inputs().entrySet()) {
            in.put(e.getKey(), e.getValue().read(b.read()));
        }
        BlockOutput out = node.processor().process(b, in, RunContext.quiet(1));
        TaskContext tc = TaskContext.get();
        int attempt = tc == null ? 0 : tc.attemptNumber();
        boolean fail = spec.failOnce() == index && attempt == 0;
        Path staging = Path.of(spec.staging());
        for (String key : spec.outputs().keySet()) {
            Pieces.write(staging, key, b, BlockAssembly.core(b, out.stacks().get(key)), fail);
        }
        if (fail) {
            throw new IllegalStateException("forced failure of block " + (index + 1));
        }
        return SmallParts.of(index, out, b.read().w(), b.read().h(), attempt);
    }

    /** Builds the processor of a run on this node from the task's settings (the global step is not run again). */
    private static Node prepare(TaskSpec spec) {
        Operation op = Operations.byName(spec.operation()).orElseThrow(
                () -> new IllegalStateException("this build has no operation " + spec.operation()));
        BlockOperation b = ((Blockwise) op).blocks();
        Values v = Values.parse(op.name(), op.params(), spec.settings());
        spec.smallImages().forEach((k, p) -> v.withImage(k, TiffFiles.open(Path.of(p), "--" + k)));
        Map<String, PlaneSource> inputs = new LinkedHashMap<>();
        spec.streamedInputs().forEach((k, p) -> inputs.put(k, Files.isDirectory(Path.of(p))
                ? FolderPlaneSource.open(Path.of(p), "--" + k) : TiffPlaneSource.open(Path.of(p), "--" + k)));
        return new Node(b.processor(v, spec.globals(), RunContext.quiet(1)), inputs);
    }

    /** Forgets a run's prepared state on this node (the driver calls it when the run ends). */
    static void forget(String id) {
        Node n = NODES.remove(id);
        if (n != null) {
            n.processor().close();
            n.inputs().values().forEach(PlaneSource::close);
        }
    }
}
