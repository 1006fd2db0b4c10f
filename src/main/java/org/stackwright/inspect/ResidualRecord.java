package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.op.Result;
import org.stackwright.volume.Volume;

/** Writes a residual analysis into a run record (JSON keys in snake case) and table rows. */
final class ResidualRecord {

    private ResidualRecord() {
    }

    static void fill(Result r, ResidualReport report, Map<String, String> settings) {
        ResidualMaps maps = report.maps();
        r.record("operation", "residuals");
        r.record("settings", settings);
        r.record("chi2_per_pixel", maps.chi2PerVoxel());
        r.record("chi2_per_pixel_interior", report.chi2Interior());
        r.record("chi2_per_pixel_border_band", report.chi2Band());
        r.record("interior_box_xyzwhd", report.interior());
        r.record("verdict", report.verdict().code());
        r.record("verdict_text", report.verdict().text());
        r.record("causes", ResidualsOperation.causes(report.verdict()));
        r.record("mean_normalised_residual", maps.meanNormalised());
        r.record("chi2_per_slice", maps.chi2PerSlice());
        r.record("mean_per_slice", maps.meanPerSlice());
        Map<String, Object> fit = new LinkedHashMap<>();
        fit.put("offset_shift_adu", report.fit().offsetShift());
        fit.put("extra_blur_variance_xy_voxel2", report.fit().extraVarianceXy());
        fit.put("extra_blur_variance_z_voxel2", report.fit().extraVarianceZ());
        fit.put("fading_first_to_last_slice", report.fit().fading());
        fit.put("chi2_explained_by_background", report.fit().explainedByBackground());
        fit.put("chi2_explained_by_psf_width", report.fit().explainedByPsf());
        fit.put("chi2_explained_by_fading", report.fit().explainedByFading());
        r.record("cause_fit", fit);
        Map<String, Object> spec = new LinkedHashMap<>();
        spec.put("frequency_cycles_per_voxel", report.spectrum().frequency());
        spec.put("power", report.spectrum().power());
        spec.put("low_frequency_power_ratio", report.spectrum().lowFrequencyRatio());
        r.record("spectrum", spec);
        Map<String, Object> hist = new LinkedHashMap<>();
        hist.put("edges", report.histogram().edges());
        long[] c = report.histogram().counts();
        List<Long> counts = new ArrayList<>();
        for (long x : c) {
            counts.add(x);
        }
        hist.put("counts", counts);
        hist.put("expected_normal", report.histogram().expected());
        hist.put("below", report.histogram().below());
        hist.put("above", report.histogram().above());
        r.record("histogram", hist);
        List<Map<String, Object>> regions = new ArrayList<>();
        for (ResidualRegions.Region g : report.regions().listed()) {
            regions.add(row(g, maps.normalised()));
        }
        r.record("regions_listed", report.regions().listedCount());
        r.record("regions", regions);
        r.record("scattered_voxels_above_4", report.regions().scatteredVoxels());
        r.record("border_voxels_xyz", maps.border());
        r.record("boundary", "estimate mirror-padded by the PSF half-width before the blur; the verdict, spectrum"
                + " and cause fit use the interior box, the band outside it holds light from outside the view");
    }

    /** One table row per region: size, centroid (voxels and micrometres), bounding box, peak residual. */
    static Map<String, Object> row(ResidualRegions.Region g, Volume calibration) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("voxels", g.voxels());
        m.put("x", g.x());
        m.put("y", g.y());
        m.put("z", g.z());
        m.put("x_um", g.x() * calibration.voxel().x());
        m.put("y_um", g.y() * calibration.voxel().y());
        m.put("z_um", g.z() * calibration.voxel().z());
        m.put("box", g.x0() + "," + g.y0() + "," + g.z0() + "-" + g.x1() + "," + g.y1() + "," + g.z1());
        m.put("peak_r", g.peak());
        return m;
    }
}
