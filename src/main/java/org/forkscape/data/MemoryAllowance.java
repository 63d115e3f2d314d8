package org.forkscape.data;

/**
 * What a reader may hold while it builds a table. The reader asks again each time what it holds passes what
 * it was granted; an allowance that cannot grant as much throws, with its own sentence, and the reading
 * stops there.
 */
@FunctionalInterface
public interface MemoryAllowance {
    /** No limit beyond the Java heap (the batch command reads its own local file). */
    MemoryAllowance UNLIMITED = bytes -> Long.MAX_VALUE;

    /**
     * Grants at least {@code bytes} in all, or throws.
     *
     * @return the bytes now granted, at least {@code bytes}
     */
    long require(long bytes);
}
