package org.forkscape.run;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.forkscape.InputException;
import org.forkscape.data.Column;
import org.forkscape.data.Table;
import org.forkscape.fit.ClusterComponents;
import org.forkscape.fit.LevelCodes;
import org.forkscape.fit.MemoryFootprint;
import org.forkscape.fit.ModelColumns;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.fit.VariantKey;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;

/**
 * The memory a run will need at its peak, estimated from the plan and the table before any work, so that a
 * run too large for the machine is refused with the estimate and the limit instead of failing halfway.
 *
 * <p>A run has two phases that hold different things beside the result table. While fitting, the runner
 * keeps one data variant at a time: its columns and cross-products, the cached moments of each set of
 * usable rows, the fourth-moment tensors and per-cluster cells when the sandwich routes would build them,
 * and each worker's row buffers (every worker is taken to refit some specification by QR, as a collinear
 * control makes it do). Afterwards the inference stage rebuilds every data variant at once and keeps a
 * model per fitted specification, and each null-draw worker keeps a resampled copy of every variant, each
 * with row buffers of its own; beside two absorbed columns a worker also holds one draw's rows at a time as a
 * variant of its own, with their demeaned rows and leverages (taken to be as many rows as the table's). The estimate is the larger phase, each part counted from its arrays
 * ({@link MemoryFootprint}); a variant is counted with all the table's rows (sample rules only remove
 * rows). The missing-pattern groups and fixed-effect and cluster cells are counted in the table, and how
 * many usable row sets and robust-error specifications each variant has from a seeded sample of the
 * plan's specifications.
 */
public final class MemoryEstimate {
    /**
     * The share of the Java heap one run may take by default: the rest is left for the table, the
     * program and the collector's headroom (common practice, no source).
     */
    public static final double DEFAULT_HEAP_SHARE = 0.8;
    /** Results per fitted specification: the columns of {@link ResultTable}. */
    private static final long RESULT_BYTES = 64;
    /** With a random sample each result also keeps its specification number. */
    private static final long SAMPLED_RESULT_BYTES = 72;
    /** The generalized linear models' own result columns: effect, its error, the likelihood-ratio p, the model. */
    private static final long GENERALIZED_RESULT_BYTES = 25;
    /** The runner's per-specification arrays: the specification numbers, each one's variant and its slot. */
    private static final long RUNNER_BYTES = 16;
    /** A sampled specification number while the sample is drawn (a boxed long in a hash set). */
    private static final long SAMPLING_BYTES = 72;
    /**
     * Beyond a long, a sampled specification number while the sample is drawn, besides its magnitude's
     * bytes: a BigInteger (header, fields and array header) in a hash set's node and table, and in the
     * array that sorts them.
     */
    private static final long BIG_SAMPLING_BYTES = 120;
    /**
     * The inference stage's per-specification objects and arrays besides the factor columns: a model with
     * its control list, slot indices, and the estimates, p-values, sizes and weights of its summaries.
     */
    private static final long INFERENCE_BYTES = 140;
    /** Per null-draw worker and fitted specification: estimates, errors, df and scratch of one draw. */
    private static final long DRAW_WORKER_BYTES = 32;
    /** Per null-draw worker and data row: its weights, unit draws and order. */
    private static final long DRAW_ROW_BYTES = 12;
    /**
     * Per null-draw worker and fitted specification, the curves' arrays: p-values and normal scores, and the
     * curves' values, estimates, p-values, normal scores and sorted values (doubles) and the curve order (an int).
     */
    private static final long DRAW_CURVE_WORKER_BYTES = 60;
    /**
     * Per draw and curve (infer.ScaleCurves), besides its values at the kept ranks: the curve's record, its
     * statistics record and the array's header.
     */
    private static final long DRAW_CURVE_BYTES = 96;
    /** Rank positions a curve keeps per draw at most (infer.ScaleCurves.MAX_RANKS). */
    private static final long DRAW_CURVE_RANKS = 200;

    private final long bytes;
    private final Map<String, Long> parts;

    private MemoryEstimate(long bytes, Map<String, Long> parts) {
        this.bytes = bytes;
        this.parts = parts;
    }

    /** The bytes at the run's peak. */
    public long bytes() {
        return bytes;
    }

