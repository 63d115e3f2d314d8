package org.forkscape.infer;

import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.run.Json;
import org.forkscape.run.ResultTable;

/**
 * An overfitting yardstick for one specification: its R-squared beside the value pure noise would give
 * on average, (K - 1) / (N - 1) for K - 1 regressors besides the intercept on N rows (common practice, no
 * source: the expectation of R-squared under the null of no relation), its adjusted R-squared and overall
 * F-test p-value, and its rows per estimated coefficient, flagged below {@link #MIN_ROWS_PER_COEFFICIENT}
 * (a rule of thumb of the trade; common practice, no source). For a generalized linear model R-squared is
 * McFadden's, whose expectation under noise has no such closed form: its yardstick is undefined (NaN) and
 * it is never counted as no better than noise; its test is the likelihood-ratio test.
 *
 * @param r2                 R-squared
 * @param r2NullExpectation  (K - 1) / (N - 1)
 * @param adjustedR2         1 - (1 - R2)(N - 1)/(N - K)
 * @param modelPValue        p-value of the overall F test
 * @param rowsPerCoefficient N / K
 */
public record Overfitting(double r2, double r2NullExpectation, double adjustedR2, double modelPValue,
        double rowsPerCoefficient) {
    /** Fewer rows than this per estimated coefficient is flagged (common practice, no source). */
    public static final double MIN_ROWS_PER_COEFFICIENT = 10;

    public static Overfitting of(ResultTable r, int slot) {
        int n = r.nObs(slot);
        int k = r.nParams(slot);
        double noise = r.family(slot).leastSquares() ? (k - 1.0) / (n - 1.0) : Double.NaN;
        return new Overfitting(r.r2(slot), noise, r.adjustedR2(slot), r.modelPValue(slot), (double) n / k);
    }

    public boolean fewRows() {
        return rowsPerCoefficient < MIN_ROWS_PER_COEFFICIENT;
    }

    /** Whether R-squared is no larger than what noise regressors give on average. */
    public boolean noBetterThanNoise() {
        return !Double.isNaN(r2NullExpectation) && !(r2 > r2NullExpectation);
    }

    /** The summary.json section {@code overfitting}: counts over the fitted specifications among {@code slots}. */
    public static Map<String, Object> summary(ResultTable r, int[] slots, double alpha) {
        int fitted = 0;
        int fewRows = 0;
        int noise = 0;
        int modelNotSignificant = 0;
        double minRows = Double.POSITIVE_INFINITY;
        for (int slot : slots) {
            if (!r.fitted(slot)) {
                continue;
            }
            fitted++;
            Overfitting o = of(r, slot);
            if (o.fewRows()) {
                fewRows++;
            }
            if (o.noBetterThanNoise()) {
                noise++;
            }
            if (!(o.modelPValue() < alpha)) {
                modelNotSignificant++;
            }
            minRows = Math.min(minRows, o.rowsPerCoefficient());
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("specifications", fitted);
        m.put("min_rows_per_coefficient", Json.number(minRows));
        m.put("rows_per_coefficient_floor", MIN_ROWS_PER_COEFFICIENT);
        m.put("few_rows", fewRows);
        m.put("r2_not_above_null_expectation", noise);
        m.put("model_p_not_significant", modelNotSignificant);
        m.put("file", OverfittingCsv.FILE);
        return m;
    }
}
