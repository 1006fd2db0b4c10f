package org.stackwright.model;

import org.stackwright.parallel.Workers;

/**
 * The proximal map of t TV: prox(v) = argmin_u 1/2 ||u - v||^2 + t TV(u), with the isotropic, anisotropy-weighted
 * total variation of {@link TotalVariation}. Solved on the dual: u = v - D^T q with |q_i| &lt;= t, q found by
 * projected gradient steps q &lt;- P(q + gamma D u), gamma = 1 / ||D||^2 (Chambolle, "An algorithm for total
 * variation minimization and applications", J. Math. Imaging Vis. 20:89-97, 2004, in its projected-gradient
 * form).
 *
 * <p>The dual q is kept between calls (warm start): a sampler calls the map at points that move little from one
 * call to the next, so a few steps per call track the exact map. A fixed number of steps keeps the cost and the
 * result deterministic. Not safe for two threads at once (owns its dual and work arrays).
 */
public final class TotalVariationProx {

    private final TotalVariation tv;
    private final Workers workers;
    private final float gamma;
    private final int steps;
    private final float[] qx;
    private final float[] qy;
    private final float[] qz;

    /**
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     * @param zWeight voxel width / voxel depth (see {@link TotalVariation})
     * @param steps dual steps per call, at least 1
     * @param workers the threads (not closed here)
     */
    public TotalVariationProx(int nx, int ny, int nz, double zWeight, int steps, Workers workers) {
        if (steps < 1) {
            throw new IllegalArgumentException("proximal steps must be at least 1 (given " + steps + ")");
        }
        this.tv = new TotalVariation(nx, ny, nz, zWeight, workers);
        this.workers = workers;
        this.gamma = (float) (1 / tv.normSquaredBound());
        this.steps = steps;
        int n = nx * ny * nz;
        this.qx = new float[n];
        this.qy = new float[n];
        this.qz = new float[n];
    }

    /** @return the total variation this map belongs to */
    public TotalVariation totalVariation() {
        return tv;
    }

    /**
     * out = prox of t TV at v.
     *
     * @param v not modified
     * @param t the weight, 0 or more (0 gives v)
     * @param out overwritten (must not be v)
     */
    public void apply(float[] v, double t, float[] out) {
        float tf = (float) t;
        for (int k = 0; k < steps; k++) {
            primal(v, out);
            tv.dualStep(out, gamma, tf, qx, qy, qz);
        }
        primal(v, out);
    }

    /** Forgets the warm start (the next call starts from q = 0). */
    public void reset() {
        java.util.Arrays.fill(qx, 0f);
        java.util.Arrays.fill(qy, 0f);
        java.util.Arrays.fill(qz, 0f);
    }

    /** out = v - D^T q */
    private void primal(float[] v, float[] out) {
        tv.adjoint(qx, qy, qz, out);
        workers.forRange(out.length, (from, to) -> {
            for (int i = from; i < to; i++) {
                out[i] = v[i] - out[i];
            }
        });
    }
}
