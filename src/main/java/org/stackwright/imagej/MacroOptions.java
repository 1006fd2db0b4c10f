package org.stackwright.imagej;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The options string of a macro call {@code run("…", "key=value key=[a value] flag")}, read exactly.
 *
 * <p>Why this exists: ImageJ's dialogs find a key by searching for {@code key=} not preceded by a letter, so
 * {@code output=} also matches inside {@code psf-output=}, and {@code noise=} inside {@code read-noise=}. We read the
 * string ourselves, refuse keys the operation does not have (ImageJ would silently ignore a misspelt key), and write
 * it back in an order where every key comes before any longer key that ends with it; the dialog then reads the
 * right value for every key.
 */
public final class MacroOptions {

    private final Map<String, String> values;

    private MacroOptions(Map<String, String> values) {
        this.values = values;
    }

    /**
     * Reads an options string.
     *
     * @param options the string given to run(); not modified
     * @return key to value; a bare word (ticked checkbox) maps to null
     * @throws IllegalArgumentException for an unclosed bracket or quote, naming the key
     */
    public static MacroOptions parse(String options) {
        Map<String, String> m = new LinkedHashMap<>();
        String s = options == null ? "" : options;
        int i = 0;
        int n = s.length();
        while (i < n) {
            while (i < n && Character.isWhitespace(s.charAt(i))) {
                i++;
            }
            if (i >= n) {
                break;
            }
            int start = i;
            while (i < n && !Character.isWhitespace(s.charAt(i)) && s.charAt(i) != '=') {
                i++;
            }
            String key = s.substring(start, i).toLowerCase(java.util.Locale.ROOT);
            if (i < n && s.charAt(i) == '=') {
                i++;
                String value;
                if (i < n && (s.charAt(i) == '[' || s.charAt(i) == '\'')) {
                    int end = s.charAt(i) == '[' ? closingBracket(s, i) : s.indexOf('\'', i + 1);
                    if (end < 0) {
                        throw new IllegalArgumentException("macro option " + key + ": the value starting with "
                                + s.charAt(i) + " is not closed; write " + key + "=[value with spaces]");
                    }
                    value = s.substring(i + 1, end);
                    i = end + 1;
                } else {
                    int vs = i;
                    while (i < n && !Character.isWhitespace(s.charAt(i))) {
                        i++;
                    }
                    value = s.substring(vs, i);
                }
                m.put(key, value);
            } else {
                m.put(key, null);
            }
        }
        return new MacroOptions(m);
    }

    private static int closingBracket(String s, int open) {
        int depth = 0;
        for (int k = open; k < s.length(); k++) {
            char c = s.charAt(k);
            if (c == '[') {
                depth++;
            } else if (c == ']' && --depth == 0) {
                return k;
            }
        }
        return -1;
    }

    /** @return key to value (null for a bare word), in the order given */
    public Map<String, String> values() {
        return values;
    }

    /**
     * Replaces every old key of a setting (see {@link org.stackwright.op.Param#withAlias}) by its current key.
     *
     * @param params the operation's settings; not modified
     * @param notes receives one note per old key used, naming the current key
     * @throws IllegalArgumentException when both an old key and its current key are given
     */
    public void resolveAliases(String operation, List<org.stackwright.op.Param> params,
            java.util.function.Consumer<String> notes) {
        for (org.stackwright.op.Param p : params) {
            for (String old : p.aliases()) {
                if (!values.containsKey(old)) {
                    continue;
                }
                if (values.containsKey(p.key())) {
                    throw new IllegalArgumentException(operation + ": macro keys '" + old + "' and '" + p.key()
                            + "' name the same setting; give only '" + p.key() + "'");
                }
                Map<String, String> renamed = new LinkedHashMap<>();
                values.forEach((k, v) -> renamed.put(k.equals(old) ? p.key() : k, v));
                values.clear();
                values.putAll(renamed);
                notes.accept(operation + ": " + p.aliasNote(old, ""));
            }
        }
    }

    /**
     * @param allowed the keys the dialog has
     * @throws IllegalArgumentException naming the first key that is not allowed and listing the allowed ones
     */
    public void checkKeys(String operation, Set<String> allowed) {
        for (String k : values.keySet()) {
            if (!allowed.contains(k)) {
                throw new IllegalArgumentException("unknown macro key '" + k + "' for " + operation + "; allowed: "
                        + String.join(", ", allowed));
            }
        }
    }

    /**
     * @return the same options written so that ImageJ's key search finds each key's own value: shorter keys
     *     first, every value in brackets
     */
    public String canonical() {
        return write();
    }

    /**
     * Gives every absent number, whole-number, text or choice setting whose key ImageJ would find inside a longer
     * key that is present (e.g. {@code noise} inside {@code read-noise=2}) its default explicitly, so that the
     * dialog does not read the longer key's value for it. Settings without a default get an empty value, which
     * the dialog reads as "not given".
     *
     * @param params the operation's settings; not modified
     */
    public void fillShadowedKeys(List<org.stackwright.op.Param> params) {
        for (org.stackwright.op.Param p : params) {
            String k = p.key();
            boolean valued = switch (p.kind()) {
                case NUMBER, INTEGER, TEXT, CHOICE, OUTPUT_FILE -> true;
                default -> false;
            };
            if (!valued || values.containsKey(k)) {
                continue;
            }
            boolean shadowed = values.keySet().stream().anyMatch(o -> o.length() > k.length() && o.endsWith(k)
                    && !Character.isLetter(o.charAt(o.length() - k.length() - 1)));
            if (shadowed) {
                values.put(k, p.defaultValue() == null ? "" : p.defaultValue());
            }
        }
    }

    private String write() {
        List<String> keys = new ArrayList<>(values.keySet());
        keys.sort(Comparator.comparingInt(String::length));
        StringBuilder sb = new StringBuilder();
        for (String k : keys) {
            String v = values.get(k);
            if (sb.length() > 0) {
                sb.append(' ');
            }
            sb.append(k);
            if (v != null) {
                sb.append("=[").append(v).append(']');
            }
        }
        return sb.toString();
    }

    /** Writes one value as ImageJ's recorder does: in brackets when it is empty or holds a space. */
    public static String quote(String value) {
        return value.isEmpty() || value.indexOf(' ') >= 0 ? "[" + value + "]" : value;
    }
}
