package org.stackwright.psf;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.VoxelSize;

/**
 * Compares a voxel size with the Nyquist limits of the optics and says in plain words when a stack is
 * undersampled. Common practice (the sampling theorem applied to the OTF cut-off): widefield lateral pixel <=
 * lambda / (4 NA), axial step <= lambda / (2 n (1 - cos alpha)) with sin alpha = NA / n. For confocal the OTF
 * reaches the sum of the excitation and emission cut-offs, for two-photon twice the cut-off of the laser
 * wavelength; the limits shrink accordingly. Any operation that knows the optics can call {@link #warnings} and
 * pass each line to {@code RunContext.warn}.
 */
public final class SamplingCheck {

    /**
     * The Nyquist limits.
     *
     * @param lateralUm largest pixel width and height that samples the PSF without aliasing, micrometres
     * @param axialUm largest z step, micrometres
     */
    public record Limits(double lateralUm, double axialUm) {
    }

    private SamplingCheck() {
    }

    /**
     * @param optics NA, wavelengths (nm) and immersion index
     * @param model PSF model name ("widefield", "gibson-lanni", "gaussian", "confocal", "two-photon")
     */
    public static Limits limits(PsfSettings optics, String model) {
        double na = optics.na();
        double n = optics.immersionIndex();
        double oneMinusCos = 1 - Math.sqrt(1 - (na / n) * (na / n));
        double em = optics.wavelengthNm() * 1e-3;
        // lateral and axial cut-off frequencies (cycles per micrometre) of the OTF
        double lateral;
        double axial;
        switch (model) {
            case "confocal" -> {
                double ex = optics.excitationOrEmissionNm() * 1e-3;
                lateral = 2 * na / em + 2 * na / ex;
                axial = n * oneMinusCos / em + n * oneMinusCos / ex;
            }
            case "two-photon" -> {
                double ex = optics.excitationOrEmissionNm() * 1e-3;
                lateral = 2 * (2 * na / ex);
                axial = 2 * (n * oneMinusCos / ex);
            }
            default -> {
                lateral = 2 * na / em;
                axial = n * oneMinusCos / em;
            }
        }
        return new Limits(1 / (2 * lateral), 1 / (2 * axial));
    }

    /**
     * @param voxel the image's voxel size, micrometres
     * @param optics the optics (only NA, wavelengths and immersion index are used)
     * @param model PSF model name, see {@link #limits}
     * @param threeD whether the stack has more than one plane (the z step is checked only then)
     * @return plain-word warnings, empty when the voxel size satisfies the Nyquist limits
     */
    public static List<String> warnings(VoxelSize voxel, PsfSettings optics, String model, boolean threeD) {
        Limits lim = limits(optics, model);
        List<String> out = new ArrayList<>();
        double pixel = Math.max(voxel.x(), voxel.y());
        String optic = String.format(Locale.ROOT, "NA %s at %s nm", num(optics.na()), num("two-photon".equals(model)
                ? optics.excitationOrEmissionNm() : optics.wavelengthNm()));
        if (pixel > lim.lateralUm() * (1 + 1e-9)) {
            out.add(String.format(Locale.ROOT, "the pixel size %s um is larger than the Nyquist limit %s um for %s"
                    + " (%s): the stack is undersampled in x and y, so the finest detail the objective passes is lost "
                    + "or aliased and no deconvolution can bring it back; use pixels of at most %s um",
                    num(pixel), num(lim.lateralUm()), optic, model, num(lim.lateralUm())));
        }
        if (threeD && voxel.z() > lim.axialUm() * (1 + 1e-9)) {
            out.add(String.format(Locale.ROOT, "the z step %s um is larger than the Nyquist limit %s um for %s in "
                    + "a medium of index %s (%s): the stack is undersampled in z; use steps of at most %s um",
                    num(voxel.z()), num(lim.axialUm()), optic, num(optics.immersionIndex()), model, num(lim.axialUm())));
        }
        return out;
    }

    /** Four significant digits without trailing zeros. */
    private static String num(double v) {
        String s = String.format(Locale.ROOT, "%.4g", v);
        return s.contains("e") || !s.contains(".") ? s : s.replaceFirst("0+$", "").replaceFirst("\\.$", "");
    }
}
