package org.stackwright.cli;

import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.List;

import org.stackwright.inspect.Pictures;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * {@code demo}: runs the main job on the bundled invented data in test-images/ and writes what it made, with a
 * picture to look at, into one folder.
 */
final class DemoCommand {

    static final String NAME = "demo";

    private final PrintStream out;
    private final PrintStream err;

    DemoCommand(PrintStream out, PrintStream err) {
        this.out = out;
        this.err = err;
    }

    static CommandSpec spec() {
        CommandSpec spec = CommandSpec.create().name(NAME);
        spec.mixinStandardHelpOptions(true);
        spec.usageMessage().description("run the main job on the bundled invented demo data (test-images/)");
        spec.addOption(OptionSpec.builder("--images").type(String.class).paramLabel("DIR")
                .description("folder with the demo images [default test-images]").build());
        spec.addOption(OptionSpec.builder("--output-dir").type(String.class).paramLabel("DIR")
                .description("folder for the results, created if missing [default demo-output]").build());
        return spec;
    }

    int run(ParseResult pr) {
        Path images = Paths.get(pr.matchedOptionValue("--images", "test-images"));
        Path dir = Paths.get(pr.matchedOptionValue("--output-dir", "demo-output"));
        try {
            Volume data = TiffFiles.read(images.resolve("demo-cells.tif"), "--images");
            Volume truth = TiffFiles.read(images.resolve("demo-cells-truth.tif"), "--images");
            Files.createDirectories(dir);
            Path png = dir.resolve("demo-side-by-side.png");
            OutputFiles.writePng(Pictures.sideBySide(List.of(truth, data), List.of("invented truth", "camera data"),
                    "demo"), png, true);
            out.println("wrote " + png);
            return Main.OK;
        } catch (IllegalArgumentException e) {
            err.println("stackwright demo: " + e.getMessage());
            return Main.BAD_INPUT;
        } catch (Exception e) {
            err.println("stackwright demo: failed: " + e);
            return Main.FAILED;
        }
    }
}
