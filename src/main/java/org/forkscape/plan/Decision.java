package org.forkscape.plan;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * One analytic choice point of a plan. A specification picks one alternative of every decision; an
 * all-subsets controls decision has one alternative per subset of its optional pool, numbered as a bit
 * mask (bit j set = optional control j is in).
 */
public sealed interface Decision {
    String name();

    /** The plan spelling of the kind. */
    String kind();

    /** How many alternatives; at least 1. */
    long alternativeCount();

    /** The label written in specifications.csv for alternative {@code choice}. */
    String label(long choice);

    record Outcome(String name, List<VariableChoice> alternatives) implements Decision {
        public Outcome {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "outcome";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    record Predictor(String name, List<VariableChoice> alternatives) implements Decision {
        public Predictor {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "predictor";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    /**
     * Controls: {@code required} are in every specification; with {@code sets == null} every subset of
     * {@code optional} is an alternative, otherwise each named set is.
     */
    record Controls(String name, List<String> required, List<String> optional, Map<String, List<String>> sets)
            implements Decision {
        public Controls {
            required = List.copyOf(required);
            optional = List.copyOf(optional);
            if (sets != null) {
                Map<String, List<String>> copy = new LinkedHashMap<>();
                sets.forEach((k, v) -> copy.put(k, List.copyOf(v)));
                sets = java.util.Collections.unmodifiableMap(copy);
            }
        }

        public boolean allSubsets() {
            return sets == null;
        }

        public String kind() {
            return "controls";
        }

        public long alternativeCount() {
            return allSubsets() ? 1L << optional.size() : sets.size();
        }

        public String label(long choice) {
            if (!allSubsets()) {
                return new ArrayList<>(sets.keySet()).get((int) choice);
            }
            StringBuilder b = new StringBuilder();
            for (int j = 0; j < optional.size(); j++) {
                if ((choice >>> j & 1L) != 0) {
                    if (b.length() > 0) {
                        b.append(" + ");
                    }
                    b.append(optional.get(j));
                }
            }
            return b.length() == 0 ? "none" : b.toString();
        }

        /** The columns alternative {@code choice} adds to the required ones. */
        public List<String> chosen(long choice) {
            if (!allSubsets()) {
                return new ArrayList<>(sets.values()).get((int) choice);
            }
            List<String> in = new ArrayList<>();
            for (int j = 0; j < optional.size(); j++) {
                if ((choice >>> j & 1L) != 0) {
                    in.add(optional.get(j));
                }
            }
            return in;
        }
    }

    record Sample(String name, List<SampleRule> alternatives) implements Decision {
        public Sample {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "sample";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    record Errors(String name, List<ErrorType> alternatives) implements Decision {
        public Errors {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "errors";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    record Absorb(String name, List<AbsorbChoice> alternatives) implements Decision {
        public Absorb {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "absorb";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    /** Analytic weights: each alternative a weight column, or none (unweighted). */
    record Weights(String name, List<WeightChoice> alternatives) implements Decision {
        public Weights {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "weights";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).label();
        }
    }

    /** The model each specification fits: {@code ols}, {@code logit}, {@code probit} or {@code poisson}. */
    record Model(String name, List<ModelFamily> alternatives) implements Decision {
        public Model {
            alternatives = List.copyOf(alternatives);
        }

        public String kind() {
            return "model";
        }

        public long alternativeCount() {
            return alternatives.size();
        }

        public String label(long choice) {
            return alternatives.get((int) choice).spelling();
        }
    }
}
