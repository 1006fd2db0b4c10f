package org.stackwright.op;

import org.stackwright.fft.FftEngines;

/**
 * The {@code fft} setting of the operations that do FFT work (deconvolve, residuals): one definition of the key,
 * turned into a context whose transforms use the chosen engine, and the one log line that says why {@code auto}
 * did not give the native engine.
 */
public final class FftChoice {

    /** The key (CLI option, macro key, SciJava field). */
    public static final String KEY = "fft";

    private FftChoice() {
    }

    /** @return the setting: auto (default), native or java */
    public static Param param() {
        return Param.choice(KEY, "auto", FftEngines.CHOICES, "FFT engine: auto = native (FFTW) where its library loads,"
                + " else java; native; java (the pure-Java engine)");
    }

    /**
     * @param v the operation's values (with the {@code fft} key)
     * @return the engine choice; {@link #context} and {@link #note} use it
     * @throws IllegalArgumentException for native where it cannot load, naming the key
     */
    public static FftEngines.Choice choose(Values v) {
        return FftEngines.choose(v.choice(KEY));
    }

    /** @return the door's context with the chosen engine (same warnings, progress and cancel) */
    public static RunContext context(RunContext door, FftEngines.Choice choice) {
        return door.withFft(choice.engine());
    }

    /** Adds the fallback line to the output and the record ({@code fft_note}) when there is one. */
    public static void note(Result r, FftEngines.Choice choice) {
        if (!choice.note().isEmpty()) {
            r.line(choice.note());
            r.record("fft_note", choice.note());
        }
    }
}
