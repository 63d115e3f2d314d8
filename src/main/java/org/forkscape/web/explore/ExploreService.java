package org.forkscape.web.explore;

import com.github.benmanes.caffeine.cache.Cache;
import com.github.benmanes.caffeine.cache.Caffeine;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Supplier;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.FullFit;
import org.forkscape.fit.FullFitter;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Factor;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.Json;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunResult;
import org.forkscape.run.RunState;
import org.forkscape.run.Scale;
import org.forkscape.run.SpecificationsCsvReader;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.UnitGroups;
import org.forkscape.run.Workspace;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.run.RunFinished;
import org.forkscape.web.system.ForkscapeSettings;
import org.springframework.context.event.EventListener;
import org.springframework.stereotype.Service;
import tools.jackson.core.type.TypeReference;

/**
 * Serves finished runs to the explorer. A run is ranked once per scale (from the run that just finished,
 * or read back from its specifications.csv) and kept while in use; each filter and order the browser asks
 * for is then a few columnar passes, and the last few are kept so that hovering, which asks for the
 * specification at a position, does not repeat them. As fitted, estimates are shown one comparable group
 * at a time (an outcome alternative with a key-predictor alternative), never pooled across units.
 */
@Service
public class ExploreService {
    private static final int CACHED_VIEWS = 32;
    /** Filtered sets whose summary and influence are kept: a few kilobytes each. */
    private static final int CACHED_SECTIONS = 256;

    private final Workspace workspace;
    private final AnalysisService analyses;
    private final InfluenceAnalysis influence;
    private final Cache<String, Ranking> runs;
    private final Map<String, View> views = lru(CACHED_VIEWS);
    private final Cache<String, Sections> sections = Caffeine.newBuilder().maximumSize(CACHED_SECTIONS)
            .executor(Runnable::run).build();

    private final Cache<String, ExploreViews.Layout> layouts;

    private record Sections(CurveSummary summary, Influence influence, int[][] alternativeCounts) {
    }

    /** @param leftOut fitted specifications of the selection without a value on the scale */
    private record View(ShownSet shown, int leftOut) {
        int[] kept() {
            return shown.kept();
        }

        DisplayOrder order() {
            return shown.order();
        }
    }

    public ExploreService(Workspace workspace, AnalysisService analyses, InfluenceAnalysis influence,
            ForkscapeSettings settings) {
        this.workspace = workspace;
        this.analyses = analyses;
        this.influence = influence;
        this.layouts = Caffeine.newBuilder().maximumSize(Math.max(1, settings.explore().cachedRuns()))
                .executor(Runnable::run).build();
        this.runs = Caffeine.newBuilder().maximumSize(Math.max(1, settings.explore().cachedRuns()))
                // evict on the calling thread: a ranking let go is memory freed now, not when a pool gets to it
                .executor(Runnable::run).build();
    }

    @EventListener
    void finished(RunFinished e) {
        RankedRun ranked = RankedRun.of(e.result());
        runs.put(e.analysisId() + "/" + e.runId() + "#" + Scale.AS_FITTED.word(), new Ranking(() -> ranked));
    }

    /** The results of a finished run ranked as fitted. */
    public RankedRun ranked(StoredAnalysis analysis, StoredRun run) {
        return ranked(analysis, run, Scale.AS_FITTED);
    }

    /**
     * The results of a finished run ranked on a scale. The cache only hands out each run's own
     * {@link Ranking}; the reading and ranking happen under that run's lock alone, so a run being ranked
     * (1.3 s at a million specifications) delays the requests for it and no others.
     */
    public RankedRun ranked(StoredAnalysis analysis, StoredRun run, Scale scale) {
        if (run.state() != RunState.FINISHED) {
            throw new RunNotFinishedException("run " + run.id() + " is " + run.state().word()
                    + "; only a finished run can be explored");
        }
        String key = analysis.id() + "/" + run.id() + "#" + scale.word();
        return runs.get(key, k -> new Ranking(() -> rank(analysis, run, scale))).get();
    }

