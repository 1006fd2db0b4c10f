package org.stackwright.op;

import java.util.List;

/**
 * One setting of an operation, described once for all three doors (command line {@code --key value}, ImageJ macro
 * {@code key=value}, SciJava parameter): its key, kind, default, unit, allowed range or choices and help text.
 *
 * @param key the word used as CLI option (after "--") and as macro key; lower case, words joined by '-'
 * @param kind what the value is
 * @param defaultValue the default as text, or null when the setting is required (or optional without default)
 * @param unit unit shown in labels ("um", "nm", "ADU"), or "" for none
 * @param help one line of help
 * @param choices allowed values of a {@link Kind#CHOICE}, otherwise empty
 * @param min smallest allowed number (NUMBER, INTEGER), inclusive
 * @param max largest allowed number (NUMBER, INTEGER), inclusive
 * @param required whether the value must be given (no default)
 * @param aliases older keys of this setting that macros and the command line still accept, with a note that names
 *     the current key (see {@link #withAlias}); never shown in dialogs or help
 */
public record Param(String key, Kind kind, String defaultValue, String unit, String help, List<String> choices,
        double min, double max, boolean required, List<String> aliases) {

    /** Kinds of settings. */
    public enum Kind {
        /** a real number */
        NUMBER,
        /** a whole number */
        INTEGER,
        /** free text (e.g. a size "64x64x33" or a grid "3x4") */
        TEXT,
        /** one of a fixed list of words */
        CHOICE,
        /** on / off */
        FLAG,
        /** an input image: a TIFF path on the command line, an open window in ImageJ */
        IMAGE,
        /** an output image: a TIFF (or PNG) path on the command line, a new window in ImageJ */
        OUTPUT_IMAGE,
        /** an output file that is not an image (a JSON run record) */
        OUTPUT_FILE
    }

    public Param {
        if (!key.matches("[a-z][a-z0-9-]*")) {
            throw new IllegalArgumentException("bad parameter key '" + key + "'");
        }
        choices = List.copyOf(choices);
        aliases = List.copyOf(aliases);
        for (String a : aliases) {
            if (!a.matches("[a-z][a-z0-9-]*") || a.equals(key)) {
                throw new IllegalArgumentException("bad alias '" + a + "' of parameter '" + key + "'");
            }
        }
    }

    /** A setting without aliases. */
    public Param(String key, Kind kind, String defaultValue, String unit, String help, List<String> choices,
            double min, double max, boolean required) {
        this(key, kind, defaultValue, unit, help, choices, min, max, required, List.of());
    }

    /**
     * @param oldKey a key this setting had before it was renamed; macros and command lines that use it keep
     *     working, with a note naming the new key
     * @return a copy that also accepts the old key
     */
    public Param withAlias(String oldKey) {
        List<String> a = new java.util.ArrayList<>(aliases);
        a.add(oldKey);
        return new Param(key, kind, defaultValue, unit, help, choices, min, max, required, a);
    }

    /**
     * @param prefix how the door writes a key: "" (macro), "--" (command line)
     * @return the note a door shows when an old key was used
     */
    public String aliasNote(String oldKey, String prefix) {
        return "'" + prefix + oldKey + "' is the old name of '" + prefix + key + "'; it still works, but write '"
                + prefix + key + "' in new macros and scripts";
    }

    /** A required or optional number in [min, max]. */
    public static Param number(String key, Double def, double min, double max, String unit, String help) {
        return new Param(key, Kind.NUMBER, def == null ? null : fmt(def), unit, help, List.of(), min, max, false);
    }

    /** A whole number in [min, max]. */
    public static Param integer(String key, Integer def, int min, int max, String help) {
        return new Param(key, Kind.INTEGER, def == null ? null : def.toString(), "", help, List.of(), min, max, false);
    }

    /** Free text. */
    public static Param text(String key, String def, String help) {
        return new Param(key, Kind.TEXT, def, "", help, List.of(), 0, 0, false);
    }

    /** One of the choices; the default must be one of them. */
    public static Param choice(String key, String def, List<String> choices, String help) {
        if (def != null && !choices.contains(def)) {
            throw new IllegalArgumentException("default " + def + " of " + key + " is not a choice");
        }
        return new Param(key, Kind.CHOICE, def, "", help, choices, 0, 0, false);
    }

    /** On/off, off by default. */
    public static Param flag(String key, String help) {
        return new Param(key, Kind.FLAG, "false", "", help, List.of(), 0, 0, false);
    }

    /** An input image. */
    public static Param image(String key, boolean required, String help) {
        return new Param(key, Kind.IMAGE, null, "", help, List.of(), 0, 0, required);
    }

    /** An output image. */
    public static Param outputImage(String key, boolean required, String help) {
        return new Param(key, Kind.OUTPUT_IMAGE, null, "", help, List.of(), 0, 0, required);
    }

    /** An output picture: a PNG file on the command line, a new (RGB) window in ImageJ. */
    public static Param outputPicture(String key, String help) {
        return new Param(key, Kind.OUTPUT_IMAGE, null, "PNG", help, List.of(), 0, 0, false);
    }

    /** An output file (JSON record). */
    public static Param outputFile(String key, String help) {
        return new Param(key, Kind.OUTPUT_FILE, null, "", help, List.of(), 0, 0, false);
    }

    /** @return a copy that must be given */
    public Param asRequired() {
        return new Param(key, kind, null, unit, help, choices, min, max, true, aliases);
    }

    /** @return true for the kinds that a door supplies as files or windows rather than as text */
    public boolean isImageOrFile() {
        return kind == Kind.IMAGE || kind == Kind.OUTPUT_IMAGE || kind == Kind.OUTPUT_FILE;
    }

    /** Formats a number without a trailing ".0" for whole values. */
    public static String fmt(double d) {
        if (d == Math.rint(d) && Math.abs(d) < 1e15) {
            return Long.toString((long) d);
        }
        return Double.toString(d);
    }
}
