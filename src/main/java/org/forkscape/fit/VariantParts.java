package org.forkscape.fit;

import java.io.Serializable;

/**
 * The parts a variant's rows are held in (the partitions of a data set on a cluster, or, in tests, slices of
 * a table), as {@link VariantByParts#build} asks them: run a computation on every part's coding and merge
 * the results in a fixed order, and take exact quantiles of values the parts give.
 */
public interface VariantParts {
    /** One part's computation on its coding; may return null. */
    interface PartFunction<T> extends Serializable {
        T apply(VariantByParts part);
    }

    /** How two parts' results become one (neither null): may modify and return the first. */
    interface Merge<T> extends Serializable {
        T apply(T a, T b);
    }

    /** One part's computation on its coding, with a value every part shares. */
    interface SharedPartFunction<S, T> extends Serializable {
        T apply(VariantByParts part, S shared);
    }

    /** Every part's result of {@code f}, merged in part order (null when every part gave null). */
    <T> T reduce(PartFunction<T> f, Merge<T> merge);

    /**
     * The same with {@code shared} handed to every part; a runner on a cluster sends it once to each machine
     * (a broadcast) rather than with every part's task.
     */
    default <S extends Serializable, T> T reduce(S shared, SharedPartFunction<S, T> f, Merge<T> merge) {
        return reduce(part -> f.apply(part, shared), merge);
    }

    /**
     * The type-7 sample quantiles (Hyndman &amp; Fan 1996, The American Statistician 50(4)) at {@code low}
     * and {@code high} of the values every part gives.
     */
    double[] quantiles(PartFunction<double[]> values, double low, double high);
}
