package org.stackwright.psf;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.InputChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code psf-from-beads}: a measured PSF from a bead stack, with a report of the beads used and rejected (and
 * why) and the FWHM of the result. When NA and wavelength are given, the stack's sampling is checked (Nyquist).
 */
public final class PsfFromBeadsOperation implements Operation {

    @Override
    public String name() {
        return "psf-from-beads";
    }

    @Override
    public String summary() {
        return "measure a PSF by averaging isolated sub-resolution beads of a bead stack";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "bead stack (calibrated in um)"),
                Param.text("size", null, "PSF size in voxels WxHxD, each odd (e.g. 31x31x41)").asRequired(),
                Param.number("bead-diameter", 0.0, 0, 100, "um",
                        "bead diameter, to correct for the bead size (0 = no correction)"),
                Param.number("saturation", 0.0, 0, Double.MAX_VALUE, "",
                        "saturation level of the camera in image units (0 = find it in the data)"),
                Param.number("na", null, 0.01, 1.7, "", "numerical aperture, for the sampling check (optional)"),
                Param.number("wavelength", null, 200, 2000, "nm", "emission wavelength, for the sampling check (optional)"),
                Param.number("immersion-index", 1.518, 1.0, 2.0, "", "immersion index, for the sampling check"),
                Param.outputImage("output", true, "the measured PSF (32-bit TIFF)"),
                Param.outputFile("record", "run record with the bead report (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus imp = v.image("input");
        int[] size = v.dims("size", 3);
        if (!ImagePlusAdapter.isCalibrated(imp)) {
            ctx.warn("the bead stack has no spatial calibration: the PSF gets 1 um voxels; set the voxel size first");
        }
        // the stack, the filtered copies of the bead search and the bead cut-outs (an estimate)
        MemoryCheck.require("psf-from-beads of " + imp.getWidth() + "x" + imp.getHeight() + "x" + imp.getNSlices(),
                MemoryCheck.floats((long) imp.getWidth() * imp.getHeight() * imp.getNSlices(), 4));
        Volume stack = InputChecks.oneVolume("input", imp);
        InputChecks.requireFinite("input", stack);
        if (v.given("na") && v.given("wavelength")) {
            PsfSettings optics = PsfSettings.matched(v.number("na"), v.number("wavelength"),
                    v.number("immersion-index"), stack.voxel(), 1, 1, 1);
            optics.check("widefield");
            SamplingCheck.warnings(stack.voxel(), optics, "widefield", stack.depth() > 1).forEach(ctx::warn);
        } else if (v.given("na") || v.given("wavelength")) {
            ctx.warn("sampling not checked: give both na and wavelength to compare the voxel size with the Nyquist limit");
        }
        double saturation = v.number("saturation") > 0 ? v.number("saturation") : Double.NaN;
        ctx.progress(0.1, "finding beads");
        PsfFromBeads.Outcome out;
        try (Workers w = new Workers(ctx.threads())) {
            out = PsfFromBeads.run(stack, size[0], size[1], size[2], v.number("bead-diameter"), saturation, w);
        }
        ctx.progress(1, "PSF from beads done");
        Result r = new Result();
        r.image("output", ImagePlusAdapter.toImagePlus(out.psf(), imp.getTitle() + "-psf-from-beads"));
        List<Map<String, Object>> report = new ArrayList<>();
        for (Bead b : out.beads()) {
            Map<String, Object> row = new LinkedHashMap<>();
            row.put("bead", b.id());
            row.put("x_um", b.x() * stack.voxel().x());
            row.put("y_um", b.y() * stack.voxel().y());
            row.put("z_um", b.z() * stack.voxel().z());
            row.put("used", b.used());
            row.put("reason", b.reason());
            r.row(row);
            report.add(row);
            if (!b.used()) {
                r.line(String.format(Locale.ROOT, "bead %d at (%.2f, %.2f, %.2f) um rejected: %s", b.id(),
                        b.x() * stack.voxel().x(), b.y() * stack.voxel().y(), b.z() * stack.voxel().z(), b.reason()));
            }
        }
        Fwhm.Widths fw = out.fwhm();
        r.line(String.format(Locale.ROOT, "used %d of %d beads; PSF %s; %s", out.used(), out.beads().size(),
                out.psf().shape(), fw.text()));
        out.notes().forEach(r::line);
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("input", imp.getTitle());
        r.record("beads_used", out.used());
        r.record("beads_found", out.beads().size());
        r.record("beads", report);
        r.record("fwhm_um", Map.of("x", fw.xUm(), "y", fw.yUm(), "z", fw.zUm()));
        r.record("notes", out.notes());
        return r;
    }
}
