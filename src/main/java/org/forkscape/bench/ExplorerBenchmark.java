package org.forkscape.bench;

import java.io.PrintStream;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.web.explore.CurveReducer;
import org.forkscape.web.explore.CurveSummary;
import org.forkscape.web.explore.DecisionInfluence;
import org.forkscape.web.explore.DisplayOrder;
import org.forkscape.web.explore.RankedRun;
import org.forkscape.web.explore.Selection;
import org.forkscape.web.explore.SpecificationFilter;

/**
 * The explorer's server-side work on large stored runs, without HTTP: what one filter change costs
 * (filter, summary cards, influence, display order, reduced curve), on 100,000 and on 1,048,576
 * specifications of a plan over the benchmark data.
 */
final class ExplorerBenchmark {
    private ExplorerBenchmark() {
    }

    /** Outcome 2 x key coding 4 x every subset of 14 controls x 4 samples x 2 error types = 1,048,576. */
    static String plan(String dataFile) {
        StringBuilder controls = new StringBuilder();
        for (int j = 1; j <= BenchData.CONTROLS; j++) {
            controls.append(j > 1 ? ", " : "").append("\"c").append(j).append('"');
        }
        return "{\"data\": \"" + dataFile + "\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"},"
                + " {\"label\": \"y std\", \"column\": \"y\", \"transform\": \"standardize\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"},"
                + " {\"label\": \"x std\", \"column\": \"x\", \"transform\": \"standardize\"},"
                + " {\"label\": \"x w1\", \"column\": \"x\", \"transform\": \"winsorize:0.01\"},"
                + " {\"label\": \"x w5\", \"column\": \"x\", \"transform\": \"winsorize:0.05\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [" + controls + "]},"
                + "{\"name\": \"rows\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"all\"},"
                + " {\"label\": \"trim 3\", \"trim\": {\"column\": \"y\", \"z\": 3}},"
                + " {\"label\": \"trim 2.5\", \"trim\": {\"column\": \"y\", \"z\": 2.5}},"
                + " {\"label\": \"c1 above -2\", \"keep\": \"c1 > -2\"}]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}";
    }

    static List<Map<String, Object>> run(PrintStream out, Path folder, Table table, String dataFile, boolean quick) {
        List<Map<String, Object>> results = new ArrayList<>();
        Plan full = new PlanReader(false).read(plan(dataFile), folder).withMaxSpecifications(2_000_000);
        long[] sizes = quick ? new long[] {100_000} : new long[] {100_000, 0};
        for (long size : sizes) {
            Plan plan = size > 0 ? full.withSample(size, 9) : full;
            long fitStart = System.nanoTime();
            RunResult run = new MultiverseRunner().run(plan, table, RunProgress.SILENT, null);
            double fitSeconds = (System.nanoTime() - fitStart) / 1e9;
            long rankStart = System.nanoTime();
            RankedRun ranked = RankedRun.of(run);
            double rankSeconds = (System.nanoTime() - rankStart) / 1e9;
            int reps = quick ? 5 : 11;
            double[] filter = new double[reps];
            double[] summary = new double[reps];
            double[] influence = new double[reps];
            double[] curve = new double[reps];
            double[] change = new double[reps];
            DecisionInfluence analysis = new DecisionInfluence();
            for (int r = -2; r < reps; r++) {
                // alternate which level is unticked so no step is answered from a warm result
                Selection selection = Selection.all(ranked.factors()).drop(1, Math.floorMod(r, 4));
                long t0 = System.nanoTime();
                int[] kept = SpecificationFilter.keep(ranked, selection);
                long t1 = System.nanoTime();
                CurveSummary.of(ranked, kept);
                long t2 = System.nanoTime();
                analysis.of(ranked, kept);
                long t3 = System.nanoTime();
                CurveReducer.reduce(ranked, DisplayOrder.byEstimate(kept), 1200);
                long t4 = System.nanoTime();
                if (r >= 0) {
                    filter[r] = (t1 - t0) / 1e6;
                    summary[r] = (t2 - t1) / 1e6;
                    influence[r] = (t3 - t2) / 1e6;
                    curve[r] = (t4 - t3) / 1e6;
                    change[r] = (t4 - t0) / 1e6;
                }
            }
            int n = run.results().size();
            out.printf("explorer on %,d specifications (fitted in %.1f s, ranked in %.2f s): filter %.1f ms, summary "
                    + "%.1f ms, influence %.1f ms, reduced curve %.1f ms; whole filter change %.1f ms (medians)%n", n,
                    fitSeconds, rankSeconds, Medians.of(filter), Medians.of(summary), Medians.of(influence), Medians.of(curve),
                    Medians.of(change));
            Map<String, Object> json = new LinkedHashMap<>();
            json.put("case", "explorer-" + n);
            json.put("specifications", n);
            json.put("fit_seconds", fitSeconds);
            json.put("rank_seconds", rankSeconds);
            json.put("filter_ms", Medians.of(filter));
            json.put("summary_ms", Medians.of(summary));
            json.put("influence_ms", Medians.of(influence));
            json.put("reduced_curve_ms", Medians.of(curve));
            json.put("filter_change_ms", Medians.of(change));
            json.put("bytes_per_specification", run.results().bytesPerSpecification());
            results.add(json);
        }
        return results;
    }
}
