package org.stackwright.cli;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.BooleanSupplier;

import ij.ImagePlus;

import org.stackwright.imagej.ChannelRunner;
import org.stackwright.imagej.DoorSettings;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.RunContext;

/**
 * Hyperstacks and per-channel values on the command line, by the same rule as the ImageJ and SciJava doors
 * ({@link ChannelRunner}): each channel and time point of the main input is its own problem, a number or choice
 * may be a comma list with one value per channel ({@code --wavelength 520,610}), another image with one channel
 * is used for every channel and one with as many channels as the input is used channel by channel; the outputs
 * are put back together with the input's channels, slices and frames.
 */
final class PerChannel {

    /** What a run made: output images by key, the run record, report lines. */
    record Made(Map<String, ImagePlus> images, Map<String, Object> record, List<String> report) {
    }

    private PerChannel() {
    }

    /** @return true when a number or choice of an operation with an input image is a comma list (one per channel) */
    static boolean hasLists(Operation op, Map<String, String> raw) {
        if (ChannelRunner.mainInput(op) == null) {
            return false; // no image, no channels: a comma is then a typing error the number check names
        }
        for (Param p : op.params()) {
            String v = raw.get(p.key());
            boolean listable = p.kind() == Param.Kind.NUMBER || p.kind() == Param.Kind.INTEGER
                    || p.kind() == Param.Kind.CHOICE;
            if (listable && v != null && v.indexOf(',') >= 0) {
                return true;
            }
        }
        return false;
    }

    /**
     * @param raw option key to text as given (paths of outputs included, so that an operation sees them given)
     * @param images the input images by key (read, not modified)
     * @param ctx progress and warnings of the whole run (warnings are prefixed with the channel and time point)
     */
    static Made run(Operation op, Map<String, String> raw, Map<String, ImagePlus> images, int threads, RunContext ctx,
            BooleanSupplier cancelled) {
        DoorSettings s = new DoorSettings();
        for (Param p : op.params()) {
            String v = raw.get(p.key());
            if (v == null || p.kind() == Param.Kind.IMAGE) {
                continue;
            }
            if (p.kind() == Param.Kind.OUTPUT_IMAGE) {
                s.outputs().add(p.key());
            }
            s.text().put(p.key(), v);
        }
        s.images().putAll(images);
        ChannelRunner.Outcome o = ChannelRunner.run(op, s, threads, ctx::progress, ctx::warn, cancelled);
        List<String> lines = new ArrayList<>();
        boolean many = o.parts().size() > 1;
        for (ChannelRunner.Part part : o.parts()) {
            String where = !many ? "" : "channel " + part.channel() + ", time point " + part.frame() + ": ";
            for (String line : part.result().report()) {
                lines.add(where + line);
            }
        }
        return new Made(o.images(), new LinkedHashMap<>(o.record()), lines);
    }
}
