package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import ij.plugin.frame.Recorder;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.registry.Operations;

/**
 * {@code deconvolve}'s output keys {@code residuals} and {@code residuals-summary}: the shorter key is contained in
 * the longer one, which ImageJ's Macro Recorder accepts only when the shorter comes first (it looks for
 * " residuals" in the options recorded so far). With a live Recorder and the command name set, as when a user
 * records, the ticked checkboxes are recorded in dialog order without the "Duplicate keyword" message, and the
 * reverse order shows why the order matters.
 */
class ResidualKeysRecorderTest {

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
        new Recorder(false);
    }

    @AfterAll
    static void stop() {
        Recorder.record = false;
        ImageJHarness.closeAll();
    }

    /** Records the ticked checkboxes as GenericDialog does (Recorder.recordOption(key)) in a thread of its own. */
    private static String record(List<String> keys) throws InterruptedException {
        ImageJHarness.closedDialogs();
        String[] options = new String[1];
        Thread t = new Thread(() -> {
            Recorder.setCommand("Deconvolve Stack...");
            for (String k : keys) {
                Recorder.recordOption(k);
            }
            options[0] = Recorder.getCommandOptions();
            Recorder.setCommand(null);
        }, "recording");
        t.start();
        t.join(30_000);
        return options[0];
    }

    @Test
    void residualKeysAreRecordedInDialogOrderWithoutDuplicateKeyword() throws Exception {
        Operation op = Operations.byName("deconvolve").orElseThrow();
        List<String> boxes = new ArrayList<>();
        for (Param p : OperationDialog.dialogOrder(op)) {
            if (p.kind() == Param.Kind.OUTPUT_IMAGE && OperationDialog.inDialog(p)) {
                boxes.add(p.key());
            }
        }
        assertTrue(boxes.indexOf("residuals") >= 0 && boxes.indexOf("residuals") < boxes.indexOf("residuals-summary"),
                "dialog order " + boxes);
        String recorded = record(boxes);
        assertEquals(List.of(), ImageJHarness.closedDialogs(), "a recorder message appeared");
        assertTrue((" " + recorded + " ").contains(" residuals residuals-summary "), recorded);
        // the other order trips ImageJ's duplicate check: the reason for the order above
        List<String> swapped = new ArrayList<>(boxes);
        java.util.Collections.swap(swapped, swapped.indexOf("residuals"), swapped.indexOf("residuals-summary"));
        record(swapped);
        assertTrue(ImageJHarness.closedDialogs().contains("Recorder"), "ImageJ's duplicate check did not fire");
    }
}
