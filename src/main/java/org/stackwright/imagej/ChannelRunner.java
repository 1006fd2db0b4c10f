package org.stackwright.imagej;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.BooleanSupplier;
import java.util.function.Consumer;

import ij.ImagePlus;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;

/**
 * Runs an operation on ImageJ images for the ImageJ and SciJava doors, hyperstacks included.
 *
 * <p>The rule for hyperstacks: the main input (the image setting called "input", else the first image setting) is
 * split into its channels and time points, and each (channel, time point) is its own problem, run in turn (time
 * points outer, channels inner). Per channel:
 * <ul>
 * <li>a number or choice may be given as a comma list with one value per channel ({@code wavelength=520,610});
 * a single value is used for every channel;</li>
 * <li>another image setting (a PSF, a mask, a reference) with as many channels as the input gives channel c its
 * own channel c; with one channel it is used for every channel. Likewise for time points.</li>
 * </ul>
 * Output images of all parts are put back together as a hyperstack with the input's channels and time points.
 * All settings of all parts are checked before the first part runs.
 */
public final class ChannelRunner {

    /** One (channel, time point) problem and what it gave. */
    public record Part(int channel, int frame, Values values, Result result, List<String> warnings) {
    }

    /** Everything a run produced. */
    public record Outcome(ImagePlus mainInput, List<Part> parts, Map<String, ImagePlus> images) {

        /** @return the run record: the operation's record (one part), or one record per part */
        public Map<String, Object> record() {
            if (parts.size() == 1) {
                Map<String, Object> r = new LinkedHashMap<>(parts.get(0).result().record());
                if (!parts.get(0).warnings().isEmpty()) {
                    r.put("warnings", parts.get(0).warnings());
                }
                return r;
            }
            Map<String, Object> r = new LinkedHashMap<>();
            List<Object> list = new ArrayList<>();
            for (Part p : parts) {
                Map<String, Object> one = new LinkedHashMap<>();
                one.put("channel", p.channel());
                one.put("frame", p.frame());
                one.put("record", p.result().record());
                if (!p.warnings().isEmpty()) {
                    one.put("warnings", p.warnings());
                }
                list.add(one);
            }
            r.put("parts", list);
            return r;
        }
    }

    private ChannelRunner() {
    }

    /** @return the key of the main input image, or null when the operation takes no image */
    public static String mainInput(Operation op) {
        String first = null;
        for (Param p : op.params()) {
            if (p.kind() == Param.Kind.IMAGE) {
                if (p.key().equals("input")) {
                    return p.key();
                }
                if (first == null) {
                    first = p.key();
                }
            }
        }
        return first;
    }

    /**
     * Checks all settings, then runs every part.
     *
     * @param settings what the user chose; the images in it are not modified
     * @param progress overall progress of the run
     * @throws IllegalArgumentException for bad settings, naming the key
     * @throws org.stackwright.parallel.CancelledException when cancelled; nothing is returned then
     */
    public static Outcome run(Operation op, DoorSettings settings, int threads, RunContext.Progress progress,
            Consumer<String> warnings, BooleanSupplier cancelled) {
        String mainKey = mainInput(op);
        ImagePlus main = mainKey == null ? null : settings.images().get(mainKey);
        int nc = main == null ? 1 : main.getNChannels();
        int nt = main == null ? 1 : main.getNFrames();
        for (Map.Entry<String, ImagePlus> e : settings.images().entrySet()) {
            if (!e.getKey().equals(mainKey)) {
                checkMatches(e.getKey(), e.getValue(), nc, nt, mainKey);
            }
        }
        List<Values> values = new ArrayList<>();
        for (int t = 1; t <= nt; t++) {
            for (int c = 1; c <= nc; c++) {
                Map<String, String> raw = perChannel(op, settings.text(), c, nc);
                for (Param p : op.params()) {
                    if (p.kind() == Param.Kind.OUTPUT_IMAGE && settings.outputs().contains(p.key())
                            && (settings.outputsAsked() || p.required())) {
                        raw.put(p.key(), ""); // asked for, as a path on the command line asks for it
                    }
                }
                Values v = Values.parse(op.name(), op.params(), raw);
                for (Map.Entry<String, ImagePlus> e : settings.images().entrySet()) {
                    ImagePlus imp = e.getValue();
                    boolean whole = imp.getNChannels() == 1 && imp.getNFrames() == 1;
                    v.withImage(e.getKey(), whole ? imp : Hyperstacks.part(imp, imp.getNChannels() == 1 ? 1 : c,
                            imp.getNFrames() == 1 ? 1 : t));
                }
                values.add(v);
            }
        }
        List<Part> parts = new ArrayList<>();
        int n = values.size();
        for (int i = 0; i < n; i++) {
            int c = i % nc + 1;
            int t = i / nc + 1;
            final int index = i;
            String where = n == 1 ? "" : (nc > 1 ? "channel " + c + (nt > 1 ? ", " : ": ") : "") + (nt > 1 ? "time " + t + ": " : "");
            List<String> partWarnings = new ArrayList<>();
            RunContext ctx = new RunContext(threads, (f, s) -> progress.report((index + f) / n, where + s),
                    w -> {
                        partWarnings.add(w);
                        warnings.accept(where + w);
                    }, cancelled);
            ctx.checkCancelled();
            Result r = op.run(values.get(i), ctx);
            parts.add(new Part(c, t, values.get(i), r, partWarnings));
        }
        Map<String, ImagePlus> images = new LinkedHashMap<>();
        String base = baseTitle(op, main);
        for (Param p : op.params()) {
            if (p.kind() != Param.Kind.OUTPUT_IMAGE || !settings.outputs().contains(p.key())) {
                continue;
            }
            List<ImagePlus> got = new ArrayList<>();
            for (Part part : parts) {
                got.add(part.result().images().get(p.key()));
            }
            String title = p.key().equals("output") ? mainTitle(op, main, got.get(0), base) : base + "-" + p.key();
            ImagePlus out = Hyperstacks.assemble(got, nc, nt, main, settings.images().values(), title, warnings);
            if (out != null) {
                images.put(p.key(), out);
            }
        }
        return new Outcome(main, parts, images);
    }

