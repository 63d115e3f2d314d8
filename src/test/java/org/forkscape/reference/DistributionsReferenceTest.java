package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import org.forkscape.fit.Distributions;
import org.junit.jupiter.api.Test;

/**
 * The engine's Student t quantiles and t and F tail probabilities against R's qt, pt and pf
 * ({@code distributions.csv}, written by {@code src/test/r/make-reference.R}; versions in
 * {@code versions.txt}). Every interval bound and p-value in a run comes from these three functions.
 *
 * <p>Tolerance {@value #RELATIVE} relative, times df/1000 when the largest df is above 1000. R evaluates
 * these to close to double precision (its nmath library). The engine's tail probabilities come from
 * Commons Math's regularized incomplete beta function I_x(a, b) with x = df/(df + t^2) and a = df/2: it
 * forms a log(x) from x rounded to a double near 1, so its relative error grows in proportion to df (about
 * 3e-16 df, measured here: 1e-12 at df 5000, 3e-10 at df 1e6), and the quantiles, found by a root search on
 * that function, inherit it. The tolerance grows the same way; at the df of the reference plans (at most
 * a few hundred) it is 1e-12. Tail probabilities compared go down to about 1e-190.
 */
class DistributionsReferenceTest {
    static final double RELATIVE = 1e-12;

    /** The tolerance at the given degrees of freedom (see the class comment). */
    static double tolerance(double df1, double df2) {
        double df = Double.isNaN(df2) ? df1 : Math.max(df1, df2);
        return RELATIVE * Math.max(1, df / 1000);
    }

    @Test
    void quantilesAndTailProbabilitiesAgreeWithR() {
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : ReferenceFiles.rows("distributions.csv")) {
            String kind = row.get("kind");
            double df1 = ReferenceFiles.number(row.get("df1"));
            double df2 = ReferenceFiles.number(row.get("df2"));
            double x = ReferenceFiles.number(row.get("x"));
            double expected = ReferenceFiles.number(row.get("value"));
            double actual;
            String source;
            switch (kind) {
                case "t_quantile" -> {
                    actual = Distributions.critical(df1, 1 - x);
                    source = "R qt(1 - (1 - " + x + ") / 2, " + df1 + ")";
                }
                case "t_two_sided_p" -> {
                    actual = Distributions.twoSidedP(x, df1);
                    source = "R 2 * pt(-" + x + ", " + df1 + ")";
                }
                case "f_upper_p" -> {
                    actual = Distributions.fUpperP(x, df1, df2);
                    source = "R pf(" + x + ", " + df1 + ", " + df2 + ", lower.tail = FALSE)";
                }
                default -> throw new IllegalStateException("unknown kind " + kind + " in distributions.csv");
            }
            double err = Agreement.relativeError(actual, expected);
            worst.merge(kind + " (relative)", err, Math::max);
            double tolerance = tolerance(df1, df2);
            if (!(err <= tolerance)) {
                failures.add(String.format("%s = %.17g, Forkscape gives %.17g (relative error %.2e > %.1e)", source,
                        expected, actual, err, tolerance));
            }
        }
        AgreementReport.write("distributions.txt", "R qt, pt, pf (" + ReferenceFiles.versions() + ")", worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with R's qt/pt/pf, distributions.csv ("
                + ReferenceFiles.versions() + "):\n" + String.join("\n", failures));
    }
}
