package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.scijava.Context;
import org.scijava.command.Command;
import org.scijava.command.CommandInfo;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;
import org.stackwright.cli.Main;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;
import org.stackwright.scijava.OperationCommand;
import org.stackwright.volume.TiffFiles;

/**
 * One definition, three doors: the same settings through the macro door (run + saveAs), the SciJava door
 * (CommandService) and the command line give byte-identical output files. Add a case to {@link #cases()} for each
 * operation; a case whose operation is not registered in this build is skipped.
 */
class DoorsAgreeTest {

    /**
     * One run: the operation, its menu label, settings as text (as on the command line, without "--"), input
     * images as files in test-images/, and the output images to compare.
     */
    record Case(String operation, String menu, Map<String, String> settings, Map<String, String> inputs,
            List<String> outputs) {
        @Override
        public String toString() {
            return operation + " " + settings;
        }
    }

    static Stream<Case> cases() {
        return Stream.of(
                new Case("simulate", "Simulate Specimen...", ordered("size", "48x40x6", "pixel", "0.1", "step", "0.25",
                        "seed", "5", "bits", "16"), Map.of(), List.of("output", "truth")),
                new Case("simulate", "Simulate Specimen...", ordered("specimen", "beads", "size", "64x48x1",
                        "defects", "5", "grid", "2x2", "seam-width", "3", "seed", "9", "read-noise", "1.5"),
                        Map.of(), List.of("output", "mask-output")),
                new Case("psf", "Model PSF...", ordered("model", "gaussian", "na", "1.0", "wavelength", "520",
                        "immersion-index", "1.33", "pixel", "0.08", "step", "0.2", "size", "33x33x21"),
                        Map.of(), List.of("output")),
                new Case("psf-refine", "Refine PSF Optics...", ordered("na", "1.0", "wavelength", "520",
                        "immersion-index", "1.518", "sample-index", "1.33", "size", "15x15x21", "fit", "depth",
                        "deepest", "10", "offset", "100", "read-noise", "2"), ordered("input", "demo-beads.tif"),
                        List.of("output")),
                new Case("deconvolve", "Deconvolve Stack...", ordered("method", "richardson-lucy", "iterations", "5",
                        "offset", "100"), ordered("input", "demo-cells.tif", "psf", "demo-psf.tif"), List.of("output")),
                new Case("deconvolve", "Deconvolve Stack...", ordered("iterations", "3", "offset", "100", "fft", "java"),
                        ordered("input", "demo-cells.tif", "psf", "demo-psf.tif"), List.of("output")),
                // the run's own residuals (a ticked output in the macro, a declared output in SciJava)
                new Case("deconvolve", "Deconvolve Stack...", ordered("method", "richardson-lucy", "iterations", "3",
                        "offset", "100", "read-noise", "2", "fft", "java"), ordered("input", "demo-cells.tif", "psf",
                        "demo-psf.tif"), List.of("output", "residuals")),
                new Case("residuals", "Residual View...", ordered("offset", "100", "background", "10", "likelihood",
                        "poisson-gaussian", "read-noise", "2", "fft", "java"), ordered("input", "demo-cells.tif",
                        "estimate", "demo-cells-truth.tif", "psf", "demo-psf.tif"), List.of("output")),
                new Case("inpaint", "Fill Masked Pixels...", ordered("method", "harmonic"),
                        ordered("input", "demo-tiles.tif", "mask", "demo-tiles-damage.tif"), List.of("output")),
                new Case("find-defects", "Find Defective Pixels...", ordered(), ordered("input", "demo-tiles.tif"),
                        List.of("output")),
                new Case("camera-noise", "Camera Noise...", ordered("offset", "100"), ordered("input", "demo-cells.tif"),
                        List.of("plot")),
                new Case("interval-profile", "Credible Interval Profile...", ordered("line", "5,5,60,40", "plane", "3"),
                        ordered("mean", "demo-cells.tif", "lower", "demo-cells.tif", "upper", "demo-cells.tif"),
                        List.of("output")),
                new Case("seam-mask", "Tile Seam Mask...", ordered("grid", "3x4", "tile", "128x128", "level-tiles",
                        "true", "offset", "100"), ordered("input", "demo-tiles.tif"),
                        List.of("output", "levelled-output", "flat-field")));
    }

    private static boolean isFlag(Operation op, String key) {
        return op.params().stream().anyMatch(p -> p.key().equals(key) && p.kind() == Param.Kind.FLAG);
    }

    private static Map<String, String> ordered(String... kv) {
        Map<String, String> m = new LinkedHashMap<>();
        for (int i = 0; i < kv.length; i += 2) {
            m.put(kv[i], kv[i + 1]);
        }
        return m;
    }

    private static Context context;

