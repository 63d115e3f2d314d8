package org.forkscape.data;

/**
 * Bytes the JVM uses for the objects a table is built of, on a 64-bit HotSpot JVM with compressed
 * references (below 32 GB of heap) and compact strings (Java 9 onwards: one byte a character for Latin-1
 * text, two otherwise): an array's 16-byte header and its elements, rounded up to 8 bytes. From the
 * layouts OpenJDK's JOL tool prints for Java 17 (from memory; {@code CompactColumnsTest} checks the totals
 * against the measured heap).
 */
final class HeapSizes {
    static final int ARRAY_HEADER = 16;
    /** A String object: header, value reference, hash, coder and flag, rounded up. */
    static final int STRING = 24;
    /** One entry of a HashMap: the node (32 bytes), its slot in the table at the default load factor (about
     * 8 bytes) and the boxed code (16 bytes; the JVM caches only -128 to 127). */
    static final int MAP_ENTRY = 56;

    private HeapSizes() {
    }

    static long array(long elements, int width) {
        return align(ARRAY_HEADER + elements * width);
    }

    static long string(String s) {
        boolean latin1 = s.chars().allMatch(c -> c < 256);
        return STRING + array(s.length(), latin1 ? 1 : 2);
    }

    private static long align(long bytes) {
        return (bytes + 7) & ~7L;
    }
}
