package org.stackwright.refine;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.Locale;

import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.op.RunContext;
import org.stackwright.psf.OpticsParameter;
import org.stackwright.psf.PsfSettings;
import org.stackwright.psf.Refinement;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * psf-refine without beads: the held-out deviance of a short deconvolution on binomially thinned halves.
 */
class SpecimenRefinementTest {

    /**
     * Binomial thinning of Poisson counts gives two halves that add up to the counts, each with half the mean and
     * (being Poisson again) variance equal to its mean (the thinning property of the Poisson distribution, e.g.
     * Kingman, Poisson Processes, 1993, sec. 1.3); and the two halves are uncorrelated.
     */
    @Test
    void thinningSplitsPoissonCountsIntoIndependentHalves() {
        int n = 200_000;
        float[] mu = new float[n];
        java.util.Arrays.fill(mu, 37f);
        Volume counts = Camera.photonCounting().record(new Volume(n, 1, 1, mu, new VoxelSize(1, 1, 1)), 4);
        Volume[] h = SpecimenRefinement.thin(counts, Camera.photonCounting(), 9);
        double sa = 0;
        double sb = 0;
        double saa = 0;
        double sab = 0;
        for (int i = 0; i < n; i++) {
            float a = h[0].data()[i];
            float b = h[1].data()[i];
            assertEquals(counts.data()[i], a + b, 0);
            sa += a;
            sb += b;
            saa += a * a;
            sab += a * b;
        }
        double ma = sa / n;
        double va = saa / n - ma * ma;
        double cov = sab / n - ma * (sb / n);
        // standard errors of the mean and variance of 200000 draws with mean 18.5 are about 0.01 and 0.06
        assertEquals(18.5, ma, 0.05);
        assertEquals(18.5, sb / n, 0.05);
        assertEquals(18.5, va, 0.3);
        assertEquals(0, cov / va, 0.01);
    }

    /**
     * The independent bead stack at 20 um (tools/reference/make_bead_stacks.py) treated as a specimen (no bead
     * model), start depth 0: the held-out deviance at the fitted depth is below that at the start, and the record
     * carries the caution that the errors are approximate. Accuracy is NOT what the bead fit achieves: measured
     * here 14.1 +/- 0.14 um for the true 20 um (8.9 um with 8 iterations and a 15x15x21 PSF); the statistic of a
     * short deconvolution favours narrower PSFs, so it is biased towards shallow depths and its stated error is far
     * too small. README says so; this test pins only what holds.
     */
    @Test
    void specimenModeImprovesTheHeldOutDevianceAndCautions() throws java.io.IOException {
        Volume stack = TiffFiles.read(Path.of("src/test/resources/reference/beads-depth20.tif"), "specimen");
        PsfSettings nominal = PsfSettings.matched(1.3, 520, 1.518, stack.voxel(), 21, 21, 31).withSample(1.33, 0);
        Refinement r = SpecimenRefinement.run(stack, nominal, List.of(OpticsParameter.DEPTH), 50, 100, 2, 1.5, 15,
                RunContext.quiet(2));
        String line = String.format(Locale.ROOT, "specimen mode on the independent 20 um stack: depth %.3f +/- %.3f um, "
                + "held-out deviance ratio to the start %.4f", r.values()[0], r.standardErrors()[0],
                ((Number) r.quality().get("ratio")).doubleValue());
        System.out.println(line);
        assertTrue(((Number) r.quality().get("ratio")).doubleValue() < 1, line);
        assertTrue(r.notes().stream().anyMatch(n -> n.contains("approximate")), r.notes().toString());
    }
}
