package org.stackwright.imagej;

import java.awt.Checkbox;
import java.awt.Component;
import java.awt.Font;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

import ij.ImagePlus;
import ij.Macro;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.volume.ImagePlusAdapter;

/**
 * The recordable dialog of one operation, built from its {@link Param}s: fields under headings
 * ({@link DialogLayout}), human labels with units, fields that do not apply greyed out ({@link FieldRules}), and,
 * for a person (not in a macro), the values last confirmed in this dialog ({@link SessionMemory}). Every field is
 * created with its key as label, because ImageJ takes the macro key from the label's first word: the Macro
 * Recorder so writes {@code key=value} with the same words as the command line, whatever the label shows. Numbers
 * are text fields, so a value reaches the operation exactly as typed or recorded, and a multi-channel image can
 * take one value per channel ({@code wavelength=520,610}).
 */
public final class OperationDialog {

    /** The choice that leaves an optional image out. */
    public static final String NONE = "none";

    private static final int WRAP = 72;

    private OperationDialog() {
    }

    /** @return the text shown beside a setting's field (the key is the macro key; this is for people) */
    public static String label(Param p) {
        return DialogLayout.label(p);
    }

    /**
     * @return true when the parameter has an item in the dialog: the main output image ("output") and required
     *     output images are always made, other output images are ticked
     */
    public static boolean inDialog(Param p) {
        return !(p.kind() == Param.Kind.OUTPUT_IMAGE && (p.required() || p.key().equals("output")));
    }

    /** @return every macro key the dialog of this operation reads */
    public static Set<String> macroKeys(Operation op) {
        Set<String> keys = new LinkedHashSet<>();
        for (Param p : dialogOrder(op)) {
            keys.add(p.key());
        }
        if (hasFiles(op)) {
            keys.add(DoorSettings.OVERWRITE);
        }
        return keys;
    }

    /** @return the parameters that have a dialog item, in dialog order (see {@link DialogLayout#order}) */
    public static List<Param> dialogOrder(Operation op) {
        List<Param> fields = new ArrayList<>();
        for (Param p : op.params()) {
            if (inDialog(p)) {
                fields.add(p);
            }
        }
        return DialogLayout.order(op, fields);
    }

    static boolean hasFiles(Operation op) {
        return op.params().stream().anyMatch(p -> p.kind() == Param.Kind.OUTPUT_FILE);
    }

