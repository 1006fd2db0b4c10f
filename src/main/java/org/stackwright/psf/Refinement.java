package org.stackwright.psf;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * What a refinement of the optics found: the refined settings, per fitted parameter its value, standard error and
 * whether the data determine it, notes in plain words, and the fit's quality and details for the run record.
 *
 * @param nominal the optics the fit started from
 * @param refined the nominal optics with the fitted values put in
 * @param free the fitted parameters, in the order of {@code --fit}
 * @param values their fitted values
 * @param standardErrors their standard errors (infinite when not determined at all)
 * @param identifiable whether the data determine each on its own
 * @param correlation correlations between the fitted parameters, "a/b" to value
 * @param notes identifiability and other cautions, plain words
 * @param quality fit quality for the record (statistic name, value, expected value, ...)
 * @param details everything else for the record (beads, scan, evaluations, ...)
 */
public record Refinement(PsfSettings nominal, PsfSettings refined, List<OpticsParameter> free, double[] values,
        double[] standardErrors, boolean[] identifiable, Map<String, Object> correlation, List<String> notes,
        Map<String, Object> quality, Map<String, Object> details) {

    /** @return {@code fitted: {depth_um: ..., ...}} */
    public Map<String, Object> fitted() {
        Map<String, Object> m = new LinkedHashMap<>();
        for (int i = 0; i < free.size(); i++) {
            m.put(free.get(i).recordName(), values[i]);
        }
        return m;
    }

    /** @return the standard errors by record name (null for a parameter without information) */
    public Map<String, Object> errors() {
        Map<String, Object> m = new LinkedHashMap<>();
        for (int i = 0; i < free.size(); i++) {
            m.put(free.get(i).recordName(), Double.isFinite(standardErrors[i]) ? standardErrors[i] : null);
        }
        return m;
    }

    /** @return the nominal values of the fitted parameters by record name */
    public Map<String, Object> startValues() {
        Map<String, Object> m = new LinkedHashMap<>();
        for (OpticsParameter p : free) {
            m.put(p.recordName(), p.get(nominal));
        }
        return m;
    }

    /** @return whether each parameter is determined, by record name */
    public Map<String, Object> identifiableRecord() {
        Map<String, Object> m = new LinkedHashMap<>();
        for (int i = 0; i < free.size(); i++) {
            m.put(free.get(i).recordName(), identifiable[i]);
        }
        return m;
    }

    /** @return one line per fitted parameter for the user */
    public List<String> lines() {
        java.util.ArrayList<String> out = new java.util.ArrayList<>();
        for (int i = 0; i < free.size(); i++) {
            OpticsParameter p = free.get(i);
            out.add(String.format(Locale.ROOT, "%s = %.4g +/- %.2g (start %.4g)%s", p.key(), values[i],
                    standardErrors[i], p.get(nominal), identifiable[i] ? "" : "  NOT DETERMINED by these data"));
        }
        return out;
    }
}
