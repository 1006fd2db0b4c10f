package org.stackwright.imagej;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;

/**
 * How a dialog presents an operation's settings: under which heading (data, PSF, optics, method, stopping,
 * camera, outputs, ...) each setting stands, its human label, and the order of the fields.
 *
 * <p>Labels and keys: ImageJ takes the macro key from the first word of the label a field is created with. Each
 * field is therefore created with its key as label (so the Macro Recorder writes the command-line word), and only
 * then is the text shown beside it replaced by the human label ({@code GenericDialog.getLabel()},
 * {@code Checkbox.setLabel}): the key never depends on the wording.
 *
 * <p>Order and the Macro Recorder: the recorder refuses ("Duplicate keyword") a key {@code k=} that it finds
 * anywhere in what it has recorded so far, so {@code output=} after {@code psf-output=} pops a dialog; and
 * ImageJ's {@code Macro.getValue} reads the first {@code k=} not preceded by a letter. So a key that ends another
 * key (a checkbox: that starts another key) is placed before it ({@link #recorderSafe}); the rule is in
 * DEVELOPERS.md and {@code RecorderTest} checks it with the real recorder for every operation.
 */
final class DialogLayout {

    /** The headings, in the order they appear. */
    static final List<String> HEADINGS = List.of("Data", "PSF", "Optics", "Voxel grid", "Specimen", "Tiles",
            "Detection", "Levelling", "Method", "Stopping", "Camera", "Settings", "Outputs");

    private static final Map<String, String> GROUP = new LinkedHashMap<>();
    private static final Map<String, String> LABEL = new LinkedHashMap<>();

    static {
        group("PSF", "model", "excitation", "pinhole", "bead-diameter", "saturation");
        group("Optics", "na", "wavelength", "immersion-index", "sample-index", "coverslip-index",
                "coverslip-thickness", "coverslip-design-thickness", "depth");
        group("Voxel grid", "pixel", "step", "size");
        group("Specimen", "specimen", "brightness", "beads", "defects", "seed");
        group("Tiles", "grid", "tile", "overlap", "order", "seam-width");
        group("Detection", "detect", "threshold", "fraction");
        group("Levelling", "level", "level-tiles", "strip");
        group("Method", "method", "mode", "regularization", "boundary", "acceleration", "replicas", "data-range", "fft");
        group("Stopping", "iterations", "stop", "tolerance");
        group("Camera", "offset", "background", "gain", "read-noise", "likelihood", "bits");
        GROUP.put("psf-from-beads/size", "PSF");
        GROUP.put("psf/size", "Voxel grid");
        GROUP.put("seam-mask/offset", "Levelling");
        GROUP.put("simulate/grid", "Specimen");
        GROUP.put("simulate/seam-width", "Specimen");
        GROUP.put("simulate/background", "Specimen");

        LABEL.put("input", "Image");
        LABEL.put("psf", "PSF");
        LABEL.put("estimate", "Estimate (e.g. a deconvolution result)");
        LABEL.put("reference", "Reference");
        LABEL.put("mask", "Mask (nonzero = untrusted)");
        LABEL.put("dark", "Dark frames");
        LABEL.put("flat", "Flat frames");
        LABEL.put("model", "Model");
        LABEL.put("na", "Numerical aperture (NA)");
        LABEL.put("wavelength", "Emission wavelength");
        LABEL.put("excitation", "Excitation wavelength (0 = emission)");
        LABEL.put("immersion-index", "Immersion refractive index");
        LABEL.put("sample-index", "Sample refractive index");
        LABEL.put("coverslip-index", "Coverslip refractive index");
        LABEL.put("coverslip-thickness", "Coverslip thickness");
        LABEL.put("coverslip-design-thickness", "Coverslip design thickness");
        LABEL.put("depth", "Depth below the coverslip");
        LABEL.put("pinhole", "Pinhole diameter");
        LABEL.put("pixel", "Pixel size (x, y)");
        LABEL.put("step", "Z step");
        LABEL.put("size", "Size (WxHxD voxels, odd)");
        LABEL.put("bead-diameter", "Bead diameter (0 = no correction)");
        LABEL.put("saturation", "Saturation level (0 = find)");
        LABEL.put("grid", "Grid (rows x columns, e.g. 3x4)");
        LABEL.put("tile", "Tile size (WxH pixels)");
        LABEL.put("overlap", "Overlap (pixels, or % of the tile)");
        LABEL.put("order", "Tile order");
        LABEL.put("seam-width", "Seam width (pixels)");
        LABEL.put("detect", "Detect the seams in the image");
        LABEL.put("threshold", "Threshold");
        LABEL.put("fraction", "Fraction of planes");
        LABEL.put("level", "Estimate a gain per tile");
        LABEL.put("level-tiles", "Correct shading and gain of the tiles");
        LABEL.put("strip", "Strip beside each seam (pixels)");
        LABEL.put("method", "Method");
        LABEL.put("mode", "Mode");
        LABEL.put("regularization", "Regularization (lambda, or auto)");
        LABEL.put("boundary", "Boundary");
        LABEL.put("acceleration", "Acceleration");
        LABEL.put("replicas", "Noise replicas (0 = off)");
        LABEL.put("data-range", "Data range (empty = reference max - min)");
        LABEL.put("fft", "FFT engine");
        LABEL.put("block-size", "Block size (WxHxD voxels, or auto)");
        LABEL.put("memory", "Memory to use (e.g. 4g; empty = the heap)");
        LABEL.put("iterations", "Iterations (maximum)");
        LABEL.put("stop", "Stop rule");
        LABEL.put("tolerance", "Tolerance");
        LABEL.put("offset", "Camera offset");
        LABEL.put("background", "Background (number or auto)");
        LABEL.put("gain", "Gain");
        LABEL.put("read-noise", "Read noise");
        LABEL.put("likelihood", "Noise model");
        LABEL.put("bits", "Bits per pixel");
        LABEL.put("specimen", "Specimen");
        LABEL.put("brightness", "Brightness");
        LABEL.put("beads", "Beads");
        LABEL.put("defects", "Defective pixels of each kind");
        LABEL.put("seed", "Random seed");
        LABEL.put("record", "Run record (JSON file, empty = none)");
        LABEL.put("summary", "Make the summary picture");
        LABEL.put("truth", "Make the truth image");
        LABEL.put("psf-output", "Make the PSF image");
        LABEL.put("mask-output", "Make the damage mask");
        LABEL.put("filled-output", "Make the mask of filled pixels");
        LABEL.put("levelled-output", "Make the levelled image (needs a gain per tile or the correction)");
        LABEL.put("flat-field", "Make the shading of one tile (needs shading and gain correction)");
        LABEL.put("spread-output", "Make the spread map (needs replicas)");
        LABEL.put("bias-output", "Make the bias map (needs replicas)");
        LABEL.put(DoorSettings.OVERWRITE, "Replace existing files");
    }

