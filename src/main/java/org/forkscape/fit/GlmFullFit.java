package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;

/**
 * Every coefficient of a fitted generalized linear model, for the reader who opens one specification: the
 * intercept (when nothing is absorbed; on the columns' own scale), the controls and the key predictor, each
 * with its standard error of the specification's type on the standard normal reference.
 */
final class GlmFullFit {
    private GlmFullFit() {
    }

    /** @param check the specification's key fit, just made (its R-squared, test and note) */
    static FullFit of(Irls irls, GlmRows rows, GlmCovariance covariance, SpecificationModel spec, DataVariant variant,
            Moments mom, KeyFit check, double confidence, String keyTerm) {
        int p = rows.p;
        int levels = rows.levels;
        int[] cols = spec.factorOrder();
        boolean intercept = !variant.absorbs;
        int count = p + (intercept ? 1 : 0);
        double[][] levelGradient = new double[count][levels];
        double[][] columnGradient = new double[count][p];
        for (int j = 0; j < p; j++) {
            columnGradient[j][j] = 1;
        }
        double interceptValue = Double.NaN;
        if (intercept) {
            // the intercept of the columns as recorded: alpha - sum_j b_j m_j, m_j the mean the rows were centred on
            levelGradient[p][0] = 1;
            interceptValue = irls.alpha[0];
            for (int j = 0; j < p; j++) {
                double m = variant.levelShift[0][cols[j]] + mom.levelMeanOffset[0][cols[j]];
                columnGradient[p][j] = irls.kept[j] ? -m : 0;
                interceptValue -= irls.beta[j] * m;
            }
        }
        double[] variance = covariance.variances(irls, spec.errors(), levelGradient, columnGradient, count);
        if (variance == null) {
            variance = new double[count];
            java.util.Arrays.fill(variance, Double.NaN);
        }
        double df = Double.POSITIVE_INFINITY;
        double critical = Distributions.critical(df, 1 - confidence);
        List<FullFit.Coefficient> out = new ArrayList<>();
        if (intercept) {
            out.add(EveryCoefficient.coefficient("(intercept)", "intercept", interceptValue, Math.sqrt(variance[p]), df,
                    critical));
        }
        for (int j = 0; j < p; j++) {
            if (!irls.kept[j]) {
                continue;
            }
            boolean isKey = j == p - 1;
            String term = isKey ? keyTerm : variant.layout.columnName(cols[j]);
            out.add(EveryCoefficient.coefficient(term, isKey ? "key" : "control", irls.beta[j], Math.sqrt(variance[j]),
                    df, critical));
        }
        return new FullFit(out, spec.errors().label(), df, rows.n, levels + irls.keptCount,
                variant.absorbs ? variant.absorbColumn : "", variant.absorbs ? levels : 0,
                EveryCoefficient.dimensions(variant), covariance.clusters,
                check.r2(), Double.NaN, Double.NaN, check.modelPValue(), "ok", check.note());
    }
}