    /**
     * Builds the dialog (not shown). In a macro, ImageJ fills it from the options instead of showing it; there
     * the defaults are the operation's own, since the recorded line says everything else.
     *
     * @param current the image the main input defaults to and whose calibration gives the defaults of "pixel"
     *     (voxel width) and "step" (z step), or null
     */
    public static GenericDialog build(Operation op, String title, ImagePlus current) {
        boolean person = Macro.getOptions() == null;
        Suggestions suggest = person ? Suggestions.of(op) : Suggestions.none();
        GenericDialog gd = new GenericDialog(title);
        String summary = op.summary();
        gd.addMessage(wrap(Character.toUpperCase(summary.charAt(0)) + summary.substring(1) + ".", WRAP));
        List<String> titles = ImageChoices.titles();
        Map<String, Component[]> fields = new LinkedHashMap<>();
        String heading = null;
        String input = null;
        String mainKey = ChannelRunner.mainInput(op);
        for (Param p : dialogOrder(op)) {
            String h = DialogLayout.heading(op, p);
            if (!h.equals(heading)) {
                gd.setInsets(heading == null ? 10 : 12, 0, 0);
                gd.addMessage(h, new Font("SansSerif", Font.BOLD, 12));
                heading = h;
            }
            String key = p.key();
            switch (p.kind()) {
                case IMAGE -> {
                    List<String> items = new ArrayList<>(titles);
                    if (!p.required()) {
                        items.add(0, NONE);
                    }
                    boolean main = key.equals(mainKey);
                    if (key.equals("psf") && p.required() && ImageChoices.newestPsf(items, input) == null
                            && !suggest.images().containsKey(key)) {
                        items.add(0, ImageChoices.CHOOSE_PSF);
                    }
                    if (items.isEmpty()) {
                        items.add(NONE);
                    }
                    String def = ImageChoices.initial(key, p.required(), items, current, main,
                            suggest.images().get(key), input);
                    if (main) {
                        input = def;
                    }
                    gd.addChoice(key, items.toArray(new String[0]), def);
                    fields.put(key, labelled(gd, gd.getChoices(), p));
                }
                case OUTPUT_IMAGE, FLAG -> {
                    String remembered = suggest.values().get(key);
                    boolean on = remembered != null ? remembered.equals("true") : "true".equals(p.defaultValue());
                    gd.addCheckbox(key, on);
                    Checkbox cb = (Checkbox) gd.getCheckboxes().lastElement();
                    cb.setLabel(label(p));
                    fields.put(key, new Component[] {cb});
                }
                case OUTPUT_FILE -> {
                    gd.addFileField(key, "", 24);
                    fields.put(key, labelled(gd, gd.getStringFields(), p));
                }
                case CHOICE -> {
                    String remembered = suggest.values().get(key);
                    String def = remembered != null && p.choices().contains(remembered) ? remembered
                            : p.defaultValue() == null ? p.choices().get(0) : p.defaultValue();
                    gd.addChoice(key, p.choices().toArray(new String[0]), def);
                    fields.put(key, labelled(gd, gd.getChoices(), p));
                }
                default -> {
                    String def = defaultText(p, current);
                    String remembered = suggest.values().get(key);
                    if (remembered != null && !calibrationDefault(p, current)) {
                        def = remembered;
                    }
                    gd.addStringField(key, def, p.kind() == Param.Kind.TEXT ? 16 : 10);
                    fields.put(key, labelled(gd, gd.getStringFields(), p));
                }
            }
        }
        if (hasFiles(op)) {
            gd.addCheckbox(DoorSettings.OVERWRITE, false);
            ((Checkbox) gd.getCheckboxes().lastElement()).setLabel(DialogLayout.overwriteLabel());
        }
        gd.addHelp(HelpText.html(op));
        if (person) {
            Greying.attach(op.name(), fields);
        }
        return gd;
    }

    /**
     * Replaces the text shown beside the field just added by the human label; the macro key was already taken
     * from the key the field was created with.
     *
     * @return the field and its label (for greying out)
     */
    private static Component[] labelled(GenericDialog gd, java.util.Vector<?> components, Param p) {
        Component field = (Component) components.lastElement();
        java.awt.Label label = gd.getLabel();
        if (label == null) {
            return new Component[] {field};
        }
        label.setText(label(p));
        return new Component[] {field, label};
    }

    /** @return true when the default of this field comes from the current image's calibration */
    private static boolean calibrationDefault(Param p, ImagePlus current) {
        return p.kind() == Param.Kind.NUMBER && current != null && ImagePlusAdapter.isCalibrated(current)
                && (p.key().equals("pixel") || p.key().equals("step") && current.getNSlices() > 1);
    }

    /**
     * The default text of a number or text field: the voxel size of the current image for pixel and step; its
     * line selection (x0,y0,x1,y1) for line and its current slice for plane.
     */
    static String defaultText(Param p, ImagePlus current) {
        if (current != null && p.key().equals("line") && current.getRoi() instanceof ij.gui.Line l) {
            return String.format(java.util.Locale.ROOT, "%.1f,%.1f,%.1f,%.1f", l.x1d, l.y1d, l.x2d, l.y2d);
        }
        if (current != null && p.key().equals("plane") && p.kind() == Param.Kind.INTEGER) {
            return Integer.toString(current.getZ());
        }
        if (calibrationDefault(p, current)) {
            return p.key().equals("pixel") ? round(ImagePlusAdapter.voxelSize(current).x())
                    : round(ImagePlusAdapter.voxelSize(current).z());
        }
        return p.defaultValue() == null ? "" : p.defaultValue();
    }

