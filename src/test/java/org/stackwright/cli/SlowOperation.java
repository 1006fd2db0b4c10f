package org.stackwright.cli;

import java.util.List;

import org.stackwright.op.Limits;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A test-only iterative operation: each iteration checks for cancel, reports "iteration k", then waits. It
 * stands in for an iterative solver in the cancel tests; with {@code --until} it holds its run open until the test
 * says so, however slowly a second process starts on a loaded machine.
 */
final class SlowOperation implements Operation {

    @Override
    public String name() {
        return "test-slow";
    }

    @Override
    public String summary() {
        return "iterate slowly (tests only)";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Limits.iterations("iterations", 100, "number of iterations"),
                Param.integer("delay", 300, 0, 60_000, "milliseconds per iteration"),
                Param.text("until", "", "end early once this file exists (empty: run all iterations)"),
                Param.outputImage("output", true, "a small image"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        int n = v.integer("iterations");
        long delay = v.integer("delay");
        String until = v.text("until");
        for (int k = 1; k <= n; k++) {
            if (!until.isEmpty() && java.nio.file.Files.exists(java.nio.file.Path.of(until))) {
                break;
            }
            ctx.checkCancelled();
            ctx.progress((double) k / n, "iteration " + k);
            try {
                Thread.sleep(delay);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new CancelledException("interrupted in iteration " + k);
            }
        }
        Volume out = Volume.zeros(8, 8, 2, VoxelSize.UNIT);
        out.data()[0] = n;
        return new Result().image("output", ImagePlusAdapter.toImagePlus(out, "slow"));
    }

    /** Runs the operation as a command line, for the SIGINT test's child process. */
    public static void main(String[] args) {
        System.setProperty("java.awt.headless", "true");
        int code = OperationRunner.run(new SlowOperation(), args, System.out, System.err);
        System.exit(CancelGuard.exitCode(code)); // as Main does
    }
}
