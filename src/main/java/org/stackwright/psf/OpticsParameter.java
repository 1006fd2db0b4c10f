package org.stackwright.psf;

import java.util.ArrayList;
import java.util.List;

/**
 * An optical setting that {@code psf-refine} can fit: its key (as in {@code --fit}), the name in the run record,
 * how it is read from and written into {@link PsfSettings}, the range searched and the step of the numerical
 * derivative of the Fisher information.
 */
public enum OpticsParameter {
    /** depth of the imaged plane below the coverslip, micrometres */
    DEPTH("depth", "depth_um", 0.1, 5),
    /** refractive index of the sample medium */
    SAMPLE_INDEX("sample-index", "sample_index", 0.002, 0.05),
    /** numerical aperture */
    NA("na", "na", 0.002, 0.05),
    /** actual coverslip thickness, micrometres */
    COVERSLIP_THICKNESS("coverslip-thickness", "coverslip_thickness_um", 1, 10);

    private final String key;
    private final String recordName;
    private final double derivativeStep;
    private final double scale;

    OpticsParameter(String key, String recordName, double derivativeStep, double scale) {
        this.key = key;
        this.recordName = recordName;
        this.derivativeStep = derivativeStep;
        this.scale = scale;
    }

    /** @return the key, as written in {@code --fit} */
    public String key() {
        return key;
    }

    /** @return the name in the run record's {@code fitted} map */
    public String recordName() {
        return recordName;
    }

    /** @return step of the central difference for derivatives */
    public double derivativeStep() {
        return derivativeStep;
    }

    /** @return a typical change, for scaling the search */
    public double scale() {
        return scale;
    }

    /** @return the value in these settings */
    public double get(PsfSettings s) {
        return switch (this) {
            case DEPTH -> s.depthUm();
            case SAMPLE_INDEX -> s.sampleIndex();
            case NA -> s.na();
            case COVERSLIP_THICKNESS -> s.coverslipThicknessUm();
        };
    }

    /** @return a copy of the settings with this parameter changed */
    public PsfSettings with(PsfSettings s, double v) {
        return switch (this) {
            case DEPTH -> s.withSample(s.sampleIndex(), v);
            case SAMPLE_INDEX -> s.withSample(v, s.depthUm());
            case NA -> new PsfSettings(v, s.wavelengthNm(), s.excitationNm(), s.immersionIndex(), s.sampleIndex(),
                    s.coverslipIndex(), s.coverslipThicknessUm(), s.coverslipDesignThicknessUm(), s.depthUm(),
                    s.pinholeAiryUnits(), s.voxel(), s.nx(), s.ny(), s.nz());
            case COVERSLIP_THICKNESS -> new PsfSettings(s.na(), s.wavelengthNm(), s.excitationNm(), s.immersionIndex(),
                    s.sampleIndex(), s.coverslipIndex(), v, s.coverslipDesignThicknessUm(), s.depthUm(),
                    s.pinholeAiryUnits(), s.voxel(), s.nx(), s.ny(), s.nz());
        };
    }

    /**
     * @param nominal the starting optics
     * @param deepestUm the deepest depth searched
     * @return {lowest, highest} value searched: depth 0 to deepest; sample index 1.30 to 1.60 (water to dense
     *     mounting media); NA from 0.8 to 1.2 times the nominal, below the immersion index; coverslip thickness
     *     within 60 um of the nominal (wider than the tolerance of #1.5 coverslips)
     */
    public double[] bounds(PsfSettings nominal, double deepestUm) {
        return switch (this) {
            case DEPTH -> new double[] {0, deepestUm};
            case SAMPLE_INDEX -> new double[] {1.30, 1.60};
            case NA -> new double[] {0.8 * nominal.na(), Math.min(1.2 * nominal.na(), 0.995 * nominal.immersionIndex())};
            case COVERSLIP_THICKNESS -> new double[] {Math.max(0, nominal.coverslipThicknessUm() - 60),
                nominal.coverslipThicknessUm() + 60};
        };
    }

    /**
     * Reads a {@code --fit} list such as "depth,sample-index".
     *
     * @throws IllegalArgumentException naming the key {@code fit} and the allowed words
     */
    public static List<OpticsParameter> parse(String text) {
        List<OpticsParameter> out = new ArrayList<>();
        if (text == null || text.isBlank()) {
            throw new IllegalArgumentException("fit is empty; give one or more of " + words() + ", separated by commas");
        }
        for (String word : text.split(",")) {
            String w = word.trim();
            OpticsParameter found = null;
            for (OpticsParameter p : values()) {
                if (p.key.equals(w)) {
                    found = p;
                }
            }
            if (found == null) {
                throw new IllegalArgumentException("fit = '" + text + "': '" + w + "' cannot be fitted; choose from "
                        + words() + ", separated by commas");
            }
            if (out.contains(found)) {
                throw new IllegalArgumentException("fit = '" + text + "' names " + w + " twice; name each once");
            }
            out.add(found);
        }
        return out;
    }

    private static String words() {
        List<String> w = new ArrayList<>();
        for (OpticsParameter p : values()) {
            w.add(p.key);
        }
        return String.join(", ", w);
    }
}
