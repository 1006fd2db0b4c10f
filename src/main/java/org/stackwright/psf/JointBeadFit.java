package org.stackwright.psf;

import java.util.List;

import org.stackwright.parallel.Workers;

/**
 * The derivatives of every bead's expected counts with respect to all parameters, the optics first, then bead by
 * bead (see {@link BeadBox}), and from them the Fisher information F_ij = sum over voxels dm/d_i dm/d_j / m of
 * Poisson counts. The derivatives with respect to the optics are central differences (two more focus tables per
 * optical parameter); those with respect to the bead parameters are analytic.
 */
final class JointBeadFit {

    private final List<BeadBox> beads;
    private final PsfSettings nominal;
    private final List<OpticsParameter> free;
    private final double halfWidth;
    private final double halfDepth;
    private final Workers workers;
    private final int g;

    /** The expected counts and their derivatives at one point: per bead, m and columns (optics, then own five). */
    record Derivatives(double[][] mean, double[][][] columns, FocusTable table) {
    }

    JointBeadFit(List<BeadBox> beads, PsfSettings nominal, List<OpticsParameter> free, double halfWidth,
            double halfDepth, Workers workers) {
        this.beads = beads;
        this.nominal = nominal;
        this.free = free;
        this.halfWidth = halfWidth;
        this.halfDepth = halfDepth;
        this.workers = workers;
        this.g = free.size();
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
