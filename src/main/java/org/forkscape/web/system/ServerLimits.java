package org.forkscape.web.system;

import org.forkscape.data.Table;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.MemoryEstimate;

/**
 * What one run may ask of this server, whatever its plan says: each limit is a setting under
 * {@code forkscape.runs.*}, and a plan beyond one is refused before anything is fitted, with the number,
 * the limit, the setting's name and the way out.
 *
 * @param maxSpecifications specifications one run may fit
 * @param maxNullDraws      null draws one run may ask for
 * @param maxMemory         bytes one run's memory estimate may reach
 * @param threads           fitting threads per run (the estimate depends on them)
 */
public record ServerLimits(long maxSpecifications, int maxNullDraws, long maxMemory, int threads) {
    /**
     * The share of the Java heap the runs computing at once may take by default: the rest holds the
     * analyses' tables, the explorer's cached runs and the server itself (common practice, no source).
     */
    public static final double HEAP_SHARE = 0.6;

    public static ServerLimits of(ForkscapeSettings.Runs runs) {
        long memory = runs.maxMemory() == null ? 0 : runs.maxMemory().toBytes();
        if (memory <= 0) {
            memory = (long) (Runtime.getRuntime().maxMemory() * HEAP_SHARE / Math.max(1, runs.concurrent()));
        }
        return new ServerLimits(runs.maxSpecifications(), runs.maxNullDraws(), memory, runs.fittingThreads());
    }

    /**
     * Refuses a plan (already checked against its table and its own cap) that asks for more than this
     * server gives one run.
     *
     * @throws org.forkscape.InputException at the plan key concerned ({@code ""} for the memory, which is the
     *                                      whole plan's)
     */
    public void check(Plan plan, Table table) {
        long all = new SpecificationSpace(plan).size();
        if (plan.sampleSize() > 0 && Math.min(plan.sampleSize(), all) > maxSpecifications) {
            throw new PlanException("sample", String.format("a sample of %,d specifications is above this server's "
                    + "limit of %,d per run (setting forkscape.runs.max-specifications); ask for a smaller sample",
                    Math.min(plan.sampleSize(), all), maxSpecifications));
        }
        if (plan.sampleSize() <= 0 && all > maxSpecifications) {
            throw new PlanException("decisions", String.format("the plan has %,d specifications, above this server's "
                    + "limit of %,d per run (setting forkscape.runs.max-specifications); fit a seeded random sample "
                    + "instead (%s)", all, maxSpecifications, FormFields.SAMPLE));
        }
        if (plan.nullDraws() > maxNullDraws) {
            throw new PlanException("nullDraws", String.format("%,d null draws are above this server's limit of %,d "
                    + "per run (setting forkscape.runs.max-null-draws); ask for fewer", plan.nullDraws(), maxNullDraws));
        }
        NullDrawSettings.of(plan).check(plan, Integer.MAX_VALUE, "nullDraws", "nullCluster");
        MemoryEstimate.of(plan, table, threads).refuseAbove(maxMemory, "fit a seeded random sample of the "
                + "specifications (" + FormFields.SAMPLE + "), or have this server's limit raised (setting "
                + "forkscape.runs.max-memory, and its Java heap with -Xmx)");
    }
}
