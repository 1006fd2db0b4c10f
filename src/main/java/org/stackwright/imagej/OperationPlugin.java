package org.stackwright.imagej;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.Macro;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.macro.Interpreter;
import ij.plugin.PlugIn;

import org.stackwright.op.Json;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;

/**
 * The ImageJ 1.x door of every operation: {@code plugins.config} names this class with the operation's name as
 * argument. It shows the operation's recordable dialog (or reads the macro options), runs on the chosen images
 * (hyperstacks channel by channel and time point by time point, see {@link ChannelRunner}), shows the outputs as
 * new images titled {@code <title>-<operation>} (hidden in batch mode, where a macro can select them; the main
 * output is shown last, so it is the current image afterwards), adds a row to the table "Stackwright Runs", plots
 * convergence (not in batch mode: the history is in the record), shows the operation's own rows (widths, metrics)
 * in the table "&lt;operation&gt; results" and writes the run record when asked. Progress goes to the
 * status bar, warnings to the Log, Esc cancels within one iteration and then nothing is shown. Errors go to
 * IJ.error, which in a macro aborts the macro with the message; with no one at the screen (ImageJ started with
 * {@code -batch}) they go to stderr and end the process with exit code 2 (bad input) or 1 ({@link Unattended}).
 * A dialog shown to a person starts on the values last confirmed in it ({@link SessionMemory}).
 */
public class OperationPlugin implements PlugIn {

    @Override
    public void run(String arg) {
        Unattended.guard();
        String name = arg == null ? "" : arg.trim();
        if (name.equals("about")) {
            About.show();
            return;
        }
        Operation op = lookup(name);
        if (op == null) {
            error("Stackwright", "This version of Stackwright has no operation '" + name + "'. It has: "
                    + String.join(", ", Operations.all().stream().map(Operation::name).toList()), Unattended.FAILED);
            return;
        }
        run(op);
    }

    /** @return the operation of this name; tests override it to add operations of their own */
    protected Operation lookup(String name) {
        return Operations.byName(name).orElse(null);
    }

    private void run(Operation op) {
        String title = "Stackwright " + op.name();
        try {
            String options = Macro.getOptions();
            boolean person = options == null;
            if (options != null) {
                MacroOptions mo = MacroOptions.parse(options);
                mo.resolveAliases(op.name(), op.params(), IJ::log);
                mo.checkKeys(op.name(), OperationDialog.macroKeys(op));
                mo.fillShadowedKeys(op.params());
                // " " keeps macro mode (all defaults); an empty string would make the dialog appear and wait
                Macro.setOptions(mo.canonical().isEmpty() ? " " : mo.canonical());
            }
            boolean needsImage = op.params().stream().anyMatch(p -> p.kind() == Param.Kind.IMAGE && p.required());
            if (needsImage && ImageChoices.titles().isEmpty()) {
                error(title, op.name() + " needs an open image (not an RGB picture): open or select one first.",
                        Unattended.BAD_INPUT);
                return;
            }
            GenericDialog gd = OperationDialog.build(op, title, WindowManager.getCurrentImage());
            gd.showDialog();
            if (gd.wasCanceled()) {
                return;
            }
            DoorSettings settings = OperationDialog.read(gd, op);
            if (person) {
                SessionMemory.remember(op.name(), settings, op.params());
            }
            execute(op, settings);
        } catch (IllegalArgumentException e) {
            IJ.showProgress(1.0);
            error(title, e.getMessage(), Unattended.BAD_INPUT);
        } catch (CancelledException e) {
            IJ.showProgress(1.0);
            IJ.showStatus(op.name() + ": cancelled; no output made");
            IJ.log(op.name() + ": cancelled by the user; no output was made and the input is unchanged.");
            if (Macro.getOptions() != null || Unattended.active()) {
                error(title, op.name() + " was cancelled; no output was made.", Unattended.FAILED);
            }
        } catch (org.stackwright.op.RunFailedException e) {
            // a run that cannot give a trustworthy result (the numerical guard): its message is the explanation
            IJ.showProgress(1.0);
            error(title, op.name() + " failed: " + e.getMessage(), Unattended.FAILED);
        } catch (OutOfMemoryError e) {
            IJ.showProgress(1.0);
            error(title, op.name() + " ran out of memory: give ImageJ more memory (Edit>Options>Memory & "
                    + "Threads) or use a smaller image.", Unattended.FAILED);
        } catch (RuntimeException e) {
            if (Macro.MACRO_CANCELED.equals(e.getMessage())) {
                throw e; // ImageJ aborting the macro (Esc, an earlier error): let it pass
            }
            IJ.showProgress(1.0);
            IJ.log(op.name() + " failed: " + e + "\n" + stack(e));
            error(title, op.name() + " failed: " + e, Unattended.FAILED);
        }
    }

