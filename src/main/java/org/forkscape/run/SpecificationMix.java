package org.forkscape.run;

import java.util.HashMap;
import java.util.HashSet;
import java.util.Map;
import java.util.Set;
import java.util.SplittableRandom;
import org.forkscape.fit.ClusterComponents;
import org.forkscape.fit.SpecificationModel;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.SpecificationSpace;

/**
 * A plan's mix of specifications, learnt from all of them or a seeded random sample: per data variant how
 * many it fits, how many with robust errors of each route, and which sets of usable rows (the variables that
 * can be missing) they ask for; the mean and largest number of coefficients; the number of factors.
 */
final class SpecificationMix {
    /**
     * Specifications decoded: all of them, or a seeded random sample of this many (an evenly spaced one
     * would alias with the mixed radix).
     */
    private static final int PROFILE = 4096;

    final Map<Integer, Variant> variants = new HashMap<>();
    double meanColumns;
    int maxColumns;
    int factors;

    static final class Variant {
        long specifications;
        long hc;
        long robust;
        long seen;
        long hcSeen;
        /** HC2 and HC3 specifications (scaled to the run, and sampled), and the missing masks they use. */
        long leverage;
        long leverageSeen;
        final Set<Long> masks = new HashSet<>();
        final Set<Long> hcMasks = new HashSet<>();
        final Set<Long> leverageMasks = new HashSet<>();
        final Map<String, Long> clusterSpecifications = new HashMap<>();
        final Map<String, Long> clusterSeen = new HashMap<>();
        final Map<String, Set<Long>> clusterMasks = new HashMap<>();
    }

    /**
     * Usable row sets among some specifications: those the sample met when it met each about twice or
     * more (it has then found nearly all), else as many as the specifications and the variables that
     * can be missing allow.
     *
     * @param seenSets       the sets the sample met
     * @param seen           sampled specifications behind them
     * @param specifications the run's specifications they stand for
     */
    static long usableSets(Set<Long> seenSets, long seen, long specifications, int maxSets) {
        if (seenSets == null || seenSets.isEmpty()) {
            return 0;
        }
        if (2L * seenSets.size() <= seen) {
            return seenSets.size();
        }
        return Math.max(seenSets.size(), Math.min(specifications, maxSets));
    }

    Variant variant(int v) {
        return variants.getOrDefault(v, new Variant());
    }

    static SpecificationMix of(SpecificationModels models, long fitted, long missingBits) {
        SpecificationSpace space = models.space();
        SpecificationMix p = new SpecificationMix();
        for (Decision d : space.decisions()) {
            p.factors += d instanceof Decision.Controls c && c.allSubsets() ? c.optional().size() : 1;
        }
        long size = space.size();
        boolean every = size <= PROFILE;
        int count = (int) (every ? size : PROFILE);
        SplittableRandom random = new SplittableRandom(PROFILE);
        long[] choices = new long[space.decisionCount()];
        double columns = 0;
        for (int i = 0; i < count; i++) {
            space.decode(every ? i : random.nextLong(size), choices);
            int ordinal = models.variantOrdinal(choices);
            SpecificationModel m = models.model(choices);
            Variant v = p.variants.computeIfAbsent(ordinal, k -> new Variant());
            v.seen++;
            long mask = m.variableMask() & missingBits;
            v.masks.add(mask);
            columns += m.controlColumns().length + 1;
            p.maxColumns = Math.max(p.maxColumns, m.controlColumns().length + 1);
            // the sandwich structures counted below are least squares'; a generalized linear model reads rows
            switch (m.family().leastSquares() ? m.errors().kind() : ErrorType.Kind.CLASSICAL) {
                case HC0, HC1 -> {
                    v.hc++;
                    v.hcSeen++;
                    v.robust++;
                    v.hcMasks.add(mask);
                }
                case HC2, HC3 -> {
                    v.robust++;
                    v.leverage++;
                    v.leverageSeen++;
                    v.leverageMasks.add(mask);
                }
                case CLUSTER -> {
                    v.robust++;
                    for (ClusterComponents.Component c : ClusterComponents.of(m.errors())) {
                        v.clusterSpecifications.merge(c.key(), 1L, Long::sum);
                        v.clusterSeen.merge(c.key(), 1L, Long::sum);
                        v.clusterMasks.computeIfAbsent(c.key(), k -> new HashSet<>()).add(mask);
                    }
                }
                default -> {
                }
            }
        }
        p.meanColumns = columns / Math.max(1, count);
        double scale = (double) fitted / Math.max(1, count);
        for (Variant v : p.variants.values()) {
            v.specifications = Math.round(v.seen * scale);
            v.hc = Math.round(v.hc * scale);
            v.robust = Math.round(v.robust * scale);
            v.leverage = Math.round(v.leverage * scale);
            v.clusterSpecifications.replaceAll((k, c) -> Math.round(c * scale));
        }
        return p;
    }
}
