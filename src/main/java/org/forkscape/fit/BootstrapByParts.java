package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;

/**
 * Poisson bootstrap draws of variants whose rows are held in parts ({@link VariantParts}, the partitions of
 * a data set on a cluster): each part computes its rows' counts in a draw from their identities
 * ({@link BootstrapDesign}, {@link PoissonCounts}), so a draw is the same whatever the partitioning, and sums
 * the statistics of its rows repeated by those counts ({@link VariantByParts#inDraw}); the parts' sums are
 * reduced in part order, as the observed variant's are, and each draw's variant is solved by the engine's own
 * estimator like any variant without rows. One reduction computes several draws
 * ({@link #drawsPerPass}), one after another on each part, so that a part holds one draw's copy of its rows
 * at a time and the statistics of at most {@link #MAX_DRAWS_PER_PASS} draws, at most
 * {@link #BYTES_PER_PASS} bytes of them as the observed variant's statistics measure.
 */
public final class BootstrapByParts {
    /** Statistics one pass may hold per part: 64 MiB, well within an executor's memory for a few tasks. */
    static final long BYTES_PER_PASS = 64L << 20;
    /** Draws per pass at most, so that a pass over a small variant stays short enough to cancel and report. */
    static final int MAX_DRAWS_PER_PASS = 64;

    private final VariantByParts whole;
    private final VariantParts parts;
    private final BootstrapDesign design;
    /** The error cluster columns nested in the resampled units, found on first use ({@link #keptWhole}). */
    private String[] renewed;

    /**
     * @param whole the instance that decides (over the columns with no rows)
     * @param parts the parts, each built with its rows' identities
     */
    public BootstrapByParts(VariantByParts whole, VariantParts parts, BootstrapDesign design) {
        this.whole = whole;
        this.parts = parts;
        this.design = design;
    }

    public BootstrapDesign design() {
        return design;
    }

    /**
     * The error cluster columns whose every cluster lies within one resampled unit, so that a draw keeps
     * them whole and makes each drawn copy of them a new cluster: the resampled column itself, and each other
     * column nested in it over the whole table (one pass over the parts per column, on first use; one machine
     * asks the same of each variant's rows, which gives the same answer unless a sample rule removes every row
     * that puts a cluster in two units), and the intersections of cluster columns a multi-way error type needs
     * that are nested so (by their {@link ClusterComponents} keys). None when single rows are drawn.
     */
    public synchronized List<String> keptWhole() {
        if (renewed == null) {
            List<String> out = new ArrayList<>();
            String resampled = design.resampledColumn();
            BootstrapDesign d = design;
            for (String column : resampled == null ? List.<String>of() : whole.clusterColumnNames()) {
                if (column.equals(resampled)) {
                    out.add(column);
                    continue;
                }
                ClusterNesting n = parts.reduce(part -> part.nesting(column, d), ClusterNesting::merge);
                if (n == null || n.nested()) {
                    out.add(column);
                }
            }
            // an intersection of cluster columns (a multi-way error type's component) is nested when one of
            // its columns is, and otherwise when each combination of their values lies within one unit
            for (ClusterComponents.Component c : resampled == null ? List.<ClusterComponents.Component>of()
                    : whole.clusterIntersections()) {
                List<String> columns = c.columns();
                boolean nested = columns.stream().anyMatch(out::contains);
                if (!nested) {
                    ClusterNesting n = parts.reduce(part -> part.nesting(columns, d), ClusterNesting::merge);
                    nested = n == null || n.nested();
                }
                if (nested) {
                    out.add(c.key());
                }
            }
            renewed = out.toArray(new String[0]);
        }
        return List.of(renewed);
    }

    /** How many draws of {@code observed}'s variant one pass over the parts computes (at least 1). */
    public int drawsPerPass(DataVariant observed) {
        long bytes = Math.max(1, 8 * statisticsDoubles(observed));
        return (int) Math.max(1, Math.min(MAX_DRAWS_PER_PASS, BYTES_PER_PASS / bytes));
    }

    /**
     * The variant {@code key} in draws {@code from} to {@code to - 1} (0-based), in one pass over the parts.
     *
     * @param observed the observed variant, built from the same parts ({@link VariantByParts#build})
     */
    public DataVariant[] draws(VariantKey key, DataVariant observed, int from, int to) {
        WholeRows facts = observed.partsFacts;
        if (facts == null) {
            throw new IllegalStateException("the observed variant was not built from parts");
        }
        boolean tensors = whole.wantsTensors(key);
        BootstrapDesign d = design;
        String[] kept = keptWhole().toArray(new String[0]);
        PartialStatistics[] sums = parts.reduce(part -> part.bootstrapStatistics(key, facts, tensors, d, kept, from,
                to), VariantByParts::addEach);
        DataVariant[] out = new DataVariant[to - from];
        for (int b = 0; b < out.length; b++) {
            out[b] = whole.drawVariant(key, facts, sums[b], inDraw(parts, d, kept, from + b), observed,
                    java.util.Set.of(kept));
        }
        return out;
    }

    /** The parts as they are in draw {@code draw}, for the QR refits of that draw (one pass each). */
    private static VariantParts inDraw(VariantParts parts, BootstrapDesign design, String[] renewed, int draw) {
        return new VariantParts() {
            @Override
            public <T> T reduce(PartFunction<T> f, Merge<T> merge) {
                return parts.reduce(part -> f.apply(part.inDraw(design, draw, renewed)), merge);
            }

            @Override
            public double[] quantiles(PartFunction<double[]> values, double low, double high) {
                throw new IllegalStateException("a draw codes its rows with the observed quantiles");
            }
        };
    }

    /** The doubles in one draw's statistics, as the observed variant's measure them. */
    static long statisticsDoubles(DataVariant v) {
        int p = v.columns;
        long cells = 0;
        for (int[] byLevel : v.cellCount) {
            for (int n : byLevel) {
                if (n > 0) {
                    cells++;
                }
            }
        }
        long doubles = cells * (p + (long) p * p);
        if (v.useFourthMoments) {
            doubles += (long) v.groupCount() * (FourthMoments.distinctFourth(p) + FourthMoments.distinctThird(p));
        }
        for (String column : v.clusterCounts.keySet()) {
            if (v.usesClusterMoments(column)) {
                doubles += v.clusterMoments(column).cells().size() * (p + (long) p * p);
            }
        }
        return doubles;
    }
}
