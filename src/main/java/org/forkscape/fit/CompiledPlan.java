package org.forkscape.fit;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.Column;
import org.forkscape.data.Table;
import org.forkscape.plan.AbsorbChoice;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.MissingRows;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.Transform;
import org.forkscape.plan.VariableChoice;
import org.forkscape.plan.WeightChoice;

/**
 * A plan read once against its table, in the form the engine uses: where each decision kind sits, each
 * outcome and predictor alternative with its column, transform and model column, each controls decision's
 * required, optional and named-set controls as model columns and variable bits, the sample rules, the
 * absorbed and cluster columns, and the columns a {@code "missing": "common"} rule looks at. Everything in
 * {@code fit} that needs the plan's structure takes it from here, so the plan is walked in one place.
 * Immutable; built by {@link SpecificationModels}.
 */
final class CompiledPlan {
    /** An outcome or predictor alternative: its column and transform, its model column and variable. */
    record CodedVariable(Column column, Transform transform, int modelColumn, int variable, String transformPath) {
    }

    /** A control's model columns and its variable's bit. */
    record ControlRef(int[] columns, long bit) {
    }

    /**
     * One controls decision: the required controls, then either one optional control per bit of the choice
     * ({@code sets == null}, all subsets) or one named set per choice.
     */
    record ControlDecision(int at, ControlRef[] required, ControlRef[] optional, ControlRef[][] sets) {
    }

    /** A control as coded into a variant's columns: each control named in the plan once, in plan order. */
    record CodedControl(Column column, int[] modelColumns) {
    }

    /** A cluster column some error type names, and its variable's bit. */
    record ClusterColumn(Column column, long bit) {
    }

    final Table table;
    final ModelColumns layout;
    final boolean commonMissing;
    final int outcomeAt;
    final int predictorAt;
    /** Position of the errors decision, -1 without one. */
    final int errorsAt;
    /** Position of the absorb decision, -1 without one. */
    final int absorbAt;
    /** Position of the weights decision, -1 without one. */
    final int weightsAt;
    /** Position of the model decision, -1 without one (every specification is then least squares). */
    final int modelAt;
    /** The model decision's alternatives ({@code ols} alone without one). */
    final ModelFamily[] families;
    /** Whether some specification fits a generalized linear model. */
    final boolean generalized;
    /** Position of each sample decision, in declared order. */
    final int[] sampleAt;
    final Decision.Sample[] samples;
    final CodedVariable[] outcomes;
    final CodedVariable[] predictors;
    final ControlDecision[] controls;
    final CodedControl[] codedControls;
    final ErrorType[] errorTypes;
    /** Per error type: the bits of its cluster columns' variables (0 when it names none). */
    final long[] errorBits;
    final ClusterColumn[] clusterColumns;
    /** The intersections of several cluster columns that multi-way error types need, each once. */
    final List<ClusterComponents.Component> clusterIntersections;
    /** Per absorb alternative: the columns whose fixed effects it absorbs (none, one or several). */
    final Column[][] absorbColumns;
    /** Per absorb alternative: the bits of the variables of every column it names. */
    final long[] absorbBits;
    /** Per weights alternative: its weight column, null for the unweighted alternative. */
    final Column[] weightColumns;
    /** Per weights alternative: the bit of its weight column's variable (0 when unweighted). */
    final long[] weightBits;
    /** Every column the plan names as a model variable, once: a common missing rule drops rows missing any. */
    final Column[] rawVariables;

