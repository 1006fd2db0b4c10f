package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.testing.ExpectedOperations;

/** plugins.config: one menu entry per operation under Plugins>Stackwright, grouped, with labels of our own. */
class MenusTest {

    private static final Pattern LINE = Pattern.compile(
            "^(Plugins>Stackwright(?:>\\w+)?), \"([^\"]+)\", org\\.stackwright\\.imagej\\.OperationPlugin\\(\"([a-z-]+)\"\\)$");

    /** label to operation name, and checks the form of every line. */
    static Map<String, String> entries() throws IOException {
        Map<String, String> m = new LinkedHashMap<>();
        try (InputStream in = MenusTest.class.getResourceAsStream("/plugins.config")) {
            assertNotNull(in, "plugins.config must be at the root of the jar");
            for (String line : new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n")) {
                if (line.isBlank() || line.startsWith("#")) {
                    continue;
                }
                Matcher mt = LINE.matcher(line.trim());
                assertTrue(mt.matches(), "bad plugins.config line: " + line);
                String group = mt.group(1);
                String op = mt.group(3);
                assertTrue(Set.of("Plugins>Stackwright>PSF", "Plugins>Stackwright>Deconvolve", "Plugins>Stackwright>Repair",
                        "Plugins>Stackwright>Inspect", "Plugins>Stackwright>Tools", "Plugins>Stackwright").contains(group),
                        "unexpected menu group " + group);
                assertTrue(op.equals("about") == group.equals("Plugins>Stackwright"), "only About sits at the top: " + line);
                assertFalse(m.containsKey(mt.group(2)), "label used twice: " + mt.group(2));
                m.put(mt.group(2), op);
            }
        }
        return m;
    }

    /** Submenus in the order of the work: ImageJ creates them in the order of their first line. */
    @Test
    void submenusFollowTheOrderOfTheWork() throws IOException {
        java.util.List<String> groups = new java.util.ArrayList<>();
        try (InputStream in = MenusTest.class.getResourceAsStream("/plugins.config")) {
            for (String line : new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n")) {
                Matcher mt = LINE.matcher(line.trim());
                if (mt.matches() && !groups.contains(mt.group(1))) {
                    groups.add(mt.group(1));
                }
            }
        }
        assertEquals(java.util.List.of("Plugins>Stackwright>PSF", "Plugins>Stackwright>Deconvolve",
                "Plugins>Stackwright>Inspect", "Plugins>Stackwright>Repair", "Plugins>Stackwright>Tools",
                "Plugins>Stackwright"), groups);
    }

    @Test
    void everyRegisteredOperationHasAMenuEntry() throws IOException {
        Set<String> listed = new HashSet<>(entries().values());
        for (Operation op : Operations.all()) {
            assertTrue(listed.contains(op.name()), "plugins.config has no entry for operation " + op.name());
        }
        assertTrue(listed.contains("about"));
    }

    /** Strict after the merge: see {@link ExpectedOperations#STRICT}. */
    @Test
    void everyMenuEntryHasARegisteredOperation() throws IOException {
        Set<String> registered = new HashSet<>();
        Operations.all().forEach(o -> registered.add(o.name()));
        for (Map.Entry<String, String> e : entries().entrySet()) {
            String op = e.getValue();
            assertTrue(op.equals("about") || registered.contains(op) || ExpectedOperations.tolerated(op),
                    "menu entry '" + e.getKey() + "' names operation '" + op + "', which is not registered");
        }
        assertEquals(ExpectedOperations.NAMES.size() + 1, entries().size(), "one entry per operation plus About");
    }

    /** ImageJ's command names are global: ours must not take the name of a built-in command. */
    @Test
    void labelsDoNotClashWithImageJCommands() throws IOException {
        String props;
        try (InputStream in = ij.IJ.class.getResourceAsStream("/IJ_Props.txt")) {
            props = new String(in.readAllBytes(), StandardCharsets.ISO_8859_1);
        }
        for (String label : entries().keySet()) {
            assertFalse(props.contains("\"" + label + "\""), label + " is already an ImageJ command");
        }
    }

    @Test
    void helpPageListsEveryKeyWithUnitAndAllowedValues() {
        for (Operation op : Operations.all()) {
            String html = HelpText.html(op);
            for (org.stackwright.op.Param p : op.params()) {
                if (OperationDialog.inDialog(p)) {
                    assertTrue(html.contains("<td>" + p.key() + "</td><td>" + p.unit() + "</td>"), op.name() + " " + p.key());
                }
            }
            assertTrue(html.contains("estimates"), "cautions on every help page");
        }
    }

    @Test
    void aboutNamesTheVersionAndTheCautions() {
        String text = About.text();
        assertTrue(text.startsWith("Stackwright "));
        assertTrue(text.contains("estimates") && text.contains("Not for diagnostic use"), text);
        for (Operation op : Operations.all()) {
            assertTrue(text.contains(op.name() + ": "), op.name());
        }
    }
}
