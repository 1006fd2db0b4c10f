package org.stackwright.fft.fftw;

import org.stackwright.parallel.Workers;

/**
 * Timing of the native engine's bare transforms for the benchmarks (not a test): planning time and the best round
 * trip (forward + inverse in place, no copies), like pyFFTW's FFTW objects executed on their own arrays. Called by
 * name from {@code solve.DeconvolutionBenchmark}, so the benchmark also compiles without FFTW.
 */
public final class FftwTiming {

    private FftwTiming() {
    }

    /**
     * @param planning estimate or measure (the planner's system property is set for the call)
     * @return {planning seconds, best round-trip seconds, the planning mode the record would show}
     */
    public static Object[] roundTrip(int nx, int ny, int nz, int threads, String planning, int reps) {
        FftwEngine.load();
        String before = System.getProperty("stackwright.fft.planning");
        System.setProperty("stackwright.fft.planning", planning);
        try (Workers w = new Workers(threads)) {
            long t0 = System.nanoTime();
            FftwTransform t = new FftwTransform(nx, ny, nz, w);
            double plan = (System.nanoTime() - t0) * 1e-9;
            double best = Double.POSITIVE_INFINITY;
            for (int k = 0; k < reps + 1; k++) {
                long s = System.nanoTime();
                t.roundTripInPlace();
                if (k > 0) {
                    best = Math.min(best, (System.nanoTime() - s) * 1e-9);
                }
            }
            return new Object[] {plan, best, t.planning()};
        } finally {
            if (before == null) {
                System.clearProperty("stackwright.fft.planning");
            } else {
                System.setProperty("stackwright.fft.planning", before);
            }
        }
    }
}
