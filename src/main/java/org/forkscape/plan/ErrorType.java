package org.forkscape.plan;

import org.forkscape.InputException;

/**
 * How the key coefficient's standard error is computed.
 *
 * @param kind          the family
 * @param clusterColumn the clustering column for {@link Kind#CLUSTER}, otherwise {@code null}
 */
public record ErrorType(Kind kind, String clusterColumn) {
    public enum Kind { CLASSICAL, HC0, HC1, HC2, HC3, CLUSTER }

    public static final ErrorType CLASSICAL = new ErrorType(Kind.CLASSICAL, null);

    /** The plan spelling: {@code classical}, {@code HC0}..{@code HC3}, {@code cluster:COLUMN}. */
    public String label() {
        return switch (kind) {
            case CLASSICAL -> "classical";
            case CLUSTER -> "cluster:" + clusterColumn;
            default -> kind.name();
        };
    }

    static ErrorType parse(String text, String path) {
        String t = text.trim();
        if (t.equalsIgnoreCase("classical")) {
            return CLASSICAL;
        }
        for (Kind k : new Kind[] {Kind.HC0, Kind.HC1, Kind.HC2, Kind.HC3}) {
            if (t.equalsIgnoreCase(k.name())) {
                return new ErrorType(k, null);
            }
        }
        if (t.startsWith("cluster:") && !t.substring("cluster:".length()).isBlank()) {
            return new ErrorType(Kind.CLUSTER, t.substring("cluster:".length()).trim());
        }
        if (t.equals("cluster") || t.equals("cluster:")) {
            throw new PlanException(path, "cluster errors name their column, as in cluster:school");
        }
        throw new PlanException(path, "unknown standard error type " + InputException.quoted(text)
                + "; use classical, HC0, HC1, HC2, HC3 or cluster:COLUMN");
    }
}
