package org.stackwright.imagej;

import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;

import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.volume.ImagePlusAdapter;

/**
 * The recordable dialog of one operation, built from its {@link Param}s. Every label starts with the parameter
 * key, because ImageJ takes the first word of a label as the macro key: the Macro Recorder so writes
 * {@code key=value} with the same words as the command line. Numbers are text fields, so a value reaches the
 * operation exactly as typed or recorded, and a multi-channel image can take one value per channel
 * ({@code wavelength=520,610}).
 */
public final class OperationDialog {

    /** The choice that leaves an optional image out. */
    public static final String NONE = "none";

    private OperationDialog() {
    }

    /** @return the dialog label of a parameter: its key, then the unit or what kind of entry it is */
    public static String label(Param p) {
        return switch (p.kind()) {
            case OUTPUT_FILE -> p.key() + " (JSON file, empty = none)";
            case OUTPUT_IMAGE -> p.key() + " (make this image too)";
            default -> p.key() + (p.unit().isEmpty() ? "" : " (" + p.unit() + ")");
        };
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
            if (inDialog(p)) {
                keys.add(p.key());
            }
        }
        if (hasFiles(op)) {
            keys.add(DoorSettings.OVERWRITE);
        }
        return keys;
    }

    /**
     * @return the parameters in dialog order: input images first, then the settings in the operation's order,
     *     then the outputs
     */
    public static List<Param> dialogOrder(Operation op) {
        List<Param> out = new ArrayList<>();
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.IMAGE) {
                out.add(p);
            }
        }
        for (Param p : op.params()) {
            if (!p.isImageOrFile()) {
                out.add(p);
            }
        }
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) {
                out.add(p);
            }
        }
        return out;
    }

    static boolean hasFiles(Operation op) {
        return op.params().stream().anyMatch(p -> p.kind() == Param.Kind.OUTPUT_FILE);
    }

    /**
     * Builds the dialog (not shown). In a macro, ImageJ fills it from the options instead of showing it.
     *
     * @param current the image the first image choice defaults to and whose calibration gives the defaults of
     *     "pixel" (voxel width) and "step" (z step), or null
     */
    public static GenericDialog build(Operation op, String title, ImagePlus current) {
        GenericDialog gd = new GenericDialog(title);
        gd.addMessage(op.summary());
        String[] titles = WindowManager.getImageTitles();
        boolean firstImage = true;
        for (Param p : dialogOrder(op)) {
            String label = label(p);
            switch (p.kind()) {
                case IMAGE -> {
                    List<String> items = new ArrayList<>(List.of(titles));
                    if (!p.required()) {
                        items.add(0, NONE);
                    }
                    if (items.isEmpty()) {
                        items.add(NONE);
                    }
                    String def = defaultImage(p, items, current, firstImage);
                    firstImage = false;
                    gd.addChoice(label, items.toArray(new String[0]), def);
                }
                case OUTPUT_IMAGE -> {
                    if (inDialog(p)) {
                        gd.addCheckbox(label, false);
                    }
                }
                case OUTPUT_FILE -> gd.addFileField(label, "", 24);
                case CHOICE -> gd.addChoice(label, p.choices().toArray(new String[0]),
                        p.defaultValue() == null ? p.choices().get(0) : p.defaultValue());
                case FLAG -> gd.addCheckbox(label, "true".equals(p.defaultValue()));
                default -> gd.addStringField(label, defaultText(p, current), p.kind() == Param.Kind.TEXT ? 16 : 10);
            }
        }
        if (hasFiles(op)) {
            gd.addCheckbox(DoorSettings.OVERWRITE + " (replace existing files)", false);
        }
        gd.addHelp(HelpText.html(op));
        return gd;
    }

    private static String defaultImage(Param p, List<String> items, ImagePlus current, boolean first) {
        if (first && current != null && items.contains(current.getTitle())) {
            return current.getTitle();
        }
        if (!p.required()) {
            return NONE;
        }
        for (String t : items) {
            if (t.toLowerCase(Locale.ROOT).contains(p.key()) && (current == null || !t.equals(current.getTitle()))) {
                return t;
            }
        }
        return items.get(0);
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
        if (p.kind() == Param.Kind.NUMBER && current != null && ImagePlusAdapter.isCalibrated(current)) {
            if (p.key().equals("pixel")) {
                return round(ImagePlusAdapter.voxelSize(current).x());
            }
            if (p.key().equals("step") && current.getNSlices() > 1) {
                return round(ImagePlusAdapter.voxelSize(current).z());
            }
        }
        return p.defaultValue() == null ? "" : p.defaultValue();
    }

    private static String round(double v) {
        return new BigDecimal(v).round(new MathContext(6)).stripTrailingZeros().toPlainString();
    }

    /**
     * Reads the dialog back, in the order it was built (after showDialog, or directly in macro mode).
     *
     * @throws IllegalArgumentException when an image named in a macro is not open, naming the key
     */
    public static DoorSettings read(GenericDialog gd, Operation op) {
        DoorSettings s = new DoorSettings();
        for (Param p : dialogOrder(op)) {
            switch (p.kind()) {
                case IMAGE -> {
                    String t = gd.getNextChoice();
                    if (t != null && !t.isEmpty() && !t.equals(NONE)) {
                        ImagePlus imp = WindowManager.getImage(t);
                        if (imp == null) {
                            throw new IllegalArgumentException(p.key() + " = '" + t + "': no open image has this title");
                        }
                        s.images().put(p.key(), imp);
                    }
                }
                case OUTPUT_IMAGE -> {
                    if (!inDialog(p) || gd.getNextBoolean()) {
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
        if (hasFiles(op)) {
            s.overwrite(gd.getNextBoolean());
        }
        return s;
    }
}
