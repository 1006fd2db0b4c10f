package org.stackwright.model;

/**
 * The statistics of camera data y given its expected value mu (both in camera units, ADU, with the offset
 * already part of mu through the background). Used by solvers (likelihood and its gradient), stopping rules
 * (expected data fit) and the residual view (variance for normalised residuals).
 *
 * <p>Implementations are immutable and cheap to call per voxel.
 */
public interface NoiseModel {

    /** @return a short name for records: "poisson", "poisson-gaussian" or "gaussian" */
    String name();

    /** @return the variance of y given mu (ADU^2), always positive */
    double variance(double mu);

    /**
     * @return the negative log-likelihood of y given mu for one voxel, up to a term that depends on y only,
     *     shifted so that it is 0 when mu equals y (a per-voxel "deviance" / 2)
     */
    double deviance(double y, double mu);

    /** @return d deviance / d mu */
    double gradient(double y, double mu);

    /** @return the expected value of deviance(y, mu) for y drawn from this model: 1/2 per voxel for large counts */
    default double expectedDeviance() {
        return 0.5;
    }
}
