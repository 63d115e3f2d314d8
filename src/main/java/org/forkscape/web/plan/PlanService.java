package org.forkscape.web.plan;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.Json;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.PlanLock;
import org.forkscape.run.Provenance;
import org.forkscape.run.TimeEstimate;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.system.FormFields;
import org.forkscape.web.system.ServerLimits;
import org.springframework.stereotype.Service;

/**
 * Reads, checks and saves the plan of an analysis. A plan is checked the way a run would meet it: its
 * structure, its columns and their types against the analysis's data, the specification cap, this server's
 * limits on one run (specifications, null draws, the memory estimate), and, when
 * the data are small enough to do it at once, the data variants themselves (a log of a value that is not
 * positive, a trim of a constant column), so that the form shows the problem next to its field before the
 * run starts. Plans are kept as the text the user gave, so a plan written by hand and a plan built in the
 * form are the same file.
 */
@Service
public class PlanService {
    /** Rows x columns^2 x variants up to which the data variants are built during a check (about 0.1 s). */
    static final long VARIANT_CHECK_BUDGET = 50_000_000L;
    /** Longer plan texts are refused before reading them. */
    public static final int MAX_PLAN_CHARACTERS = 1_000_000;

    private final Workspace workspace;
    private final AnalysisService analyses;
    private final ServerLimits limits;

    public PlanService(Workspace workspace, AnalysisService analyses, ServerLimits limits) {
        this.workspace = workspace;
        this.analyses = analyses;
        this.limits = limits;
    }

    /** The plan being edited: the saved one, or a start with an outcome and a key predictor to fill in. */
    public String current(StoredAnalysis analysis) {
        return workspace.plan(analysis.id()).orElseGet(() -> starter(analysis, workspace.dataFile(analysis.id()).getFileName().toString()));
    }

    public boolean saved(StoredAnalysis analysis) {
        return workspace.plan(analysis.id()).isPresent();
    }

    /** Checks without throwing for problems of the plan. */
    public PlanCheck check(StoredAnalysis analysis, String json) {
        try {
            Plan plan = read(analysis, json);
            return PlanCheck.ready(count(plan), fitted(plan));
        } catch (InputException e) {
            long count = -1;
            long fitted = -1;
            try {
                Plan structure = new PlanReader(true).read(json, workspace.analysisFolder(analysis.id()));
                count = count(structure);
                fitted = fitted(structure);
            } catch (InputException unreadable) {
                // the count is unknown until the plan reads
            }
            return PlanCheck.refused(count, fitted, e);
        }
    }

    /**
     * Reads and checks a plan for this analysis.
     *
     * @throws InputException with the JSON path of the problem
     */
    public Plan read(StoredAnalysis analysis, String json) {
        if (json == null || json.isBlank()) {
            throw new PlanException("", "the plan is empty; a plan is a JSON object with \"data\" and \"decisions\"");
        }
        if (json.length() > MAX_PLAN_CHARACTERS) {
            throw new PlanException("", "the plan is longer than " + MAX_PLAN_CHARACTERS + " characters");
        }
        Plan plan = new PlanReader(true).read(json, workspace.analysisFolder(analysis.id()));
        Path data = workspace.dataFile(analysis.id());
        if (!plan.dataFile().equals(data.normalize())) {
            String name = data.getFileName().toString();
            throw new PlanException("data", "this analysis's data file is " + name + "; the plan must name it "
                    + "(\"data\": \"" + name + "\")");
        }
        Table table = analyses.table(analysis);
        PlanChecker.check(plan, table);
        MultiverseRunner.checkCount(plan, FormFields.SETTINGS);
        limits.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long columns = models.layout().size();
        if ((long) table.rowCount() * columns * columns * models.variantCount() <= VARIANT_CHECK_BUDGET) {
            for (int v = 0; v < models.variantCount(); v++) {
                models.variant(models.variantKey(v));
            }
        }
        return plan;
    }

