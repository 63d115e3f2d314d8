package org.forkscape.fit;

/**
 * Thrown when a specification needs a pass over its rows (the precision guard's QR refit, the HC2 or HC3
 * leverages, a sandwich whose row-free route could lose digits, a generalized linear model's iterations)
 * and its variant holds only statistics summed elsewhere ({@link DataVariant#holdsRows}). The message says
 * which pass, in a researcher's words.
 */
public final class RowPassUnavailable extends RuntimeException {
    private static final long serialVersionUID = 1L;

    RowPassUnavailable(String pass) {
        super("it needs " + pass + ", a pass over its rows, which a run from statistics alone does not make");
    }
}
