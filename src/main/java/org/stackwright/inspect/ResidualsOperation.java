package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.model.NoiseModel;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.op.FftChoice;
import org.stackwright.op.InputChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code residuals}: turns the forward model back onto an estimate and shows, in the data's noise units, what it
 * fails to explain. Writes the normalised residual stack, optionally a one-page summary picture and a JSON record
 * (chi^2 per voxel and per slice, verdict, histogram, spectrum, regions); prints chi^2 per voxel and the verdict.
 * The maths lives in {@link ResidualReport}.
 */
public final class ResidualsOperation implements Operation {

    @Override
    public String name() {
        return "residuals";
    }

    @Override
    public String summary() {
        return "check an estimate against its data: normalised residuals, chi^2 and a verdict in words";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the data (camera image) the estimate was made from"),
                Param.image("estimate", true, "the estimate (e.g. a deconvolution result), same size as the input,"
                        + " in ADU above the offset"),
                Param.image("psf", true, "the PSF used (odd sizes, peak at the centre, same voxel size)"),
                Param.number("offset", 0.0, -1e9, 1e9, "ADU", "camera offset (bias) added to the prediction"),
                Param.number("background", 0.0, -1e9, 1e9, "ADU", "background per voxel above the offset"),
                Param.choice("likelihood", "poisson", List.of("poisson", "poisson-gaussian", "gaussian"),
                        "noise model: photon counting, camera (gain and read noise) or constant Gaussian").withAlias("noise"),
                Param.number("gain", 1.0, 1e-9, 1e9, "ADU/e-", "camera gain (poisson, poisson-gaussian)"),
                Param.number("read-noise", 0.0, 0, 1e9, "ADU",
                        "read noise (poisson-gaussian) or the noise standard deviation (gaussian)"),
                Param.outputImage("output", false, "the normalised residual stack (32-bit TIFF; leave out when only the"
                        + " verdict is wanted)"),
                Param.outputPicture("summary", "a one-page summary picture"),
                FftChoice.param(),
                Param.outputFile("record", "run record (JSON) with chi^2, verdict, histogram, spectrum and regions"));
    }

    @Override
    public Result run(Values v, RunContext door) {
        FftEngines.Choice fft = FftChoice.choose(v);
        RunContext ctx = FftChoice.context(door, fft);
        ImagePlus dataImp = v.image("input");
        ImagePlus psfImp = v.image("psf");
        // data, estimate, five maps and their interior crops, the padded blur grid and its spectrum (an estimate)
        long voxels = (long) dataImp.getWidth() * dataImp.getHeight() * dataImp.getNSlices();
        long grid = (long) (dataImp.getWidth() + psfImp.getWidth()) * (dataImp.getHeight() + psfImp.getHeight())
                * (dataImp.getNSlices() + psfImp.getNSlices());
        MemoryCheck.require("residuals of " + dataImp.getWidth() + "x" + dataImp.getHeight() + "x"
                + dataImp.getNSlices(), MemoryCheck.floats(voxels, 14) + MemoryCheck.floats(grid, 3));
        Volume data = InputChecks.oneVolume("input", dataImp);
        Volume estimate = InputChecks.oneVolume("estimate", v.image("estimate"));
        Volume psf = InputChecks.oneVolume("psf", psfImp);
        InputChecks.Scan scan = InputChecks.check("input", data, ctx);
        InputChecks.requireFinite("estimate", estimate);
        if (!ImagePlusAdapter.isCalibrated(psfImp) && !psf.voxel().sameAs(data.voxel())) {
            ctx.warn("the PSF carries no calibration; taking the input's voxel size " + data.voxel());
            psf = psf.withVoxel(data.voxel());
        }
        if (!ImagePlusAdapter.isCalibrated(v.image("estimate")) && !estimate.voxel().sameAs(data.voxel())) {
            estimate = estimate.withVoxel(data.voxel());
        }
        if (data.depth() == 1 && psf.depth() > 1) {
            ctx.warn("psf is 3D (" + psf.shape() + ") and the input 2D: its centre plane (the in-focus plane of a thin"
                    + " specimen) is used");
            psf = ForwardBlur.centrePlane(psf);
        }
        psf = PsfChecks.prepare("psf", psf, data, ctx).withVoxel(data.voxel());
        NoiseModel noise = ResidualModel.noiseModel(v.choice("likelihood"), v.number("gain"), v.number("read-noise"));
        ResidualModel model = new ResidualModel(v.number("offset"), v.number("background"), noise);
        ctx.progress(0.1, "computing residuals");
        ResidualReport report;
        try (Workers w = new Workers(ctx.threads())) {
            if (scan.nonFinite() > 0) {
                data = predictionWhereUntrusted(data, estimate, psf, model, scan.nonFiniteMask(), w, ctx.fft());
                ctx.warn(String.format(Locale.ROOT, "input: the %d untrusted pixels are given the prediction"
                        + " (residual 0), so they count as a perfect fit and lower chi^2 per voxel by up to %.3g %%",
                        scan.nonFinite(), 100.0 * scan.nonFinite() / data.size()));
            }
            report = ResidualReport.analyse(data, estimate, psf, model, w, ctx.fft());
        }
        ctx.checkCancelled();
        ctx.progress(0.8, "writing");
        String title = dataImp.getTitle() == null ? "data" : dataImp.getTitle();
        Result r = new Result();
        r.image("output", ImagePlusAdapter.toImagePlus(report.maps().normalised(), title + "-residuals"));
        if (v.given("summary")) {
            r.image("summary", SummaryPicture.render(title, data, estimate, report));
        }
        ResidualRecord.fill(r, report, v.effective());
        r.record("fft_engine", ctx.fft().name());
        FftChoice.note(r, fft);
        Verdict verdict = report.verdict();
        r.line(String.format(Locale.ROOT, "chi^2 per voxel: %.4f (about 1 when the data fit the noise model)",
                report.maps().chi2PerVoxel()));
        if (Double.isFinite(report.chi2Band())) {
            r.line(String.format(Locale.ROOT, "chi^2 per voxel in the interior, further than the PSF half-width"
                    + " from the faces (used for the verdict): %.4f; in the border band: %.4f", report.chi2Interior(),
                    report.chi2Band()));
        }
        r.line("verdict: " + verdict.code());
        r.line(verdict.text());
        List<ResidualRegions.Region> regions = report.regions().listed();
        if (!regions.isEmpty()) {
            r.line(String.format(Locale.ROOT, "regions with |r| > 4 in the whole stack (%d, largest first;"
                    + " the verdict counts those in the interior):", report.regions().listedCount()));
            r.line("  voxels        x        y        z   peak r");
            for (int i = 0; i < Math.min(10, regions.size()); i++) {
                ResidualRegions.Region g = regions.get(i);
                r.line(String.format(Locale.ROOT, "  %6d %8.1f %8.1f %8.1f %8.1f", g.voxels(), g.x(), g.y(), g.z(),
                        g.peak()));
            }
            if (regions.size() > 10) {
                r.line("  ... (all in the record)");
            }
        }
        for (ResidualRegions.Region g : regions) {
            r.row(ResidualRecord.row(g, data));
        }
        ctx.progress(1, "done");
        return r;
    }

    /**
     * @return a copy of the data whose untrusted (NaN or infinite) pixels hold the prediction offset + background
     *     + H x, so that they carry no residual
     */
    static Volume predictionWhereUntrusted(Volume data, Volume estimate, Volume psf, ResidualModel model,
            byte[] untrusted, Workers w, FftEngine fft) {
        float[] hx = ForwardBlur.blur(estimate, psf, w, fft).data();
        float[] y = data.data().clone();
        for (int i = 0; i < y.length; i++) {
            if (untrusted[i] != 0) {
                y[i] = (float) (model.offset() + model.background() + hx[i]);
            }
        }
        return data.withData(y);
    }

    /** @return the causes as record maps */
    static List<Map<String, Object>> causes(Verdict v) {
        List<Map<String, Object>> out = new ArrayList<>();
        for (Verdict.Cause c : v.causes()) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("code", c.code());
            m.put("chi2_explained_per_pixel", c.share());
            m.put("text", c.sentence());
            out.add(m);
        }
        return out;
    }
}