    /**
     * @return the title of the main output: "&lt;title&gt;-&lt;operation&gt;"; for an operation without input image,
     *     the title the operation gave it when that starts with its name (a modelled PSF says what it is:
     *     "psf-gibson-lanni-NA1.3-520nm")
     */
    static String mainTitle(Operation op, ImagePlus main, ImagePlus made, String base) {
        if (main == null && made != null && made.getTitle() != null && made.getTitle().startsWith(op.name() + "-")) {
            return made.getTitle();
        }
        return base;
    }

    /**
     * @return "&lt;title&gt;-&lt;operation&gt;": the input's title without its file extension (spaces kept), or the
     *     operation name when there is no input image
     */
    public static String baseTitle(Operation op, ImagePlus main) {
        if (main == null) {
            return op.name();
        }
        String t = main.getTitle().replaceFirst(
                "(?i)\\.(ome\\.tiff?|tiff?|png|jpe?g|gif|bmp|zip|raw|ics|ids|lsm|czi|nd2|lif|oib|oif|dv|ims)$", "");
        return t + "-" + op.name();
    }

    private static void checkMatches(String key, ImagePlus imp, int nc, int nt, String mainKey) {
        int c = imp.getNChannels();
        int t = imp.getNFrames();
        if (c != 1 && c != nc) {
            throw new IllegalArgumentException(key + " = '" + imp.getTitle() + "' has " + c + " channels but "
                    + mainKey + " has " + nc + "; give one channel (used for all) or one per channel");
        }
        if (t != 1 && t != nt) {
            throw new IllegalArgumentException(key + " = '" + imp.getTitle() + "' has " + t + " time points but "
                    + mainKey + " has " + nt + "; give one time point (used for all) or one per time point");
        }
    }

    /**
     * The text settings of channel c: a comma list of numbers or choices gives one value per channel.
     *
     * @throws IllegalArgumentException when a list has neither 1 nor nc entries, naming the key
     */
    static Map<String, String> perChannel(Operation op, Map<String, String> text, int c, int nc) {
        Map<String, String> out = new LinkedHashMap<>();
        for (Param p : op.params()) {
            String v = text.get(p.key());
            if (v == null) {
                continue;
            }
            boolean listable = p.kind() == Param.Kind.NUMBER || p.kind() == Param.Kind.INTEGER
                    || p.kind() == Param.Kind.CHOICE;
            if (listable && v.indexOf(',') >= 0) {
                String[] items = v.split(",", -1);
                if (items.length != nc) {
                    throw new IllegalArgumentException(p.key() + " = '" + v + "' gives " + items.length
                            + " values; give one value, or one per channel (" + nc + ")");
                }
                v = items[c - 1].trim();
            }
            out.put(p.key(), v);
        }
        return out;
    }
}
