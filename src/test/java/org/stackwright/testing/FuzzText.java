package org.stackwright.testing;

import java.util.List;
import java.util.SplittableRandom;

/**
 * Random and malformed text for fuzz tests: numbers at and beyond every limit, very long values, control and
 * non-Latin characters, shell and macro syntax. Seeded, so a failing case can be replayed from its index.
 */
public final class FuzzText {

    private static final String[] SPECIAL = {"", " ", "NaN", "-NaN", "Infinity", "-Infinity", "1e309", "-1e309",
        "4.9e-324", "0", "-0", "0x10", "1_000", "1,5", "１２", "٣", "1e", "e1", ".", "-", "+", "--", "=", "==", "[", "]",
        "[]", "[a b]", "\"", "'", "\\", "\0", "\t", "\n", "\r\n", "%s", "%n", "${x}", "$(ls)", "`id`", "*", "?", "**/*",
        "{a,b}", "~", "..", "../../etc/passwd", "/", "//", "C:\\x", "\u202e", "\ud800", "\uffff", "😀", "µm", "9x9x9",
        "0x0x0", "-1x2x3", "1x1x1", "100000x100000x100000", "2147483647", "2147483648", "-2147483649",
        "9223372036854775808", "true", "false", "TRUE", "cells", "beads", "16", "32"};

    private FuzzText() {
    }

    /** @return a random value: special, numeric, random characters, or very long */
    public static String value(SplittableRandom r) {
        return switch (r.nextInt(6)) {
            case 0, 1 -> SPECIAL[r.nextInt(SPECIAL.length)];
            case 2 -> Double.toString((r.nextDouble() - 0.5) * Math.pow(10, r.nextInt(-30, 30)));
            case 3 -> Long.toString(r.nextLong());
            case 4 -> chars(r, r.nextInt(1, 20));
            default -> r.nextBoolean() ? "1".repeat(r.nextInt(300, 20_000)) : chars(r, r.nextInt(1000, 20_000));
        };
    }

    /** @return a random key: one of the known keys, a mangled one, or junk */
    public static String key(SplittableRandom r, List<String> known) {
        String k = known.get(r.nextInt(known.size()));
        return switch (r.nextInt(5)) {
            case 0, 1 -> k;
            case 2 -> k.toUpperCase(java.util.Locale.ROOT);
            case 3 -> k + chars(r, 1);
            default -> chars(r, r.nextInt(0, 12));
        };
    }

    /** @return random characters from the whole range of the basic plane, surrogates and controls included */
    public static String chars(SplittableRandom r, int n) {
        StringBuilder sb = new StringBuilder(n);
        for (int i = 0; i < n; i++) {
            sb.append(switch (r.nextInt(4)) {
                case 0 -> (char) r.nextInt(0, 32);
                case 1 -> (char) r.nextInt(32, 127);
                case 2 -> "=[] \"'-x.".charAt(r.nextInt(9));
                default -> (char) r.nextInt(127, 0x10000);
            });
        }
        return sb.toString();
    }

    /** @return the number of fuzz cases: the system property stackwright.fuzz.count, or the given default */
    public static int count(int defaultCount) {
        return Integer.getInteger("stackwright.fuzz.count", defaultCount);
    }
}
