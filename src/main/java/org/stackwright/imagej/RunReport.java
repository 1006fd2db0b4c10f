package org.stackwright.imagej;

import java.awt.Color;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.measure.ResultsTable;

import org.stackwright.op.Param;

/**
 * What a run leaves besides images: one row per (channel, time point) in the table "Stackwright Runs" with every
 * setting and every plain number or word of the run record (columns "record.KEY"), and a convergence plot when
 * the record holds a "history" list (the objective per iteration).
 */
final class RunReport {

    /** Title of the table of runs. */
    static final String TABLE = "Stackwright Runs";

    private static final Color[] COLOURS = {Color.BLUE, Color.RED, new Color(0, 140, 0), Color.MAGENTA,
        Color.ORANGE, Color.CYAN.darker(), Color.BLACK};

    private RunReport() {
    }

    /** Adds the rows and shows the table. */
    static ResultsTable table(String operation, ChannelRunner.Outcome outcome) {
        ResultsTable rt = ResultsTable.getResultsTable(TABLE);
        if (rt == null) {
            rt = new ResultsTable();
        }
        for (ChannelRunner.Part part : outcome.parts()) {
            Map<String, Object> row = new LinkedHashMap<>();
            row.put("operation", operation);
            row.put("input", outcome.mainInput() == null ? "" : outcome.mainInput().getTitle());
            row.put("channel", part.channel());
            row.put("frame", part.frame());
            for (Param p : part.values().params()) {
                if (p.kind() == Param.Kind.IMAGE) {
                    ImagePlus imp = part.values().image(p.key());
                    row.put(p.key(), imp == null ? OperationDialog.NONE : imp.getTitle());
                }
            }
            row.putAll(part.values().effective());
            double bg = backgroundUsed(part.result().record());
            if (Double.isFinite(bg)) {
                row.put("background_used", bg);
            }
            for (Map.Entry<String, Object> e : part.result().record().entrySet()) {
                Object v = e.getValue();
                if (v instanceof Number || v instanceof String || v instanceof Boolean) {
                    row.put("record." + e.getKey(), v);
                }
            }
            row.put("warnings", part.warnings().size());
            addRow(rt, row);
        }
        rt.show(TABLE);
        return rt;
    }

    /**
     * Shows the operation's own table rows (bead widths, metrics, regions ...) in the table
     * "&lt;operation&gt; results", each row with the input, channel and time point it came from.
     *
     * @return the table, or null when the run made no rows
     */
    static ResultsTable rows(String operation, ChannelRunner.Outcome outcome) {
        if (outcome.parts().stream().allMatch(p -> p.result().rows().isEmpty())) {
            return null;
        }
        String title = rowsTitle(operation);
        ResultsTable rt = ResultsTable.getResultsTable(title);
        if (rt == null) {
            rt = new ResultsTable();
        }
        for (ChannelRunner.Part part : outcome.parts()) {
            for (Map<String, Object> r : part.result().rows()) {
                Map<String, Object> row = new LinkedHashMap<>();
                row.put("input", outcome.mainInput() == null ? "" : outcome.mainInput().getTitle());
                row.put("channel", part.channel());
                row.put("frame", part.frame());
                row.putAll(r);
                addRow(rt, row);
            }
        }
        rt.show(title);
        return rt;
    }

    /**
     * Adds one row. A column this row has no value for, and a new column in the rows before it, hold an empty text:
     * a table shared by operations never shows 0 (ImageJ's default for a missing number) or "NaN" for a setting
     * a run does not have, on screen or in a saved file.
     */
    static void addRow(ResultsTable rt, Map<String, Object> row) {
        List<String> before = columns(rt);
        rt.incrementCounter();
        int at = rt.size() - 1;
        for (Map.Entry<String, Object> e : row.entrySet()) {
            add(rt, e.getKey(), String.valueOf(e.getValue()));
        }
        for (String c : columns(rt)) {
            if (!row.containsKey(c)) {
                rt.setValue(c, at, "");
            }
            if (!before.contains(c)) {
                for (int r = 0; r < at; r++) {
                    rt.setValue(c, r, "");
                }
            }
        }
    }

