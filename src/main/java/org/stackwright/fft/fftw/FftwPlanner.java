package org.stackwright.fft.fftw;

import static org.bytedeco.fftw.global.fftw3.FFTW_ESTIMATE;
import static org.bytedeco.fftw.global.fftw3.FFTW_MEASURE;
import static org.bytedeco.fftw.global.fftw3.FFTW_WISDOM_ONLY;
import static org.bytedeco.fftw.global.fftw3.fftwf_destroy_plan;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_c2r_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_r2c_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_with_nthreads;
import static org.bytedeco.fftw.global.fftw3.fftwf_set_timelimit;

import java.util.HashMap;
import java.util.Locale;
import java.util.Map;

import org.bytedeco.fftw.global.fftw3.fftwf_plan;
import org.bytedeco.javacpp.FloatPointer;

/**
 * Makes and keeps FFTW plans, one pair (forward, inverse) per grid size and thread count for the life of the JVM,
 * and decides how each is planned.
 *
 * <p><b>One planner at a time.</b> FFTW's planner (and its wisdom and thread settings) is not thread-safe; only
 * executing a finished plan is. Every call into the planner holds {@link #LOCK}.
 *
 * <p><b>Estimate or measure.</b> An estimated plan (FFTW_ESTIMATE) costs milliseconds to make; a measured one
 * (FFTW_MEASURE) times candidate algorithms on the machine and runs the transform faster, but making it costs about
 * {@link #PLANNING_ROUND_TRIPS} round trips of the estimated plan and saves only about {@link #MEASURED_SAVING} of
 * each later one (both measured here: README, FFT engine), far more than a typical deconvolution saves. So the choice
 * follows the measured total time, like renting skis before buying them: a grid is first planned by estimate;
 * every filtering through it is timed; once this JVM has spent so much time on the grid that a measured plan would
 * have paid for itself (time spent x saving &gt; predicted planning time), the next transform of that size gets a
 * measured plan (FFTW's time limit set to twice the prediction) and the plan is kept as wisdom in the user's cache
 * folder ({@link WisdomFile}), so later transforms, runs and JVMs get it at no cost. A run never changes plans
 * midway. The system property {@code stackwright.fft.planning} (auto, estimate or measure) overrides this, e.g. for
 * benchmarks, and the tests pin it to estimate.
 *
 * <p><b>Determinism.</b> Estimated plans depend only on the size and thread count: repeat runs give bit-identical
 * results for one thread count. Plans for different thread counts may use different algorithms: the results were
 * identical for 1, 2 and 4 threads at the demo's size, but not at every size (80x80x32: last bits differ, and
 * iterations carry that forward; README, "FFT engine"). Measured plans are chosen
 * by timing, so two measurements can pick different algorithms and results differ in the last bits; the same wisdom
 * gives the same plan again.
 */
final class FftwPlanner {

    /** Held around every call into FFTW's planner, wisdom and thread settings. */
    static final Object LOCK = new Object();

    /** The cost of measured planning in round trips of the estimated plan (forward + inverse); see the class doc. */
    static final double PLANNING_ROUND_TRIPS = 100;

    /** The fraction of a round trip's time a measured plan saves over an estimated one; see the class doc. */
    static final double MEASURED_SAVING = 0.15;

    static final String ESTIMATE = "estimate";
    static final String FROM_WISDOM = "measured, from wisdom";
    static final String MEASURED = "measured in this run";

    private static final String PLANNING_PROPERTY = "stackwright.fft.planning";

    /** A grid size and thread count: what a plan is made for. */
    record Grid(int nx, int ny, int nz, int threads) {
    }

    /** A forward and an inverse plan of one grid, and how they were made; {@link #ran} reports time spent. */
    static final class Plans {
        private final fftwf_plan forward;
        private final fftwf_plan inverse;
        private final String planning;
        private final Usage usage;

        Plans(fftwf_plan forward, fftwf_plan inverse, String planning, Usage usage) {
            this.forward = forward;
            this.inverse = inverse;
            this.planning = planning;
            this.usage = usage;
        }