    /**
     * Reports an error: with no one at the screen (ImageJ -batch) on stderr, ending the process with the exit code;
     * otherwise in ImageJ's error window, its text wrapped to a readable width (in a macro this also stops the
     * macro with the message).
     */
    static void error(String title, String message, int exitCode) {
        if (Unattended.active()) {
            Unattended.fail(title, message, exitCode);
            return;
        }
        IJ.error(title, OperationDialog.wrap(message, 90));
    }

    /** Runs with the collected settings and shows what the run made. */
    void execute(Operation op, DoorSettings s) {
        for (Map.Entry<String, String> f : s.files().entrySet()) {
            try {
                TiffFiles.checkWritable(Paths.get(f.getValue()), s.overwrite());
            } catch (IllegalArgumentException e) {
                throw new IllegalArgumentException(f.getKey() + ": " + e.getMessage()
                        + (e.getMessage().contains("exists") ? " (tick overwrite to allow it)" : ""), e);
            }
        }
        IJ.resetEscape();
        long t0 = System.nanoTime();
        ChannelRunner.Outcome outcome = ChannelRunner.run(op, s, Prefs.getThreads(),
                (fraction, status) -> {
                    IJ.showProgress(fraction);
                    IJ.showStatus(op.name() + ": " + status);
                },
                w -> IJ.log(op.name() + " warning: " + w), IJ::escapePressed);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        for (ChannelRunner.Part part : outcome.parts()) {
            part.result().record().putIfAbsent("seconds", seconds / outcome.parts().size());
            for (String line : part.result().report()) {
                IJ.log(line);
            }
        }
        Map<String, Object> record = outcome.record();
        for (Map.Entry<String, String> f : s.files().entrySet()) {
            Path path = Paths.get(f.getValue());
            try {
                OutputFiles.writeText(Json.write(record).getBytes(StandardCharsets.UTF_8), path, s.overwrite());
            } catch (IOException e) {
                throw new UncheckedIOException("could not write " + f.getKey() + " " + path + ": " + e.getMessage(), e);
            }
        }
        if (op.name().equals("deconvolve") && outcome.parts().size() == 1) {
            ChannelRunner.Part part = outcome.parts().get(0);
            SessionMemory.deconvolved(outcome.mainInput(), s.images().get("psf"), outcome.images().get("output"),
                    RunReport.cameraUsed(part.values().effective(), part.result().record()),
                    RunReport.backgroundUsed(part.result().record()));
        }
        RunReport.table(op.name(), outcome);
        RunReport.rows(op.name(), outcome);
        Plot plot = Interpreter.isBatchMode() ? null
                : RunReport.convergence(ChannelRunner.baseTitle(op, outcome.mainInput()), outcome);
        if (plot != null) {
            plot.show();
        }
        // the main output is shown last, so that it is the current image for the next macro line
        for (Map.Entry<String, ImagePlus> e : outcome.images().entrySet()) {
            if (!e.getKey().equals("output")) {
                e.getValue().show();
            }
        }
        if (outcome.images().containsKey("output")) {
            outcome.images().get("output").show();
        }
        IJ.showProgress(1.0);
        Object stop = outcome.parts().get(outcome.parts().size() - 1).result().record().get("stop_reason");
        IJ.showStatus(op.name() + ": done in " + String.format(java.util.Locale.ROOT, "%.1f s", seconds)
                + (stop == null ? "" : "; stopped: " + stop));
    }

    private static String stack(Throwable e) {
        StringBuilder sb = new StringBuilder();
        for (StackTraceElement el : e.getStackTrace()) {
            sb.append("    at ").append(el).append('\n');
            if (sb.length() > 2000) {
                break;
            }
        }
        return sb.toString();
    }
}