    /** What the peak is made of: a description of each part and its bytes, largest first. */
    public Map<String, Long> parts() {
        return parts;
    }

    /** {@link #DEFAULT_HEAP_SHARE} of the largest heap this Java process may use. */
    public static long defaultLimit() {
        return (long) (Runtime.getRuntime().maxMemory() * DEFAULT_HEAP_SHARE);
    }

    /**
     * Refuses the run when the estimate is above {@code limit}.
     *
     * @param wayOut what the user can do through this door, as the end of the sentence
     * @throws InputException with the estimate, its largest part, the limit and the way out
     */
    public void refuseAbove(long limit, String wayOut) {
        if (bytes <= limit) {
            return;
        }
        Map.Entry<String, Long> largest = parts.entrySet().iterator().next();
        throw new InputException("", "this run would need about " + format(bytes) + " of memory (the largest part, "
                + format(largest.getValue()) + ", for " + largest.getKey() + "), above the limit of " + format(limit)
                + "; " + wayOut);
    }

    /** Bytes in binary units as people read them: 512 KB, 37 MB, 1.4 GB. */
    public static String format(long bytes) {
        double kb = bytes / 1024.0;
        double mb = kb / 1024;
        double gb = mb / 1024;
        if (gb >= 1) {
            return String.format(Locale.ROOT, "%.1f GB", gb);
        }
        if (mb >= 1) {
            return String.format(Locale.ROOT, "%.0f MB", mb);
        }
        return String.format(Locale.ROOT, "%.0f KB", Math.max(1, kb));
    }

