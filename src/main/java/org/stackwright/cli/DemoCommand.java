package org.stackwright.cli;

import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.List;

import java.nio.charset.StandardCharsets;
import java.util.Locale;

import org.stackwright.inspect.Pictures;
import org.stackwright.inspect.ResidualReport;
import org.stackwright.inspect.SummaryPicture;
import org.stackwright.op.Json;
import org.stackwright.op.RunContext;
import org.stackwright.solve.ConvergencePlot;
import org.stackwright.solve.Deconvolution;
import org.stackwright.solve.DeconvolutionSettings;
import org.stackwright.solve.IterationListener;
import org.stackwright.solve.Nrmse;
import org.stackwright.solve.RunResiduals;
import org.stackwright.solve.StopRule;
import org.stackwright.solve.Stopping;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * {@code demo}: deconvolves the bundled invented cell stack (test-images/demo-cells.tif) with its PSF by
 * accelerated Richardson-Lucy with the noise-based stop, and writes the result, the run record and a side-by-side
 * picture (maximum projections of data, result and the invented truth) into one folder; prints the error against
 * the truth. Then checks the result against the data with the run's own residuals (the extended-grid estimate's
 * prediction, same camera model: Poisson plus Gaussian read noise), writes its summary picture and prints chi^2
 * per pixel and the verdict.
 */
final class DemoCommand {

    static final String NAME = "demo";

    private static final double OFFSET = 100;

    private final PrintStream out;
    private final PrintStream err;

    DemoCommand(PrintStream out, PrintStream err) {
        this.out = out;
        this.err = err;
    }

    static CommandSpec spec() {
        CommandSpec spec = CommandSpec.create().name(NAME);
        spec.mixinStandardHelpOptions(true);
        spec.usageMessage().description("deconvolve the bundled invented demo stack (test-images/) and compare with its truth");
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
            Volume psf = TiffFiles.read(images.resolve("demo-psf.tif"), "--images");
            Files.createDirectories(dir);
            // the camera of tools/make-test-images.sh: offset 100 ADU, read noise 2 ADU, gain 1; background estimated
            DeconvolutionSettings settings = new DeconvolutionSettings("richardson-lucy",
                    new Stopping(StopRule.NOISE, 200, 1e-3), OFFSET, Double.NaN, 1, 2, Double.NaN, "extended", true,
                    "poisson");
            RunContext ctx = new RunContext(Runtime.getRuntime().availableProcessors(), new CliProgress(err),
                    w -> err.println("warning: " + w), null);
            Deconvolution.Outcome o = RunResiduals.deconvolve(data, psf, "demo-psf.tif", null, settings, ctx,
                    IterationListener.NONE);
            err.print(CliProgress.CLEAR);
            Path tif = dir.resolve("demo-cells-deconvolved.tif");
            TiffFiles.write(o.result(), tif, true);
            Path json = dir.resolve("demo-cells-run.json");
            OutputFiles.writeText(Json.write(o.record()).getBytes(StandardCharsets.UTF_8), json, true);
            Path png = dir.resolve("demo-side-by-side.png");
            OutputFiles.writePng(Pictures.sideBySide(List.of(data, o.result(), truth),
                    List.of("camera data", "deconvolved", "invented truth"), "demo"), png, true);
            Path curve = dir.resolve("demo-convergence.png");
            OutputFiles.writePng(ConvergencePlot.of(o.solution(), "mean KL divergence per pixel", 0.5), curve, true);
            double bg = ((Number) ((java.util.Map<?, ?>) o.record().get("settings")).get("background_adu")).doubleValue();
            // the run's own residuals: its extended-grid estimate predicts the data everywhere, band included
            ResidualReport report = RunResiduals.analyse(data, psf, null, settings, o, ctx);
            Path residuals = dir.resolve("demo-residuals.png");
            OutputFiles.writePng(SummaryPicture.render("demo-cells", data, o.result(), report), residuals, true);
            out.println(String.format(Locale.ROOT, "deconvolved %s (accelerated Richardson-Lucy): %d iterations, "
                    + "%.2f s; stopped by %s", data.shape(), o.solution().iterations(), o.solution().seconds(),
                    o.solution().stopReason()));
            out.println(String.format(Locale.ROOT, "NRMSE against the invented truth: camera data (minus offset and "
                    + "background) %.3f, deconvolved %.3f", Nrmse.of(data.data(), truth.data(), OFFSET + bg),
                    Nrmse.of(o.result().data(), truth.data())));
            out.println(String.format(Locale.ROOT, "residual check (data against the run's own prediction): chi^2 per"
                    + " pixel %.3f over the whole image (about 1 when the data fit the noise model), border band %.3f;"
                    + " verdict: %s", report.chi2Trusted(), report.chi2Band(), report.verdict().code()));
            out.println(report.verdict().text());
            out.println("wrote " + tif);
            out.println("wrote " + json);
            out.println("wrote " + png);
            out.println("wrote " + curve);
            out.println("wrote " + residuals);
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