    private static String round(double v) {
        return new BigDecimal(v).round(new MathContext(6)).stripTrailingZeros().toPlainString();
    }

    /**
     * Reads the dialog back, in the order it was built (after showDialog, or directly in macro mode).
     *
     * @throws IllegalArgumentException when an image named in a macro is not open, or the PSF was not chosen,
     *     naming the key
     */
    public static DoorSettings read(GenericDialog gd, Operation op) {
        DoorSettings s = new DoorSettings();
        for (Param p : dialogOrder(op)) {
            switch (p.kind()) {
                case IMAGE -> {
                    String t = gd.getNextChoice();
                    if (ImageChoices.CHOOSE_PSF.equals(t)) {
                        throw new IllegalArgumentException(p.key() + ": choose the PSF image (none of the open images "
                                + "looks like one: odd sizes, no larger than the input, brightest at the centre)");
                    }
                    if (t != null && !t.isEmpty() && !t.equals(NONE)) {
                        ImagePlus imp = WindowManager.getImage(t);
                        if (imp == null) {
                            throw new IllegalArgumentException(p.key() + " = '" + t + "': no open image has this title");
                        }
                        s.images().put(p.key(), imp);
                    }
                }
                case OUTPUT_IMAGE -> {
                    if (gd.getNextBoolean()) {
                        s.outputs().add(p.key());
                    }
                }
                case OUTPUT_FILE -> {
                    String path = gd.getNextString().trim();
                    if (!path.isEmpty()) {
                        s.files().put(p.key(), path);
                    }
                }
                case CHOICE -> s.text().put(p.key(), gd.getNextChoice());
                case FLAG -> s.text().put(p.key(), Boolean.toString(gd.getNextBoolean()));
                default -> {
                    String v = gd.getNextString().trim();
                    if (!v.isEmpty() || p.defaultValue() != null) {
                        s.text().put(p.key(), v);
                    }
                }
            }
        }
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.OUTPUT_IMAGE && !inDialog(p)) {
                s.outputs().add(p.key());
            }
        }
        if (hasFiles(op)) {
            s.overwrite(gd.getNextBoolean());
        }
        return s;
    }

    /** @return the text with line breaks at spaces so that no line is longer than width (longer words stay whole) */
    static String wrap(String text, int width) {
        StringBuilder out = new StringBuilder();
        for (String line : text.split("\n", -1)) {
            if (out.length() > 0) {
                out.append('\n');
            }
            int col = 0;
            for (String word : line.split(" ", -1)) {
                if (col > 0 && col + 1 + word.length() > width) {
                    out.append('\n');
                    col = 0;
                } else if (col > 0) {
                    out.append(' ');
                    col++;
                }
                out.append(word);
                col += word.length();
            }
        }
        return out.toString();
    }

    /** The values and images a dialog starts on for a person: remembered ones, or a follow-up of the last run. */
    record Suggestions(Map<String, String> values, Map<String, String> images) {

        static Suggestions none() {
            return new Suggestions(Map.of(), Map.of());
        }

        static Suggestions of(Operation op) {
            Map<String, String> values = SessionMemory.values(op.name());
            Map<String, String> images = SessionMemory.images(op.name());
            String lastEstimate = images.get("estimate");
            images.remove(ChannelRunner.mainInput(op)); // the main input is the current image, as in ImageJ
            SessionMemory.Deconvolution d = SessionMemory.lastDeconvolution();
            if (op.name().equals("residuals") && d != null && d.result() != null
                    && WindowManager.getImage(d.result()) != null && !d.result().equals(lastEstimate)) {
                images.put("input", d.input());
                images.put("estimate", d.result());
                if (d.psf() != null) {
                    images.put("psf", d.psf());
                }
                values.putAll(d.camera());
            }
            return new Suggestions(values, images);
        }
    }
}
