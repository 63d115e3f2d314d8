package org.forkscape.infer;

import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.run.Json;
import org.forkscape.text.HumanNumbers;

/**
 * How many null draws were at least as extreme as the observed curve, out of the draws compared. The
 * p-value is their share, {@code exceedances / draws}. A share of zero does not mean p = 0: R draws
 * cannot resolve a p below 1 / (R + 1), the smallest value of the Monte Carlo p-value (1 + exceedances)
 * / (R + 1) (Davison &amp; Hinkley 1997, Bootstrap Methods and their Application, chapter 4; North,
 * Curtis &amp; Sham 2002, "A note on the calculation of empirical P values from Monte Carlo procedures",
 * American Journal of Human Genetics 71(2)), so a zero is reported as below that bound.
 *
 * @param exceedances draws at least as extreme as the observed curve
 * @param draws       draws compared (those in which at least one specification could be fitted)
 */
public record DrawTally(int exceedances, int draws) {

    public DrawTally {
        if (exceedances < 0 || exceedances > draws) {
            throw new IllegalArgumentException(exceedances + " exceedances of " + draws + " draws");
        }
    }

    /** The share of draws at least as extreme; NaN when no draw was compared. */
    public double p() {
        return draws == 0 ? Double.NaN : (double) exceedances / draws;
    }

    /** 1 / (draws + 1) when no draw was as extreme (the true p is reported as below it), otherwise NaN. */
    public double bound() {
        return draws > 0 && exceedances == 0 ? 1.0 / (draws + 1) : Double.NaN;
    }

    /** For example "p < 0.0034 (1/301; none of 300 draws as extreme)" or "p = 0.012 (3 of 300 draws)". */
    public String text() {
        return HumanNumbers.drawP(exceedances, draws);
    }

    /** The summary.json entry of one test: {@code exceedances}, {@code draws}, {@code p}, {@code p_bound}. */
    Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("exceedances", exceedances);
        m.put("draws", draws);
        m.put("p", Json.number(p()));
        m.put("p_bound", Json.number(bound()));
        return m;
    }
}
