package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/** The automatic regularisation weight (work in progress: the method's default for now). */
public final class RegularizationChoice {

    /** The chosen lambda and how it was found. */
    public record Choice(double lambda, String how) {
        /** @return the run-record entry */
        public Map<String, Object> record() {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("lambda", lambda);
            m.put("how", how);
            return m;
        }
    }

    private RegularizationChoice() {
    }

    /** Chooses lambda for resolved camera values and background. */
    static Choice choose(Volume data, Volume psf, byte[] mask, DeconvolutionSettings s, RunContext ctx) {
        return new Choice(DeconvolutionSettings.defaultRegularization(s.method()), "default");
    }
}
