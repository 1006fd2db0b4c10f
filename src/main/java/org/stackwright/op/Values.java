package org.stackwright.op;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

/**
 * The settings of one run of an operation: text values checked against the operation's {@link Param}s, plus the
 * input images the door supplied. Every problem is reported as an {@link IllegalArgumentException} whose message
 * names the key, the value given and what is allowed.
 */
public final class Values {

    private final String operation;
    private final Map<String, Param> params = new LinkedHashMap<>();
    private final Map<String, String> text = new LinkedHashMap<>();
    private final Map<String, ImagePlus> images = new LinkedHashMap<>();
    private final java.util.Set<String> wanted = new java.util.LinkedHashSet<>();

    private Values(String operation, List<Param> list) {
        this.operation = operation;
        for (Param p : list) {
            params.put(p.key(), p);
        }
    }

    /**
     * Checks raw text values. Keys not known to the operation, numbers that do not parse or lie out of range and
     * words that are not among the choices are refused. Image and file keys are taken as given (paths or window
     * titles) and resolved by the door.
     *
     * @param operation operation name, for messages
     * @param list the operation's parameters
     * @param raw key to value; not modified
     */
    public static Values parse(String operation, List<Param> list, Map<String, String> raw) {
        Values v = new Values(operation, list);
        for (Map.Entry<String, String> e : raw.entrySet()) {
            String key = e.getKey();
            Param p = v.params.get(key);
            if (p == null) {
                throw new IllegalArgumentException("unknown setting '" + shorten(key) + "' for " + operation
                        + "; allowed: " + String.join(", ", v.params.keySet()));
            }
            String value = e.getValue() == null ? "" : e.getValue().trim();
            v.check(p, value);
            v.text.put(key, value);
        }
        for (Param p : list) {
            if (p.required() && p.kind() != Param.Kind.IMAGE && p.kind() != Param.Kind.OUTPUT_IMAGE
                    && !v.text.containsKey(p.key())) {
                throw new IllegalArgumentException("setting '" + p.key() + "' is required for " + operation + ": " + p.help());
            }
        }
        return v;
    }

    private void check(Param p, String value) {
        switch (p.kind()) {
            case NUMBER -> {
                double d = parseNumber(p.key(), value);
                if (d < p.min() || d > p.max()) {
                    throw new IllegalArgumentException(p.key() + " = " + shorten(value) + " is out of range; allowed "
                            + range(p) + (p.unit().isEmpty() ? "" : " " + p.unit()));
                }
            }
            case INTEGER -> {
                long n;
                try {
                    n = Long.parseLong(value);
                } catch (NumberFormatException ex) {
                    throw new IllegalArgumentException(p.key() + " = '" + shorten(value) + "' is not a whole number; allowed "
                            + range(p));
                }
                if (n < p.min() || n > p.max()) {
                    throw new IllegalArgumentException(p.key() + " = " + n + " is out of range; allowed " + range(p));
                }
            }
            case CHOICE -> {
                if (!p.choices().contains(value)) {
                    throw new IllegalArgumentException(p.key() + " = '" + shorten(value) + "' is not allowed; choose one of "
                            + String.join(", ", p.choices()));
                }
            }
            case FLAG -> {
                if (!value.isEmpty() && !value.equals("true") && !value.equals("false")) {
                    throw new IllegalArgumentException(p.key() + " = '" + shorten(value) + "' is not allowed; use true or false");
                }
            }
            default -> {
                if (value.indexOf('\0') >= 0) {
                    throw new IllegalArgumentException(p.key() + " contains a NUL character");
                }
            }
        }
    }

    private static String range(Param p) {
        boolean noMax = p.max() == Double.MAX_VALUE || p.max() >= Integer.MAX_VALUE;
        if (p.min() == Double.MIN_VALUE) {
            // the smallest positive double stands for "above 0"
            return "above 0" + (noMax ? "" : " up to " + Param.fmt(p.max()));
        }
        return Param.fmt(p.min()) + " to " + (noMax ? "any" : Param.fmt(p.max()));
    }

    /**
     * A plain decimal number: optional sign, digits with an optional decimal point, optional exponent. Java's
     * parser also takes "520f", "520d" and hexadecimal floating point ("0x1.04p9"), which are not numbers a user
     * means to type and would be copied into records as typed; "NaN" and "Infinity" are let through to be refused
     * as not finite.
     */
    private static final java.util.regex.Pattern DECIMAL =
            java.util.regex.Pattern.compile("[+-]?(\\d+\\.?\\d*|\\.\\d+)([eE][+-]?\\d+)?|[+-]?(NaN|Infinity)");

    private static double parseNumber(String key, String value) {
        double d;
        if (!DECIMAL.matcher(value).matches()) {
            throw new IllegalArgumentException(key + " = '" + shorten(value) + "' is not a number; give a decimal"
                    + " number such as 520, 0.065 or 1e-3");
        }
        try {
            d = Double.parseDouble(value);
        } catch (NumberFormatException ex) {
            throw new IllegalArgumentException(key + " = '" + shorten(value) + "' is not a number");
        }
        if (!Double.isFinite(d)) {
            throw new IllegalArgumentException(key + " = " + shorten(value) + " is not a finite number");
        }
        return d;
    }

