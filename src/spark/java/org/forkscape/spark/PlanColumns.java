package org.forkscape.spark;

import java.util.LinkedHashSet;
import java.util.Set;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.plan.AbsorbChoice;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SampleRule;
import org.forkscape.plan.VariableChoice;
import org.forkscape.plan.WeightChoice;

/** Every column a plan reads, once, in plan order (the null draws' resampled column last): the only columns read from the Parquet data. */
final class PlanColumns {
    private PlanColumns() {
    }

    static Set<String> of(Plan plan) {
        Set<String> names = new LinkedHashSet<>();
        for (Decision d : plan.decisions()) {
            if (d instanceof Decision.Outcome o) {
                o.alternatives().stream().map(VariableChoice::column).forEach(names::add);
            } else if (d instanceof Decision.Predictor p) {
                p.alternatives().stream().map(VariableChoice::column).forEach(names::add);
            } else if (d instanceof Decision.Controls c) {
                names.addAll(c.required());
                names.addAll(c.optional());
                if (!c.allSubsets()) {
                    c.sets().values().forEach(names::addAll);
                }
            } else if (d instanceof Decision.Sample s) {
                for (SampleRule rule : s.alternatives()) {
                    if (rule instanceof SampleRule.KeepRows k) {
                        names.addAll(k.expression().columns());
                    } else if (rule instanceof SampleRule.TrimRows t) {
                        names.add(t.column());
                    }
                }
            } else if (d instanceof Decision.Errors e) {
                e.alternatives().stream().map(ErrorType::clusterColumns).forEach(names::addAll);
            } else if (d instanceof Decision.Absorb a) {
                a.alternatives().stream().map(AbsorbChoice::columns).forEach(names::addAll);
            } else if (d instanceof Decision.Weights w) {
                w.alternatives().stream().filter(WeightChoice::weighted).map(WeightChoice::column)
                        .forEach(names::add);
            }
        }
        String resampled = plan.nullDraws() > 0 ? NullDrawSettings.of(plan).clusterColumn() : null;
        if (resampled != null) {
            names.add(resampled);
        }
        return names;
    }

    /** The columns whose values group rows (absorbed fixed effects, clusters). */
    static Set<String> grouping(Plan plan) {
        Set<String> names = new LinkedHashSet<>();
        for (Decision d : plan.decisions()) {
            if (d instanceof Decision.Errors e) {
                e.alternatives().stream().map(ErrorType::clusterColumns).forEach(names::addAll);
            } else if (d instanceof Decision.Absorb a) {
                a.alternatives().stream().map(AbsorbChoice::columns).forEach(names::addAll);
            }
        }
        return names;
    }
}
