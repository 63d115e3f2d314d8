package org.forkscape.fit;

import java.io.Serializable;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;

/**
 * One pass of a generalized linear fit over the rows of a variant held in parts, as the driver asks it of
 * every part ({@link VariantByParts#glmPassSums}): which rows (the usable missing patterns), their columns
 * in within coordinates (the level offsets of the driver's statistics), each level's place among the levels
 * the specification's rows hold, and what to sum there. Every answer is a vector of sums that add part by
 * part ({@link #layout}), so the driver merges the parts in part order and reads the whole's sums, which
 * are those one machine sums from the rows (to rounding). Small: O(levels p + p^2) doubles, independent of
 * the rows. Immutable once made.
 */
public final class GlmPassRequest implements Serializable {
    private static final long serialVersionUID = 1L;

    /** What a pass sums. */
    enum Kind {
        /**
         * Per level the outcome's sum and the rows (the cold start), the same weighted with y log y and the
         * saturated log-likelihood (the null model), and the rows whose key value is not 0 or 1.
         */
        START,
        /** At a point: the deviance, the rows at the boundary, the information's and the score's sums ({@link Irls}). */
        EVALUATE,
        /** At the estimate: the average marginal effect's sums and its gradient's ({@link GeneralizedLinear}). */
        MARGINS,
        /** At the estimate: the sandwich's meat, or its per-cluster score sums ({@link GlmCovariance}). */
        MEAT,
        /**
         * At a point: the triangular factor of the weighted within design W^1/2 (X - M) over the columns
         * asked ({@link #kept}; M the driver's weighted level means {@link #levelMean}), where the fit factors
         * its information by QR ({@link Irls#ORTHOGONAL_BELOW_SHARE}). The parts' factors are stacked and
         * factored again, not added ({@link #stacked}).
         */
        ORTHOGONAL
    }

    /**
     * What every pass of one specification shares: its rows and columns, and for cluster errors each
     * component of the error type ({@link ClusterComponents#of}; one for one-way errors, none otherwise): its
     * key, its clusters in the variant, and for an intersection of columns the whole table's key of each of
     * them (ascending, so that a part numbers the clusters it holds as the variant does; null for one column,
     * whose codes are the same on every part).
     */
    record Rows(long[] usableMasks, int[] columns, int outcome, double[][] offsets, int[] compactLevel,
            int levels, String[] clusterKeys, int[] clusterCounts, long[][] intersectionKeys)
            implements Serializable {
    }

    final Kind kind;
    final Rows rows;
    /** The model by name: its {@link GlmFamily} is one of three shared instances, not sent. */
    private final ModelFamily model;
    final double[] alpha;
    final double[] beta;
    // MARGINS
    final boolean twoValued;
    // MEAT: the combinations c = I^-1 g over the columns and the levels, and the information for leverages
    final double[][] along;
    final double[][] alongLevels;
    final ErrorType.Kind errorKind;
    final double[] levelWeight;
    final double[] levelMean;
    final double[] factor;
    final boolean[] kept;

    private GlmPassRequest(Kind kind, Rows rows, GlmFamily family, double[] alpha, double[] beta, boolean twoValued,
            double[][] along, double[][] alongLevels, ErrorType.Kind errorKind, double[] levelWeight,
            double[] levelMean, double[] factor, boolean[] kept) {
        this.kind = kind;
        this.rows = rows;
        this.model = family == GlmFamily.LOGIT ? ModelFamily.LOGIT : family == GlmFamily.PROBIT ? ModelFamily.PROBIT
                : ModelFamily.POISSON;
        this.alpha = alpha;
        this.beta = beta;
        this.twoValued = twoValued;
        this.along = along;
        this.alongLevels = alongLevels;
        this.errorKind = errorKind;
        this.levelWeight = levelWeight;
        this.levelMean = levelMean;
        this.factor = factor;
        this.kept = kept;
    }

    static GlmPassRequest start(Rows rows, GlmFamily family) {
        return new GlmPassRequest(Kind.START, rows, family, null, null, false, null, null, null, null, null, null,
                null);
    }

    static GlmPassRequest evaluate(Rows rows, GlmFamily family, double[] alpha, double[] beta) {
        return new GlmPassRequest(Kind.EVALUATE, rows, family, alpha.clone(), beta.clone(), false, null, null, null,
                null, null, null, null);
    }

    static GlmPassRequest margins(Rows rows, GlmFamily family, double[] alpha, double[] beta, boolean twoValued) {
        return new GlmPassRequest(Kind.MARGINS, rows, family, alpha.clone(), beta.clone(), twoValued, null, null,
                null, null, null, null, null);
    }

    static GlmPassRequest meat(Rows rows, GlmFamily family, double[] alpha, double[] beta, double[][] along,
            double[][] alongLevels, ErrorType.Kind errorKind, double[] levelWeight, double[] levelMean,
            double[] factor, boolean[] kept) {
        return new GlmPassRequest(Kind.MEAT, rows, family, alpha.clone(), beta.clone(), false, along, alongLevels,
                errorKind, levelWeight, levelMean, factor, kept);
    }

    /**
     * At {@code alpha}, {@code beta}: the triangular factor of the part's rows of W^1/2 (X - M) over the
     * columns {@code considered} (the others read as 0), M = {@code levelMean}.
     */
    static GlmPassRequest orthogonal(Rows rows, GlmFamily family, double[] alpha, double[] beta,
            double[] levelMean, boolean[] considered) {
        return new GlmPassRequest(Kind.ORTHOGONAL, rows, family, alpha.clone(), beta.clone(), false, null, null,
                null, null, levelMean.clone(), null, considered.clone());
    }

    /** Whether the parts' answers are merged by stacking their factors (the tall-skinny QR) instead of adding. */
    boolean stacked() {
        return kind == Kind.ORTHOGONAL;
    }

    GlmFamily family() {
        return GlmFamily.of(model);
    }

    /**
     * The length of this pass's sums: START 4 L + 3 ({@link Irls#outcomeSums}, then
     * {@link GlmLikelihoods#nullSums}, then the key values other than 0 and 1), EVALUATE
     * 2 + 2 L + L p + p^2 + p (deviance, rows at the boundary, per level the weight, the score, the weighted
     * column sums; the cross-products, the columns' score), MARGINS 2 + L + p (the effect's sum, the rows'
     * weight, the gradient over levels and columns), MEAT m without clusters (one meat per combination),
     * m G + G per component of the cluster error type with them (each combination's score sum per cluster,
     * then per cluster the parts holding rows of it, so that a cluster seen anywhere counts), the components
     * one after the other; ORTHOGONAL p^2 (an upper triangular p x p factor, row-major, rows of zeros below
     * a part's rank): L levels, p columns, m combinations, G the component's clusters.
     */
    int layout() {
        int l = rows.levels;
        int p = rows.columns.length;
        return switch (kind) {
            case START -> 4 * l + 3;
            case EVALUATE -> 2 + 2 * l + l * p + p * p + p;
            case MARGINS -> 2 + l + p;
            case MEAT -> {
                if (rows.clusterKeys.length == 0) {
                    yield along.length;
                }
                int length = 0;
                for (int g : rows.clusterCounts) {
                    length += (along.length + 1) * g;
                }
                yield length;
            }
            case ORTHOGONAL -> p * p;
        };
    }
}
