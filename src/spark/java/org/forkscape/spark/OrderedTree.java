package org.forkscape.spark;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.Iterator;
import java.util.List;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.forkscape.fit.VariantParts.Merge;
import scala.Tuple2;

/**
 * A tree reduction whose additions happen in a fixed order: each partition's value is tagged with the
 * partition's index, and each level of the tree merges up to {@link #FAN_IN} neighbours in index order. Spark's
 * own treeAggregate merges partial results in the order they arrive, so floating-point sums could differ
 * from one run to the next; here the same partitioning gives the same bits every time. Each level is one
 * small shuffle of partial results; the rows themselves never move.
 */
final class OrderedTree {
    /** Partial results merged by one task per level. */
    static final int FAN_IN = 8;

    private OrderedTree() {
    }

    /** The merge of every element of {@code values} (one per partition), in partition order. */
    static <T> T reduce(JavaRDD<T> values, Merge<T> merge) {
        JavaPairRDD<Long, T> level = values.mapPartitionsWithIndex((Integer index, Iterator<T> it) -> {
            T acc = null;
            while (it.hasNext()) {
                T next = it.next();
                acc = acc == null ? next : merge.apply(acc, next);
            }
            List<Tuple2<Long, T>> out = new ArrayList<>();
            if (acc != null) {
                out.add(new Tuple2<>((long) index, acc));
            }
            return out.iterator();
        }, true).mapToPair(t -> t);
        long width = values.getNumPartitions();
        while (width > FAN_IN) {
            long groups = (width + FAN_IN - 1) / FAN_IN;
            level = level.mapToPair(t -> new Tuple2<>(t._1 / FAN_IN, t)).groupByKey((int) groups)
                    .mapValues(members -> mergeInOrder(members, merge)).mapToPair(t -> t);
            width = groups;
        }
        List<Tuple2<Long, T>> last = new ArrayList<>(level.collect());
        return mergeInOrder(last, merge);
    }

    private static <T> T mergeInOrder(Iterable<Tuple2<Long, T>> members, Merge<T> merge) {
        List<Tuple2<Long, T>> sorted = new ArrayList<>();
        members.forEach(sorted::add);
        sorted.sort(Comparator.comparing(Tuple2::_1));
        T acc = null;
        for (Tuple2<Long, T> m : sorted) {
            acc = acc == null ? m._2 : merge.apply(acc, m._2);
        }
        return acc;
    }
}
