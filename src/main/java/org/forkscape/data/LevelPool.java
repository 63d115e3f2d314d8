package org.forkscape.data;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * The distinct texts of one categorical column, each kept once: a cell's text becomes a code in the order
 * of first appearance, and the parser's own String for the cell is dropped. {@link #sorted} then gives the
 * levels in natural string order and the recoding from first-appearance codes to it.
 */
final class LevelPool {
    private final Map<String, Integer> codes = new HashMap<>();
    private final List<String> levels = new ArrayList<>();
    private long bytes;

    /** The code of {@code text}, a new one when it is new. */
    int code(String text) {
        Integer known = codes.get(text);
        if (known != null) {
            return known;
        }
        int code = levels.size();
        codes.put(text, code);
        levels.add(text);
        bytes += HeapSizes.string(text) + HeapSizes.MAP_ENTRY + Integer.BYTES;
        return code;
    }

    /** What the levels and their index hold, as priced by {@link HeapSizes}. */
    long bytes() {
        return bytes;
    }

    /** The levels sorted, with {@code recode[firstAppearanceCode]} = the code in that order. */
    Sorted sorted() {
        Integer[] order = new Integer[levels.size()];
        Arrays.setAll(order, k -> k);
        Arrays.sort(order, Comparator.comparing(levels::get));
        int[] recode = new int[order.length];
        List<String> sorted = new ArrayList<>(order.length);
        for (int k = 0; k < order.length; k++) {
            recode[order[k]] = k;
            sorted.add(levels.get(order[k]));
        }
        return new Sorted(sorted, recode);
    }

    record Sorted(List<String> levels, int[] recode) {
    }
}
