package org.stackwright.psf;

import java.util.List;

import org.apache.commons.math3.fitting.leastsquares.LeastSquaresBuilder;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresOptimizer;
import org.apache.commons.math3.fitting.leastsquares.LevenbergMarquardtOptimizer;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.util.Pair;
import org.stackwright.model.PoissonNoise;
import org.stackwright.parallel.Workers;

/**
 * The joint maximum-likelihood fit of the optics and every bead's five parameters: Levenberg-Marquardt
 * (commons-math3) on the deviance residuals of all bead boxes (see {@link BeadBox}), parameters ordered optics
 * first, then bead by bead. Optimising everything together follows narrow, curved valleys of the likelihood (depth
 * against sample index, for instance) that a search over the optics alone, with the beads refitted at each step,
 * crawls along. The derivatives of the expected counts with respect to the optics are central differences (two
 * more focus tables per optical parameter); those with respect to the bead parameters are analytic. The same
 * derivatives give the Fisher information, F_ij = sum over voxels dm/d_i dm/d_j / m.
 */
final class JointBeadFit {

    private static final PoissonNoise POISSON = new PoissonNoise();

    private final List<BeadBox> beads;
    private final PsfSettings nominal;
    private final List<OpticsParameter> free;
    private final double[][] bounds;
    private final double halfWidth;
    private final double halfDepth;
    private final Workers workers;
    private final int g;
    private final int rows;

    /** The expected counts and their derivatives at one point: per bead, m and columns (optics, then own five). */
    record Derivatives(double[][] mean, double[][][] columns, FocusTable table) {
    }

    JointBeadFit(List<BeadBox> beads, PsfSettings nominal, List<OpticsParameter> free, double[][] bounds,
            double halfWidth, double halfDepth, Workers workers) {
        this.beads = beads;
        this.nominal = nominal;
        this.free = free;
        this.bounds = bounds;
        this.halfWidth = halfWidth;
        this.halfDepth = halfDepth;
        this.workers = workers;
        this.g = free.size();
        int n = 0;
        for (BeadBox b : beads) {
            n += b.size();
        }
        this.rows = n;
    }

    /** @return the number of parameters: optics, then five per bead */
    int parameters() {
        return g + BeadBox.PARAMS * beads.size();
    }

    /** @return the point of the optics theta and the beads' current parameters */
    double[] point(double[] theta) {
        double[] p = new double[parameters()];
        System.arraycopy(theta, 0, p, 0, g);
        for (int b = 0; b < beads.size(); b++) {
            System.arraycopy(beads.get(b).parameters(), 0, p, g + BeadBox.PARAMS * b, BeadBox.PARAMS);
        }
        return p;
    }

    /**
     * Fits everything from a start point; the beads keep their fitted parameters.
     *
     * @return the fitted point
     */
    double[] fit(double[] start) {
        LeastSquaresOptimizer.Optimum best = new LevenbergMarquardtOptimizer()
                .withCostRelativeTolerance(1e-10)
                .withParameterRelativeTolerance(1e-8)
                .optimize(new LeastSquaresBuilder()
                        .start(start)
                        .model(point -> residuals(point.toArray()))
                        .target(new double[rows])
                        .parameterValidator(this::valid)
                        .lazyEvaluation(false)
                        .maxEvaluations(200)
                        .maxIterations(100)
                        .build());
        double[] p = valid(best.getPoint()).toArray();
        setBeads(p);
        return p;
    }

    /** Keeps the optics inside their search ranges and each bead physical. */
    private RealVector valid(RealVector v) {
        double[] p = v.toArray();
        for (int a = 0; a < g; a++) {
            p[a] = Math.max(bounds[a][0], Math.min(bounds[a][1], p[a]));
        }
        for (int b = 0; b < beads.size(); b++) {
            double[] q = beads.get(b).valid(java.util.Arrays.copyOfRange(p, g + BeadBox.PARAMS * b,
                    g + BeadBox.PARAMS * (b + 1)));
            System.arraycopy(q, 0, p, g + BeadBox.PARAMS * b, BeadBox.PARAMS);
        }
        return new ArrayRealVector(p, false);
    }

    private void setBeads(double[] p) {
        for (int b = 0; b < beads.size(); b++) {
            beads.get(b).setParameters(java.util.Arrays.copyOfRange(p, g + BeadBox.PARAMS * b,
                    g + BeadBox.PARAMS * (b + 1)));
        }
    }

