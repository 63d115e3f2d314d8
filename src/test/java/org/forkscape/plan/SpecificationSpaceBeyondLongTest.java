package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigInteger;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.HashSet;
import java.util.Set;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;

/** A plan of 2^120 specifications: counted exactly and sampled uniformly over the whole space. */
class SpecificationSpaceBeyondLongTest {
    private static final int OPTIONAL = 40;
    /** Significance level of each chi-square test; with a fixed seed the test is deterministic. */
    private static final double ALPHA = 0.001;
    private static final int BINS = 32;

    /** One outcome, one predictor, three controls decisions of 40 optional columns: (2^40)^3 = 2^120 specifications. */
    static Plan plan(int sample, long seed) {
        StringBuilder decisions = new StringBuilder("{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"y\", \"column\": \"y\"}]}, {\"name\": \"x\", \"kind\": \"predictor\", "
                + "\"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]}");
        for (int d = 0; d < 3; d++) {
            decisions.append(", ").append("{\"name\": \"k").append(d)
                    .append("\", \"kind\": \"controls\", \"optional\": [");
            for (int i = 0; i < OPTIONAL; i++) {
                decisions.append(i == 0 ? "" : ", ").append("\"c").append(d).append('_').append(i).append('"');
            }
            decisions.append("]}");
        }
        return new PlanReader(false).read("{\"data\": \"d.csv\", \"sample\": " + sample + ", \"seed\": " + seed
                + ", \"decisions\": [" + decisions + "]}", Path.of("."));
    }

    @Test
    void theCountIsExact() {
        SpecificationSpace s = new SpecificationSpace(plan(100, 1));
        assertEquals(BigInteger.TWO.pow(120), s.count());
        assertTrue(s.beyondLong());
        assertEquals(Long.MAX_VALUE, s.size());
    }

    @Test
    void aSampleIsDistinctSortedAndTheSameForTheSameSeed() {
        SpecificationSpace s = new SpecificationSpace(plan(500, 7));
        long[] keys = s.indices(500, 7);
        assertEquals(500, keys.length);
        BigInteger previous = BigInteger.ZERO;
        Set<BigInteger> seen = new HashSet<>();
        for (long key : keys) {
            BigInteger number = s.number(key).value();
            assertTrue(number.compareTo(previous) > 0, "numbers increase with the key");
            assertTrue(number.compareTo(s.count()) <= 0);
            assertTrue(seen.add(number));
            assertEquals(key, s.key(number), "key and number are inverses");
            previous = number;
        }
        SpecificationSpace again = new SpecificationSpace(plan(500, 7));
        SpecificationSpace other = new SpecificationSpace(plan(500, 8));
        long[] a = new long[5];
        long[] b = new long[5];
        boolean differs = false;
        for (long key : keys) {
            s.decode(key, a);
            again.decode(key, b);
            assertArrayEquals(a, b);
            other.decode(key, b);
            differs |= a[2] != b[2];
        }
        assertTrue(differs, "another seed draws another sample");
        assertEquals(-1, s.key(BigInteger.ZERO));
        assertEquals(-1, s.key(s.count().add(BigInteger.ONE)));
    }

    @Test
    void theNumberIsTheMixedRadixIndexPlusOneWrittenAsText() {
        SpecificationSpace s = new SpecificationSpace(plan(10, 3));
        long[] c = new long[5];
        s.decode(4, c);
        BigInteger radix = BigInteger.TWO.pow(OPTIONAL);
        BigInteger expected = BigInteger.valueOf(c[2]).multiply(radix).add(BigInteger.valueOf(c[3])).multiply(radix)
                .add(BigInteger.valueOf(c[4])).add(BigInteger.ONE);
        assertEquals(expected, s.number(4).value());
        assertEquals(expected.toString(), s.number(4).json());
    }

    /**
     * Pearson's chi-square test of each decision's digit against the uniform distribution, over 32
     * equal bins of its leading bits and 32 of its trailing bits, on 20,000 draws (625 expected per bin;
     * the usual minimum of 5 per bin is far exceeded, Cochran 1954, "Some methods for strengthening the
     * common chi-square tests", Biometrics 10(4)). The earlier sampler drew indices below 2^63 only, so
     * the first decision's digit was always 0 and the second's below 2^17: both fail at once.
     */
    @Test
    void eachDecisionsDigitIsUniformOverItsWholeRange() {
        int n = 20_000;
        SpecificationSpace s = new SpecificationSpace(plan(n, 20261202));
        long[][] high = new long[3][BINS];
        long[][] low = new long[3][BINS];
        long[] c = new long[5];
        for (long key : s.indices(n, 20261202)) {
            s.decode(key, c);
            for (int d = 0; d < 3; d++) {
                high[d][(int) (c[d + 2] >>> (OPTIONAL - 5))]++;
                low[d][(int) (c[d + 2] & (BINS - 1))]++;
            }
        }
        double[] expected = new double[BINS];
        Arrays.fill(expected, (double) n / BINS);
        ChiSquareTest test = new ChiSquareTest();
        for (int d = 0; d < 3; d++) {
            assertTrue(test.chiSquareTest(expected, high[d]) > ALPHA, "leading bits of controls decision " + d);
            assertTrue(test.chiSquareTest(expected, low[d]) > ALPHA, "trailing bits of controls decision " + d);
        }
    }
}
