package org.stackwright.psf;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * {@code psf}: a modelled PSF from the optics (Gaussian, widefield Born & Wolf, Gibson-Lanni, confocal,
 * two-photon), calibrated, odd-sized, centred and of unit sum. Warns when the requested voxel size undersamples
 * the optics (Nyquist).
 */
public final class PsfOperation implements Operation {

    @Override
    public String name() {
        return "psf";
    }

    @Override
    public String summary() {
        return "model a PSF from the optics (idealised: a measured PSF is preferred for quantitative work)";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.choice("model", null, PsfModel.names(), "PSF model").asRequired(),
                Param.number("na", null, 0.01, 1.7, "", "numerical aperture of the objective").asRequired(),
                Param.number("wavelength", null, 200, 2000, "nm", "emission wavelength").asRequired(),
                Param.number("excitation", 0.0, 0, 2000, "nm",
                        "excitation wavelength (confocal; for two-photon the laser wavelength); 0 = emission wavelength"),
                Param.number("immersion-index", null, 1.0, 2.0, "", "refractive index of the immersion medium the "
                        + "objective is made for").asRequired(),
                Param.number("sample-index", null, 1.0, 2.0, "", "refractive index of the sample medium "
                        + "(default: immersion-index)"),
                Param.number("coverslip-index", null, 1.0, 2.0, "", "refractive index of the coverslip "
                        + "(default: immersion-index)"),
                Param.number("coverslip-thickness", PsfSettings.STANDARD_COVERSLIP_UM, 0, 10_000, "um",
                        "actual coverslip thickness"),
                Param.number("coverslip-design-thickness", PsfSettings.STANDARD_COVERSLIP_UM, 0, 10_000, "um",
                        "coverslip thickness the objective is corrected for"),
                Param.number("depth", 0.0, 0, 10_000, "um", "depth of the imaged plane below the coverslip"),
                Param.number("pinhole", 1.0, 0, 1000, "AU", "confocal pinhole diameter in Airy units "
                        + "(1 AU = 1.22 wavelength / na)"),
                Param.number("pixel", null, 1e-4, 100, "um", "pixel width and height").asRequired(),
                Param.number("step", null, 1e-4, 100, "um", "z step").asRequired(),
                Param.text("size", null, "PSF size in voxels WxHxD, each odd (e.g. 65x65x41)").asRequired(),
                Param.outputImage("output", true, "the PSF (32-bit TIFF)"),
                Param.outputFile("record", "run record (JSON)"));
    }

    /** @return the settings of a run, from the operation's values */
    static PsfSettings settings(Values v) {
        int[] size = v.dims("size", 3);
        double ni = v.number("immersion-index");
        double ns = v.given("sample-index") ? v.number("sample-index") : ni;
        double ng = v.given("coverslip-index") ? v.number("coverslip-index") : ni;
        return new PsfSettings(v.number("na"), v.number("wavelength"), v.number("excitation"), ni, ns, ng,
                v.number("coverslip-thickness"), v.number("coverslip-design-thickness"), v.number("depth"),
                v.number("pinhole"), new VoxelSize(v.number("pixel"), v.number("pixel"), v.number("step")),
                size[0], size[1], size[2]);
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        PsfModel model = PsfModel.byName(v.choice("model"));
        PsfSettings s = settings(v);
        s.check(model.name());
        // the PSF, its unit-sum copy and the output image
        MemoryCheck.require("psf --size " + s.nx() + "x" + s.ny() + "x" + s.nz(),
                MemoryCheck.floats((long) s.nx() * s.ny() * s.nz(), 3));
        for (String w : SamplingCheck.warnings(s.voxel(), s, model.name(), s.nz() > 1)) {
            ctx.warn(w);
        }
        Map<String, Object> record = new LinkedHashMap<>();
        ctx.progress(0.05, "modelling a " + model.name() + " PSF of " + s.nx() + "x" + s.ny() + "x" + s.nz());
        Volume psf;
        try (Workers w = new Workers(ctx.threads())) {
            if (model instanceof DiffractionPsf d) {
                d.cautions(s).forEach(ctx::warn);
                if (d.kind() != DiffractionPsf.Kind.WIDEFIELD) {
                    double shift = d.focalOffset(s, w);
                    record.put("focal_offset_um", shift);
                    record.put("paraxial_focal_offset_um", DiffractionPsf.paraxialShift(s));
                }
            }
            ctx.checkCancelled();
            psf = model.compute(s, w);
        }
        ctx.progress(1, "PSF done");
        Fwhm.Widths fw = Fwhm.measure(psf);
        Result r = new Result();
        r.image("output", ImagePlusAdapter.toImagePlus(psf, title(model.name(), v.number("na"), v.number("wavelength"))));
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("model", model.name());
        r.record("fwhm_um", Map.of("x", fw.xUm(), "y", fw.yUm(), "z", fw.zUm()));
        record.forEach(r::record);
        r.record("caution", "modelled PSFs are idealised; a measured PSF is preferred for quantitative work");
        r.line(String.format(Locale.ROOT, "%s PSF %s voxels of %s; FWHM x %.4f um, y %.4f um, z %.4f um",
                model.name(), psf.shape(), psf.voxel(), fw.xUm(), fw.yUm(), fw.zUm()));
        if (record.containsKey("focal_offset_um")) {
            r.line(String.format(Locale.ROOT, "intensity maximum %.4f um from the nominal focus (positive = deeper; "
                    + "paraxial rule %.4f um); the PSF is centred on the maximum",
                    (double) record.get("focal_offset_um"), (double) record.get("paraxial_focal_offset_um")));
        }
        return r;
    }

    /** @return a title that says what the PSF is: "psf-gibson-lanni-NA1.3-520nm" */
    static String title(String model, double na, double wavelength) {
        return "psf-" + model + "-NA" + Param.fmt(na) + "-" + Param.fmt(wavelength) + "nm";
    }
}
