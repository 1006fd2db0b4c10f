package org.stackwright.psf;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

class BeadRefinementTest extends TwoWorkers {

    @Test
    void explore() {
        Volume stack = BeadStacks.make(BeadStacks.oilIntoWater(15), 3, 2, 40000, 20, 7, workers);
        for (List<OpticsParameter> free : List.of(List.of(OpticsParameter.DEPTH, OpticsParameter.SAMPLE_INDEX),
                List.of(OpticsParameter.DEPTH, OpticsParameter.NA), List.of(OpticsParameter.DEPTH, OpticsParameter.COVERSLIP_THICKNESS))) {
            long t1 = System.nanoTime();
            Refinement r = BeadRefinement.run(stack, BeadStacks.oilIntoWater(0).withSample(1.40, 0), free, 50,
                    100, 2, 1.5, new int[] {10, 10, 12}, RunContext.quiet(2));
            long t2 = System.nanoTime();
            System.out.println(free + " -> " + r.lines() + " corr " + r.correlation() + " notes " + r.notes()
                    + " evals " + r.details().get("evaluations") + " fit " + (t2 - t1) / 1e9 + " dev " + r.quality().get("deviance_ratio"));
        }
    }
}
