package org.stackwright.psf;

/**
 * One bead found in a bead stack, with its position and whether it went into the averaged PSF.
 *
 * @param id number in order of detection (brightest first), from 1
 * @param x column, voxels (sub-voxel after localisation)
 * @param y row, voxels
 * @param z plane, voxels
 * @param peak brightest smoothed value above the background (image units)
 * @param used true when the bead went into the average
 * @param reason why it was rejected; "" when used
 */
public record Bead(int id, double x, double y, double z, double peak, boolean used, String reason) {

    /** @return the same bead rejected for the given reason */
    public Bead reject(String why) {
        return new Bead(id, x, y, z, peak, false, why);
    }

    /** @return the same bead at a refined position */
    public Bead at(double nx, double ny, double nz) {
        return new Bead(id, nx, ny, nz, peak, used, reason);
    }
}
