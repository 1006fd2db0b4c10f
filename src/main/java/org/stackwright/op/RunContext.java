package org.stackwright.op;

import java.util.ArrayList;
import java.util.List;
import java.util.function.BooleanSupplier;
import java.util.function.Consumer;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.CancelledException;

/**
 * What a door gives a running operation: the thread count, the FFT engine, where progress and warnings go, and how to
 * learn that the user cancelled. Warnings are also kept so that they end up in the run record.
 */
public final class RunContext {

    /** Receives progress: fraction done in [0, 1] and a short status line. */
    @FunctionalInterface
    public interface Progress {
        void report(double fraction, String status);
    }

    private final int threads;
    private final Progress progress;
    private final Consumer<String> warningSink;
    private final BooleanSupplier cancelled;
    private final List<String> warnings;
    /** null: the JVM's standard engine ({@link FftEngines#standard()}), looked up when first asked for */
    private final FftEngine fft;

    public RunContext(int threads, Progress progress, Consumer<String> warningSink, BooleanSupplier cancelled) {
        this(threads, progress, warningSink, cancelled, new ArrayList<>(), null);
    }

    private RunContext(int threads, Progress progress, Consumer<String> warningSink, BooleanSupplier cancelled,
            List<String> warnings, FftEngine fft) {
        if (threads < 1) {
            throw new IllegalArgumentException("threads must be at least 1 (given " + threads + ")");
        }
        this.threads = threads;
        this.progress = progress == null ? (f, s) -> { } : progress;
        this.warningSink = warningSink == null ? w -> { } : warningSink;
        this.cancelled = cancelled == null ? () -> false : cancelled;
        this.warnings = warnings;
        this.fft = fft;
    }

    /**
     * @param engine the FFT engine the operation's transforms use (an operation's {@code --fft} choice)
     * @return the same context (same progress, warnings kept in the same list, same cancel) with that engine
     */
    public RunContext withFft(FftEngine engine) {
        return new RunContext(threads, progress, warningSink, cancelled, warnings, engine);
    }

    /**
     * @param other where progress goes instead (e.g. a part of a longer run mapped onto its share of the bar)
     * @return the same context (warnings kept in the same list, same cancel, same engine) with that progress
     */
    public RunContext withProgress(Progress other) {
        return new RunContext(threads, other, warningSink, cancelled, warnings, fft);
    }

    /** @return the FFT engine to use: the one given by {@link #withFft}, else the JVM's standard engine */
    public FftEngine fft() {
        return fft != null ? fft : FftEngines.standard();
    }

    /** A quiet context for tests and library calls. */
    public static RunContext quiet(int threads) {
        return new RunContext(threads, null, null, null);
    }

    public int threads() {
        return threads;
    }

    public void progress(double fraction, String status) {
        progress.report(fraction, status);
    }

    /** Reports a warning (sampling, memory, NaN pixels ...) to the user and keeps it for the record. */
    public void warn(String message) {
        synchronized (warnings) {
            warnings.add(message);
        }
        warningSink.accept(message);
    }

    /** @return the warnings so far */
    public List<String> warnings() {
        synchronized (warnings) {
            return List.copyOf(warnings);
        }
    }

    /** @return true when the user asked to stop */
    public boolean isCancelled() {
        return cancelled.getAsBoolean() || Thread.currentThread().isInterrupted();
    }

    /** @throws CancelledException when the user asked to stop */
    public void checkCancelled() {
        if (isCancelled()) {
            throw new CancelledException("cancelled by the user");
        }
    }
}