        fftwf_plan forward() {
            return forward;
        }

        fftwf_plan inverse() {
            return inverse;
        }

        String planning() {
            return planning;
        }

        /** Adds one filtering (forward, product, inverse) of this grid to the time spent on it. */
        void ran(long nanos) {
            if (planning.equals(ESTIMATE)) {
                usage.add(nanos);
            }
        }
    }

    /** Time spent on a grid with its estimated plan, and the plans made so far. */
    private static final class Usage {
        private long nanos;
        private long count;
        private Plans estimated;
        private Plans measured;

        synchronized void add(long t) {
            nanos += t;
            count++;
        }

        synchronized long nanos() {
            return nanos;
        }

        synchronized long count() {
            return count;
        }
    }

    private static final Map<Grid, Usage> GRIDS = new HashMap<>();

    private FftwPlanner() {
    }

    /**
     * @param grid the size and threads
     * @param buffer an aligned spectrum-sized buffer of a new transform: measured planning overwrites it
     * @return plans for the grid (made now or earlier)
     */
    static Plans plans(Grid grid, FloatPointer buffer) {
        String policy = System.getProperty(PLANNING_PROPERTY, "auto").trim().toLowerCase(Locale.ROOT);
        synchronized (LOCK) {
            Usage u = GRIDS.computeIfAbsent(grid, g -> new Usage());
            if (u.measured != null && !policy.equals(ESTIMATE)) {
                return u.measured;
            }
            if (!policy.equals(ESTIMATE)) {
                Plans fromWisdom = make(grid, buffer, FFTW_MEASURE | FFTW_WISDOM_ONLY, FROM_WISDOM, u);
                if (fromWisdom != null) {
                    u.measured = fromWisdom;
                    return fromWisdom;
                }
            }
            boolean measure = policy.equals("measure")
                    || (policy.equals("auto") && u.count() > 0 && u.nanos() * MEASURED_SAVING > predictedPlanningNanos(u));
            if (measure) {
                double limit = policy.equals("measure") ? -1 : 2e-9 * predictedPlanningNanos(u);
                fftwf_set_timelimit(limit);
                try {
                    u.measured = make(grid, buffer, FFTW_MEASURE, MEASURED, u);
                } finally {
                    fftwf_set_timelimit(-1);
                }
                if (u.measured != null) {
                    WisdomFile.write();
                    return u.measured;
                }
            }
            if (u.estimated == null) {
                u.estimated = make(grid, buffer, FFTW_ESTIMATE, ESTIMATE, u);
                if (u.estimated == null) {
                    throw new IllegalStateException("FFTW made no plan for " + grid.nx() + "x" + grid.ny() + "x" + grid.nz());
                }
            }
            return u.estimated;
        }
    }

    /** Reads the wisdom file, if any (at load). Caller holds {@link #LOCK}. */
    static void readWisdom() {
        WisdomFile.read();
    }

    /** Predicted cost of measured planning: PLANNING_ROUND_TRIPS times the mean estimated round trip. */
    private static double predictedPlanningNanos(Usage u) {
        return PLANNING_ROUND_TRIPS * u.nanos() / Math.max(1, u.count());
    }

    /** @return the plan pair, or null when FFTW made none (e.g. no wisdom with FFTW_WISDOM_ONLY) */
    private static Plans make(Grid g, FloatPointer buffer, int flags, String planning, Usage u) {
        fftwf_plan_with_nthreads(g.threads());
        // FFTW's arrays are row-major (last index fastest): dimensions z, y, x
        fftwf_plan f = fftwf_plan_dft_r2c_3d(g.nz(), g.ny(), g.nx(), buffer, buffer, flags);
        if (f == null || f.isNull()) {
            return null;
        }
        fftwf_plan b = fftwf_plan_dft_c2r_3d(g.nz(), g.ny(), g.nx(), buffer, buffer, flags);
        if (b == null || b.isNull()) {
            fftwf_destroy_plan(f);
            return null;
        }
        return new Plans(f, b, planning, u);
    }
}
