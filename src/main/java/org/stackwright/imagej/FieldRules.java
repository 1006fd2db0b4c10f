package org.stackwright.imagej;

import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import java.util.function.Predicate;

/**
 * Which dialog fields apply to the method, model or mode chosen in the same dialog, so the others can be greyed
 * out (they are still read and recorded: a greyed-out value is simply not used by the operation). Each rule is
 * written from the operation's own help texts ("ignored by richardson-lucy", "confocal", "needs replicas"); a
 * setting without a rule always applies.
 */
final class FieldRules {

    /** The current text of another field of the same dialog: a choice's item, "true"/"false" for a checkbox. */
    interface State extends Function<String, String> {
    }

    private static final Map<String, Predicate<State>> RULES = new HashMap<>();

    static {
        // deconvolve
        rule("deconvolve", "regularization", s -> !is(s, "method", "richardson-lucy"));
        rule("deconvolve", "acceleration", s -> is(s, "method", "richardson-lucy") || is(s, "method", "richardson-lucy-tv"));
        rule("deconvolve", "iterations", s -> !is(s, "method", "wiener"));
        rule("deconvolve", "stop", s -> !is(s, "method", "wiener"));
        rule("deconvolve", "tolerance", s -> !is(s, "method", "wiener") && is(s, "stop", "change"));
        rule("deconvolve", "likelihood", s -> is(s, "method", "total-variation") || positive(s, "replicas"));
        rule("deconvolve", "spread-output", s -> positive(s, "replicas"));
        rule("deconvolve", "bias-output", s -> positive(s, "replicas"));
        // psf: the aberration terms belong to the diffraction models that use them
        for (String k : List.of("sample-index", "coverslip-index", "coverslip-thickness", "coverslip-design-thickness",
                "depth")) {
            rule("psf", k, s -> !is(s, "model", "gaussian", "widefield"));
        }
        rule("psf", "excitation", s -> is(s, "model", "confocal", "two-photon"));
        rule("psf", "pinhole", s -> is(s, "model", "confocal"));
        // residuals: gain for photon noise, read noise for camera or Gaussian noise
        rule("residuals", "gain", s -> !is(s, "likelihood", "gaussian"));
        rule("residuals", "read-noise", s -> !is(s, "likelihood", "poisson"));
        // seam-mask: a layout or a detection; levelling settings only when levelling
        for (String k : List.of("grid", "tile", "overlap", "order")) {
            rule("seam-mask", k, s -> !is(s, "detect", "true"));
        }
        rule("seam-mask", "threshold", s -> is(s, "detect", "true"));
        rule("seam-mask", "input", s -> is(s, "detect", "true") || is(s, "level", "true")
                || is(s, "level-tiles", "true"));
        for (String k : List.of("offset", "strip", "levelled-output")) {
            rule("seam-mask", k, s -> is(s, "level", "true") || is(s, "level-tiles", "true"));
        }
        rule("seam-mask", "flat-field", s -> is(s, "level-tiles", "true"));
        // inpaint: the median fill has no solver
        rule("inpaint", "iterations", s -> !is(s, "method", "median"));
        rule("inpaint", "tolerance", s -> !is(s, "method", "median"));
        // simulate
        rule("simulate", "beads", s -> is(s, "specimen", "beads"));
    }

    private FieldRules() {
    }

    private static void rule(String operation, String key, Predicate<State> applies) {
        RULES.put(operation + "/" + key, applies);
    }

    private static boolean is(State s, String key, String... values) {
        String v = known(s, key);
        for (String x : values) {
            if (x.equals(v)) {
                return true;
            }
        }
        return false;
    }

    private static boolean positive(State s, String key) {
        String v = known(s, key);
        try {
            return Double.parseDouble(v.trim()) > 0;
        } catch (NumberFormatException e) {
            return false;
        }
    }

    /** @throws IllegalStateException when the dialog has no such field (the rule then does not grey out) */
    private static String known(State s, String key) {
        String v = s.apply(key);
        if (v == null) {
            throw new IllegalStateException("no field " + key);
        }
        return v;
    }

    /** @return true when the setting applies given the other fields' current state (no rule: always) */
    static boolean applies(String operation, String key, State state) {
        Predicate<State> r = RULES.get(operation + "/" + key);
        if (r == null) {
            return true;
        }
        try {
            return r.test(state);
        } catch (RuntimeException e) {
            return true; // a field the rule needs is missing: never grey out by mistake
        }
    }

    /** @return "operation/key" of every setting that has a rule */
    static java.util.Set<String> ruled() {
        return java.util.Set.copyOf(RULES.keySet());
    }

    /** @return true when some rule of the operation depends on another field */
    static boolean hasRules(String operation) {
        return RULES.keySet().stream().anyMatch(k -> k.startsWith(operation + "/"));
    }
}