    @TempDir
    Path dir;

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
        context = new Context(CommandService.class);
    }

    @AfterAll
    static void stop() {
        if (context != null) {
            context.dispose();
        }
        ImageJHarness.closeAll();
    }

    @ParameterizedTest
    @MethodSource("cases")
    void sameSettingsGiveIdenticalFilesThroughEveryDoor(Case c) throws Exception {
        Operation op = Operations.byName(c.operation()).orElse(null);
        Assumptions.assumeTrue(op != null, "operation " + c.operation() + " is not in this build yet");
        Path images = ImageJHarness.projectDir().resolve("test-images");

        // 1. macro door
        StringBuilder macro = new StringBuilder("setBatchMode(true);\n");
        StringBuilder options = new StringBuilder();
        // a ticked checkbox is its key alone in a macro
        c.settings().forEach((k, v) -> options.append(isFlag(op, k) ? k : k + '=' + MacroOptions.quote(v)).append(' '));
        String base = op.name();
        for (Map.Entry<String, String> in : c.inputs().entrySet()) {
            macro.append("open('").append(images.resolve(in.getValue())).append("');\n");
            options.append(in.getKey()).append('=').append(MacroOptions.quote(in.getValue())).append(' ');
            if (in.getKey().equals(ChannelRunner.mainInput(op))) {
                base = in.getValue().replaceFirst("\\.tif$", "") + "-" + op.name();
            }
        }
        for (String out : c.outputs()) {
            if (OperationDialog.inDialog(op.params().stream().filter(p -> p.key().equals(out)).findFirst().orElseThrow())) {
                options.append(out).append(' ');
            }
        }
        macro.append("run('").append(c.menu()).append("', '").append(options.toString().trim()).append("');\n");
        macro.append("main = getTitle();\n"); // the main output is the current image after a run
        for (String out : c.outputs()) {
            macro.append(out.equals("output") ? "selectImage(main);\n" : "selectImage('" + base + "-" + out + "');\n")
                    .append("saveAs('Tiff', '").append(dir.resolve("macro-" + out + ".tif")).append("');\n");
        }
        String err = ImageJHarness.runMacro(macro.toString(), "");
        assertNull(err, () -> err + "\nin:\n" + macro);

        // 2. SciJava door
        Map<String, Object> inputs = new HashMap<>();
        for (Param p : op.params()) {
            String v = c.settings().get(p.key());
            if (v != null) {
                inputs.put(OperationCommand.fieldName(p.key()), switch (p.kind()) {
                    case NUMBER -> Double.valueOf(v);
                    case INTEGER -> Integer.valueOf(v);
                    case FLAG -> Boolean.valueOf(v);
                    default -> v;
                });
            }
            if (c.inputs().containsKey(p.key())) {
                inputs.put(OperationCommand.fieldName(p.key()),
                        TiffFiles.open(images.resolve(c.inputs().get(p.key())), p.key()));
            }
        }
        CommandService commands = context.getService(CommandService.class);
        CommandInfo info = null;
        for (CommandInfo ci : commands.getCommandsOfType(Command.class)) {
            if (ci.getClassName().startsWith("org.stackwright.scijava.")
                    && ((OperationCommand) ci.loadClass().getDeclaredConstructor().newInstance()).operationName()
                            .equals(op.name())) {
                info = ci;
            }
        }
        CommandModule module = commands.run(info, true, inputs).get();
        assertFalse(module.isCanceled(), module.getCancelReason());
        for (String out : c.outputs()) {
            TiffFiles.write((ImagePlus) module.getOutput(OperationCommand.fieldName(out)),
                    dir.resolve("scijava-" + out + ".tif"), false);
        }

        // 3. command line
        List<String> args = new ArrayList<>(List.of(op.name()));
        c.settings().forEach((k, v) -> args.addAll(List.of("--" + k, v)));
        c.inputs().forEach((k, v) -> args.addAll(List.of("--" + k, images.resolve(v).toString())));
        for (String out : c.outputs()) {
            args.addAll(List.of("--" + out, dir.resolve("cli-" + out + ".tif").toString()));
        }
        ByteArrayOutputStream err2 = new ByteArrayOutputStream();
        int code = Main.run(args.toArray(new String[0]), new PrintStream(new ByteArrayOutputStream()),
                new PrintStream(err2));
        assertEquals(Main.OK, code, err2::toString);

        for (String out : c.outputs()) {
            Path cli = dir.resolve("cli-" + out + ".tif");
            assertEquals(-1, Files.mismatch(cli, dir.resolve("macro-" + out + ".tif")), out + ": macro file differs from CLI");
            assertEquals(-1, Files.mismatch(cli, dir.resolve("scijava-" + out + ".tif")), out + ": SciJava file differs from CLI");
        }
    }
}
