package org.stackwright.repair;

import org.stackwright.parallel.Workers;

/**
 * Preconditioned conjugate gradient for a symmetric positive definite system A x = b given as an operator (no
 * stored matrix), with the diagonal (Jacobi) preconditioner M = diag(A) or a given one ({@link Multigrid}).
 *
 * <p>Iteration (Saad, "Iterative Methods for Sparse Linear Systems", 2nd ed., 2003, Algorithm 9.1):
 * r = b - A x, z = M^-1 r, p = z; repeat: alpha = (r.z)/(p.Ap), x += alpha p, r -= alpha Ap, z = M^-1 r,
 * beta = (r_new.z_new)/(r.z), p = z + beta p. Stops when ||r|| <= tolerance ||b|| or after maxIterations.
 * Sums use {@link Workers#sum}, so the answer is bit-identical for any thread count. Work vectors are allocated
 * once per solver and reused for every solve of the same size.
 */
final class ConjugateGradient {

    /** y = A x; x is not modified, y is written completely. */
    @FunctionalInterface
    interface Operator {
        void apply(double[] x, double[] y);
    }

    /** z = M^-1 r for a symmetric positive definite M; r is not modified, z is written completely. */
    @FunctionalInterface
    interface Preconditioner {
        void apply(double[] r, double[] z);
    }

    /** What a solve did. */
    record Outcome(int iterations, double relativeResidual, boolean converged) {
    }

    private final double tolerance;
    private final int maxIterations;
    private final Workers workers;
    private final double[] r;
    private final double[] z;
    private final double[] p;
    private final double[] ap;
    /** step length and direction update of the current iteration (read by the loop bodies) */
    private volatile double alpha;
    private volatile double beta;

    /**
     * @param n system size
     * @param tolerance relative residual at which to stop, > 0
     * @param maxIterations largest number of iterations, >= 1
     */
    ConjugateGradient(int n, double tolerance, int maxIterations, Workers workers) {
        this.tolerance = tolerance;
        this.maxIterations = maxIterations;
        this.workers = workers;
        r = new double[n];
        z = new double[n];
        p = new double[n];
        ap = new double[n];
    }

    /**
     * Solves A x = b.
     *
     * @param a the operator, symmetric positive definite
     * @param diagonal the diagonal of A (all entries positive); not modified
     * @param b right-hand side; not modified
     * @param x starting guess on entry, solution on return (modified)
     */
    Outcome solve(Operator a, double[] diagonal, double[] b, double[] x) {
        return solve(a, diagonal, null, b, x);
    }

    /**
     * Solves A x = b with a general preconditioner (e.g. {@link Multigrid}).
     *
     * @param a the operator, symmetric positive definite
     * @param m the preconditioner, symmetric positive definite
     * @param b right-hand side; not modified
     * @param x starting guess on entry, solution on return (modified)
     */
    Outcome solve(Operator a, Preconditioner m, double[] b, double[] x) {
        return solve(a, null, m, b, x);
    }

    private Outcome solve(Operator a, double[] diagonal, Preconditioner m, double[] b, double[] x) {
        int n = b.length;
        if (n == 0) {
            return new Outcome(0, 0, true);
        }
        double bNorm = Math.sqrt(workers.sum(n, (f, t) -> dot(b, b, f, t)));
        if (bNorm == 0) {
            bNorm = 1;
        }
        // loop bodies made once: the iterations below allocate nothing
        Workers.RangeSum rDotZ = (f, t) -> dot(r, z, f, t);
        Workers.RangeSum rDotR = (f, t) -> dot(r, r, f, t);
        Workers.RangeSum pDotAp = (f, t) -> dot(p, ap, f, t);
        Workers.RangeBody step = (f, t) -> {
            double al = alpha;
            for (int i = f; i < t; i++) {
                x[i] += al * p[i];
                r[i] -= al * ap[i];
                if (diagonal != null) {
                    z[i] = r[i] / diagonal[i];
                }
            }
        };
        Workers.RangeBody direction = (f, t) -> {
            double be = beta;
            for (int i = f; i < t; i++) {
                p[i] = z[i] + be * p[i];
            }
        };
        a.apply(x, ap);
        workers.forRange(n, (f, t) -> {
            for (int i = f; i < t; i++) {
                r[i] = b[i] - ap[i];
                if (diagonal != null) {
                    z[i] = r[i] / diagonal[i];
                }
            }
        });
        if (m != null) {
            m.apply(r, z);
        }
        System.arraycopy(z, 0, p, 0, n);
        double rz = workers.sum(n, rDotZ);
        double rNorm = Math.sqrt(workers.sum(n, rDotR));
        int it = 0;
        while (rNorm > tolerance * bNorm && it < maxIterations) {
            a.apply(p, ap);
            double pap = workers.sum(n, pDotAp);
            if (!(pap > 0)) {
                break;
            }
            alpha = rz / pap;
            workers.forRange(n, step);
            if (m != null) {
                m.apply(r, z);
            }
            double rzNew = workers.sum(n, rDotZ);
            beta = rzNew / rz;
            rz = rzNew;
            workers.forRange(n, direction);
            rNorm = Math.sqrt(workers.sum(n, rDotR));
            it++;
        }
        return new Outcome(it, rNorm / bNorm, rNorm <= tolerance * bNorm);
    }

    private static double dot(double[] u, double[] v, int from, int to) {
        double s = 0;
        for (int i = from; i < to; i++) {
            s += u[i] * v[i];
        }
        return s;
    }
}
