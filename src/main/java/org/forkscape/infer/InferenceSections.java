package org.forkscape.infer;

import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.UnitGroups;

/**
 * The joint-inference layer of one finished run, as the batch command writes it: the null draws (when
 * asked for), the selection-adjusted p of the best-looking specification, the extreme bounds, the
 * weights within comparable groups, the overfitting yardstick and the influence of the decisions, as
 * summary.json sections (and, in {@code by_scale}, the same per comparable group and on the unit-free scales,
 * see {@link ScaleSections}), plus the files null-draws.csv and overfitting.csv. {@link #compute} is the
 * inference stage that the batch command, and the web's run queue through its summary sections, hand to
 * {@link org.forkscape.run.RunPipeline}.
 */
public final class InferenceSections implements InferenceStage.Outcome {
    private final RunResult run;
    private final NullDrawResult nullDraws;
    private final Map<String, Object> sections;

    private InferenceSections(RunResult run, NullDrawResult nullDraws, Map<String, Object> sections) {
        this.run = run;
        this.nullDraws = nullDraws;
        this.sections = sections;
    }

    /**
     * @param settings null draws to run ({@code draws == 0} for none); checked by the caller
     * @param threads  worker threads for the null draws
     * @param progress receives null draws done / total
     * @param cancel   may be null
     */
    public static InferenceSections compute(RunResult run, NullDrawSettings settings, int threads, RunProgress progress,
            AtomicBoolean cancel) {
        int[] all = new int[run.results().size()];
        for (int i = 0; i < all.length; i++) {
            all[i] = i;
        }
        RunVariants variants = RunVariants.of(run, all);
        NullDrawResult draws = settings.draws() > 0 ? NullDraws.run(variants, settings, threads, progress, cancel) : null;
        Map<String, Object> m = new LinkedHashMap<>();
        if (draws != null) {
            m.put("null", draws.toJson());
        }
        BestSpecification best = BestSpecification.of(run.results(), all, draws);
        m.put("best", best == null ? null : best.toJson());
        LeamerBounds bounds = LeamerBounds.of(run.results(), all, run.plan().confidence());
        m.put("interval_bounds", bounds == null ? null : bounds.toJson());
        List<ComparableGroups.Group> groups = ComparableGroups.of(variants, run.plan().confidence());
        m.put("comparable_groups", ComparableGroups.toJson(groups));
        m.put("overfitting", Overfitting.summary(run.results(), all, run.plan().alpha()));
        InfluenceReport influence = Influence.of(run, all);
        m.put("influence", influence.factorsJson());
        Map<String, Object> overall = influence.overallJson();
        overall.put("mixes_units", UnitGroups.of(run).unitsDiffer());
        m.put("influence_overall", overall);
        m.put("by_scale", ScaleSections.of(run, all, draws));
        return new InferenceSections(run, draws, m);
    }

    @Override
    public Map<String, Object> sections() {
        return sections;
    }

    /** The null draws, or null when none were asked for. */
    public NullDrawResult nullDraws() {
        return nullDraws;
    }

    /** The null draws' warning about the resampled unit ({@link IgnoredClustering}), when there is one. */
    @Override
    public List<String> warnings() {
        return nullDraws == null || nullDraws.warning() == null ? List.of() : List.of(nullDraws.warning());
    }

    /** Every file {@link #writeFiles} may write, whether or not this run writes it. */
    public static final List<String> FILE_NAMES = List.of(NullDrawsCsv.FILE, OverfittingCsv.FILE);

    /** The files {@link #writeFiles} writes for this run. */
    public List<String> fileNames() {
        return nullDraws == null ? List.of(OverfittingCsv.FILE) : FILE_NAMES;
    }

    /** Writes null-draws.csv (when there are draws) and overfitting.csv into the run's folder. */
    @Override
    public void writeFiles(Path folder) {
        if (nullDraws != null) {
            NullDrawsCsv.write(nullDraws, folder);
        }
        OverfittingCsv.write(run.results(), folder);
    }
}
