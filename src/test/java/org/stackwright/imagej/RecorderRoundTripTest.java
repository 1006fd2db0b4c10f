package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
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

import javax.imageio.ImageIO;

import ij.IJ;
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
 * The real Macro Recorder on every dialog of every operation (and of the test operation, whose keys
 * {@code noise} and {@code read-noise} shadow each other on purpose): the command is started from its menu entry
 * with the Recorder window open, as a person would, every field is given a value other than its default, OK is
 * pressed, and then
 * <ul>
 * <li>the Recorder must not have refused a key (its "Duplicate keyword" message);</li>
 * <li>ImageJ's own {@code Macro.getValue} must read back, from the recorded line, the value each field showed
 * (and each checkbox must be a word of the line exactly when it was ticked);</li>
 * <li>the recorded line, run as a macro, must give the same settings.</li>
 * </ul>
 * The commands are the dry-run doors ({@link DryRunPlugin}: the real dialog and macro reading, no computation).
 * Generic over {@link Operations#all()}: a new key is checked when its operation is. A screenshot of each dialog
 * is written to target/dialogs/ for a person to look at.
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
        EventQueue.invokeAndWait(() -> new Recorder(true));
    }

    @AfterAll
    static void stop() {
        Recorder.record = false;
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
        String command = DryRunPlugin.label(op.name());
        ImageJHarness.closedDialogs();
        ImageJHarness.allowDialog(title);
        DryRunPlugin.last = null;
        int before = Recorder.getInstance().getText().length();
        cells.getWindow().toFront();
        IJ.doCommand(command);
        GenericDialog gd = waitForDialog(title);
        fillAndConfirm(gd, op, shots.resolve(op.name() + ".png"));
        long end = System.currentTimeMillis() + 30_000;
        String added = "";
        while (System.currentTimeMillis() < end) {
            added = Recorder.getInstance().getText().substring(before);
            if (DryRunPlugin.last != null && added.contains("run(\"" + command + "\"")) {
                break;
            }
            Thread.sleep(100);
        }
        ImageJHarness.allowDialog(null);
        List<String> refused = ImageJHarness.closedDialogs();
        assertEquals(List.of(), refused, op.name() + ": the Recorder (or another window) stopped the command");
        DoorSettings shown = DryRunPlugin.last;
        assertNotNull(shown, op.name() + ": the command did not finish");
        String options = recordedOptions(added, command);
        String where = op.name() + " recorded as '" + options + "'";

        // ImageJ's own reading of the recorded line gives each field's value
        for (Param p : OperationDialog.dialogOrder(op)) {
            String key = p.key();
            String got = Macro.getValue(options, key, null);
            switch (p.kind()) {
                case IMAGE -> assertEquals(shown.images().containsKey(key) ? shown.images().get(key).getTitle()
                        : OperationDialog.NONE, got, where + ": " + key);
                case OUTPUT_FILE -> assertEquals(shown.files().get(key), got, where + ": " + key);
                case FLAG -> assertEquals(Boolean.parseBoolean(shown.text().get(key)), isWord(options, key),
                        where + ": " + key);
                case OUTPUT_IMAGE -> assertEquals(shown.outputs().contains(key), isWord(options, key), where + ": " + key);
                // an empty text field is recorded as key=[] and read as "not given"
                default -> assertEquals(shown.text().getOrDefault(key, ""), got, where + ": " + key);
            }
        }
        if (OperationDialog.hasFiles(op)) {
            assertEquals(shown.overwrite(), isWord(options, DoorSettings.OVERWRITE), where + ": overwrite");
        }
        assertNotDefaults(op, shown, where);

        // the recorded line as a macro gives the same settings
        DryRunPlugin.last = null;
        String err = ImageJHarness.runMacro("run(\"" + command + "\", \"" + options + "\");", "");
        assertNull(err, where + ": " + err);
        DoorSettings back = DryRunPlugin.last;
        assertNotNull(back, where + ": the macro gave nothing");
        assertEquals(shown.text(), back.text(), where);
        assertEquals(shown.images(), back.images(), where);
        assertEquals(shown.outputs(), back.outputs(), where);
        assertEquals(shown.files(), back.files(), where);
        assertEquals(shown.overwrite(), back.overwrite(), where);
    }

    /** @return the options of the last {@code run("command", "options");} line the recorder wrote */
    private static String recordedOptions(String text, String command) {
        String head = "run(\"" + command + "\", \"";
        int at = text.lastIndexOf(head);
        assertTrue(at >= 0, "the recorder wrote no line for " + command + ": " + text);
        int end = text.indexOf("\");", at);
        return text.substring(at + head.length(), end);
    }

    /** @return true when the key is a word of the options outside brackets, as ImageJ reads a checkbox */
    static boolean isWord(String options, String key) {
        int depth = 0;
        String s = options + " ";
        for (int i = 0; i + key.length() < s.length(); i++) {
            char c = s.charAt(i);
            if (c == '[') {
                depth++;
            } else if (c == ']') {
                depth--;
            }
            if (depth == 0 && (i == 0 || s.charAt(i - 1) == ' ') && s.startsWith(key, i)
                    && s.charAt(i + key.length()) == ' ') {
                return true;
            }
        }
        return false;
    }

    private static void assertNotDefaults(Operation op, DoorSettings shown, String where) {
        Values a = Values.parse(op.name(), op.params(), ChannelRunner.perChannel(op, shown.text(), 1, 1));
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.NUMBER || p.kind() == Param.Kind.INTEGER || p.kind() == Param.Kind.CHOICE) {
                assertTrue(!a.raw(p.key()).equals(p.defaultValue()) || p.choices().size() == 1,
                        where + ": " + p.key() + " kept its default, so the round trip proves nothing for it");
            }
        }
    }

    private static GenericDialog waitForDialog(String title) throws InterruptedException {
        long end = System.currentTimeMillis() + 20_000;
        while (System.currentTimeMillis() < end) {
            for (java.awt.Window w : java.awt.Window.getWindows()) {
                if (w instanceof GenericDialog g && g.isShowing() && title.equals(g.getTitle())) {
                    return g;
                }
            }
            Thread.sleep(50);
        }
        throw new AssertionError("the dialog '" + title + "' did not open; closed instead: "
                + ImageJHarness.closedDialogs());
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