    private DialogLayout() {
    }

    private static void group(String heading, String... keys) {
        for (String k : keys) {
            GROUP.put(k, heading);
        }
    }

    /** @return the heading a setting stands under */
    static String heading(Operation op, Param p) {
        String h = GROUP.get(op.name() + "/" + p.key());
        if (h != null) {
            return h;
        }
        return switch (p.kind()) {
            case IMAGE -> p.key().equals("psf") ? "PSF" : "Data";
            case OUTPUT_IMAGE, OUTPUT_FILE -> "Outputs";
            default -> GROUP.getOrDefault(p.key(), "Settings");
        };
    }

    /**
     * @return the text shown beside a field: the human label (for a setting without one, its key in words),
     *     with the unit in brackets
     */
    static String label(Param p) {
        return label(p.key(), p.unit(), p.kind());
    }

    /** @return the label of the overwrite switch */
    static String overwriteLabel() {
        return LABEL.get(DoorSettings.OVERWRITE);
    }

    private static String label(String key, String unit, Param.Kind kind) {
        String text = LABEL.get(key);
        if (text == null) {
            String words = key.replace('-', ' ');
            text = kind == Param.Kind.OUTPUT_IMAGE ? "Make " + words.replace(" output", "") + " image"
                    : Character.toUpperCase(words.charAt(0)) + words.substring(1);
        }
        if (!unit.isEmpty() && kind != Param.Kind.OUTPUT_IMAGE) {
            text += " (" + unit + ")";
        }
        return text;
    }

    /**
     * @return the dialog fields in order: by heading ({@link #HEADINGS}), the operation's order within a heading,
     *     then moved where needed so that the Macro Recorder accepts every key ({@link #recorderSafe})
     */
    static List<Param> order(Operation op, List<Param> fields) {
        List<Param> out = new ArrayList<>();
        for (String h : HEADINGS) {
            for (Param p : fields) {
                if (heading(op, p).equals(h)) {
                    out.add(p);
                }
            }
        }
        for (Param p : fields) {
            if (!out.contains(p)) {
                out.add(p);
            }
        }
        return recorderSafe(out);
    }

    /**
     * Moves each key in front of every earlier key that would hide it from the Macro Recorder and from
     * {@code Macro.getValue} ({@link #hides}). Stable: fields that need no move keep their order.
     *
     * @param fields in the intended order; not modified
     */
    static List<Param> recorderSafe(List<Param> fields) {
        List<Param> out = new ArrayList<>(fields);
        for (int pass = 0; pass < out.size() * out.size() + 1; pass++) {
            boolean moved = false;
            for (int j = 0; j < out.size() && !moved; j++) {
                for (int i = 0; i < j; i++) {
                    if (hides(out.get(i), out.get(j))) {
                        out.add(i, out.remove(j));
                        moved = true;
                        break;
                    }
                }
            }
            if (!moved) {
                return out;
            }
        }
        throw new IllegalStateException("no recorder-safe order for " + fields.stream().map(Param::key).toList());
    }

    /**
     * @return true when {@code earlier}, recorded first, would make the recorder refuse {@code later}: for a
     *     checkbox, the recorder looks for " later" (so a key that starts with it hides it); for a value, it
     *     looks for "later=" (so a key that ends with it hides it)
     */
    static boolean hides(Param earlier, Param later) {
        String e = earlier.key();
        String l = later.key();
        if (e.equals(l)) {
            return false;
        }
        return checkbox(later) ? e.startsWith(l) : e.endsWith(l);
    }

    /** @return true for the settings a dialog shows as a checkbox */
    static boolean checkbox(Param p) {
        return p.kind() == Param.Kind.FLAG || p.kind() == Param.Kind.OUTPUT_IMAGE;
    }
}
