package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Map;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.stackwright.volume.Volume;

/**
 * The automatic stop with {@code deconvolve}'s defaults (only the offset given) on the SECOND independent generator's
 * stacks ({@link ConditionStacks#SECOND}: {@code tools/reference/make_born_wolf_conditions.py}, the paraxial Born
 * &amp; Wolf integral, Born &amp; Wolf, "Principles of Optics", 7th ed., 1999, sec. 8.8.1; shells, filaments and
 * beads; an sCMOS-like camera with per-pixel gain, read noise and offset), against the oracle: the best error over
 * iteration counts of accelerated Richardson-Lucy with the true camera values, found with the truth. The model-error
 * rule of {@link AutoStop} was set on the first generator's stacks ({@link DefaultsNearOracleTest}); this is its check
 * on data it was not tuned on.
 *
 * <p>Measured (2 threads; ratio = default error / oracle error; trial fit excess at the held-out best; its spatially
 * structured part): exact 1.003 (2.9%, below 0), PSF cropped to 61% 1.002 (3.3%), 10% too wide 1.024 (3.0%), 10% too
 * narrow 0.999 (3.8%), background gradient 0.995 (0.1%), dim 1.011 (6.5%, structured below 0), bright 1.015 (121%,
 * structured below 0). Before the structure condition the rule fired on the dim stack (gain found 13% low) and on the
 * bright one (2% pixel gain spread), both with the exact PSF, and stopped at 3 and 34 iterations: ratios 1.141 and
 * 1.148. Here the cropped PSF's excess (3.3%) stays below the 4% threshold and its held-out stop is already within 1%
 * of the oracle (its best is after 38 iterations, not 10 as on the first generator's stacks), so the rule must not
 * fire on any condition. Goal as for the first generator: within 10% of the oracle, never the maximum.
 */
class BornWolfDefaultsNearOracleTest {

    private static Volume truth;

    @BeforeAll
    static void readTruth() {
        truth = ConditionStacks.read(ConditionStacks.BORN_WOLF, "truth");
    }

    @ParameterizedTest
    @ValueSource(strings = {"exact", "cropped", "wide", "narrow", "gradient", "dim", "bright"})
    void defaultStopIsWithinTenPercentOfTheOracle(String name) {
        ConditionStacks.Row row = ConditionStacks.run(ConditionStacks.named(ConditionStacks.SECOND, name), truth, 2);
        System.out.println("second generator: " + row.line());
        assertTrue(row.ratio() <= 1.10, row.line());
        assertFalse(row.reason().startsWith("maximum"), row.line());
        assertTrue(row.reason().startsWith("auto: " + row.iterations() + " iterations, where the fit to held-out"),
                row.line());
        assertFalse(row.modelErrorStop(), row.line());
        assertTrue(Double.isFinite(row.fitExcess()) && Double.isFinite(row.structuredExcess()), row.line());
        @SuppressWarnings("unchecked")
        Map<String, Object> settings = (Map<String, Object>) row.record().get("settings");
        assertEquals("auto", settings.get("stop"), settings.toString());
    }
}
