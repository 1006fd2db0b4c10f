package org.stackwright.psf;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

class ExploreTmpTest extends TwoWorkers {

    @Test
    void explore() {
        Volume stack = BeadStacks.make(BeadStacks.oilIntoWater(15), 2, 2, 400000, 20, 7, workers);
        long t1 = System.nanoTime();
        Refinement r = BeadRefinement.run(stack, BeadStacks.oilIntoWater(0).withSample(1.40, 0), List.of(OpticsParameter.DEPTH, OpticsParameter.SAMPLE_INDEX), 50,
                100, 2, 1.5, new int[] {10, 10, 12}, RunContext.quiet(2));
        System.out.println(r.lines() + " corr " + r.correlation() + " dev " + r.quality().get("deviance") + " evals " + r.details().get("scan_evaluations") + " " + (System.nanoTime() - t1) / 1e9);
    }
}
