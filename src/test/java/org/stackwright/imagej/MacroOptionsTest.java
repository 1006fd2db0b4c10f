package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;

import ij.Macro;

import org.junit.jupiter.api.Test;

/** Reading macro options exactly, and the per-channel value rule; no display needed. */
class MacroOptionsTest {

    @Test
    void readsPlainBracketedQuotedAndBareValues() {
        Map<String, String> m = MacroOptions.parse("input=[demo cells.tif] na=1.4  note='a b' truth method=rl").values();
        Map<String, String> expected = new LinkedHashMap<>();
        expected.put("input", "demo cells.tif");
        expected.put("na", "1.4");
        expected.put("note", "a b");
        expected.put("truth", null);
        expected.put("method", "rl");
        assertEquals(expected, m);
    }

    /** ImageJ's own search finds "output=" inside "psf-output="; the canonical order fixes that. */
    @Test
    void keysThatEndAlikeGetTheirOwnValueFromImageJsSearch() {
        String given = "psf-output=p.tif read-noise=2 output=o.tif noise=poisson";
        assertEquals("p.tif", Macro.getValue(given, "output", null), "the flaw this class works around");
        String canonical = MacroOptions.parse(given).canonical();
        assertEquals("o.tif", Macro.getValue(canonical, "output", null));
        assertEquals("p.tif", Macro.getValue(canonical, "psf-output", null));
        assertEquals("poisson", Macro.getValue(canonical, "noise", null));
        assertEquals("2", Macro.getValue(canonical, "read-noise", null));
    }

    @Test
    void anAbsentKeyHiddenInsideALongerOneGetsItsDefault() {
        // "noise" is absent; ImageJ's search alone would read "2" from read-noise=2 for it
        String given = "read-noise=2 offset=100";
        assertEquals("2", Macro.getValue(given, "noise", null), "the flaw this guards against");
        MacroOptions mo = MacroOptions.parse(given);
        mo.fillShadowedKeys(java.util.List.of(
                org.stackwright.op.Param.choice("noise", "poisson", java.util.List.of("poisson", "gaussian"), "noise"),
                org.stackwright.op.Param.number("read-noise", 0.0, 0, 100, "ADU", "read noise"),
                org.stackwright.op.Param.number("offset", 0.0, -1e6, 1e6, "ADU", "offset"),
                org.stackwright.op.Param.number("set", null, 0, 1, "", "not hidden anywhere")));
        String c = mo.canonical();
        assertEquals("poisson", Macro.getValue(c, "noise", null));
        assertEquals("2", Macro.getValue(c, "read-noise", null));
        assertNull(Macro.getValue(c, "set", null), "a key hidden nowhere stays absent");
    }

    @Test
    void unknownKeysAndUnclosedBracketsAreRefusedWithTheirName() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> MacroOptions.parse("na=1 wavelenght=500").checkKeys("psf", Set.of("na", "wavelength")));
        assertTrue(e.getMessage().contains("wavelenght") && e.getMessage().contains("wavelength"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> MacroOptions.parse("input=[a b na=1"));
        assertTrue(e.getMessage().contains("input"), e.getMessage());
    }

    @Test
    void aListGivesOneValuePerChannel() {
        OffsetOperation op = new OffsetOperation();
        Map<String, String> text = Map.of("wavelength", "500, 600", "note", "a,b");
        assertEquals("600", ChannelRunner.perChannel(op, text, 2, 2).get("wavelength"));
        assertEquals("a,b", ChannelRunner.perChannel(op, text, 2, 2).get("note"), "free text is not split");
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ChannelRunner.perChannel(op, Map.of("wavelength", "500,600,700"), 1, 2));
        assertTrue(e.getMessage().startsWith("wavelength = '500,600,700'"), e.getMessage());
        assertNull(ChannelRunner.perChannel(op, Map.of(), 1, 1).get("wavelength"));
    }
}
