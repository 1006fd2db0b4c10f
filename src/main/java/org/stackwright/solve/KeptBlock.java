package org.stackwright.solve;

import java.util.Collections;
import java.util.IdentityHashMap;
import java.util.Map;

import org.stackwright.blocks.Globals;
import org.stackwright.volume.Volume;

/**
 * The representative block's result from the global step, held until the blocks run and its own block asks for
 * it (then forgotten), so that block is not deconvolved twice. It belongs to one global step's result.
 */
final class KeptBlock {

    private Volume result;
    private final Map<Globals, Integer> owner = Collections.synchronizedMap(new IdentityHashMap<>());

    /** Keeps a result for the block of this index of this global step's plan, or forgets any (result null). */
    synchronized void keep(Globals g, int index, Volume kept) {
        owner.clear();
        result = kept;
        if (kept != null && index >= 0) {
            owner.put(g, index);
        } else {
            result = null;
        }
    }

    /** @return the kept result when this block is it (once; it is then forgotten), or null */
    synchronized Volume take(Globals g, int index) {
        Integer i = owner.get(g);
        if (i == null || i != index || result == null) {
            return null;
        }
        Volume v = result;
        result = null;
        owner.clear();
        return v;
    }

    /** @return the index of the block whose result is kept for this global step, or -1 */
    int index(Globals g) {
        Integer i = owner.get(g);
        return i == null ? -1 : i;
    }
}
