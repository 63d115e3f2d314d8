package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigInteger;
import java.util.Map;
import org.apache.commons.math3.distribution.FDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.forkscape.fit.FitStatus;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.run.ResultTable;
import org.junit.jupiter.api.Test;

/**
 * Extreme bounds, the best specification, the null-draw p-values and quantiles, and the overfitting
 * yardstick on hand-made result tables; t quantiles from Commons Math's TDistribution.
 */
class SummariesTest {
    private static KeyFit fit(double b, double se, int df, int n, int k) {
        return new KeyFit(b, se, df, n, k, 0.3, 10, 5, FitStatus.OK, "", "", false, VarianceRoute.NONE, 1);
    }

    private static ResultTable table(KeyFit... fits) {
        ResultTable t = new ResultTable(fits.length, null);
        for (int i = 0; i < fits.length; i++) {
            t.set(i, fits[i]);
        }
        return t;
    }

    private static final int[] ALL3 = {0, 1, 2};

    @Test
    void extremeBoundsAreTheWidestIntervalEnds() {
        double t = new TDistribution(null, 20).inverseCumulativeProbability(0.975);
        ResultTable r = table(fit(1, 0.5, 20, 23, 3), fit(2, 0.25, 20, 23, 3), fit(0.5, 1, 20, 23, 3));
        LeamerBounds e = LeamerBounds.of(r, ALL3, 0.95);
        // lower ends 1 - 0.5t, 2 - 0.25t, 0.5 - t: the third is lowest; upper ends likewise the third
        assertEquals(0.5 - t, e.lower(), 1e-12);
        assertEquals(0.5 + t, e.upper(), 1e-12);
        assertEquals(BigInteger.valueOf(3), e.lowerSpec().value());
        assertEquals(BigInteger.valueOf(3), e.upperSpec().value());
        assertFalse(e.sameSign());
        LeamerBounds positive = LeamerBounds.of(table(fit(3, 0.5, 20, 23, 3), fit(2, 0.25, 20, 23, 3)),
                new int[] {0, 1}, 0.95);
        assertEquals(2 - 0.25 * t, positive.lower(), 1e-12);
        assertTrue(positive.sameSign());
    }

    @Test
    void failedSpecificationsAreLeftOut() {
        ResultTable r = new ResultTable(2, null);
        r.set(0, KeyFit.failed(FitStatus.TOO_FEW_ROWS, "2 rows for 3 coefficients", 2, 3));
        r.set(1, fit(1, 0.5, 20, 23, 3));
        assertEquals(BigInteger.valueOf(2), LeamerBounds.of(r, new int[] {0, 1}, 0.95).lowerSpec().value());
        assertNull(LeamerBounds.of(r, new int[] {0}, 0.95));
        assertNull(BestSpecification.of(r, new int[] {0}, null));
    }

    @Test
    void theBestSpecificationAndItsMinPAdjustment() {
        ResultTable r = table(fit(1, 0.5, 20, 23, 3), fit(2, 0.5, 20, 23, 3), fit(0.5, 1, 20, 23, 3));
        // t = 4 is the largest: p = 2 P(T20 > 4)
        double p = 2 * (1 - new TDistribution(null, 20).cumulativeProbability(4));
        NullDrawResult draws = result(statistics(0.1, 0.5, 1, 0.001), statistics(0.1, 0.5, 1, 0.02),
                statistics(0.1, 0.5, 1, 0.5), statistics(0.1, 0.5, 1, 0.0001));
        BestSpecification best = BestSpecification.of(r, ALL3, draws);
        assertEquals(BigInteger.valueOf(2), best.spec().value());
        assertEquals(2, best.row());
        assertEquals(p, best.pNominal(), 1e-12);
        // p is about 7e-4: of the draws' smallest p-values (0.001, 0.02, 0.5, 0.0001) only the last is at most it
        assertEquals(0.25, best.pAdjusted(), 0);
        assertTrue(Double.isNaN(BestSpecification.of(r, ALL3, null).pAdjusted()));
    }

    private static CurveStatistics statistics(double median, double share, double meanZ, double minP) {
        return new CurveStatistics(10, median, median >= 0 ? 1 : -1, (int) Math.round(10 * share), share, meanZ, minP);
    }

    private static NullDrawResult result(CurveStatistics... draws) {
        return new NullDrawResult(new NullDrawSettings(draws.length, NullMethod.BOOTSTRAP, 1, null, false), null,
                new CurveStatistics(10, 0.3, 1, 5, 0.5, -1, 0.01), draws, null, null, null, 0, 0);
    }

    @Test
    void nullPValuesAreSharesOfDrawsAtLeastAsExtreme() {
        CurveStatistics empty = new CurveStatistics(0, Double.NaN, 1, 0, Double.NaN, Double.NaN, Double.NaN);
        NullDrawResult r = result(statistics(0.1, 0.5, 1.2, 0.2), statistics(-0.4, 0.2, 0.5, 0.2),
                statistics(0.35, 0.7, -0.9, 0.2), statistics(-0.2, 0, -3, 0.2), empty);
        // observed median 0.3: |-0.4| and 0.35 reach it; share 0.5: 0.5 and 0.7; |mean z| 1: 1.2 and -3
        assertEquals(0.5, r.pMedian(), 0);
        assertEquals(0.5, r.pShareSignificant(), 0);
        assertEquals(0.5, r.pStouffer(), 0);
        assertEquals(1, r.emptyDraws());
    }

    @Test
    void nullQuantilesUseTheType7Definition() {
        // Hyndman & Fan (1996) type 7 on 1..5: position 1 + 4p, so 1.1, 3 and 4.9
        NullDrawResult r = result(statistics(1, 0, 0, 1), statistics(2, 0, 0, 1), statistics(3, 0, 0, 1),
                statistics(4, 0, 0, 1), statistics(5, 0, 0, 1));
        Map<String, Object> q = r.quantiles(CurveStatistics::median);
        assertEquals(1.1, (Double) q.get("2.5"), 1e-12);
        assertEquals(3.0, (Double) q.get("50"), 1e-12);
        assertEquals(4.9, (Double) q.get("97.5"), 1e-12);
    }

    @Test
    void overfittingYardstick() {
        // overall F statistics 0.6 on (2, 17) df and 30 on (2, 97) df: p about 0.56 and below 1e-9
        ResultTable r = table(new KeyFit(1, 0.5, 17, 20, 3, 0.05, 10, 0.6, FitStatus.OK, "", "", false, VarianceRoute.NONE, 1),
                new KeyFit(1, 0.5, 97, 100, 3, 0.4, 10, 30, FitStatus.OK, "", "", false, VarianceRoute.NONE, 1));
        Overfitting small = Overfitting.of(r, 0);
        assertEquals(2.0 / 19, small.r2NullExpectation(), 1e-15);
        assertEquals(20.0 / 3, small.rowsPerCoefficient(), 1e-15);
        assertTrue(small.fewRows());
        assertTrue(small.noBetterThanNoise());
        assertEquals(1 - 0.95 * 19 / 17, small.adjustedR2(), 1e-15);
        Overfitting large = Overfitting.of(r, 1);
        assertFalse(large.fewRows());
        assertFalse(large.noBetterThanNoise());
        assertEquals(1 - new FDistribution(null, 2, 17).cumulativeProbability(0.6), small.modelPValue(), 1e-12);
        Map<String, Object> summary = Overfitting.summary(r, new int[] {0, 1}, 0.05);
        assertEquals(1, summary.get("few_rows"));
        assertEquals(1, summary.get("r2_not_above_null_expectation"));
        assertEquals(1, summary.get("model_p_not_significant"));
    }
}
