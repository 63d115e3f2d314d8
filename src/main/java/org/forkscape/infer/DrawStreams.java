package org.forkscape.infer;

import java.util.SplittableRandom;

/**
 * One random stream per null draw, derived from the run's seed and the draw's number alone: stream d is
 * the d-th split of a generator seeded with the run's seed (Steele, Lea &amp; Flood 2014, "Fast
 * splittable pseudorandom number generators", OOPSLA), so a draw's numbers do not depend on which thread
 * computes it or in what order.
 */
final class DrawStreams {
    /**
     * Mixed into the seed so that the draws' streams differ from the stream that samples specifications
     * from the same seed.
     */
    private static final long NULL_DRAWS_DOMAIN = 0x6E756C6C64726177L;

    private DrawStreams() {
    }

    static SplittableRandom[] of(long seed, int draws) {
        SplittableRandom root = new SplittableRandom(seed ^ NULL_DRAWS_DOMAIN);
        SplittableRandom[] streams = new SplittableRandom[draws];
        for (int d = 0; d < draws; d++) {
            streams[d] = root.split();
        }
        return streams;
    }
}