    /**
     * Estimates a run of a plan that passed {@code PlanChecker.check} and the specification cap.
     *
     * @param threads the run's worker threads
     */
    public static MemoryEstimate of(Plan plan, Table table, int threads) {
        SpecificationModels models = new SpecificationModels(plan, table);
        ModelColumns layout = models.layout();
        long inPlan = models.space().size();
        boolean beyondLong = models.space().beyondLong();
        long fitted = plan.sampleSize() > 0 ? Math.min(plan.sampleSize(), inPlan) : inPlan;
        boolean sampled = fitted < inPlan;
        int rows = table.rowCount();
        int columns = layout.size();
        int workers = Math.max(1, threads);

        Column[] variables = variableColumns(plan, table, layout);
        long missingBits = 0;
        for (int v = 0; v < variables.length; v++) {
            if (anyMissing(variables[v])) {
                missingBits |= 1L << v;
            }
        }
        RowCells cells = new RowCells(table, variables, missingBits);
        Map<String, int[]> clusterCodes = new LinkedHashMap<>();
        int clusterParts = 0;
        for (Decision.Errors e : plan.all(Decision.Errors.class)) {
            for (ErrorType t : e.alternatives()) {
                if (t.kind() == ErrorType.Kind.CLUSTER) {
                    clusterParts = Math.max(clusterParts, ClusterComponents.of(t).size());
                    for (ClusterComponents.Component c : ClusterComponents.of(t)) {
                        clusterCodes.computeIfAbsent(c.key(), k -> ClusterComponents.codes(table, c.columns()));
                    }
                }
            }
        }
        SpecificationMix profile = SpecificationMix.of(models, fitted, missingBits);
        int maxUsableSets = Long.bitCount(missingBits) >= 30 ? Integer.MAX_VALUE : 1 << Long.bitCount(missingBits);
        // the QR refit buffers of least squares; a plan of generalized linear models alone never fills them
        boolean leastSquares = plan.modelFamilies().stream().anyMatch(ModelFamily::leastSquares);
        long fitterRows = leastSquares ? workers * MemoryFootprint.fitterRows(rows, profile.maxColumns + 1) : 0;
        boolean generalized = plan.generalized();
        long recorded = generalized ? MemoryFootprint.recordedColumns(rows,
                plan.outcome().alternatives().size() + plan.predictor().alternatives().size()) : 0;

        long largestVariant = 0;
        Map<String, Long> largestVariantParts = Map.of();
        long allVariants = 0;
        long drawCopies = 0;
        long drawnRows = 0;
        boolean permute = plan.nullMethod().equals("permute");
        int predictors = plan.predictor().alternatives().size();
        for (int v = 0; v < models.variantCount(); v++) {
            SpecificationMix.Variant pv = profile.variant(v);
            if (pv.specifications == 0) {
                continue;
            }
            List<String> absorbedColumns = absorbedColumns(plan, models.variantKey(v));
            boolean several = absorbedColumns.size() > 1;
            String absorbed = absorbedColumns.isEmpty() ? null : absorbedColumns.get(0);
            // a weighted variant's fourth moments also keep w^2-weighted lower orders (fit.FourthMoments)
            boolean weighted = weighted(plan, models.variantKey(v));
            // several absorbed columns: one cell level, and the demeaned rows of each usable set instead
            int[] levelCodes = absorbed == null || several ? null : LevelCodes.of(table.column(absorbed));
            int levels = levelCodes == null ? 1 : Math.max(1, count(levelCodes));
            long variantCells = cells.distinct(levelCodes, null);
            long base = MemoryFootprint.variant(rows, columns, variantCells, levels, clusterCodes.size()) + recorded;
            // at most every specification of the variant a generalized linear fit, each keeping its start
            long starts = generalized ? pv.specifications * MemoryFootprint.glmStart(profile.maxColumns + 1, levels)
                    : 0;
            long glmFitters = generalized
                    ? workers * (MemoryFootprint.glmFitter(rows, profile.maxColumns + 1, levels, clusterParts)
                            + (several ? MemoryFootprint.severalEffectsGlmFitter(rows, profile.maxColumns + 1,
                                    absorbedColumns.size()) : 0))
                    : 0;
            allVariants += base + starts;
            long usable = SpecificationMix.usableSets(pv.masks, pv.seen, pv.specifications, maxUsableSets);
            long moments = usable * MemoryFootprint.moments(columns, levels, pv.robust > 0 ? rows : 0)
                    + workers * MemoryFootprint.momentsBuild(columns, levels)
                    + (several ? MemoryFootprint.demeanedRows(rows, columns, usable, workers) : 0);
            long leverages = 0;
            long drawnLeverages = 0;
            int outsideLargest = 0;
            if (absorbedColumns.size() > 2) {
                // three or more: each worker building a usable set holds its exact rank's workspace
                int most = 0;
                for (String column : absorbedColumns) {
                    int levelsHere = count(LevelCodes.of(table.column(column)));
                    outsideLargest += levelsHere;
                    most = Math.max(most, levelsHere);
                }
                outsideLargest -= most;
                moments += Math.min(workers, usable) * MemoryFootprint.exactRank(rows, outsideLargest);
            }
            if (several && pv.leverageSeen > 0) {
                // HC2 and HC3: the dummies' leverages of each usable set they use
                long leverageSets = SpecificationMix.usableSets(pv.leverageMasks, pv.leverageSeen, pv.leverage,
                        maxUsableSets);
                if (absorbedColumns.size() > 2) {
                    leverages = MemoryFootprint.severalLeverages(rows, outsideLargest, leverageSets, workers);
                    drawnLeverages = MemoryFootprint.severalLeverages(rows, outsideLargest, leverageSets, 1);
                } else {
                    int first = count(LevelCodes.of(table.column(absorbedColumns.get(0))));
                    int second = count(LevelCodes.of(table.column(absorbedColumns.get(1))));
                    leverages = MemoryFootprint.crossedLeverages(rows, Math.max(first, second),
                            Math.min(first, second), leverageSets, workers);
                    drawnLeverages = MemoryFootprint.crossedLeverages(rows, Math.max(first, second),
                            Math.min(first, second), leverageSets, 1);
                }
            }
            long fourth = 0;
            if (absorbed == null && MemoryFootprint.fourthMomentsPay(rows, columns, cells.groups(), pv.hc,
                    profile.meanColumns)) {
                fourth = MemoryFootprint.fourthMomentTensors(rows, columns, cells.groups(), workers, weighted)
                        + SpecificationMix.usableSets(pv.hcMasks, pv.hcSeen, pv.hc, maxUsableSets)
                        * MemoryFootprint.fourthMoments(columns);
            }
            long clusterCells = 0;
            if (several) {
                // beside two absorbed columns: per usable set, from its demeaned rows (fit.DataVariant.expect)
                long fourthSpecifications = pv.hc;
                for (Map.Entry<String, int[]> c : clusterCodes.entrySet()) {
                    long count = pv.clusterSpecifications.getOrDefault(c.getKey(), 0L);
                    int clusters = count(c.getValue());
                    if (count == 0) {
                        continue;
                    }
                    if (largestCluster(c.getValue(), clusters) <= 1) {
                        fourthSpecifications += count;
                    } else if (MemoryFootprint.withinClusterMomentsPay(rows, columns, count, profile.meanColumns,
                            clusters)) {
                        clusterCells += MemoryFootprint.withinClusterCells(rows, columns, clusters,
                                SpecificationMix.usableSets(
                                        pv.clusterMasks.get(c.getKey()), pv.clusterSeen.getOrDefault(c.getKey(), 0L),
                                        count, maxUsableSets), workers);
                    }
                }
                if (MemoryFootprint.withinFourthMomentsPay(rows, columns, fourthSpecifications, profile.meanColumns)) {
                    fourth = MemoryFootprint.withinFourthMoments(rows, columns, usable, workers);
                }
            }
            for (Map.Entry<String, int[]> c : clusterCodes.entrySet()) {
                long count = pv.clusterSpecifications.getOrDefault(c.getKey(), 0L);
                if (count > 0 && !several && MemoryFootprint.clusterMomentsPay(rows, columns, levels, count, profile.meanColumns,
                        count(c.getValue()))) {
                    clusterCells += MemoryFootprint.clusterCells(rows, columns, cells.distinct(levelCodes, c.getValue()))
                            + SpecificationMix.usableSets(pv.clusterMasks.get(c.getKey()),
                                    pv.clusterSeen.getOrDefault(c.getKey(), 0L), count, maxUsableSets)
                            * MemoryFootprint.usableClusterCells(columns, RowCells.pairs(levelCodes, c.getValue()));
                }
            }
            Map<String, Long> variantParts = new LinkedHashMap<>();
            variantParts.put("the largest data variant's columns, cross-products and cached moments", base
                    + MemoryFootprint.variantBuild(rows, columns, variantCells, workers) + moments);
            variantParts.put("the fourth-moment tensors of the HC0/HC1 sandwich", fourth);
            variantParts.put("the absorbed columns' leverages of the HC2/HC3 sandwich", leverages);
            variantParts.put("the per-cluster cells of the cluster-robust sandwich", clusterCells);
            variantParts.put("the fitting threads' row buffers for refits by QR", fitterRows);
            variantParts.put("the generalized linear models' rows, iteration state and starts", glmFitters + starts);
            long total = sum(variantParts);
            if (total > largestVariant) {
                largestVariant = total;
                largestVariantParts = variantParts;
            }
            if (plan.nullDraws() > 0) {
                // each resampled variant keeps its own row buffers for refits by QR and robust errors
                drawCopies += MemoryFootprint.resampledVariant(rows, columns, variantCells, levels,
                        permute ? predictors : 0) + usable * (MemoryFootprint.moments(columns, levels, 0)
                        + (pv.robust > 0 ? MemoryFootprint.repeatedRows(rows) : 0))
                        + MemoryFootprint.fitterRows(rows, profile.maxColumns + 1)
                        + (generalized ? MemoryFootprint.glmFitter(rows, profile.maxColumns + 1, levels,
                                clusterParts) : 0);
                if (several) {
                    // a draw's rows as a variant of their own, demeaned again: one at a time per worker
                    drawnRows = Math.max(drawnRows, MemoryFootprint.drawnRows(rows, columns, variantCells,
                            clusterCodes.size(), usable, weighted) + drawnLeverages);
                }
            }
        }

        // beyond a long the space also keeps the sample's digits, one long per decision, for the whole run
        long results = fitted * ((sampled ? SAMPLED_RESULT_BYTES : RESULT_BYTES)
                + (generalized ? GENERALIZED_RESULT_BYTES : 0) + (beyondLong ? 8L * plan.decisions().size() : 0));
        Map<String, Long> fitting = new LinkedHashMap<>(largestVariantParts);
        fitting.put("the result table", results);
        fitting.put("the specification numbers and their variants", RUNNER_BYTES * fitted);

        Map<String, Long> inference = new LinkedHashMap<>();
        inference.put("the result table", results);
        inference.put("every data variant, which the inference stage holds at once", allVariants);
        inference.put("the inference stage's per-specification models and summaries",
                fitted * (INFERENCE_BYTES + Math.round(4 * (profile.meanColumns + profile.factors))));
        if (plan.nullDraws() > 0) {
            int drawWorkers = Math.max(1, Math.min(workers, plan.nullDraws()));
            long perWorker = (DRAW_WORKER_BYTES + DRAW_CURVE_WORKER_BYTES) * fitted + DRAW_ROW_BYTES * rows + drawCopies
                    + drawnRows;
            inference.put("the null draws' resampled copies of the variants", drawWorkers * perWorker);
            // one curve per comparable group as fitted, then the t statistic and the partial correlation
            long curves = plan.outcome().alternativeCount() * plan.predictor().alternativeCount()
                    * Math.max(1, plan.all(org.forkscape.plan.Decision.Model.class).stream()
                            .mapToLong(d -> d.alternatives().size()).max().orElse(1)) + 2;
            inference.put("the null draws' values at the kept ranks of each curve", (long) plan.nullDraws()
                    * Math.min(curves, fitted + 2) * (DRAW_CURVE_BYTES + 8 * Math.min(DRAW_CURVE_RANKS, fitted)));
        }

        Map<String, Long> drawing = new LinkedHashMap<>();
        drawing.put("the sample of specification numbers while it is drawn", !sampled ? 0
                : beyondLong ? fitted * (BIG_SAMPLING_BYTES + models.space().count().bitLength() / 8
                        + 8L * plan.decisions().size())
                : SAMPLING_BYTES * fitted);

        Map<String, Long> peak = fitting;
        for (Map<String, Long> phase : List.of(inference, drawing)) {
            if (sum(phase) > sum(peak)) {
                peak = phase;
            }
        }
        Map<String, Long> sorted = new LinkedHashMap<>();
        peak.entrySet().stream().filter(e -> e.getValue() > 0)
                .sorted(Map.Entry.<String, Long>comparingByValue().reversed())
                .forEach(e -> sorted.put(e.getKey(), e.getValue()));
        return new MemoryEstimate(sum(peak), Collections.unmodifiableMap(sorted));
    }

