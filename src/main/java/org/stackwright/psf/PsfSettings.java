package org.stackwright.psf;

import java.util.Locale;

import org.stackwright.volume.VoxelSize;

/**
 * The optics and the sampling grid of a modelled PSF: one record shared by every {@link PsfModel}. Lengths in
 * micrometres, wavelengths in nanometres (vacuum). Field names follow the command-line keys of the {@code psf}
 * operation, and {@link #check(String)} names those keys in its messages.
 *
 * @param na numerical aperture of the objective (key {@code na})
 * @param wavelengthNm emission wavelength (key {@code wavelength})
 * @param excitationNm excitation wavelength (key {@code excitation}); for two-photon the laser wavelength. 0 means
 *     "same as the emission wavelength" (one-photon models only)
 * @param immersionIndex refractive index of the immersion medium, the objective's design medium ({@code immersion-index})
 * @param sampleIndex refractive index of the medium around the emitter ({@code sample-index})
 * @param coverslipIndex refractive index of the coverslip ({@code coverslip-index})
 * @param coverslipThicknessUm actual coverslip thickness ({@code coverslip-thickness})
 * @param coverslipDesignThicknessUm thickness the objective is corrected for ({@code coverslip-design-thickness})
 * @param depthUm depth of the emitter below the coverslip ({@code depth})
 * @param pinholeAiryUnits confocal pinhole diameter in Airy units, 1 AU = 1.22 emission wavelength / NA ({@code pinhole})
 * @param voxel voxel size ({@code pixel}, {@code step})
 * @param nx width in voxels, odd ({@code size})
 * @param ny height in voxels, odd
 * @param nz depth in voxels, odd
 */
public record PsfSettings(double na, double wavelengthNm, double excitationNm, double immersionIndex,
        double sampleIndex, double coverslipIndex, double coverslipThicknessUm, double coverslipDesignThicknessUm,
        double depthUm, double pinholeAiryUnits, VoxelSize voxel, int nx, int ny, int nz) {

    /** Standard #1.5 coverslip thickness, micrometres. */
    public static final double STANDARD_COVERSLIP_UM = 170;

    /**
     * Aberration-free optics (sample and coverslip matched to the immersion medium, depth 0, pinhole 1 AU,
     * excitation = emission).
     */
    public static PsfSettings matched(double na, double wavelengthNm, double immersionIndex, VoxelSize voxel,
            int nx, int ny, int nz) {
        return new PsfSettings(na, wavelengthNm, 0, immersionIndex, immersionIndex, immersionIndex,
                STANDARD_COVERSLIP_UM, STANDARD_COVERSLIP_UM, 0, 1, voxel, nx, ny, nz);
    }

    /** @return a copy with other sample index and depth */
    public PsfSettings withSample(double index, double depth) {
        return new PsfSettings(na, wavelengthNm, excitationNm, immersionIndex, index, coverslipIndex,
                coverslipThicknessUm, coverslipDesignThicknessUm, depth, pinholeAiryUnits, voxel, nx, ny, nz);
    }

    /** @return a copy with another excitation wavelength and pinhole */
    public PsfSettings withExcitation(double excitation, double pinhole) {
        return new PsfSettings(na, wavelengthNm, excitation, immersionIndex, sampleIndex, coverslipIndex,
                coverslipThicknessUm, coverslipDesignThicknessUm, depthUm, pinhole, voxel, nx, ny, nz);
    }

    /** @return a copy with another grid */
    public PsfSettings withGrid(VoxelSize v, int x, int y, int z) {
        return new PsfSettings(na, wavelengthNm, excitationNm, immersionIndex, sampleIndex, coverslipIndex,
                coverslipThicknessUm, coverslipDesignThicknessUm, depthUm, pinholeAiryUnits, v, x, y, z);
    }

    /** @return the excitation wavelength in nm, the emission wavelength when none was given */
    public double excitationOrEmissionNm() {
        return excitationNm > 0 ? excitationNm : wavelengthNm;
    }

    /** @return the pinhole radius in micrometres (object space) */
    public double pinholeRadiusUm() {
        return pinholeAiryUnits * 0.5 * 1.22 * wavelengthNm * 1e-3 / na;
    }

    /**
     * Rejects impossible optics and grids.
     *
     * @param model the model name, for messages
     * @throws IllegalArgumentException naming the command-line key, the value and what is allowed
     */
    public void check(String model) {
        positive("na", na);
        positive("wavelength", wavelengthNm);
        atLeast("immersion-index", immersionIndex, 1);
        atLeast("sample-index", sampleIndex, 1);
        atLeast("coverslip-index", coverslipIndex, 1);
        nonNegative("coverslip-thickness", coverslipThicknessUm);
        nonNegative("coverslip-design-thickness", coverslipDesignThicknessUm);
        nonNegative("depth", depthUm);
        nonNegative("pinhole", pinholeAiryUnits);
        if (!(excitationNm >= 0) || Double.isInfinite(excitationNm)) {
            throw new IllegalArgumentException("excitation = " + fmt(excitationNm)
                    + " must be a positive wavelength in nm (or 0 for the emission wavelength)");
        }
        if (na >= immersionIndex) {
            throw new IllegalArgumentException("na = " + fmt(na) + " must be smaller than immersion-index = "
                    + fmt(immersionIndex) + " (sin of the aperture angle is na / immersion-index)");
        }
        if ("two-photon".equals(model) && excitationNm <= 0) {
            throw new IllegalArgumentException("excitation is required for model two-photon: give the laser "
                    + "wavelength in nm (e.g. --excitation 900)");
        }
        if (voxel == null) {
            throw new IllegalArgumentException("pixel and step must be given (voxel size in um)");
        }
        if (nx % 2 == 0 || ny % 2 == 0 || nz % 2 == 0 || nx < 1 || ny < 1 || nz < 1) {
            throw new IllegalArgumentException("size = " + nx + "x" + ny + "x" + nz + ": every size must be odd and "
                    + "at least 1 so that the peak sits on the centre voxel (e.g. " + odd(nx) + "x" + odd(ny) + "x"
                    + odd(nz) + ")");
        }
        org.stackwright.volume.Volume.checkSize(nx, ny, nz);
    }

    private static int odd(int n) {
        return Math.max(1, n % 2 == 0 ? n + 1 : n);
    }

    private static void positive(String key, double v) {
        if (!(v > 0) || Double.isInfinite(v)) {
            throw new IllegalArgumentException(key + " = " + fmt(v) + " must be a positive number");
        }
    }

    private static void nonNegative(String key, double v) {
        if (!(v >= 0) || Double.isInfinite(v)) {
            throw new IllegalArgumentException(key + " = " + fmt(v) + " must be zero or positive");
        }
    }

    private static void atLeast(String key, double v, double min) {
        if (!(v >= min) || Double.isInfinite(v)) {
            throw new IllegalArgumentException(key + " = " + fmt(v) + " must be a refractive index of at least " + fmt(min));
        }
    }

    static String fmt(double v) {
        return v == Math.rint(v) && Math.abs(v) < 1e9 ? Long.toString((long) v) : String.format(Locale.ROOT, "%.6g", v)
                .replaceFirst("\\.?0+$", "");
    }
}
