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

    private record Sections(CurveSummary summary, Influence influence) {
    }

    /** @param leftOut fitted specifications of the selection without a value on the scale */
    private record View(int[] kept, DisplayOrder order, int leftOut) {
    }

    /** A scale and, on a scale with units, the one comparable group shown (-1 on a unit-free scale). */
    record ScaleChoice(Scale scale, int group) {
        String text() {
            return scale.word() + (group < 0 ? "" : ":" + group);
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
                units.unitsDiffer(), Scale.AS_FITTED.word(), units.firstFitted(), factorOfDecision(r, plan.outcome()),
                factorOfDecision(r, plan.predictor()), models ? factorOfDecision(r, plan.all(Decision.Model.class).get(0))
                        : -1, summary(analysis, run));
    }

    private static List<ExploreViews.GroupView> groupViews(UnitGroups units, Scale scale) {
        return units.groups().stream().map(g -> new ExploreViews.GroupView(g.id(), g.outcome(), g.predictor(),
                g.model() == null ? null : g.model().spelling(), g.title(), g.fitted(), units.unit(scale, g))).toList();
    }

    public ExploreViews.CurveView curve(StoredAnalysis analysis, StoredRun run, String drop, String sort, String scale,
            String group, int width) {
        RankedRun r = ranked(analysis, run, scaleOf(scale));
        ScaleChoice choice = choice(r, group);
        View view = view(analysis, run, r, choice, drop, sort);
        Selection selection = Selection.parse(r.factors(), drop);
        boolean grouped = !sortText(sort).equals("estimate");
        String unit = r.units().unit(choice.scale(), choice.group() < 0 ? null : r.units().groups().get(choice.group()));
        int fitted = ranked(analysis, run).size();
        Sections sections = sections(analysis.id() + "/" + run.id() + "?" + selection.dropText() + "&" + choice.text(),
                r, view.kept);
        return new ExploreViews.CurveView(fitted, selection.dropText(), sortText(sort), choice.scale().word(),
                choice.group(), unit, view.leftOut, sections.summary(), sections.influence(),
                grouped ? view.order.groups() : List.of(), CurveReducer.reduce(r, view.order, width),
                AlternativeCounts.of(r, view.kept));
    }

    /**
     * The summary cards and the influence panel of a filtered set, which depend on the set alone (not on its
     * order or the plot's width) and are the costliest part of a curve: kept for the sets asked for most
     * recently, so that going back to a filter, or another width or order of it, reuses them. Computed
     * outside the cache, so no request waits for another's; two requests for a new set may both compute it.
     */
    private Sections sections(String key, RankedRun r, int[] kept) {
        Sections cached = sections.getIfPresent(key);
        if (cached != null) {
            return cached;
        }
        Sections computed = new Sections(CurveSummary.of(r, kept), influence.of(r, kept));
        sections.put(key, computed);
        return computed;
    }

    /** The specification at a position of the curve under the given filter, order and scale. */
    public ExploreViews.SpecificationView at(StoredAnalysis analysis, StoredRun run, String drop, String sort,
            String scale, String group, int position) {
        RankedRun r = ranked(analysis, run, scaleOf(scale));
        View view = view(analysis, run, r, choice(r, group), drop, sort);
        if (position < 0 || position >= view.order.size()) {
            throw new InputException("position", "there is no position " + position + " in a set of "
                    + view.order.size() + " specifications (positions start at 0)");
        }
        int rank = view.order.ranks()[position];
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
        RankedRun r = ranked(analysis, run, scaleOf(scale));
        return SpecificationPosition.of(r, view(analysis, run, r, choice(r, group), drop, sort).order, spec - 1);
    }

    private static Scale scaleOf(String word) {
        if (word == null || word.isBlank()) {
            return Scale.AS_FITTED;
        }
        Scale s = Scale.named(word);
        if (s == null) {
            throw new InputException("scale", "\"" + word.strip() + "\" is not a scale; use fitted, effect, "
                    + "standardized, partial or t");
        }
        return s;
    }

    /**
     * On a scale with units (as fitted, the average marginal effect), the comparable group shown: the one
     * asked for, or the first with a fitted specification; on a unit-free scale, none (every group shares
     * the scale).
     */
    private static ScaleChoice choice(RankedRun r, String group) {
        if (r.scale().unitFree()) {
            return new ScaleChoice(r.scale(), -1);
        }
        UnitGroups units = r.units();
        if (group == null || group.isBlank()) {
            return new ScaleChoice(r.scale(), units.firstFitted());
        }
        int count = units.groups().size();
        try {
            int g = Integer.parseInt(group.strip());
            if (g >= 0 && g < count) {
                return new ScaleChoice(r.scale(), g);
            }
        } catch (NumberFormatException e) {
            // answered below with the accepted range
        }
        throw new InputException("group", "\"" + group.strip() + "\" is not a comparable group of this run on the "
                + r.scale().title() + " scale; use a number from 0 to " + (count - 1) + " (see the groups of the "
                + "layout's scales)");
    }

    /** The factor of a decision that is one factor (the outcome's, the key predictor's). */
    private static int factorOfDecision(RankedRun r, Decision decision) {
        return r.factors().stream().filter(f -> !f.isControl() && f.decision().equals(decision.name()))
                .mapToInt(Factor::id).findFirst().orElseThrow();
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

    private View view(StoredAnalysis analysis, StoredRun run, RankedRun r, ScaleChoice choice, String drop,
            String sort) {
        Selection selection = Selection.parse(r.factors(), drop);
        String order = sortText(sort);
        String key = analysis.id() + "/" + run.id() + "?" + selection.dropText() + "&" + order + "&" + choice.text();
        synchronized (views) {
            View cached = views.get(key);
            if (cached != null) {
                return cached;
            }
        }
        Plan plan = r.run().plan();
        if (choice.group() >= 0) {
            UnitGroups.Group g = r.units().groups().get(choice.group());
            selection = selection.only(factorOfDecision(r, plan.outcome()), g.outcomeChoice())
                    .only(factorOfDecision(r, plan.predictor()), g.predictorChoice());
            if (g.modelChoice() >= 0) {
                selection = selection.only(factorOfDecision(r, plan.all(Decision.Model.class).get(0)), g.modelChoice());
            }
        }
        int[] kept = SpecificationFilter.keep(r, selection);
        DisplayOrder display = order.equals("estimate") ? DisplayOrder.byEstimate(kept)
                : DisplayOrder.groupedBy(r, kept, factorOf(r, order));
        // the ranking as fitted holds every fitted specification, with the same factors: the selection there
        // less the one here is what this scale leaves out
        int leftOut = r.leftOut() == 0 ? 0
                : SpecificationFilter.keep(ranked(analysis, run), selection).length - kept.length;
        View view = new View(kept, display, leftOut);
        synchronized (views) {
            views.put(key, view);
        }
        return view;
    }

    private static String sortText(String sort) {
        return sort == null || sort.isBlank() ? "estimate" : sort.strip();
    }

    private static int factorOf(RankedRun r, String sort) {
        String prefix = "factor:";
        if (sort.startsWith(prefix)) {
            try {
                int f = Integer.parseInt(sort.substring(prefix.length()));
                if (f >= 0 && f < r.factors().size()) {
                    return f;
                }
            } catch (NumberFormatException e) {
                // reported below with the accepted forms
            }
        }
        throw new InputException("sort", "\"" + sort + "\" is not an order of this run; use estimate or factor:F "
                + "with F from 0 to " + (r.factors().size() - 1));
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
