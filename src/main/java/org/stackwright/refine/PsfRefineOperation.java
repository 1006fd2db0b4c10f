package org.stackwright.refine;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.InputChecks;
import org.stackwright.op.Limits;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.BeadRefinement;
import org.stackwright.psf.DiffractionPsf;
import org.stackwright.psf.OpticsParameter;
import org.stackwright.psf.PsfSettings;
import org.stackwright.psf.Refinement;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * {@code psf-refine}: fits optical parameters of the Gibson-Lanni PSF (depth, sample index, NA, coverslip
 * thickness) to a bead stack ({@link BeadRefinement}: maximum likelihood under the camera noise model) or, without
 * beads, to the specimen itself ({@link SpecimenRefinement}: held-out likelihood of a short deconvolution), and
 * writes the refined PSF with a record of the fitted values, their standard errors, the fit's quality and plain
 * words on what the data cannot determine.
 */
public final class PsfRefineOperation implements Operation {

    @Override
    public String name() {
        return "psf-refine";
    }

    @Override
    public String summary() {
        return "fit the depth, sample index, NA or coverslip thickness of a Gibson-Lanni PSF to beads or the specimen";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "bead stack (isolated point-like beads) or, with source specimen, the "
                        + "specimen stack; raw camera values"),
                Param.choice("source", "beads", List.of("beads", "specimen"), "what the stack shows: beads (fit to "
                        + "each bead) or specimen (no beads: held-out likelihood of a short deconvolution)"),
                Param.choice("model", "gibson-lanni", List.of("gibson-lanni"), "PSF model whose optics are fitted"),
                Param.number("na", null, 0.01, 1.7, "", "numerical aperture (start value when fitted)").asRequired(),
                Param.number("wavelength", null, 200, 2000, "nm", "emission wavelength").asRequired(),
                Param.number("immersion-index", null, 1.0, 2.0, "", "refractive index of the immersion medium the "
                        + "objective is made for").asRequired(),
                Param.number("sample-index", null, 1.0, 2.0, "", "refractive index of the sample medium (start "
                        + "value when fitted; default: immersion-index)"),
                Param.number("coverslip-index", null, 1.0, 2.0, "", "refractive index of the coverslip "
                        + "(default: immersion-index)"),
                Param.number("coverslip-thickness", PsfSettings.STANDARD_COVERSLIP_UM, 0, 10_000, "um",
                        "actual coverslip thickness (start value when fitted)"),
                Param.number("coverslip-design-thickness", PsfSettings.STANDARD_COVERSLIP_UM, 0, 10_000, "um",
                        "coverslip thickness the objective is corrected for"),
                Param.number("depth", 0.0, 0, 10_000, "um", "depth of the imaged plane below the coverslip "
                        + "(start value when fitted)"),
                Param.text("fit", "depth", "parameters to fit, separated by commas: depth, sample-index, na, "
                        + "coverslip-thickness"),
                Param.number("deepest", 50.0, 1, 10_000, "um", "deepest depth searched"),
                Param.number("pixel", null, 1e-4, 100, "um", "pixel width and height (default: the stack's calibration)"),
                Param.number("step", null, 1e-4, 100, "um", "z step (default: the stack's calibration)"),
                Param.text("size", null, "size of the refined PSF in voxels WxHxD, each odd (e.g. 65x65x41); "
                        + "beads are fitted in a box no larger than this").asRequired(),
                Param.number("offset", 0.0, -1e9, 1e9, "ADU", "camera offset (bias)"),
                Param.number("gain", 1.0, 1e-9, 1e9, "ADU/e-", "camera gain"),
                Param.number("read-noise", 0.0, 0, 1e9, "ADU", "camera read noise (standard deviation)"),
                Limits.iterations("iterations", SpecimenRefinement.DEFAULT_ITERATIONS,
                        "specimen: Richardson-Lucy iterations of the short deconvolution per candidate"),
                Param.outputImage("output", true, "the refined PSF (32-bit TIFF)"),
                Param.outputFile("record", "run record (JSON): fitted values, standard errors, fit quality"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus imp = v.image("input");
        Volume stack = InputChecks.oneVolume("input", imp);
        InputChecks.requireFinite("input", stack);
        VoxelSize voxel = voxel(v, imp, stack);
        stack = stack.withVoxel(voxel);
        int[] size = v.dims("size", 3);
        double ni = v.number("immersion-index");
        PsfSettings nominal = new PsfSettings(v.number("na"), v.number("wavelength"), 0, ni,
                v.given("sample-index") ? v.number("sample-index") : ni,
                v.given("coverslip-index") ? v.number("coverslip-index") : ni, v.number("coverslip-thickness"),
                v.number("coverslip-design-thickness"), v.number("depth"), 1, voxel, size[0], size[1], size[2]);
        nominal.check("gibson-lanni");
        List<OpticsParameter> free = OpticsParameter.parse(v.text("fit"));
        double deepest = v.number("deepest");
        if (free.contains(OpticsParameter.DEPTH) && nominal.depthUm() > deepest) {
            throw new IllegalArgumentException("depth = " + Param.fmt(nominal.depthUm()) + " lies below deepest = "
                    + Param.fmt(deepest) + "; give a start depth within the searched range or raise deepest");
        }
        boolean specimen = v.choice("source").equals("specimen");
        Refinement r;
        if (specimen) {
            r = SpecimenRefinement.run(stack, nominal, free, deepest, v.number("offset"), v.number("gain"),
                    v.number("read-noise"), v.integer("iterations"), ctx);
        } else {
            // the stack, the bead boxes with their model and derivative buffers (a few stack-sized arrays at most)
            MemoryCheck.require("psf-refine of " + stack.shape(), MemoryCheck.floats(stack.size(), 4));
            r = BeadRefinement.run(stack, nominal, free, deepest, v.number("offset"), v.number("gain"),
                    v.number("read-noise"), BeadRefinement.box(nominal), ctx);
        }
        ctx.checkCancelled();
        ctx.progress(0.95, "psf-refine: computing the refined PSF");
        MemoryCheck.require("psf-refine --size " + size[0] + "x" + size[1] + "x" + size[2],
                MemoryCheck.floats((long) size[0] * size[1] * size[2], 3));
        Volume psf;
        try (Workers w = new Workers(ctx.threads())) {
            psf = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI).compute(r.refined(), w);
        }
        ctx.progress(1, "psf-refine done");
        return result(v, imp, r, psf);
    }

    private Result result(Values v, ImagePlus imp, Refinement r, Volume psf) {
        Result out = new Result();
        out.image("output", ImagePlusAdapter.toImagePlus(psf, imp.getTitle() + "-psf-refine"));
        out.record("operation", name());
        out.record("settings", v.effective());
        out.record("input", imp.getTitle());
        out.record("source", v.choice("source"));
        out.record("fitted", r.fitted());
        out.record("standard_errors", r.errors());
        out.record("start_values", r.startValues());
        out.record("identifiable", r.identifiableRecord());
        out.record("correlations", r.correlation());
        out.record("fit_quality", r.quality());
        out.record("notes", r.notes());
        r.details().forEach(out::record);
        out.record("caution", "fitted optics describe the model that best explains these data; a modelled PSF is "
                + "idealised, and a value the record marks as not identifiable must not be used");
        r.lines().forEach(out::line);
        out.line(String.format(Locale.ROOT, "fit quality: %s ratio to a perfect model's expectation %.4f",
                r.quality().get("statistic"), ((Number) r.quality().getOrDefault("deviance_ratio",
                        r.quality().getOrDefault("ratio", Double.NaN))).doubleValue()));
        r.notes().forEach(n -> out.line("note: " + n));
        @SuppressWarnings("unchecked")
        List<Map<String, Object>> rows = (List<Map<String, Object>>) r.details().getOrDefault("beads",
                new ArrayList<Map<String, Object>>());
        for (Map<String, Object> row : rows) {
            out.row(new LinkedHashMap<>(row));
        }
        return out;
    }

    /** @return the voxel size: pixel and step when given, else the stack's calibration */
    private static VoxelSize voxel(Values v, ImagePlus imp, Volume stack) {
        boolean calibrated = ImagePlusAdapter.isCalibrated(imp);
        if (!calibrated && !(v.given("pixel") && v.given("step"))) {
            throw new IllegalArgumentException("input '" + imp.getTitle() + "' has no spatial calibration; give pixel "
                    + "and step (um)");
        }
        double px = v.given("pixel") ? v.number("pixel") : stack.voxel().x();
        double pz = v.given("step") ? v.number("step") : stack.voxel().z();
        return new VoxelSize(px, px, pz);
    }
}