    static String shorten(String s) {
        return s.length() > 60 ? s.substring(0, 57) + "..." : s;
    }

    /** @return the operation name */
    public String operation() {
        return operation;
    }

    /** @return the parameters, in order */
    public List<Param> params() {
        return new ArrayList<>(params.values());
    }

    /** @return the parameter with this key */
    public Param param(String key) {
        Param p = params.get(key);
        if (p == null) {
            throw new IllegalStateException(operation + " has no setting " + key);
        }
        return p;
    }

    /** @return true when the value was given (not only defaulted) */
    public boolean given(String key) {
        param(key);
        return text.containsKey(key) || images.containsKey(key);
    }

    /**
     * Marks output images a door will show (the ImageJ and SciJava doors make outputs as windows, not files, so no
     * path is given for them).
     *
     * @param keys output image keys, not modified
     */
    public Values wantOutputs(java.util.Collection<String> keys) {
        for (String k : keys) {
            if (param(k).kind() == Param.Kind.OUTPUT_IMAGE) {
                wanted.add(k);
            }
        }
        return this;
    }

    /** @return true when an output image is asked for: a path given (command line) or a window wanted (ImageJ) */
    public boolean wants(String key) {
        return given(key) || wanted.contains(key);
    }

    /** @return the value as given, or the default; null when neither exists */
    public String raw(String key) {
        Param p = param(key);
        String v = text.get(key);
        return v != null ? v : p.defaultValue();
    }

    public double number(String key) {
        String v = raw(key);
        if (v == null) {
            throw new IllegalArgumentException("setting '" + key + "' is required for " + operation + ": " + param(key).help());
        }
        return parseNumber(key, v);
    }

    public int integer(String key) {
        String v = raw(key);
        if (v == null) {
            throw new IllegalArgumentException("setting '" + key + "' is required for " + operation + ": " + param(key).help());
        }
        return Integer.parseInt(v);
    }

    public String text(String key) {
        return raw(key);
    }

    public String choice(String key) {
        return raw(key);
    }

    public boolean flag(String key) {
        String v = raw(key);
        return v != null && (v.isEmpty() || v.equals("true"));
    }

    /** Supplies an input image (by the door). */
    public Values withImage(String key, ImagePlus imp) {
        Param p = param(key);
        if (p.kind() != Param.Kind.IMAGE) {
            throw new IllegalStateException(key + " is not an image setting");
        }
        images.put(key, imp);
        return this;
    }

    /**
     * @return the input image, or null when optional and not given
     * @throws IllegalArgumentException when required and not given
     */
    public ImagePlus image(String key) {
        ImagePlus imp = images.get(key);
        if (imp == null && param(key).required()) {
            throw new IllegalArgumentException("image '" + key + "' is required for " + operation + ": " + param(key).help());
        }
        return imp;
    }

    /** @return the input images the door supplied, by key (a copy) */
    public Map<String, ImagePlus> images() {
        return new LinkedHashMap<>(images);
    }

    /**
     * Parses "AxBxC" (or "AxB" when dims is 2) into positive whole numbers.
     *
     * @throws IllegalArgumentException naming the key when the text does not have that form
     */
    public int[] dims(String key, int dims) {
        String v = raw(key);
        return parseDims(key, v, dims);
    }

    /** See {@link #dims(String, int)}. */
    public static int[] parseDims(String key, String v, int dims) {
        String shape = dims == 3 ? "WxHxD, e.g. 65x65x41" : "AxB, e.g. 3x4";
        if (v == null || v.isEmpty()) {
            throw new IllegalArgumentException(key + " is required: give " + shape);
        }
        String[] parts = v.toLowerCase(Locale.ROOT).split("x", -1);
        if (parts.length != dims) {
            throw new IllegalArgumentException(key + " = '" + shorten(v) + "' has the wrong form; give " + shape);
        }
        int[] out = new int[dims];
        for (int i = 0; i < dims; i++) {
            try {
                out[i] = Integer.parseInt(parts[i].trim());
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException(key + " = '" + shorten(v) + "' has the wrong form; give " + shape);
            }
            if (out[i] < 1 || out[i] > 100_000) {
                throw new IllegalArgumentException(key + " = '" + shorten(v) + "': each size must be from 1 to 100000");
            }
        }
        return out;
    }

    /** @return all text values given (not defaults), in parameter order, for records */
    public Map<String, String> givenText() {
        Map<String, String> m = new LinkedHashMap<>();
        for (String k : params.keySet()) {
            if (text.containsKey(k)) {
                m.put(k, text.get(k));
            }
        }
        return m;
    }

    /** @return every non-image setting with its effective value (given or default), for run records */
    public Map<String, String> effective() {
        Map<String, String> m = new LinkedHashMap<>();
        for (Param p : params.values()) {
            if (p.isImageOrFile()) {
                continue;
            }
            String v = raw(p.key());
            if (v != null) {
                m.put(p.key(), v);
            }
        }
        return m;
    }
}