    private static List<String> columns(ResultsTable rt) {
        String[] h = rt.getHeadings();
        List<String> out = new ArrayList<>();
        for (String c : h == null ? new String[0] : h) {
            if (c != null && !c.isEmpty() && !c.equals(" ")) {
                out.add(c);
            }
        }
        return out;
    }

    /** @return the title of an operation's own table */
    static String rowsTitle(String operation) {
        return operation + " results";
    }

    private static void add(ResultsTable rt, String column, String value) {
        try {
            double d = Double.parseDouble(value);
            if (Double.isFinite(d)) {
                rt.addValue(column, d);
                return;
            }
        } catch (NumberFormatException e) {
            // a word: stored as text below
        }
        rt.addValue(column, value);
    }

    /**
     * @return the background a run used, ADU above the offset ("background_adu" of the record or of its
     *     "settings"; the estimate when the background was "auto"), or NaN when the record has none
     */
    static double backgroundUsed(Map<String, Object> record) {
        Object v = record.get("background_adu");
        if (v == null && record.get("settings") instanceof Map<?, ?> settings) {
            v = settings.get("background_adu");
        }
        return v instanceof Number n ? n.doubleValue() : Double.NaN;
    }

    /**
     * @return the settings a dialog or macro gave, with the camera values the run used in place of "auto" or empty
     *     ones (gain, read noise, offset from the record's "settings", where they were found from the data)
     */
    static Map<String, String> cameraUsed(Map<String, String> given, Map<String, Object> record) {
        Map<String, String> out = new java.util.LinkedHashMap<>(given);
        if (record.get("settings") instanceof Map<?, ?> settings) {
            String[][] keys = {{"gain", "gain"}, {"read-noise", "read_noise_adu"}, {"offset", "offset_adu"}};
            for (String[] k : keys) {
                if (settings.get(k[1]) instanceof Number n && Double.isFinite(n.doubleValue())) {
                    out.put(k[0], org.stackwright.op.Param.fmt(n.doubleValue()));
                }
            }
        }
        return out;
    }

    /** @return the convergence plot, or null when no part's record has a history */
    static Plot convergence(String title, ChannelRunner.Outcome outcome) {
        Plot plot = null;
        StringBuilder legend = new StringBuilder();
        int k = 0;
        for (ChannelRunner.Part part : outcome.parts()) {
            double[] y = history(part.result().record().get("history"));
            if (y == null) {
                continue;
            }
            double[] x = new double[y.length];
            for (int i = 0; i < y.length; i++) {
                x[i] = i + 1;
            }
            if (plot == null) {
                plot = new Plot(title + " convergence", "iteration", "objective");
            }
            plot.setColor(COLOURS[k++ % COLOURS.length]);
            plot.addPoints(x, y, Plot.LINE);
            legend.append(legend.length() == 0 ? "" : "\n").append("channel ").append(part.channel())
                    .append(", time ").append(part.frame());
        }
        if (plot != null && outcome.parts().size() > 1) {
            plot.addLegend(legend.toString());
        }
        if (plot != null) {
            plot.setLimitsToFit(false);
        }
        return plot;
    }

    /**
     * @return the history as numbers: a list of numbers, or of maps holding "objective" (or their first number);
     *     null when there is none
     */
    static double[] history(Object h) {
        if (h instanceof double[] a) {
            return a.length == 0 ? null : a.clone();
        }
        if (!(h instanceof List<?> list) || list.isEmpty()) {
            return null;
        }
        List<Double> out = new ArrayList<>();
        for (Object o : list) {
            if (o instanceof Number n) {
                out.add(n.doubleValue());
            } else if (o instanceof Map<?, ?> m) {
                Object v = m.containsKey("objective") ? m.get("objective")
                        : m.values().stream().filter(Number.class::isInstance).findFirst().orElse(null);
                if (!(v instanceof Number n)) {
                    return null;
                }
                out.add(n.doubleValue());
            } else {
                return null;
            }
        }
        return out.stream().mapToDouble(Double::doubleValue).toArray();
    }
}