    private RankedRun rank(StoredAnalysis analysis, StoredRun run, Scale scale) {
        if (scale != Scale.AS_FITTED) {
            // every scale ranks the same results: read them once
            return RankedRun.of(ranked(analysis, run, Scale.AS_FITTED).run(), scale);
        }
        Path folder = workspace.runFolder(analysis.id(), run.id());
        Plan plan = new PlanReader(true).read(workspace.runPlan(analysis.id(), run.id()),
                workspace.analysisFolder(analysis.id()));
        Table table = analyses.table(analysis);
        Object seconds = summary(analysis, run).get("seconds");
        RunResult result = SpecificationsCsvReader.read(plan, table, folder.resolve(RunOutputs.SPECIFICATIONS),
                seconds instanceof Number n ? n.doubleValue() : Double.NaN);
        return RankedRun.of(result);
    }

    /**
     * One run's ranking on one scale, computed by the first request that needs it while the others for
     * the same run and scale wait for it. A failure is not kept: the next request tries again.
     */
    private static final class Ranking {
        private final Supplier<RankedRun> compute;
        private RankedRun ranked;

        Ranking(Supplier<RankedRun> compute) {
            this.compute = compute;
        }

        synchronized RankedRun get() {
            if (ranked == null) {
                ranked = compute.get();
            }
            return ranked;
        }
    }

