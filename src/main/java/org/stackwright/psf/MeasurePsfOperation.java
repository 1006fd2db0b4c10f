package org.stackwright.psf;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.InputChecks;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/** {@code measure-psf}: FWHM in x, y and z (micrometres) of a PSF or a single bead, by 1D Gaussian profile fits. */
public final class MeasurePsfOperation implements Operation {

    @Override
    public String name() {
        return "measure-psf";
    }

    @Override
    public String summary() {
        return "measure the FWHM in x, y and z of a PSF or a single bead image";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the PSF or bead image (calibrated in um)"),
                Param.outputFile("record", "run record (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus imp = v.image("input");
        if (!ImagePlusAdapter.isCalibrated(imp)) {
            ctx.warn("the image has no spatial calibration: widths are given for 1 um voxels, i.e. in voxels");
        }
        Volume psf = InputChecks.oneVolume("input", imp);
        // only the value rules: a bead image to be measured may be off-centre, even-sized and on a background
        PsfChecks.requireUsableValues("input", psf);
        Fwhm.Widths w = Fwhm.measure(psf);
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("image", imp.getTitle());
        row.put("fwhm_x_um", w.xUm());
        row.put("fwhm_y_um", w.yUm());
        row.put("fwhm_z_um", w.zUm());
        row.put("peak_x", w.x());
        row.put("peak_y", w.y());
        row.put("peak_z", w.z());
        Result r = new Result();
        r.row(row);
        r.record("operation", name());
        r.record("input", imp.getTitle());
        r.record("fwhm_um", row);
        r.record("method", "Gaussian plus constant fitted (Levenberg-Marquardt) to the main lobe of the x, y and z "
                + "profiles through the brightest voxel; FWHM = 2.3548 sigma");
        r.line(String.format(Locale.ROOT, "%s (peak at voxel %d, %d, %d)", w.text(), w.x(), w.y(), w.z()));
        return r;
    }
}
