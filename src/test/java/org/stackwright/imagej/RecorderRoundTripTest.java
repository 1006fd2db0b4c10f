package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Button;
import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.EventQueue;
import java.awt.Rectangle;
import java.awt.Robot;
import java.awt.TextField;
import java.awt.event.ActionEvent;
import java.awt.image.BufferedImage;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.concurrent.atomic.AtomicReference;

import javax.imageio.ImageIO;

import ij.ImagePlus;
import ij.Macro;
import ij.gui.GenericDialog;
import ij.plugin.frame.Recorder;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;
import org.stackwright.op.Values;

/**
 * Recorder round trip of every key of every operation: the real dialog is shown (under Xvfb), filled with values
 * other than the defaults and confirmed, while ImageJ's Macro Recorder records it; then the dialog is built in
 * macro mode from the recorded options string and must give the same settings. A screenshot of each dialog is
 * written to target/dialogs/ for a person to look at.
 */
class RecorderRoundTripTest {

    private static ImagePlus cells;
    private static ImagePlus psf;

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
        cells = ImageJDoorTest.hyperstack("demo cells.tif", 1, 3, 1);
        cells.show();
        psf = ImageJDoorTest.hyperstack("psf", 1, 3, 1);
        psf.show();
        cells.getWindow().toFront();
        ij.WindowManager.setTempCurrentImage(cells);
    }

    @AfterAll
    static void stop() {
        ImageJHarness.closeAll();
    }

    @Test
    void everyKeyOfEveryOperationSurvivesTheRecorder() throws Exception {
        List<Operation> ops = new ArrayList<>(Operations.all());
        ops.add(new OffsetOperation());
        Path shots = Paths.get(System.getProperty("stackwright.build.dir", "target"), "dialogs");
        Files.createDirectories(shots);
        for (Operation op : ops) {
            roundTrip(op, shots);
        }
    }

    private void roundTrip(Operation op, Path shots) throws Exception {
        String title = "Stackwright " + op.name();
        Recorder.record = true; // before building: the dialog keeps its macro keys only while recording
        Recorder.resetCommandOptions();
        GenericDialog gd = OperationDialog.build(op, title, cells);
        ImageJHarness.allowDialog(title);
        AtomicReference<Throwable> failed = new AtomicReference<>();
        Thread filler = new Thread(() -> {
            try {
                fillAndConfirm(gd, op, shots.resolve(op.name() + ".png"));
            } catch (Throwable t) {
                failed.set(t);
                gd.dispose();
            }
        });
        filler.start();
        gd.showDialog();
        filler.join();
        if (failed.get() != null) {
            throw new AssertionError(failed.get());
        }
        DoorSettings shown = OperationDialog.read(gd, op);
        String recorded = Recorder.getCommandOptions();
        Recorder.record = false;
        ImageJHarness.allowDialog(null);
        assertNotNull(recorded, op.name() + ": nothing recorded");
        for (String key : OperationDialog.macroKeys(op)) {
            assertTrue((" " + recorded + " ").matches("(?s).* " + java.util.regex.Pattern.quote(key) + "[= ].*"),
                    op.name() + ": key " + key + " not recorded in: " + recorded);
        }

        AtomicReference<Object> fromMacro = new AtomicReference<>();
        Thread macro = new Thread(() -> {
            try {
                MacroOptions mo = MacroOptions.parse(recorded);
                mo.checkKeys(op.name(), OperationDialog.macroKeys(op));
                Macro.setOptions(mo.canonical());
                GenericDialog m = OperationDialog.build(op, title, cells);
                m.showDialog();
                fromMacro.set(OperationDialog.read(m, op));
                Macro.setOptions(null);
            } catch (Throwable t) {
                fromMacro.set(t);
            }
        }, "Run$_recorder round trip");
        macro.start();
        macro.join(20_000);
        if (fromMacro.get() instanceof Throwable t) {
            throw new AssertionError(op.name() + ": macro mode failed on " + recorded, t);
        }
        DoorSettings back = (DoorSettings) fromMacro.get();
        assertNotNull(back, op.name() + ": macro mode gave nothing");
        String where = op.name() + " from '" + recorded + "'";
        assertEquals(shown.text(), back.text(), where);
        assertEquals(shown.images(), back.images(), where);
        assertEquals(shown.outputs(), back.outputs(), where);
        assertEquals(shown.files(), back.files(), where);
        assertEquals(shown.overwrite(), back.overwrite(), where);
        Values a = Values.parse(op.name(), op.params(), ChannelRunner.perChannel(op, shown.text(), 1, 1));
        Values b = Values.parse(op.name(), op.params(), ChannelRunner.perChannel(op, back.text(), 1, 1));
        assertEquals(a.effective(), b.effective(), where);
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.NUMBER || p.kind() == Param.Kind.INTEGER || p.kind() == Param.Kind.CHOICE) {
                assertTrue(!a.raw(p.key()).equals(p.defaultValue()) || p.choices().size() == 1,
                        where + ": " + p.key() + " kept its default, so the round trip proves nothing for it");
            }
        }
    }

    /** Sets a value other than the default in every item, takes a screenshot, then presses OK. */
    private static void fillAndConfirm(GenericDialog gd, Operation op, Path png) throws Exception {
        long end = System.currentTimeMillis() + 10_000;
        while (!gd.isShowing() && System.currentTimeMillis() < end) {
            Thread.sleep(50);
        }
        Thread.sleep(300);
        EventQueue.invokeAndWait(() -> {
            Iterator<?> texts = gd.getStringFields() == null ? List.of().iterator() : gd.getStringFields().iterator();
            Iterator<?> choices = gd.getChoices() == null ? List.of().iterator() : gd.getChoices().iterator();
            Iterator<?> boxes = gd.getCheckboxes() == null ? List.of().iterator() : gd.getCheckboxes().iterator();
            for (Param p : OperationDialog.dialogOrder(op)) {
                switch (p.kind()) {
                    case IMAGE -> {
                        Choice c = (Choice) choices.next();
                        c.select(p.key().equals(ChannelRunner.mainInput(op)) ? cells.getTitle() : psf.getTitle());
                    }
                    case CHOICE -> {
                        Choice c = (Choice) choices.next();
                        c.select(other(p.choices(), p.defaultValue()));
                    }
                    case FLAG -> ((Checkbox) boxes.next()).setState(true);
                    case OUTPUT_IMAGE -> {
                        if (OperationDialog.inDialog(p)) {
                            ((Checkbox) boxes.next()).setState(true);
                        }
                    }
                    case OUTPUT_FILE -> ((TextField) texts.next()).setText("run record " + p.key() + ".json");
                    case NUMBER -> ((TextField) texts.next()).setText(otherNumber(p));
                    case INTEGER -> ((TextField) texts.next()).setText(otherInteger(p));
                    default -> {
                        TextField t = (TextField) texts.next();
                        if (p.required() && p.defaultValue() == null) {
                            t.setText(exampleFromHelp(p));
                        }
                    }
                }
            }
            if (boxes.hasNext()) {
                ((Checkbox) boxes.next()).setState(true);
            }
        });
        EventQueue.invokeAndWait(() -> {
            gd.validate();
            for (java.awt.Component c : gd.getComponents()) {
                c.repaint();
            }
            gd.repaint();
        });
        java.awt.Toolkit.getDefaultToolkit().sync();
        Thread.sleep(800);
        Rectangle r = gd.getBounds();
        BufferedImage shot = new Robot().createScreenCapture(r);
        ImageIO.write(shot, "png", png.toFile());
        EventQueue.invokeAndWait(() -> {
            Button ok = gd.getButtons()[0];
            gd.actionPerformed(new ActionEvent(ok, ActionEvent.ACTION_PERFORMED, ok.getLabel()));
        });
    }

    /** A required text setting without a default gets the example its help gives ("... (e.g. 65x65x41)"). */
    static String exampleFromHelp(Param p) {
        java.util.regex.Matcher m = java.util.regex.Pattern.compile("e\\.g\\. ([^ ),;]+)").matcher(p.help());
        if (!m.find()) {
            throw new AssertionError(p.key() + " is required without a default; its help should give an example (e.g. ...)");
        }
        return m.group(1);
    }

    private static String other(List<String> choices, String def) {
        String last = choices.get(choices.size() - 1);
        return last.equals(def) ? choices.get(0) : last;
    }

    /** A number inside the range, not the default, with several significant digits. */
    static String otherNumber(Param p) {
        double def = p.defaultValue() == null ? p.min() : Double.parseDouble(p.defaultValue());
        double v = def == 0 ? 0.375 : def * 1.375;
        if (v > p.max() || v < p.min()) {
            v = p.min() + (Math.min(p.max(), p.min() + 10) - p.min()) * 0.3125;
        }
        return Param.fmt(v);
    }

    static String otherInteger(Param p) {
        long def = p.defaultValue() == null ? (long) p.min() : Long.parseLong(p.defaultValue());
        return Long.toString(def + 1 <= p.max() ? def + 1 : def - 1);
    }
}
