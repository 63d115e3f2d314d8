package org.forkscape.fit;

import java.io.Serializable;
import org.forkscape.plan.ErrorType;

/**
 * What a pass over a specification's rows held elsewhere needs to sum its HC0 to HC3 meat where the rows are
 * ({@link VariantByParts#rowPassSums}), taken from the driver's solve: the kept model columns (key last) and
 * the outcome, the coefficients b, the key row w of (X'X)^-1, the lower triangular M with (X'X)^-1 = M'M
 * (for the leverages h_i = 1/n_level + ||M x_i||^2), the usable rows' missing patterns, and per fixed-effect
 * level the offsets that turn the stored level-shifted values into within values and the level's usable row
 * count; in a weighted variant also each level's usable weight total (the leverages' w_i / W_level; the
 * offsets are then weighted level means, and the part scales its rows by sqrt(w_i) as one machine does).
 * For a cluster column, the column, whose per-cluster scores the part answers instead. Small: O(p^2 +
 * levels p) doubles, independent of the rows. Immutable once made.
 */
public final class RowPassRequest implements Serializable {
    private static final long serialVersionUID = 1L;

    final int[] kept;
    final int y;
    final double[] b;
    final double[] w;
    /** Row-major p x p, lower triangle set (read for HC2 and HC3 only). */
    final double[] m;
    /** The missing masks of the usable row groups, ascending. */
    final long[] usableMasks;
    /** Per level: the kept columns' offsets, then the outcome's. */
    final double[][] levelOffsets;
    final int[] levelCounts;
    /** Per level: the usable rows' weight total; null when the variant is unweighted. */
    final double[] levelWeights;
    final ErrorType.Kind kind;
    /** Beside two absorbed columns: the second column's effects, for the part's within values; else null. */
    final CrossedEffectsByParts.Effects crossedEffects;
    /** For a cluster error type: its cluster column (one column, whose codes are the same on every part); else null. */
    final String clusterColumn;
    /** The variant's clusters of {@link #clusterColumn} (the length of the scores a part answers); else 0. */
    final int clusters;

    private RowPassRequest(int[] kept, int y, double[] b, double[] w, double[] m, long[] usableMasks,
            double[][] levelOffsets, int[] levelCounts, double[] levelWeights, ErrorType.Kind kind,
            CrossedEffectsByParts.Effects crossedEffects, String clusterColumn, int clusters) {
        this.crossedEffects = crossedEffects;
        this.clusterColumn = clusterColumn;
        this.clusters = clusters;
        this.kept = kept;
        this.y = y;
        this.b = b;
        this.w = w;
        this.m = m;
        this.usableMasks = usableMasks;
        this.levelOffsets = levelOffsets;
        this.levelCounts = levelCounts;
        this.levelWeights = levelWeights;
        this.kind = kind;
    }

    /** The pieces of solution {@code s} of the rows of {@code mom}, outcome {@code y}, for an HC0 to HC3 meat. */
    static RowPassRequest of(Moments mom, KeySolution s, int y, ErrorType.Kind kind) {
        int p = s.p;
        int[] kept = java.util.Arrays.copyOf(s.kept, p);
        double[] w = new double[p];
        s.keyRow(w);
        double[] m = new double[p * p];
        if (kind == ErrorType.Kind.HC2 || kind == ErrorType.Kind.HC3) {
            for (int i = 0; i < p; i++) {
                for (int j = 0; j <= i; j++) {
                    m[i * p + j] = s.mAt(i, j);
                }
            }
        }
        DataVariant v = mom.variant;
        long[] masks = mom.usableGroups.stream().mapToLong(g -> v.groupMissing[g]).sorted().toArray();
        double[][] offsets = new double[mom.levelMeanOffset.length][p + 1];
        for (int l = 0; l < offsets.length; l++) {
            for (int c = 0; c < p; c++) {
                offsets[l][c] = mom.levelMeanOffset[l][kept[c]];
            }
            offsets[l][p] = mom.levelMeanOffset[l][y];
        }
        return new RowPassRequest(kept, y, java.util.Arrays.copyOf(s.b, p), w, m, masks, offsets,
                mom.levelCount.clone(), v.weighted ? mom.levelWeight.clone() : null, kind, mom.crossedEffects, null, 0);
    }

    /**
     * The same for the CR1 meat of one cluster column, {@code column}, whose codes are the same on every part:
     * each part answers its clusters' scores and which of them hold a usable row ({@link #answerLength}).
     */
    static RowPassRequest ofClusters(Moments mom, KeySolution s, int y, String column) {
        RowPassRequest r = of(mom, s, y, ErrorType.Kind.CLUSTER);
        return new RowPassRequest(r.kept, r.y, r.b, r.w, r.m, r.usableMasks, r.levelOffsets, r.levelCounts,
                r.levelWeights, r.kind, r.crossedEffects, column, mom.variant.wholeClusterCounts.get(column));
    }

    /**
     * The length of a part's answer: the meat's one sum; for a cluster column, each cluster's score sum
     * (0 where the part has no usable row of it), then whether the part has a usable row of it (1 or 0), both
     * by the variant's cluster code, so that the parts' answers add cluster by cluster.
     */
    int answerLength() {
        return clusterColumn == null ? 1 : 2 * clusters;
    }

    /** Approximate size when serialized, in bytes: what a batch of requests is bounded by. */
    long bytes() {
        long p = kept.length;
        return 64 + 4 * p + 8 * (2 * p + p * p) + 8L * usableMasks.length
                + (long) levelOffsets.length * (16 + 8 * (p + 1)) + 12L * levelCounts.length
                + (crossedEffects == null ? 0 : 8 * crossedEffects.doubles()) + 8L * (answerLength() - 1);
    }
}
