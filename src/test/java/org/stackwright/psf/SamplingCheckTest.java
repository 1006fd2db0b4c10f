package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.VoxelSize;

/**
 * Nyquist limits (common practice: the sampling theorem applied to the OTF cut-off 2 NA / lambda laterally and
 * n (1 - cos alpha) / lambda axially; see REFERENCES.md): lateral pixel <= lambda / (4 NA), axial step <=
 * lambda / (2 n (1 - cos alpha)), sin alpha = NA / n.
 */
class SamplingCheckTest {

    private static final PsfSettings OIL = PsfSettings.matched(1.4, 520, 1.518, VoxelSize.UNIT, 1, 1, 1);

    @Test
    void widefieldLimitsFollowTheFormulas() {
        SamplingCheck.Limits lim = SamplingCheck.limits(OIL, "widefield");
        assertEquals(0.520 / (4 * 1.4), lim.lateralUm(), 1e-12);
        double alpha = Math.asin(1.4 / 1.518);
        assertEquals(0.520 / (2 * 1.518 * (1 - Math.cos(alpha))), lim.axialUm(), 1e-12);
        // a confocal OTF reaches the sum of the excitation and emission cut-offs: equal wavelengths halve the limits
        SamplingCheck.Limits conf = SamplingCheck.limits(OIL.withExcitation(520, 1), "confocal");
        assertEquals(lim.lateralUm() / 2, conf.lateralUm(), 1e-12);
        assertEquals(lim.axialUm() / 2, conf.axialUm(), 1e-12);
    }

    @Test
    void warnsInPlainWordsOnlyWhenUndersampled() {
        assertEquals(List.of(), SamplingCheck.warnings(new VoxelSize(0.09, 0.09, 0.2), OIL, "widefield", true));
        List<String> lateral = SamplingCheck.warnings(new VoxelSize(0.1, 0.1, 0.2), OIL, "widefield", true);
        assertEquals(1, lateral.size());
        assertTrue(lateral.get(0).startsWith("the pixel size 0.1 um is larger than the Nyquist limit 0.09286 um"),
                lateral.get(0));
        assertTrue(lateral.get(0).contains("undersampled"), lateral.get(0));
        List<String> axial = SamplingCheck.warnings(new VoxelSize(0.09, 0.09, 0.5), OIL, "widefield", true);
        assertEquals(1, axial.size());
        assertTrue(axial.get(0).startsWith("the z step 0.5 um is larger than the Nyquist limit"), axial.get(0));
        assertEquals(List.of(), SamplingCheck.warnings(new VoxelSize(0.09, 0.09, 0.5), OIL, "widefield", false),
                "a single plane has no z step to check");
    }
}
