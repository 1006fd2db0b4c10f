package org.stackwright.imagej;

import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.Param;

/**
 * What the ImageJ door remembers within one ImageJ session, as ImageJ's own commands do: the values last
 * confirmed in each operation's dialog (settings, choices, ticked outputs, chosen images; not file paths and not
 * "overwrite"), and what the last deconvolution ran on, so that the residual view can start on its data, its
 * result, its PSF and its camera values. Used only for dialogs shown to a person: in a macro the recorded line
 * rules and anything it leaves out takes the operation's default. Nothing is written to disk.
 */
final class SessionMemory {

    /** The last deconvolution: the titles of its images and the camera values it used. */
    record Deconvolution(String input, String psf, String result, Map<String, String> camera) {
    }

    private static final Map<String, Map<String, String>> VALUES = new HashMap<>();
    private static final Map<String, Map<String, String>> IMAGES = new HashMap<>();
    private static Deconvolution lastDeconvolution;

    private SessionMemory() {
    }

    /** Remembers what a person confirmed in a dialog. */
    static synchronized void remember(String operation, DoorSettings s, Iterable<Param> params) {
        Map<String, String> v = new LinkedHashMap<>(s.text());
        for (Param p : params) {
            if (p.kind() == Param.Kind.OUTPUT_IMAGE && OperationDialog.inDialog(p)) {
                v.put(p.key(), Boolean.toString(s.outputs().contains(p.key())));
            }
        }
        VALUES.put(operation, v);
        Map<String, String> titles = new LinkedHashMap<>();
        s.images().forEach((k, imp) -> titles.put(k, imp.getTitle()));
        IMAGES.put(operation, titles);
    }

    /** @return key to the text last confirmed in the operation's dialog (empty when none) */
    static synchronized Map<String, String> values(String operation) {
        return new LinkedHashMap<>(VALUES.getOrDefault(operation, Map.of()));
    }

    /** @return key to the title of the image last chosen in the operation's dialog (empty when none) */
    static synchronized Map<String, String> images(String operation) {
        return new LinkedHashMap<>(IMAGES.getOrDefault(operation, Map.of()));
    }

    /**
     * Notes a finished deconvolution (from a dialog or a macro).
     *
     * @param background the background used, ADU above the offset (the estimate when it was "auto")
     */
    static synchronized void deconvolved(ImagePlus input, ImagePlus psf, ImagePlus result, Map<String, String> settings,
            double background) {
        Map<String, String> camera = new LinkedHashMap<>();
        for (String k : new String[] {"offset", "gain", "read-noise"}) {
            if (settings.containsKey(k)) {
                camera.put(k, settings.get(k));
            }
        }
        if (Double.isFinite(background)) {
            camera.put("background", Param.fmt(background));
        }
        String likelihood = "gaussian".equals(settings.get("likelihood")) ? "gaussian"
                : parse(settings.get("read-noise")) > 0 ? "poisson-gaussian" : "poisson";
        camera.put("likelihood", likelihood);
        lastDeconvolution = new Deconvolution(input.getTitle(), psf == null ? null : psf.getTitle(),
                result == null ? null : result.getTitle(), camera);
    }

    /** @return the last deconvolution, or null */
    static synchronized Deconvolution lastDeconvolution() {
        return lastDeconvolution;
    }

    /** Forgets everything (tests). */
    static synchronized void clear() {
        VALUES.clear();
        IMAGES.clear();
        lastDeconvolution = null;
    }

    private static double parse(String s) {
        try {
            return s == null ? 0 : Double.parseDouble(s.trim());
        } catch (NumberFormatException e) {
            return 0;
        }
    }
}
