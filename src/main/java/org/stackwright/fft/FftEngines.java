package org.stackwright.fft;

import java.lang.reflect.InvocationTargetException;
import java.util.List;
import java.util.Locale;
import java.util.function.Supplier;

/**
 * Which FFT engine runs: the choice {@code auto}, {@code native} or {@code java} (the {@code --fft} key of the
 * operations) turned into an engine.
 *
 * <p>{@code auto} gives the native engine (FFTW) when its library loads on this platform, otherwise the Java engine
 * together with one line saying why ({@link Choice#note()}, for the log and the run record). {@code native} where the
 * library does not load is an error naming the key. The system property {@code stackwright.fft} (auto, native or
 * java) sets what {@code auto} means for the whole JVM: the tests use it to run the deconvolution suite on each
 * engine, and a user can pin an engine in Fiji's JVM options.
 *
 * <p>The native engine is looked up by name ({@code org.stackwright.fft.fftw.FftwEngine}), so a build without FFTW
 * ({@code -Dpure-java}) compiles and runs without it. Loading is tried once per JVM.
 */
public final class FftEngines {

    /** The choices of the {@code --fft} key. */
    public static final List<String> CHOICES = List.of("auto", "native", "java");

    /** The name of the pure-Java engine in the run record. */
    public static final String JAVA_NAME = "java";

    /** The name of the native engine in the run record. */
    public static final String NATIVE_NAME = "native";

    static final String PROPERTY = "stackwright.fft";

    private static final String NATIVE_CLASS = "org.stackwright.fft.fftw.FftwEngine";

    private static final FftEngine JAVA = new FftEngine() {
        @Override
        public String name() {
            return JAVA_NAME;
        }

        @Override
        public RealTransform transform(int nx, int ny, int nz, org.stackwright.parallel.Workers workers) {
            return new JavaTransform(nx, ny, nz, workers);
        }

        @Override
        public String toString() {
            return JAVA_NAME;
        }
    };

    /**
     * An engine and, when {@code auto} could not give the native engine, one line saying why (else empty).
     *
     * @param engine the engine to use
     * @param note why the Java engine runs although native was preferred, or ""
     */
    public record Choice(FftEngine engine, String note) {
    }

    /** The outcome of trying to load the native engine: the engine, or why not. */
    record Attempt(FftEngine engine, String failure) {
    }

    private FftEngines() {
    }

    /** @return the pure-Java engine */
    public static FftEngine java() {
        return JAVA;
    }

    /**
     * @param choice auto, native or java (the {@code --fft} value)
     * @return the engine and, for a fallback, the line that says why
     * @throws IllegalArgumentException for an unknown word, or native where it cannot load (naming {@code fft})
     */
    public static Choice choose(String choice) {
        return choose(choice, System.getProperty(PROPERTY, "auto"), NativeHolder::attempt);
    }

    /** @return what {@code auto} gives in this JVM (without the note); the engine of library calls */
    public static FftEngine standard() {
        return choose("auto").engine();
    }

    /**
     * The choice with an explicit meaning of auto and native loader (tests force the loader to fail).
     *
     * @param choice auto, native or java
     * @param autoMeans what auto stands for: auto, native or java (the system property)
     * @param loader tries to load the native engine
     */
    static Choice choose(String choice, String autoMeans, Supplier<Attempt> loader) {
        String c = choice == null ? "auto" : choice.trim().toLowerCase(Locale.ROOT);
        if (!CHOICES.contains(c)) {
            throw new IllegalArgumentException("fft = '" + choice + "' is not allowed; choose auto, native or java");
        }
        boolean pinned = false;
        if (c.equals("auto")) {
            String meant = autoMeans == null || autoMeans.isBlank() ? "auto" : autoMeans.trim().toLowerCase(Locale.ROOT);
            if (!CHOICES.contains(meant)) {
                throw new IllegalArgumentException("system property " + PROPERTY + " = '" + autoMeans
                        + "' is not allowed; give auto, native or java");
            }
            pinned = !meant.equals("auto");
            c = meant;
        }
        if (c.equals("java")) {
            return new Choice(JAVA, "");
        }
        Attempt a = loader.get();
        if (a.engine() != null) {
            return new Choice(a.engine(), "");
        }
        if (c.equals("native")) {
            throw new IllegalArgumentException((pinned ? "fft = auto means native (system property " + PROPERTY
                    + ") but native" : "fft = native") + " is not available here: " + a.failure() + "; give fft auto or java");
        }
        return new Choice(JAVA, "FFT engine: java (the native FFTW engine did not load: " + a.failure() + ")");
    }

    /** Tries to load the native engine once per JVM. */
    private static final class NativeHolder {
        private static final Attempt ATTEMPT = load();

        static Attempt attempt() {
            return ATTEMPT;
        }

        private static Attempt load() {
            try {
                Class<?> c = Class.forName(NATIVE_CLASS);
                return new Attempt((FftEngine) c.getMethod("load").invoke(null), null);
            } catch (ClassNotFoundException e) {
                return new Attempt(null, "this build has no native FFT engine (built without FFTW)");
            } catch (InvocationTargetException e) {
                return new Attempt(null, reason(e.getCause()));
            } catch (ReflectiveOperationException | LinkageError | RuntimeException e) {
                return new Attempt(null, reason(e));
            }
        }
    }

    /** @return the first line of a load failure, at most 300 characters */
    static String reason(Throwable t) {
        String m = t.getMessage() == null ? t.getClass().getSimpleName() : t.getClass().getSimpleName() + ": " + t.getMessage();
        int nl = m.indexOf('\n');
        if (nl >= 0) {
            m = m.substring(0, nl);
        }
        return m.length() > 300 ? m.substring(0, 300) + "..." : m;
    }
}