    private static long sum(Map<String, Long> parts) {
        return parts.values().stream().mapToLong(Long::longValue).sum();
    }

    /** The column behind each model variable, in the layout's order. */
    private static Column[] variableColumns(Plan plan, Table table, ModelColumns layout) {
        Column[] out = new Column[layout.variableCount()];
        for (int j = 0; j < plan.outcome().alternatives().size(); j++) {
            out[layout.outcomeVariable(j)] = table.column(plan.outcome().alternatives().get(j).column());
        }
        for (int j = 0; j < plan.predictor().alternatives().size(); j++) {
            out[layout.predictorVariable(j)] = table.column(plan.predictor().alternatives().get(j).column());
        }
        for (int v = 0; v < out.length; v++) {
            if (out[v] == null) {
                out[v] = table.column(layout.variables().get(v));
            }
        }
        return out;
    }

    private static boolean anyMissing(Column column) {
        for (int r = 0; r < column.size(); r++) {
            if (column.isMissing(r)) {
                return true;
            }
        }
        return false;
    }

    /** Whether a variant is weighted (its weights alternative names a column). */
    private static boolean weighted(Plan plan, VariantKey key) {
        return key.weightChoice() >= 0
                && plan.all(Decision.Weights.class).get(0).alternatives().get(key.weightChoice()).weighted();
    }

    /** The columns whose fixed effects a variant absorbs (none, one or several). */
    private static List<String> absorbedColumns(Plan plan, VariantKey key) {
        if (key.absorbChoice() < 0) {
            return List.of();
        }
        return plan.all(Decision.Absorb.class).get(0).alternatives().get(key.absorbChoice()).columns();
    }

    /** Number of codes 0..k-1 in a column of level codes (-1 missing): k. */
    /** Rows of the most frequent code, among {@code clusters} codes (-1 for missing ignored). */
    private static int largestCluster(int[] codes, int clusters) {
        int[] rows = new int[clusters];
        int largest = 0;
        for (int c : codes) {
            if (c >= 0) {
                largest = Math.max(largest, ++rows[c]);
            }
        }
        return largest;
    }

    private static int count(int[] codes) {
        int max = -1;
        for (int c : codes) {
            max = Math.max(max, c);
        }
        return max + 1;
    }
}