    /** The run's summary.json as written. */
    public Map<String, Object> summary(StoredAnalysis analysis, StoredRun run) {
        Path file = workspace.runFolder(analysis.id(), run.id()).resolve(RunOutputs.SUMMARY);
        try {
            return Json.MAPPER.readValue(Files.readString(file), new TypeReference<LinkedHashMap<String, Object>>() {
            });
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
    }

    /** The run's layout, the same for every request: computed once per run and kept while the run is. */
    public ExploreViews.Layout layout(StoredAnalysis analysis, StoredRun run) {
        String key = analysis.id() + "/" + run.id();
        ExploreViews.Layout cached = layouts.getIfPresent(key);
        if (cached != null) {
            return cached;
        }
        ExploreViews.Layout computed = computeLayout(analysis, run);
        layouts.put(key, computed);
        return computed;
    }

    private ExploreViews.Layout computeLayout(StoredAnalysis analysis, StoredRun run) {
        RankedRun r = ranked(analysis, run);
        Plan plan = r.run().plan();
        List<ExploreViews.FactorView> factors = new ArrayList<>();
        int[] all = SpecificationFilter.keep(r, Selection.all(r.factors()));
        for (Factor f : r.factors()) {
            int[] counts = new int[f.levels().size()];
            for (int k : all) {
                counts[r.level(f.id(), k)]++;
            }
            factors.add(new ExploreViews.FactorView(f.id(), f.name(), f.decision(), f.isControl(), f.levels(),
                    java.util.Arrays.stream(counts).boxed().toList()));
        }
        Map<String, List<String>> required = new LinkedHashMap<>();
        for (Decision.Controls c : plan.all(Decision.Controls.class)) {
            if (!c.required().isEmpty()) {
                required.put(c.name(), c.required());
            }
        }
        List<ExploreViews.ReasonCount> reasons = r.unfittedReasons().entrySet().stream()
                .map(e -> new ExploreViews.ReasonCount(e.getKey(), e.getValue())).toList();
        int unfitted = reasons.stream().mapToInt(ExploreViews.ReasonCount::count).sum();
        long inPlan = r.run().models().space().size();
        UnitGroups units = r.units();
        List<ExploreViews.GroupView> groups = groupViews(units, Scale.AS_FITTED);
        boolean models = !plan.all(Decision.Model.class).isEmpty();
        List<ExploreViews.ScaleView> scales = new ArrayList<>();
        for (Scale s : Scale.values()) {
            if (s == Scale.AVERAGE_MARGINAL_EFFECT && !models) {
                // without a model decision every effect is its coefficient: the scale would repeat "as fitted"
                continue;
            }
            int leftOut = 0;
            ResultTable t = r.run().results();
            for (int slot = 0; slot < t.size(); slot++) {
                if (t.fitted(slot) && !s.defined(t, slot)) {
                    leftOut++;
                }
            }
            UnitGroups own = s.unitFree() ? null : s == Scale.AS_FITTED ? units : UnitGroups.of(r.run(), s);
            scales.add(new ExploreViews.ScaleView(s.word(), s.title(), s.unitFree(), s.hasInterval(),
                    s.unitFree() ? units.unit(s, null) : null, own == null ? List.of() : groupViews(own, s),
                    own != null && own.unitsDiffer(), own == null ? -1 : own.firstFitted(), leftOut));
        }
        return new ExploreViews.Layout(analysis.id(), run.id(), analysis.title(), plan.confidence(),
                plan.outcome().name(), plan.predictor().name(), r.size(), unfitted, inPlan,
                r.run().results().size() < inPlan, factors, r.gridRows(), required, reasons, scales, groups,
                units.unitsDiffer(), Scale.AS_FITTED.word(), units.firstFitted(), ShownSet.factorOfDecision(r, plan.outcome()),
                ShownSet.factorOfDecision(r, plan.predictor()), models ? ShownSet.factorOfDecision(r, plan.all(Decision.Model.class).get(0))
                        : -1, summary(analysis, run));
    }

    private static List<ExploreViews.GroupView> groupViews(UnitGroups units, Scale scale) {
        return units.groups().stream().map(g -> new ExploreViews.GroupView(g.id(), g.outcome(), g.predictor(),
                g.model() == null ? null : g.model().spelling(), g.title(), g.fitted(), units.unit(scale, g))).toList();
    }

    public ExploreViews.CurveView curve(StoredAnalysis analysis, StoredRun run, String drop, String sort, String scale,
            String group, int width) {
        RankedRun r = ranked(analysis, run, ShownSet.scaleOf(scale));
        View view = view(analysis, run, r, drop, sort, group);
        ShownSet shown = view.shown();
        int fitted = ranked(analysis, run).size();
        Sections sections = sections(analysis.id() + "/" + run.id() + "?" + shown.filter().dropText() + "&"
                + choiceText(shown), r, view.kept());
        return new ExploreViews.CurveView(fitted, shown.filter().dropText(), shown.sort(), shown.scale().word(),
                shown.group(), shown.unit(), view.leftOut, sections.summary(), sections.influence(),
                shown.grouped() ? view.order().groups() : List.of(), CurveReducer.reduce(r, view.order(), width),
                sections.alternativeCounts());
    }

    /**
     * The set a view shows, ranked on its scale, for the print figure of the same view: the filter, order,
     * scale and group of a curve request.
     */
    public ShownSet shown(StoredAnalysis analysis, StoredRun run, RankedRun r, String drop, String sort, String group) {
        return view(analysis, run, r, drop, sort, group).shown();
    }

    private static String choiceText(ShownSet shown) {
        return shown.scale().word() + (shown.group() < 0 ? "" : ":" + shown.group());
    }

    /**
     * The summary cards, the influence panel and the filter panel's counts of a filtered set, which depend on
     * the set alone (not on its order or the plot's width) and are the costliest part of a curve: kept for the sets asked for most
     * recently, so that going back to a filter, or another width or order of it, reuses them. Computed
     * outside the cache, so no request waits for another's; two requests for a new set may both compute it.
     */
    private Sections sections(String key, RankedRun r, int[] kept) {
        Sections cached = sections.getIfPresent(key);
        if (cached != null) {
            return cached;
        }
        Sections computed = new Sections(CurveSummary.of(r, kept), influence.of(r, kept), AlternativeCounts.of(r, kept));
        sections.put(key, computed);
        return computed;
    }

    /** The specification at a position of the curve under the given filter, order and scale. */
    public ExploreViews.SpecificationView at(StoredAnalysis analysis, StoredRun run, String drop, String sort,
            String scale, String group, int position) {
        RankedRun r = ranked(analysis, run, ShownSet.scaleOf(scale));
        View view = view(analysis, run, r, drop, sort, group);
        if (position < 0 || position >= view.order().size()) {
            throw new InputException("position", "there is no position " + position + " in a set of "
                    + view.order().size() + " specifications (positions start at 0)");
        }
        int rank = view.order().ranks()[position];
        int slot = r.slot(rank);
        ResultTable t = r.run().results();
        double confidence = r.run().plan().confidence();
        long index = t.specIndex(slot);
        Scale effect = Scale.AVERAGE_MARGINAL_EFFECT;
        return new ExploreViews.SpecificationView(position, index + 1, choices(r.run(), index),
                t.family(slot).spelling(), t.estimate(slot), t.stdError(slot), t.statistic(slot), t.df(slot),
                t.pValue(slot), t.ciLow(slot, confidence), t.ciHigh(slot, confidence), t.effect(slot),
                t.effectStdError(slot), effect.low(t, slot, confidence), effect.high(t, slot, confidence),
                Scale.STANDARDIZED.value(t, slot), Scale.STANDARDIZED.low(t, slot, confidence),
                Scale.STANDARDIZED.high(t, slot, confidence), Scale.PARTIAL_CORRELATION.value(t, slot),
                Scale.PARTIAL_CORRELATION.low(t, slot, confidence), Scale.PARTIAL_CORRELATION.high(t, slot, confidence),
                t.nObs(slot), t.nParams(slot), t.r2(slot), t.adjustedR2(slot), t.modelPValue(slot), t.deviance(slot),
                t.status(slot));
    }

    /** The position of specification {@code spec} (1-based) in the curve as shown, -1 when the set lacks it. */
    public int positionOf(StoredAnalysis analysis, StoredRun run, String drop, String sort, String scale,
            String group, long spec) {
        RankedRun r = ranked(analysis, run, ShownSet.scaleOf(scale));
        return SpecificationPosition.of(r, view(analysis, run, r, drop, sort, group).order(), spec - 1);
    }

    /** Every coefficient of specification {@code spec} (1-based, as in specifications.csv) of the run. */
    public ExploreViews.FullFitView fit(StoredAnalysis analysis, StoredRun run, long spec) {
        RankedRun r = ranked(analysis, run);
        RunResult result = r.run();
        long index = spec - 1;
        ResultTable t = result.results();
        int slot = slotOf(t, index);
        if (slot < 0) {
            throw new InputException("spec", "specification " + spec + " is not among the "
                    + String.format("%,d", t.size()) + " this run fitted");
        }
        FullFit fit = new FullFitter().fit(result.plan(), result.models(), index);
        double confidence = result.plan().confidence();
        Scale effect = Scale.AVERAGE_MARGINAL_EFFECT;
        return new ExploreViews.FullFitView(spec, confidence, choices(result, index), t.family(slot).spelling(),
                t.family(slot).words(), t.effect(slot), t.effectStdError(slot), effect.low(t, slot, confidence),
                effect.high(t, slot, confidence), t.deviance(slot), fit);
    }

    private View view(StoredAnalysis analysis, StoredRun run, RankedRun r, String drop, String sort, String group) {
        String key = analysis.id() + "/" + run.id() + "?" + Selection.parse(r.factors(), drop).dropText() + "&"
                + ShownSet.sortText(sort) + "&" + r.scale().word() + ":" + (group == null ? "" : group.strip());
        synchronized (views) {
            View cached = views.get(key);
            if (cached != null) {
                return cached;
            }
        }
        ShownSet shown = ShownSet.of(r, drop, sort, group);
        // the ranking as fitted holds every fitted specification, with the same factors: the selection there
        // less the one here is what this scale leaves out
        int leftOut = r.leftOut() == 0 ? 0
                : SpecificationFilter.keep(ranked(analysis, run), shown.selection()).length - shown.kept().length;
        View view = new View(shown, leftOut);
        synchronized (views) {
            views.put(key, view);
        }
        return view;
    }

    /** The slot of a specification index in the run, -1 when the run did not fit it. */
    private static int slotOf(ResultTable t, long index) {
        int lo = 0;
        int hi = t.size() - 1;
        while (lo <= hi) {
            int mid = (lo + hi) >>> 1;
            long at = t.specIndex(mid);
            if (at == index) {
                return mid;
            }
            if (at < index) {
                lo = mid + 1;
            } else {
                hi = mid - 1;
            }
        }
        return -1;
    }

    private static List<ExploreViews.Choice> choices(RunResult run, long index) {
        SpecificationSpace space = run.models().space();
        long[] c = new long[space.decisionCount()];
        space.decode(index, c);
        List<ExploreViews.Choice> out = new ArrayList<>();
        List<Decision> decisions = run.plan().decisions();
        for (int d = 0; d < decisions.size(); d++) {
            out.add(new ExploreViews.Choice(decisions.get(d).name(), decisions.get(d).kind(),
                    decisions.get(d).label(c[d])));
        }
        return out;
    }

    private static <V> Map<String, V> lru(int size) {
        return new LinkedHashMap<>(16, 0.75f, true) {
            @Override
            protected boolean removeEldestEntry(Map.Entry<String, V> eldest) {
                return size() > size;
            }
        };
    }
}
