package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.op.Result;
import org.stackwright.volume.Volume;

/** Writes a residual analysis into a run record (JSON keys in snake case) and table rows. */
public final class ResidualRecord {

    private ResidualRecord() {
    }

    static void fill(Result r, ResidualReport report, Map<String, String> settings) {
        r.record("operation", "residuals");
        r.record("settings", settings);
        details(report).forEach(r::record);
    }

    /**
     * The three numbers a deconvolution's run record carries under {@code residuals} (the full analysis is in the
     * residual stack and the summary picture).
     */
    public static Map<String, Object> brief(ResidualReport report) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("chi2_per_pixel", report.chi2Trusted());
        m.put("verdict", report.verdict().code());
        m.put("verdict_text", report.verdict().text());
        m.put("chi2_per_pixel_border_band", report.chi2Band());
        m.put("border_band_voxels_xyz", report.region().band());
        m.put("boundary", report.region().boundary());
        m.put("psf_width_ratio_xy", report.widthRatioXy());
        m.put("psf_width_ratio_z", report.widthRatioZ());
        return m;
    }

    /** @return every record entry of an analysis, in snake case */
    static Map<String, Object> details(ResidualReport report) {
        Map<String, Object> r = new LinkedHashMap<>();
        ResidualMaps inner = report.trustedMaps();
        TrustedRegion region = report.region();
        r.put("chi2_per_pixel", report.chi2Trusted());
        r.put("chi2_per_pixel_whole_image", report.chi2Whole());
        r.put("chi2_per_pixel_border_band", report.chi2Band());
        r.put("verdict", report.verdict().code());
        r.put("verdict_text", report.verdict().text());
        r.put("causes", ResidualsOperation.causes(report.verdict()));
        r.put("boundary", region.boundary());
        r.put("trusted_region", region.describe());
        r.put("trusted_box_xyzwhd", region.box());
        r.put("trusted_voxels", inner.trusted());
        r.put("border_band_voxels_xyz", region.band());
        r.put("border_band_excluded", region.bandExcluded());
        r.put("mean_normalised_residual", inner.meanNormalised());
        r.put("chi2_per_slice", report.chi2PerPlane());
        Map<String, Object> fit = new LinkedHashMap<>();
        fit.put("offset_shift_adu", report.fit().offsetShift());
        fit.put("extra_blur_variance_xy_voxel2", report.fit().extraVarianceXy());
        fit.put("extra_blur_variance_z_voxel2", report.fit().extraVarianceZ());
        fit.put("psf_width_ratio_xy", report.widthRatioXy());
        fit.put("psf_width_ratio_z", report.widthRatioZ());
        fit.put("fading_first_to_last_slice", report.fit().fading());
        fit.put("chi2_explained_by_background", report.fit().explainedByBackground());
        fit.put("chi2_explained_by_psf_width", report.fit().explainedByPsf());
        fit.put("chi2_explained_by_fading", report.fit().explainedByFading());
        r.put("cause_fit", fit);
        Map<String, Object> spec = new LinkedHashMap<>();
        spec.put("frequency_cycles_per_voxel", report.spectrum().frequency());
        spec.put("power", report.spectrum().power());
        spec.put("low_frequency_power_ratio", report.spectrum().lowFrequencyRatio());
        r.put("spectrum", spec);
        Map<String, Object> hist = new LinkedHashMap<>();
        hist.put("edges", report.histogram().edges());
        List<Long> counts = new ArrayList<>();
        for (long x : report.histogram().counts()) {
            counts.add(x);
        }
        hist.put("counts", counts);
        hist.put("expected_normal", report.histogram().expected());
        hist.put("below", report.histogram().below());
        hist.put("above", report.histogram().above());
        r.put("histogram", hist);
        List<Map<String, Object>> regions = new ArrayList<>();
        for (ResidualRegions.Region g : report.regions().listed()) {
            regions.add(row(g, report.maps().normalised()));
        }
        r.put("regions_listed", report.regions().listedCount());
        r.put("regions", regions);
        r.put("regions_in_border_band", report.bandRegions());
        r.put("scattered_voxels_above_4", report.regions().scatteredVoxels());
        r.put("boundary_note", region.boundaryWords() + "; " + (region.bandExcluded()
                ? "the verdict, chi^2, histogram, spectrum, cause fit and regions use the interior only"
                : "the verdict uses the whole image; the band's chi^2 is given apart"));
        return r;
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
