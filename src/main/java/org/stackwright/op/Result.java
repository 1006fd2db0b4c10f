package org.stackwright.op;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;

/**
 * What an operation produced: output images keyed by their parameter key, a run record (a JSON-like tree of
 * maps, lists, numbers, strings and booleans), lines of report for the user, and table rows (one map per row).
 */
public final class Result {

    private final Map<String, ImagePlus> images = new LinkedHashMap<>();
    private final Map<String, Object> record = new LinkedHashMap<>();
    private final List<String> report = new ArrayList<>();
    private final List<Map<String, Object>> rows = new ArrayList<>();

    /** Adds an output image under its OUTPUT_IMAGE key. */
    public Result image(String key, ImagePlus imp) {
        images.put(key, imp);
        return this;
    }

    /** Adds a record entry. */
    public Result record(String key, Object value) {
        record.put(key, value);
        return this;
    }

    /** Adds a line for the user (CLI stdout, ImageJ Log). */
    public Result line(String text) {
        report.add(text);
        return this;
    }

    /** Adds a table row (ImageJ ResultsTable, CLI stdout). */
    public Result row(Map<String, Object> row) {
        rows.add(row);
        return this;
    }

    public Map<String, ImagePlus> images() {
        return images;
    }

    public Map<String, Object> record() {
        return record;
    }

    public List<String> report() {
        return report;
    }

    public List<Map<String, Object>> rows() {
        return rows;
    }
}
