package org.forkscape.infer;

import java.util.List;

/**
 * One factor of the influence analysis: a decision, or, for an all-subsets controls decision, one of
 * its optional controls with the levels {@code in} and {@code out}.
 *
 * @param name     the decision's name, or the optional control's column
 * @param decision the name of the decision it comes from
 * @param levels   level labels in order
 */
public record Factor(String name, String decision, List<String> levels) {
    public static final String IN = "in";
    public static final String OUT = "out";

    public Factor {
        levels = List.copyOf(levels);
    }
}
