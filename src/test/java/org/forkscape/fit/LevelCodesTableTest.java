package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Arrays;
import java.util.SplittableRandom;
import java.util.TreeSet;
import org.forkscape.data.NumericColumn;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * A numeric grouping column coded among the whole table's values ({@link LevelCodes#of(org.forkscape.data.Column,
 * double[])}): through the table of whole numbers where it applies, and by binary search otherwise, every
 * code equal to {@link Arrays#binarySearch(double[], double)}'s (Java's own search, which the table stands
 * for), missing cells -1; values that are whole and not, spread narrow and wide, negative, and both zeros.
 */
class LevelCodesTableTest {
    @ParameterizedTest(name = "{0} values spread {1}, fractions {2}")
    @CsvSource({"1000, 1, false", "1000, 8, false", "1000, 9, false", "50, 1000000, false", "200, 3, true"})
    void codesAreThoseOfTheBinarySearch(int count, int spread, boolean fractions) {
        SplittableRandom random = new SplittableRandom(count * 31L + spread);
        TreeSet<Double> distinct = new TreeSet<>();
        distinct.add(-0.0);
        distinct.add(0.0);
        while (distinct.size() < count) {
            double v = random.nextInt(count * spread) - count;
            distinct.add(fractions && random.nextBoolean() ? v + 0.5 : v);
        }
        double[] sorted = distinct.stream().mapToDouble(Double::doubleValue).toArray();
        double[] rows = new double[5000];
        for (int r = 0; r < rows.length; r++) {
            rows[r] = r % 97 == 0 ? Double.NaN : sorted[random.nextInt(sorted.length)];
        }
        int[] expected = new int[rows.length];
        for (int r = 0; r < rows.length; r++) {
            expected[r] = Double.isNaN(rows[r]) ? -1 : Arrays.binarySearch(sorted, rows[r]);
        }
        assertArrayEquals(expected, LevelCodes.of(new NumericColumn("g", rows), sorted));
        assertEquals(spread <= 8 && !fractions, LevelCodes.wholeNumberCodes(sorted) != null, "coded through the table");
    }
}
