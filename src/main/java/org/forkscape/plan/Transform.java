package org.forkscape.plan;

import java.util.Locale;
import org.forkscape.InputException;

/**
 * A recoding of an outcome or predictor column, applied within each data variant.
 * {@code standardize} and {@code winsorize} use the rows kept by the sample decisions of that variant.
 */
public sealed interface Transform {
    /** The spelling used in plan files. */
    String spelling();

    record Identity() implements Transform {
        public String spelling() {
            return "none";
        }
    }

    record Log() implements Transform {
        public String spelling() {
            return "log";
        }
    }

    record Log1p() implements Transform {
        public String spelling() {
            return "log1p";
        }
    }

    record Sqrt() implements Transform {
        public String spelling() {
            return "sqrt";
        }
    }

    /** (x - mean) / sd, sd with n - 1. */
    record Standardize() implements Transform {
        public String spelling() {
            return "standardize";
        }
    }

    /**
     * Values below the {@code fraction} quantile or above the {@code 1 - fraction} quantile are set to
     * those quantiles; quantiles by linear interpolation between order statistics (Hyndman &amp; Fan 1996,
     * "Sample quantiles in statistical packages", The American Statistician 50(4), definition 7).
     */
    record Winsorize(double fraction) implements Transform {
        public String spelling() {
            return "winsorize:" + fraction;
        }
    }

    Transform NONE = new Identity();

    /** Parses a plan's spelling; {@code path} names the field in the message when it is wrong. */
    static Transform parse(String text, String path) {
        String t = text.trim().toLowerCase(Locale.ROOT);
        switch (t) {
            case "", "none":
                return NONE;
            case "log":
                return new Log();
            case "log1p":
                return new Log1p();
            case "sqrt":
                return new Sqrt();
            case "standardize":
                return new Standardize();
            default:
                break;
        }
        if (t.startsWith("winsorize:")) {
            String f = t.substring("winsorize:".length());
            if (!f.strip().matches("\\d*\\.?\\d+(e-?\\d+)?")) {
                throw new PlanException(path, "winsorize needs a fraction, as in winsorize:0.05; found \"" + f + "\"");
            }
            double fraction = Double.parseDouble(f.strip());
            if (!(fraction > 0 && fraction < 0.5)) {
                throw new PlanException(path, "the winsorize fraction must lie strictly between 0 and 0.5; found " + f);
            }
            return new Winsorize(fraction);
        }
        throw new PlanException(path, "unknown transform " + InputException.quoted(text)
                + "; use log, log1p, sqrt, standardize or winsorize:F (0 < F < 0.5)");
    }
}
