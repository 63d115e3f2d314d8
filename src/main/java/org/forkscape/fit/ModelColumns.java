package org.forkscape.fit;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;

/**
 * The layout shared by every data variant of a plan: the model columns (every outcome and predictor
 * alternative as its own column, then every control, categorical controls expanded to dummies against
 * their first level) and the model variables whose missing cells decide which rows a specification uses
 * (each outcome and predictor alternative, each control, each cluster and fixed-effect column).
 */
public final class ModelColumns {
    private final List<String> columnNames = new ArrayList<>();
    private final List<Integer> columnVariable = new ArrayList<>();
    private final List<String> variables = new ArrayList<>();
    private final Map<String, Integer> variableIndex = new LinkedHashMap<>();
    private final int[] outcomeColumns;
    private final int[] predictorColumns;
    private final Map<String, int[]> controlColumns = new LinkedHashMap<>();

    /**
     * @param outcomes   the column of each outcome alternative
     * @param predictors the column of each predictor alternative
     * @param controls   each control once, in plan order
     * @param clusters   each cluster column once
     * @param absorbed   each fixed-effect column once
     */
    ModelColumns(List<String> outcomes, List<String> predictors, Map<String, Column> controls,
            List<String> clusters, List<String> absorbed, List<String> weights) {
        outcomeColumns = new int[outcomes.size()];
        for (int j = 0; j < outcomes.size(); j++) {
            outcomeColumns[j] = add(outcomes.get(j), variable("outcome:" + j));
        }
        predictorColumns = new int[predictors.size()];
        for (int j = 0; j < predictors.size(); j++) {
            predictorColumns[j] = add(predictors.get(j), variable("predictor:" + j));
        }
        controls.forEach((name, column) -> {
            int v = variable(name);
            if (column instanceof CategoricalColumn cat) {
                int[] cols = new int[Math.max(0, cat.levels().size() - 1)];
                for (int k = 1; k < cat.levels().size(); k++) {
                    cols[k - 1] = add(name + "=" + cat.levels().get(k), v);
                }
                controlColumns.put(name, cols);
            } else {
                controlColumns.put(name, new int[] {add(name, v)});
            }
        });
        clusters.forEach(this::variable);
        absorbed.forEach(this::variable);
        weights.forEach(this::variable);
        if (variables.size() > 64) {
            throw new org.forkscape.plan.PlanException("decisions", "uses " + variables.size()
                    + " distinct model variables; at most 64 are supported");
        }
    }

    private int add(String name, int variable) {
        columnNames.add(name);
        columnVariable.add(variable);
        return columnNames.size() - 1;
    }

    private int variable(String name) {
        return variableIndex.computeIfAbsent(name, n -> {
            variables.add(n);
            return variables.size() - 1;
        });
    }

    /** Number of model columns P. */
    public int size() {
        return columnNames.size();
    }

    public String columnName(int column) {
        return columnNames.get(column);
    }

    public int variableOf(int column) {
        return columnVariable.get(column);
    }

    public int variableCount() {
        return variables.size();
    }

    /** Variable index of a control, cluster or fixed-effect column name. */
    public int variable(String name, boolean mustExist) {
        Integer v = variableIndex.get(name);
        if (v == null && mustExist) {
            throw new IllegalArgumentException("no model variable " + name);
        }
        return v == null ? -1 : v;
    }

    public int outcomeColumn(int alternative) {
        return outcomeColumns[alternative];
    }

    public int predictorColumn(int alternative) {
        return predictorColumns[alternative];
    }

    public int outcomeVariable(int alternative) {
        return variableIndex.get("outcome:" + alternative);
    }

    public int predictorVariable(int alternative) {
        return variableIndex.get("predictor:" + alternative);
    }

    /** The model columns of a control (one for numeric, one dummy per non-reference level for categorical). */
    public int[] controlColumns(String control) {
        return controlColumns.get(control);
    }

    /** Names of the variables, for messages ({@code outcome:j} and {@code predictor:j} for those alternatives). */
    public List<String> variables() {
        return variables;
    }
}
