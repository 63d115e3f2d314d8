package org.forkscape.fit;

import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;

/**
 * What one specification fits inside its data variant: an outcome column, control columns and the key
 * predictor's column (all model column indices), the variables whose missing cells exclude a row, and the
 * standard error type.
 *
 * @param outcomeColumn  model column of the outcome alternative
 * @param controlColumns model columns of the controls, in plan order (dummies expanded)
 * @param keyColumn      model column of the key predictor alternative
 * @param variableMask   bit v set for every model variable the specification uses
 * @param errors         the standard error type
 * @param family         the model fitted
 */
public record SpecificationModel(int outcomeColumn, int[] controlColumns, int keyColumn, long variableMask,
        ErrorType errors, ModelFamily family) {
    /** Controls first, key predictor last: the order in which the solver factors the columns. */
    int[] factorOrder() {
        int[] order = java.util.Arrays.copyOf(controlColumns, controlColumns.length + 1);
        order[controlColumns.length] = keyColumn;
        return order;
    }
}
