package org.stackwright.blocks;

import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Param;
import org.stackwright.op.Values;

/**
 * The two settings every block-capable operation has, {@code block-size} and {@code memory}, and how they are read.
 */
public final class BlockSettings {

    /** Key of the block size setting. */
    public static final String BLOCK_SIZE = "block-size";
    /** Key of the memory setting. */
    public static final String MEMORY = "memory";

    private static final Pattern SIZE = Pattern.compile("(\\d+(?:\\.\\d+)?)\\s*([kmgt])b?", Pattern.CASE_INSENSITIVE);

    private BlockSettings() {
    }

    /** @return the block-size parameter: WxHxD cores, or auto */
    public static Param blockSize() {
        return Param.text(BLOCK_SIZE, "auto", "cut the stack into blocks of WxHxD voxels (plus a halo), or auto: one "
                + "block when the stack fits in memory, otherwise blocks that fit");
    }

    /** @return the memory parameter: a size such as 700m or 4g */
    public static Param memory() {
        return Param.text(MEMORY, null, "memory the run may use, e.g. 700m or 4g (default: what the Java heap "
                + "allows); decides the size of automatic blocks");
    }

    /** @return true when the block size was given as WxHxD (not auto) */
    public static boolean given(Values v) {
        String s = v.text(BLOCK_SIZE);
        return s != null && !s.isBlank() && !s.trim().equalsIgnoreCase("auto");
    }

    /**
     * @return the core size per axis, or null for auto
     * @throws IllegalArgumentException naming block-size when it is neither WxHxD nor auto
     */
    public static int[] coreSize(Values v) {
        if (!given(v)) {
            return null;
        }
        try {
            return Values.parseDims(BLOCK_SIZE, v.text(BLOCK_SIZE).trim(), 3);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(e.getMessage() + ", or auto");
        }
    }

    /**
     * @return the bytes a run may use: the memory setting (capped at what the heap has free, with the reason in
     *     the second element as 1) or what the heap has free
     * @throws IllegalArgumentException naming memory when the text is not a size
     */
    public static long budget(Values v) {
        long free = MemoryCheck.available();
        String s = v.text(MEMORY);
        if (s == null || s.isBlank()) {
            return free;
        }
        return Math.min(parseSize(s), free);
    }

    /** @return true when the memory setting asks for more than the heap has free */
    public static boolean beyondHeap(Values v) {
        String s = v.text(MEMORY);
        return s != null && !s.isBlank() && parseSize(s) > MemoryCheck.available();
    }

    /**
     * @param text e.g. 700m, 4g, 512k, 1.5g (binary units: k = 1024)
     * @return bytes
     * @throws IllegalArgumentException naming memory
     */
    public static long parseSize(String text) {
        Matcher m = SIZE.matcher(text.trim());
        if (!m.matches()) {
            throw new IllegalArgumentException(MEMORY + " = '" + text + "' is not a size; give a number with k, m, g or"
                    + " t, e.g. 700m or 4g");
        }
        double n = Double.parseDouble(m.group(1));
        int shift = switch (m.group(2).toLowerCase(Locale.ROOT)) {
            case "k" -> 10;
            case "m" -> 20;
            case "g" -> 30;
            default -> 40;
        };
        double bytes = n * (1L << shift);
        if (!(bytes >= 1 << 20) || bytes > 1L << 50) {
            throw new IllegalArgumentException(MEMORY + " = '" + text + "' is out of range; give 1m or more");
        }
        return (long) bytes;
    }
}
