package org.forkscape.check;

/**
 * At least N rows per estimated coefficient (n_obs / n_params in specifications.csv) in every fitted
 * specification. Measured: the smallest ratio over the fitted specifications.
 */
record RowsPerCoefficientRule(double atLeast) implements ReleaseRule {
    static final String NAME = "rows_per_coefficient";

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String requirement = "at least " + Numbers.text(atLeast) + " in every fitted specification";
        if (run.fewestRowsPerCoefficient().isEmpty()) {
            return RuleResult.of(NAME, false, null, requirement, "no specification was fitted");
        }
        double fewest = run.fewestRowsPerCoefficient().getAsDouble();
        return RuleResult.of(NAME, fewest >= atLeast, fewest, requirement, "fewest " + Numbers.text(fewest)
                + " (specification " + run.fewestRowsSpec() + ")");
    }
}
