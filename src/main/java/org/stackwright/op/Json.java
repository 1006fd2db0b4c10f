package org.stackwright.op;

import java.util.Iterator;
import java.util.Locale;
import java.util.Map;

/**
 * Writes a run record as JSON: maps (objects), iterables and arrays (lists), numbers, strings, booleans and null.
 * Non-finite numbers become null (JSON has no NaN). Output is deterministic (map order kept).
 */
public final class Json {

    private Json() {
    }

    /** @return the value as indented JSON text */
    public static String write(Object value) {
        StringBuilder sb = new StringBuilder();
        write(value, sb, 0);
        sb.append('\n');
        return sb.toString();
    }

    private static void write(Object v, StringBuilder sb, int indent) {
        if (v == null) {
            sb.append("null");
        } else if (v instanceof Map<?, ?> m) {
            if (m.isEmpty()) {
                sb.append("{}");
                return;
            }
            sb.append("{\n");
            Iterator<? extends Map.Entry<?, ?>> it = m.entrySet().iterator();
            while (it.hasNext()) {
                Map.Entry<?, ?> e = it.next();
                pad(sb, indent + 1);
                string(String.valueOf(e.getKey()), sb);
                sb.append(": ");
                write(e.getValue(), sb, indent + 1);
                sb.append(it.hasNext() ? ",\n" : "\n");
            }
            pad(sb, indent);
            sb.append('}');
        } else if (v instanceof Iterable<?> list) {
            array(list.iterator(), sb, indent);
        } else if (v instanceof double[] a) {
            sb.append('[');
            for (int i = 0; i < a.length; i++) {
                sb.append(i > 0 ? ", " : "");
                number(a[i], sb);
            }
            sb.append(']');
        } else if (v instanceof int[] a) {
            sb.append('[');
            for (int i = 0; i < a.length; i++) {
                sb.append(i > 0 ? ", " : "").append(a[i]);
            }
            sb.append(']');
        } else if (v instanceof Object[] a) {
            array(java.util.Arrays.asList(a).iterator(), sb, indent);
        } else if (v instanceof Number n) {
            if (n instanceof Integer || n instanceof Long) {
                sb.append(n);
            } else {
                number(n.doubleValue(), sb);
            }
        } else if (v instanceof Boolean b) {
            sb.append(b);
        } else {
            string(v.toString(), sb);
        }
    }

    private static void array(Iterator<?> it, StringBuilder sb, int indent) {
        sb.append('[');
        boolean first = true;
        while (it.hasNext()) {
            Object o = it.next();
            sb.append(first ? "" : ", ");
            first = false;
            if (o instanceof Map<?, ?>) {
                sb.append('\n');
                pad(sb, indent + 1);
            }
            write(o, sb, indent + 1);
        }
        sb.append(']');
    }

    private static void number(double d, StringBuilder sb) {
        if (!Double.isFinite(d)) {
            sb.append("null");
        } else if (d == Math.rint(d) && Math.abs(d) < 1e15) {
            sb.append((long) d);
        } else {
            sb.append(String.format(Locale.ROOT, "%.9g", d).replaceFirst("0+(e|$)", "$1").replaceFirst("\\.(e|$)", ".0$1"));
        }
    }

    private static void string(String s, StringBuilder sb) {
        sb.append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '"' -> sb.append("\\\"");
                case '\\' -> sb.append("\\\\");
                case '\n' -> sb.append("\\n");
                case '\r' -> sb.append("\\r");
                case '\t' -> sb.append("\\t");
                default -> {
                    if (c < 0x20) {
                        sb.append(String.format(Locale.ROOT, "\\u%04x", (int) c));
                    } else {
                        sb.append(c);
                    }
                }
            }
        }
        sb.append('"');
    }

    private static void pad(StringBuilder sb, int indent) {
        sb.append("  ".repeat(indent));
    }
}