    /**
     * What a run of the plan would take on this server: the time measured on a few of its specifications
     * ({@link TimeEstimate}) with the server's fitting threads, and the memory at its peak against the
     * server's limit for one run.
     *
     * @throws InputException when the plan cannot run
     */
    public RunEstimate estimate(StoredAnalysis analysis, String json) {
        Plan plan = read(analysis, json);
        Table table = analyses.table(analysis);
        TimeEstimate time = TimeEstimate.of(plan, table, limits.threads());
        long memory = MemoryEstimate.of(plan, table, limits.threads()).bytes();
        return new RunEstimate(time.seconds(), time.text(limits.threads()), memory, limits.maxMemory(),
                "about " + MemoryEstimate.format(memory) + " of memory at the peak, of this server's limit of "
                        + MemoryEstimate.format(limits.maxMemory()) + " for one run");
    }

    /**
     * @param seconds      the time estimate
     * @param time         it in words, with what it rests on
     * @param memoryBytes  the memory estimate
     * @param memoryLimit  the server's limit for one run
     * @param memory       the two in words
     */
    public record RunEstimate(double seconds, String time, long memoryBytes, long memoryLimit, String memory) {
    }

    /** Saves a plan that passes the check. @throws InputException when it does not */
    public PlanCheck save(StoredAnalysis analysis, String json) {
        Plan plan = read(analysis, json);
        workspace.savePlan(analysis.id(), json);
        return PlanCheck.ready(count(plan), fitted(plan));
    }

    /**
     * Locks the saved plan (its plan.json and the analysis's data.csv, the bytes a run of it records),
     * which must pass the check; an existing lock is kept unless {@code replace}, as the {@code lock}
     * command keeps it.
     *
     * @throws InputException when no plan was saved, the saved plan cannot run, or it is locked already
     */
    public PlanLock lock(StoredAnalysis analysis, boolean replace) {
        String saved = workspace.plan(analysis.id()).orElseThrow(() -> new InputException("plan",
                "save the plan before locking it"));
        read(analysis, saved);
        Optional<PlanLock> earlier = workspace.planLock(analysis.id());
        if (earlier.isPresent() && !replace) {
            throw new InputException("lock", "the plan was locked at " + earlier.get().locked() + " (fingerprint "
                    + earlier.get().fingerprint() + "); lock it anew to replace that lock, with a new time and "
                    + "fingerprint");
        }
        PlanLock lock = PlanLock.of(saved.getBytes(StandardCharsets.UTF_8), workspace.dataFile(analysis.id()));
        workspace.savePlanLock(analysis.id(), lock);
        return lock;
    }

    /** The saved plan's lock and whether the saved plan and the data still match it, or empty without a lock. */
    public Optional<PlanLock.Status> lockStatus(StoredAnalysis analysis) {
        return workspace.planLock(analysis.id()).map(lock -> lock.check(workspace.plan(analysis.id()).map(p ->
                Provenance.sha256(p.getBytes(StandardCharsets.UTF_8))).orElse(""), Provenance.sha256(
                workspace.dataFile(analysis.id()))));
    }

    private static long count(Plan plan) {
        return new SpecificationSpace(plan).size();
    }

    private static long fitted(Plan plan) {
        long all = count(plan);
        return plan.sampleSize() > 0 ? Math.min(plan.sampleSize(), all) : all;
    }

    private static String starter(StoredAnalysis analysis, String dataName) {
        Map<String, Object> plan = new LinkedHashMap<>();
        plan.put("title", analysis.title());
        plan.put("data", dataName);
                plan.put("decisions", List.of(emptyDecision("outcome"), emptyDecision("predictor")));
        return Json.MAPPER.writeValueAsString(plan);
    }

    private static Map<String, Object> emptyDecision(String kind) {
        Map<String, Object> alternative = new LinkedHashMap<>();
        alternative.put("label", "");
        alternative.put("column", "");
        Map<String, Object> d = new LinkedHashMap<>();
        d.put("name", kind);
        d.put("kind", kind);
        d.put("alternatives", List.of(alternative));
        return d;
    }
}
