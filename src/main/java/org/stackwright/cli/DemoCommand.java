package org.stackwright.cli;

import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.List;

import java.nio.charset.StandardCharsets;
import java.util.Locale;

import org.stackwright.inspect.Pictures;
import org.stackwright.inspect.ResidualModel;
import org.stackwright.inspect.ResidualReport;
import org.stackwright.inspect.SummaryPicture;
import org.stackwright.op.Json;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.solve.ConvergencePlot;
import org.stackwright.solve.Deconvolution;
import org.stackwright.solve.DeconvolutionSettings;
import org.stackwright.solve.IterationListener;
import org.stackwright.solve.Nrmse;
import org.stackwright.solve.StopRule;
import org.stackwright.solve.Stopping;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * {@code demo}: deconvolves the bundled invented cell stack (carried in the jar, see {@link DemoData}) with its
 * PSF by accelerated Richardson-Lucy with the noise-based stop, and writes the result, the run record and a
 * side-by-side picture (maximum projections of data, result and the invented truth) into one folder; prints the
 * error against the truth. Then checks the result against the data with the residual view (same camera model:
 * Poisson plus Gaussian read noise), writes its summary picture and prints chi^2 per voxel and the verdict. Like
 * every command it refuses to replace existing files unless {@code --overwrite} is given, and checks that before
 * any work.
 */
final class DemoCommand {

    static final String NAME = "demo";

    private static final double OFFSET = 100;

    /** The files the demo writes, in its output folder. */
    static final List<String> FILES = List.of("demo-cells-deconvolved.tif", "demo-cells-run.json",
            "demo-side-by-side.png", "demo-convergence.png", "demo-residuals.png");

    private final PrintStream out;
    private final PrintStream err;

    DemoCommand(PrintStream out, PrintStream err) {
        this.out = out;
        this.err = err;
    }

    static CommandSpec spec() {
        CommandSpec spec = CommandSpec.create().name(NAME);
        spec.mixinStandardHelpOptions(true);
        spec.usageMessage().description("deconvolve the bundled invented demo stack and compare with its truth");
        spec.addOption(OptionSpec.builder("--images").type(String.class).paramLabel("DIR")
                .description("folder with demo-cells.tif, demo-psf.tif and demo-cells-truth.tif "
                        + "[default: the copies inside this jar]").build());
        spec.addOption(OptionSpec.builder("--output-dir").type(String.class).paramLabel("DIR")
                .description("folder for the results, created if missing [default demo-output]").build());
        spec.addOption(OptionSpec.builder("--overwrite").arity("0").type(boolean.class)
                .description("replace result files that exist (default: refuse)").build());
        return spec;
    }

    int run(ParseResult pr) {
        Path dir = Paths.get(pr.matchedOptionValue("--output-dir", "demo-output"));
        boolean overwrite = pr.hasMatchedOption("--overwrite");
        int threads = Runtime.getRuntime().availableProcessors();
        CliProgress progress = new CliProgress(err);
        try {
            Files.createDirectories(dir);
            for (String f : FILES) {
                try {
                    TiffFiles.checkWritable(dir.toAbsolutePath().resolve(f), overwrite);
                } catch (IllegalArgumentException e) {
                    throw new IllegalArgumentException("--output-dir: " + e.getMessage()
                            + (e.getMessage().contains("exists") ? " (give --overwrite to replace the demo's files)" : ""));
                }
            }
            progress.report(0, "reading the demo images");
            DemoData.Images images = pr.hasMatchedOption("--images")
                    ? DemoData.folder(Paths.get(pr.matchedOptionValue("--images", "test-images")))
                    : DemoData.bundled(threads);
            Volume data = images.data();
            Volume truth = images.truth();
            Volume psf = images.psf();
            // the camera of tools/make-test-images.sh: offset 100 ADU, read noise 2 ADU, gain 1; background estimated
            DeconvolutionSettings settings = new DeconvolutionSettings("richardson-lucy",
                    new Stopping(StopRule.NOISE, 200, 1e-3), OFFSET, Double.NaN, 1, 2, Double.NaN, "extended", true,
                    "poisson");
            // progress: deconvolution 5 to 80 % (the noise stop usually ends long before the 200-iteration cap, so
            // its own fraction jumps to the end), residual view 80 to 95 %, files to 100 %
            RunContext ctx = new RunContext(threads, (f, s) -> progress.report(0.05 + 0.75 * f, s),
                    w -> err.println("warning: " + w), null);
            Deconvolution.Outcome o = Deconvolution.run(data, psf, "demo-psf.tif", null, settings, ctx,
                    IterationListener.NONE);
            progress.report(0.8, "residual view of the result");
            double bg = ((Number) ((java.util.Map<?, ?>) o.record().get("settings")).get("background_adu")).doubleValue();
            ResidualModel model = new ResidualModel(OFFSET, bg, ResidualModel.noiseModel("poisson-gaussian", 1, 2));
            ResidualReport report;
            try (Workers w = new Workers(threads)) {
                report = ResidualReport.analyse(data, o.result(), psf, model, w);
            }
            progress.report(0.95, "writing");
            Path tif = dir.resolve(FILES.get(0));
            TiffFiles.write(o.result(), tif, overwrite);
            Path json = dir.resolve(FILES.get(1));
            OutputFiles.writeText(Json.write(o.record()).getBytes(StandardCharsets.UTF_8), json, overwrite);
            Path png = dir.resolve(FILES.get(2));
            OutputFiles.writePng(Pictures.sideBySide(List.of(data, o.result(), truth),
                    List.of("camera data", "deconvolved", "invented truth"), "demo"), png, overwrite);
            Path curve = dir.resolve(FILES.get(3));
            OutputFiles.writePng(ConvergencePlot.of(o.solution(), "mean KL divergence per voxel", 0.5), curve, overwrite);
            Path residuals = dir.resolve(FILES.get(4));
            OutputFiles.writePng(SummaryPicture.render("demo-cells", data, o.result(), report), residuals, overwrite);
            progress.report(1, "done");
            err.print(CliProgress.CLEAR);
            out.println("demo images: " + images.where());
            out.println(String.format(Locale.ROOT, "deconvolved %s (accelerated Richardson-Lucy): %d iterations, "
                    + "%.2f s; stopped by %s", data.shape(), o.solution().iterations(), o.solution().seconds(),
                    o.solution().stopReason()));
            out.println(String.format(Locale.ROOT, "background: %.4g ADU above the offset (estimated: background "
                    + "auto)", bg));
            out.println(String.format(Locale.ROOT, "NRMSE against the invented truth: camera data (minus offset and "
                    + "background) %.3f, deconvolved %.3f", Nrmse.of(data.data(), truth.data(), OFFSET + bg),
                    Nrmse.of(o.result().data(), truth.data())));
            out.println(String.format(Locale.ROOT, "residual check (data against the blurred result): chi^2 per voxel "
                    + "%.3f (about 1 when the data fit the noise model), in the interior %.3f; verdict: %s",
                    report.maps().chi2PerVoxel(), report.chi2Interior(), report.verdict().code()));
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
