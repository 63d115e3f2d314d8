package org.forkscape.report;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import org.forkscape.Version;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.Transform;
import org.forkscape.plan.VariableChoice;
import org.forkscape.plan.WeightChoice;
import org.forkscape.run.Scale;
import tools.jackson.databind.JsonNode;

/**
 * The methods paragraph for a paper's appendix: what the run did, naming the published source of each
 * method it used (the same sources the code cites where each is implemented), and the Forkscape version.
 * Only the methods the run's plan and summary show it used are named.
 */
final class MethodsText {
    private MethodsText() {
    }

    static String of(Plan plan, JsonNode summary, Scale scale) {
        List<String> s = new ArrayList<>();
        long fitted = summary.path("fitted").asLong();
        s.add("We fitted " + String.format("%,d", fitted) + " specifications"
                + (summary.path("sampled").asBoolean() ? " (a seeded random sample of the "
                + summary.path("specifications_in_plan").asString() + " the plan defines)" : "")
                + ", every combination of the analytic choices stated in the plan, and report them together as a "
                + "specification curve (Simonsohn, Simmons & Nelson 2020, \"Specification curve analysis\", "
                + "Nature Human Behaviour 4, 1208-1214), with Forkscape " + Version.current() + ".");
        Set<ModelFamily> models = new LinkedHashSet<>(plan.modelFamilies());
        if (models.contains(ModelFamily.OLS)) {
            s.add("Least-squares specifications were solved from cross-product matrices by Cholesky factorization, "
                    + "with a refit by Householder QR wherever the factorization could lose precision (Higham 2002, "
                    + "Accuracy and Stability of Numerical Algorithms, 2nd ed.).");
        }
        if (models.stream().anyMatch(m -> m != ModelFamily.OLS)) {
            s.add("Logit, probit and Poisson specifications were fitted by maximum likelihood through iteratively "
                    + "reweighted least squares (Nelder & Wedderburn 1972, JRSS A 135(3); McCullagh & Nelder 1989, "
                    + "Generalized Linear Models, 2nd ed.), and their key effect is also reported as the average "
                    + "marginal effect with a delta-method standard error (Cameron & Trivedi 2005, "
                    + "Microeconometrics).");
        }
        Set<ErrorType.Kind> errors = new LinkedHashSet<>();
        for (Decision.Errors e : plan.all(Decision.Errors.class)) {
            e.alternatives().forEach(t -> errors.add(t.kind()));
        }
        List<String> robust = new ArrayList<>();
        if (errors.contains(ErrorType.Kind.HC0) || errors.contains(ErrorType.Kind.HC1)) {
            robust.add("heteroskedasticity-consistent errors HC0/HC1 (White 1980, Econometrica 48(4))");
        }
        if (errors.contains(ErrorType.Kind.HC2) || errors.contains(ErrorType.Kind.HC3)) {
            robust.add("HC2/HC3 (MacKinnon & White 1985, Journal of Econometrics 29(3))");
        }
        if (errors.contains(ErrorType.Kind.CLUSTER)) {
            robust.add("cluster-robust CR1 errors (Cameron & Miller 2015, Journal of Human Resources 50(2))");
        }
        if (!robust.isEmpty()) {
            s.add("Standard errors " + (errors.contains(ErrorType.Kind.CLASSICAL) ? "were classical or " : "were ")
                    + String.join("; ", robust) + ".");
        }
        if (plan.all(Decision.Absorb.class).stream().flatMap(a -> a.alternatives().stream())
                .anyMatch(c -> !c.columns().isEmpty())) {
            s.add("Absorbed fixed effects were removed by the within transformation, identical to including their "
                    + "dummies (Frisch & Waugh 1933, Econometrica 1(4); Lovell 1963, JASA 58(304)).");
        }
        if (plan.severalAbsorbedPath() != null) {
            s.add("Two crossed fixed effects were removed together by alternating projections accelerated by "
                    + "conjugate gradients (Gaure 2013, Computational Statistics & Data Analysis 66; Guimar\u00e3es & "
                    + "Portugal 2010, Stata Journal 10(4); Hestenes & Stiefel 1952, Journal of Research of the National "
                    + "Bureau of Standards 49(6)), and counted in K by the rank of their dummies: their levels "
                    + "less one per connected component of the levels' bipartite graph.");
            if (errors.contains(ErrorType.Kind.HC2) || errors.contains(ErrorType.Kind.HC3)) {
                s.add("Beside them, the leverages of HC2/HC3 were exact: the hat matrix of the partitioned regression "
                        + "is the dummies' plus the demeaned columns' (Frisch-Waugh-Lovell; Davidson & MacKinnon 2004, "
                        + "Econometric Theory and Methods, sections 2.4 and 2.6), the dummies' part from the Schur "
                        + "complement of their cross-product matrix, one level fixed per connected component.");
            }
        }
        if (plan.all(Decision.Weights.class).stream().flatMap(w -> w.alternatives().stream())
                .anyMatch(WeightChoice::weighted)) {
            s.add("Weighted specifications used analytic weights: weighted least squares, or prior weights in the "
                    + "likelihood of the generalized linear models, as R's lm and glm take them, with rows of zero "
                    + "or missing weight left out (McCullagh & Nelder 1989, section 2.5).");
        }
        if (usesWinsorize(plan)) {
            s.add("Winsorized variables were cut at quantiles interpolated between order statistics (Hyndman & Fan "
                    + "1996, The American Statistician 50(4), definition 7).");
        }
        s.add("Medians and quartiles of the estimates are type 7 sample quantiles (Hyndman & Fan 1996).");
        if (scale == Scale.STANDARDIZED) {
            s.add("The curve is drawn on standardized coefficients (Cohen, Cohen, West & Aiken 2003, Applied "
                    + "Multiple Regression/Correlation Analysis for the Behavioral Sciences, 3rd ed.).");
        } else if (scale == Scale.PARTIAL_CORRELATION) {
            s.add("The curve is drawn on partial correlations t / sqrt(t^2 + df) (Greene 2012, Econometric "
                    + "Analysis, 7th ed.; Stanley & Doucouliagos 2012, Meta-Regression Analysis in Economics and "
                    + "Business).");
        }
        JsonNode draws = summary.path("null");
        if (draws.isObject()) {
            String method = draws.path("method").asString();
            s.add("The whole curve was tested against " + draws.path("draws").asInt() + " null draws ("
                    + (method.equals("permute") ? "the key predictor permuted between rows"
                    : "the key effect removed and " + draws.path("resampled").asString() + " resampled with "
                    + "replacement" + (draws.path("resampled").asString().equals("clusters")
                    ? ", as in Cameron, Gelbach & Miller 2008, Review of Economics and Statistics 90(3)" : ""))
                    + "; Simonsohn, Simmons & Nelson 2020) on three statistics: the median estimate, the share "
                    + "significant in the dominant sign and the mean normal score (Stouffer, Suchman, DeVinney, "
                    + "Star & Williams 1949, The American Soldier); p-values are shares of draws at least as extreme "
                    + "(Davison & Hinkley 1997, Bootstrap Methods and their Application; North, Curtis & Sham 2002, "
                    + "American Journal of Human Genetics 71(2)), and the smallest nominal p was adjusted for its "
                    + "selection by the min-p method (Westfall & Young 1993, Resampling-Based Multiple Testing).");
        }
        s.add("Extreme bounds are the lowest lower and highest upper interval bound (Leamer 1983, \"Let's take the "
                + "con out of econometrics\", American Economic Review 73(1)); within groups of specifications with "
                + "the same outcome, key predictor, model and rows we report CDF(0) (Sala-i-Martin 1997, \"I just "
                + "ran two million regressions\", American Economic Review 87(2)) and BIC weights (Raftery 1995, "
                + "\"Bayesian model selection in social research\", Sociological Methodology 25).");
        s.add("The share of the estimates' variance each decision explains is a one-way analysis of variance of the "
                + "estimates by its alternatives.");
        s.add("A robust curve is not proof of a causal effect, and the set of specifications was to be decided "
                + "before the results were seen.");
        return "# Methods\n\n" + String.join(" ", s) + "\n";
    }

    private static boolean usesWinsorize(Plan plan) {
        List<VariableChoice> choices = new ArrayList<>(plan.outcome().alternatives());
        choices.addAll(plan.predictor().alternatives());
        return choices.stream().anyMatch(c -> c.transform() instanceof Transform.Winsorize);
    }
}
