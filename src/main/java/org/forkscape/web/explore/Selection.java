package org.forkscape.web.explore;

import java.util.Arrays;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.plan.Factor;

/**
 * Which levels of each factor stay in the set: the explorer's filter. A specification stays when every
 * one of its levels is allowed. Written in requests as {@code drop=F.L,F.L} (factor id, level), the
 * levels the user unticked.
 */
public final class Selection {
    private final boolean[][] allowed;
    private final boolean[] restricted;

    private Selection(boolean[][] allowed) {
        this.allowed = allowed;
        this.restricted = new boolean[allowed.length];
        for (int f = 0; f < allowed.length; f++) {
            for (boolean a : allowed[f]) {
                if (!a) {
                    restricted[f] = true;
                }
            }
        }
    }

    /** Everything allowed. */
    public static Selection all(List<Factor> factors) {
        boolean[][] allowed = new boolean[factors.size()][];
        for (Factor f : factors) {
            allowed[f.id()] = new boolean[f.levels().size()];
            Arrays.fill(allowed[f.id()], true);
        }
        return new Selection(allowed);
    }

    /** The same selection with one more level dropped. */
    public Selection drop(int factor, int level) {
        boolean[][] copy = new boolean[allowed.length][];
        for (int f = 0; f < allowed.length; f++) {
            copy[f] = allowed[f].clone();
        }
        copy[factor][level] = false;
        return new Selection(copy);
    }

    /** The same selection with every level of the factor but {@code level} dropped. */
    public Selection only(int factor, int level) {
        boolean[][] copy = new boolean[allowed.length][];
        for (int f = 0; f < allowed.length; f++) {
            copy[f] = allowed[f].clone();
        }
        for (int l = 0; l < copy[factor].length; l++) {
            copy[factor][l] &= l == level;
        }
        return new Selection(copy);
    }

    /**
     * Parses the {@code drop} parameter; an empty or missing one allows everything. Unknown factors or
     * levels are an {@link InputException} at {@code drop}.
     */
    public static Selection parse(List<Factor> factors, String drop) {
        Selection s = all(factors);
        if (drop == null || drop.isBlank()) {
            return s;
        }
        for (String token : drop.split(",")) {
            String t = token.strip();
            if (t.isEmpty()) {
                continue;
            }
            int dot = t.indexOf('.');
            int f;
            int l;
            try {
                f = Integer.parseInt(t.substring(0, Math.max(0, dot)));
                l = Integer.parseInt(t.substring(dot + 1));
            } catch (NumberFormatException | StringIndexOutOfBoundsException e) {
                throw new InputException("drop", "\"" + t + "\" is not FACTOR.LEVEL (two whole numbers, as in 0.1)");
            }
            if (f < 0 || f >= factors.size() || l < 0 || l >= factors.get(f).levels().size()) {
                throw new InputException("drop", "there is no level " + t + " in this run");
            }
            s = s.drop(f, l);
        }
        return s;
    }

    public boolean allowed(int factor, int level) {
        return allowed[factor][level];
    }

    /** Whether any level of the factor is dropped. */
    public boolean restricts(int factor) {
        return restricted[factor];
    }

    boolean[] allowedLevels(int factor) {
        return allowed[factor];
    }

    /** The canonical {@code drop} text of this selection (for caching and links). */
    public String dropText() {
        StringBuilder b = new StringBuilder();
        for (int f = 0; f < allowed.length; f++) {
            for (int l = 0; l < allowed[f].length; l++) {
                if (!allowed[f][l]) {
                    if (b.length() > 0) {
                        b.append(',');
                    }
                    b.append(f).append('.').append(l);
                }
            }
        }
        return b.toString();
    }
}
