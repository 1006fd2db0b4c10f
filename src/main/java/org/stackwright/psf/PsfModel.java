package org.stackwright.psf;

import java.util.List;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * A modelled point spread function. Every model returns a calibrated volume of the requested odd size whose
 * largest voxel is the centre voxel (n/2 along each axis) and whose voxels sum to 1.
 */
public interface PsfModel {

    /** @return the model's command-line name, e.g. "gibson-lanni" */
    String name();

    /**
     * @param settings optics and grid; checked with {@link PsfSettings#check(String)}
     * @param workers threads for per-plane work (not closed)
     * @return a new PSF volume with the settings' voxel size
     * @throws IllegalArgumentException naming the setting when the optics are impossible
     */
    Volume compute(PsfSettings settings, Workers workers);

    /** @return every model, in the order help lists them */
    static List<PsfModel> all() {
        return List.of(new GaussianPsf(), new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD),
                new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI), new DiffractionPsf(DiffractionPsf.Kind.CONFOCAL),
                new DiffractionPsf(DiffractionPsf.Kind.TWO_PHOTON));
    }

    /** @return the names of all models */
    static List<String> names() {
        return all().stream().map(PsfModel::name).toList();
    }

    /**
     * @return the model with this name
     * @throws IllegalArgumentException naming the key {@code model} when there is none
     */
    static PsfModel byName(String name) {
        return all().stream().filter(m -> m.name().equals(name)).findFirst().orElseThrow(() ->
                new IllegalArgumentException("model = '" + name + "' is not known; choose one of "
                        + String.join(", ", names())));
    }
}
