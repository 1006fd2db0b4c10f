package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.registry.Operations;

/** The dialog's layout without a display: field order, labels, greying rules, wrapped text, old keys. */
class DialogLayoutTest {

    private static List<String> keys(List<Param> ps) {
        return ps.stream().map(Param::key).toList();
    }

    /**
     * ImageJ's recorder looks for "key=" (a checkbox: " key") in what it recorded so far: a key that ends (a
     * checkbox key that starts) another key must come first.
     */
    @Test
    void aKeyThatAnotherKeyHidesIsMovedInFront() {
        Param readNoise = Param.number("read-noise", 0.0, 0, 10, "ADU", "x");
        Param noise = Param.choice("noise", "a", List.of("a", "b"), "x");
        Param levelled = Param.outputImage("levelled-output", false, "x");
        Param level = Param.flag("level", "x");
        Param other = Param.number("gain", 1.0, 0, 10, "", "x");
        assertEquals(List.of("noise", "read-noise", "gain"),
                keys(DialogLayout.recorderSafe(List.of(readNoise, other, noise))));
        assertEquals(List.of("level", "levelled-output"), keys(DialogLayout.recorderSafe(List.of(levelled, level))));
        // a value key that only starts another key, and a checkbox that only ends one, are not hidden
        Param depth = Param.number("depth", 0.0, 0, 10, "um", "x");
        Param variant = Param.flag("depth-variant", "x");
        assertEquals(List.of("depth-variant", "depth"), keys(DialogLayout.recorderSafe(List.of(variant, depth))));
    }

    @Test
    void everyOperationsDialogIsInARecorderSafeOrderUnderHeadings() {
        for (Operation op : Operations.all()) {
            List<Param> order = OperationDialog.dialogOrder(op);
            for (int j = 0; j < order.size(); j++) {
                for (int i = 0; i < j; i++) {
                    assertFalse(DialogLayout.hides(order.get(i), order.get(j)),
                            op.name() + ": " + order.get(i).key() + " hides " + order.get(j).key());
                }
                String label = OperationDialog.label(order.get(j));
                assertTrue(Character.isUpperCase(label.charAt(0)), op.name() + ": label " + label);
                assertTrue(DialogLayout.HEADINGS.contains(DialogLayout.heading(op, order.get(j))));
            }
        }
    }

    @Test
    void greyingRulesNameSettingsThatExist() {
        for (String ruled : FieldRules.ruled()) {
            String[] opKey = ruled.split("/");
            Operation op = Operations.byName(opKey[0]).orElseThrow(() -> new AssertionError(ruled));
            assertTrue(op.params().stream().anyMatch(p -> p.key().equals(opKey[1])), ruled + " has no such setting");
        }
        Map<String, String> rl = Map.of("method", "richardson-lucy", "stop", "noise", "replicas", "0");
        Map<String, String> tv = Map.of("method", "total-variation", "stop", "change", "replicas", "3");
        assertFalse(FieldRules.applies("deconvolve", "regularization", rl::get));
        assertTrue(FieldRules.applies("deconvolve", "regularization", tv::get));
        assertFalse(FieldRules.applies("deconvolve", "tolerance", rl::get));
        assertTrue(FieldRules.applies("deconvolve", "tolerance", tv::get));
        assertFalse(FieldRules.applies("deconvolve", "spread-output", rl::get));
        assertTrue(FieldRules.applies("deconvolve", "spread-output", tv::get));
        assertTrue(FieldRules.applies("deconvolve", "offset", rl::get), "no rule: always applies");
        assertTrue(FieldRules.applies("psf", "pinhole", Map.<String, String>of()::get), "unknown state: not greyed");
    }

    @Test
    void longMessagesAreWrapped() {
        String msg = "psf = 'x' has 128x128x32 voxels; allowed: odd sizes only, with the peak at the centre voxel; "
                + "crop or pad it knowingly and give it again, or choose another image from the list of open images";
        String wrapped = OperationDialog.wrap(msg, 40);
        for (String line : wrapped.split("\n")) {
            assertTrue(line.length() <= 40, line);
        }
        assertEquals(msg, wrapped.replace('\n', ' '));
    }

    @Test
    void oldMacroKeysBecomeTheirNewKeysWithANote() {
        Operation op = Operations.byName("deconvolve").orElseThrow();
        List<String> notes = new ArrayList<>();
        MacroOptions mo = MacroOptions.parse("input=a noise=gaussian read-noise=2");
        mo.resolveAliases(op.name(), op.params(), notes::add);
        assertEquals("gaussian", mo.values().get("likelihood"));
        assertEquals("2", mo.values().get("read-noise"));
        assertFalse(mo.values().containsKey("noise"));
        assertEquals(1, notes.size());
        assertTrue(notes.get(0).contains("'noise' is the old name of 'likelihood'"), notes.get(0));
        MacroOptions both = MacroOptions.parse("noise=gaussian likelihood=poisson");
        assertThrows(IllegalArgumentException.class, () -> both.resolveAliases(op.name(), op.params(), n -> { }));
    }
}