    /** @return the expected counts and all their derivatives at point p (sets the beads' parameters) */
    Derivatives derivatives(double[] p) {
        double[] theta = java.util.Arrays.copyOf(p, g);
        setBeads(p);
        FocusTable table = new FocusTable(BeadRefinement.apply(nominal, free, theta), halfWidth, halfDepth, workers);
        FocusTable[] up = new FocusTable[g];
        FocusTable[] down = new FocusTable[g];
        double[] span = new double[g];
        for (int a = 0; a < g; a++) {
            double h = free.get(a).derivativeStep();
            double[] tu = theta.clone();
            double[] td = theta.clone();
            // stay where the model is defined: depth not negative, NA below the immersion index
            double top = free.get(a) == OpticsParameter.NA ? 0.999 * nominal.immersionIndex() : Double.MAX_VALUE;
            tu[a] = Math.max(theta[a], Math.min(theta[a] + h, top));
            td[a] = free.get(a) == OpticsParameter.DEPTH ? Math.max(0, theta[a] - h) : theta[a] - h;
            span[a] = tu[a] - td[a];
            up[a] = new FocusTable(BeadRefinement.apply(nominal, free, tu), halfWidth, halfDepth, workers);
            down[a] = new FocusTable(BeadRefinement.apply(nominal, free, td), halfWidth, halfDepth, workers);
        }
        int nb = beads.size();
        double[][] mean = new double[nb][];
        double[][][] columns = new double[nb][][];
        workers.forRange(nb, (b0, b1) -> {
            for (int b = b0; b < b1; b++) {
                BeadBox bead = beads.get(b);
                double[][] own = bead.jacobian(table);
                double[][] cols = new double[g + BeadBox.PARAMS][];
                for (int a = 0; a < g; a++) {
                    double[] mu = bead.expected(up[a]);
                    double[] md = bead.expected(down[a]);
                    for (int i = 0; i < mu.length; i++) {
                        mu[i] = (mu[i] - md[i]) / span[a];
                    }
                    cols[a] = mu;
                }
                System.arraycopy(own, 0, cols, g, BeadBox.PARAMS);
                columns[b] = cols;
                mean[b] = bead.expected(table);
            }
        });
        return new Derivatives(mean, columns, table);
    }

    private Pair<RealVector, RealMatrix> residuals(double[] point) {
        double[] p = valid(new ArrayRealVector(point, false)).toArray();
        Derivatives d = derivatives(p);
        double[] r = new double[rows];
        double[][] jac = new double[rows][parameters()];
        int row = 0;
        for (int b = 0; b < beads.size(); b++) {
            double[] y = beads.get(b).data();
            double[] m = d.mean()[b];
            double[][] cols = d.columns()[b];
            int own = g + BeadBox.PARAMS * b;
            for (int i = 0; i < y.length; i++, row++) {
                double mi = Math.max(m[i], 1e-12);
                double dev = POISSON.deviance(y[i], mi);
                double ri = Math.copySign(Math.sqrt(2 * Math.max(dev, 0)), y[i] - mi);
                r[row] = ri;
                // dr/dm = (1 - y/m) / r; near r = 0 its limit is -1/sqrt(m)
                double drdm = Math.abs(ri) > 1e-6 ? POISSON.gradient(y[i], mi) / ri : -1 / Math.sqrt(mi);
                for (int a = 0; a < g; a++) {
                    jac[row][a] = drdm * cols[a][i];
                }
                for (int k = 0; k < BeadBox.PARAMS; k++) {
                    jac[row][own + k] = drdm * cols[g + k][i];
                }
            }
        }
        return new Pair<>(new ArrayRealVector(r, false), new Array2DRowRealMatrix(jac, false));
    }

    /** @return the Fisher information of all parameters at the derivatives' point */
    double[][] fisher(Derivatives d) {
        int n = parameters();
        double[][] f = new double[n][n];
        for (int b = 0; b < beads.size(); b++) {
            double[] m = d.mean()[b];
            double[][] cols = d.columns()[b];
            int[] at = new int[cols.length];
            for (int a = 0; a < g; a++) {
                at[a] = a;
            }
            for (int k = 0; k < BeadBox.PARAMS; k++) {
                at[g + k] = g + BeadBox.PARAMS * b + k;
            }
            for (int i = 0; i < cols.length; i++) {
                for (int j = i; j < cols.length; j++) {
                    double s = 0;
                    for (int v = 0; v < m.length; v++) {
                        s += cols[i][v] * cols[j][v] / Math.max(m[v], 1e-12);
                    }
                    f[at[i]][at[j]] += s;
                    if (at[i] != at[j]) {
                        f[at[j]][at[i]] += s;
                    }
                }
            }
        }
        return f;
    }
}