    CompiledPlan(Plan plan, Table table) {
        this.table = table;
        this.commonMissing = plan.missing() == MissingRows.COMMON;
        List<Decision> ds = plan.decisions();
        int outcome = -1;
        int predictor = -1;
        int errors = -1;
        int absorb = -1;
        int model = -1;
        int weights = -1;
        List<Integer> controlPositions = new ArrayList<>();
        List<Integer> samplePositions = new ArrayList<>();
        for (int d = 0; d < ds.size(); d++) {
            Decision decision = ds.get(d);
            if (decision instanceof Decision.Outcome) {
                outcome = d;
            } else if (decision instanceof Decision.Predictor) {
                predictor = d;
            } else if (decision instanceof Decision.Controls) {
                controlPositions.add(d);
            } else if (decision instanceof Decision.Sample) {
                samplePositions.add(d);
            } else if (decision instanceof Decision.Errors) {
                errors = d;
            } else if (decision instanceof Decision.Absorb) {
                absorb = d;
            } else if (decision instanceof Decision.Model) {
                model = d;
            } else if (decision instanceof Decision.Weights) {
                weights = d;
            }
        }
        outcomeAt = outcome;
        predictorAt = predictor;
        errorsAt = errors;
        absorbAt = absorb;
        modelAt = model;
        weightsAt = weights;
        families = plan.modelFamilies().toArray(new ModelFamily[0]);
        generalized = plan.generalized();
        sampleAt = samplePositions.stream().mapToInt(Integer::intValue).toArray();
        samples = samplePositions.stream().map(d -> (Decision.Sample) ds.get(d)).toArray(Decision.Sample[]::new);

        List<VariableChoice> outcomeChoices = ((Decision.Outcome) ds.get(outcomeAt)).alternatives();
        List<VariableChoice> predictorChoices = ((Decision.Predictor) ds.get(predictorAt)).alternatives();
        Map<String, Column> controlColumns = new LinkedHashMap<>();
        for (int d : controlPositions) {
            for (String name : named((Decision.Controls) ds.get(d))) {
                controlColumns.computeIfAbsent(name, table::column);
            }
        }
        List<ErrorType> types = errorsAt < 0 ? List.of() : ((Decision.Errors) ds.get(errorsAt)).alternatives();
        List<String> clusterNames = types.stream().flatMap(t -> t.clusterColumns().stream()).distinct().toList();
        List<AbsorbChoice> absorbChoices = absorbAt < 0 ? List.of() : ((Decision.Absorb) ds.get(absorbAt)).alternatives();
        List<String> absorbNames = absorbChoices.stream().flatMap(a -> a.columns().stream()).distinct().toList();
        List<WeightChoice> weightChoices = weightsAt < 0 ? List.of() : ((Decision.Weights) ds.get(weightsAt)).alternatives();
        List<String> weightNames = weightChoices.stream().filter(WeightChoice::weighted).map(WeightChoice::column)
                .distinct().toList();
        layout = new ModelColumns(outcomeChoices.stream().map(VariableChoice::column).toList(),
                predictorChoices.stream().map(VariableChoice::column).toList(), controlColumns, clusterNames,
                absorbNames, weightNames);

        outcomes = new CodedVariable[outcomeChoices.size()];
        for (int j = 0; j < outcomes.length; j++) {
            VariableChoice v = outcomeChoices.get(j);
            outcomes[j] = new CodedVariable(table.column(v.column()), v.transform(), layout.outcomeColumn(j),
                    layout.outcomeVariable(j), "decisions[" + outcomeAt + "].alternatives[" + j + "].transform");
        }
        predictors = new CodedVariable[predictorChoices.size()];
        for (int j = 0; j < predictors.length; j++) {
            VariableChoice v = predictorChoices.get(j);
            predictors[j] = new CodedVariable(table.column(v.column()), v.transform(), layout.predictorColumn(j),
                    layout.predictorVariable(j), "decisions[" + predictorAt + "].alternatives[" + j + "].transform");
        }
        controls = new ControlDecision[controlPositions.size()];
        for (int d = 0; d < controls.length; d++) {
            Decision.Controls c = (Decision.Controls) ds.get(controlPositions.get(d));
            controls[d] = new ControlDecision(controlPositions.get(d), refs(c.required()), refs(c.optional()),
                    c.allSubsets() ? null : c.sets().values().stream().map(this::refs).toArray(ControlRef[][]::new));
        }
        codedControls = controlColumns.entrySet().stream()
                .map(e -> new CodedControl(e.getValue(), layout.controlColumns(e.getKey())))
                .toArray(CodedControl[]::new);

        errorTypes = types.toArray(new ErrorType[0]);
        errorBits = new long[errorTypes.length];
        for (int e = 0; e < errorTypes.length; e++) {
            for (String name : errorTypes[e].clusterColumns()) {
                errorBits[e] |= bit(name);
            }
        }
        clusterIntersections = types.stream().filter(ErrorType::multiway)
                .flatMap(t -> ClusterComponents.of(t).stream()).filter(c -> c.columns().size() > 1).distinct().toList();
        clusterColumns = clusterNames.stream().map(name -> new ClusterColumn(table.column(name), bit(name)))
                .toArray(ClusterColumn[]::new);
        absorbColumns = new Column[absorbChoices.size()][];
        absorbBits = new long[absorbChoices.size()];
        for (int a = 0; a < absorbColumns.length; a++) {
            List<String> columns = absorbChoices.get(a).columns();
            absorbColumns[a] = columns.stream().map(table::column).toArray(Column[]::new);
            for (String name : columns) {
                absorbBits[a] |= bit(name);
            }
        }
        weightColumns = new Column[weightChoices.size()];
        weightBits = new long[weightChoices.size()];
        for (int w = 0; w < weightColumns.length; w++) {
            WeightChoice choice = weightChoices.get(w);
            weightColumns[w] = choice.weighted() ? table.column(choice.column()) : null;
            weightBits[w] = choice.weighted() ? bit(choice.column()) : 0;
        }

        List<String> raw = new ArrayList<>();
        outcomeChoices.forEach(v -> raw.add(v.column()));
        predictorChoices.forEach(v -> raw.add(v.column()));
        raw.addAll(controlColumns.keySet());
        raw.addAll(clusterNames);
        raw.addAll(absorbNames);
        raw.addAll(weightNames);
        rawVariables = raw.stream().distinct().map(table::column).toArray(Column[]::new);
    }

    /** Every control a controls decision names: required, optional, then the named sets'. */
    private static List<String> named(Decision.Controls c) {
        List<String> names = new ArrayList<>(c.required());
        names.addAll(c.optional());
        if (!c.allSubsets()) {
            c.sets().values().forEach(names::addAll);
        }
        return names;
    }

    private long bit(String name) {
        return 1L << layout.variable(name, true);
    }

    private ControlRef[] refs(List<String> names) {
        return names.stream().map(name -> new ControlRef(layout.controlColumns(name), bit(name)))
                .toArray(ControlRef[]::new);
    }

    /** Number of absorb alternatives (1 without an absorb decision: absorbing nothing). */
    int absorbAlternatives() {
        return absorbAt < 0 ? 1 : absorbColumns.length;
    }

    /** Number of weights alternatives (1 without a weights decision: unweighted). */
    int weightAlternatives() {
        return weightsAt < 0 ? 1 : weightColumns.length;
    }

    /** The rows a variant's sample choices keep, in words, for messages about transforms over them. */
    String describeRows(int[] sampleChoices) {
        if (samples.length == 0) {
            return "over all rows";
        }
        StringBuilder b = new StringBuilder("in the rows kept by ");
        for (int s = 0; s < samples.length; s++) {
            if (s > 0) {
                b.append(", ");
            }
            b.append(samples[s].name()).append(" = ").append(samples[s].label(sampleChoices[s]));
        }
        return b.toString();
    }
}
