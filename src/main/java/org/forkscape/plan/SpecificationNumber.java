package org.forkscape.plan;

import java.math.BigInteger;

/**
 * A specification's 1-based number in its plan's whole space, as written in the results.
 *
 * @param value  the number
 * @param asText whether JSON carries it as decimal text: so it is in a space beyond a {@code long}, where
 *               a JSON number would lose digits in most readers (a double keeps 53 bits)
 */
public record SpecificationNumber(BigInteger value, boolean asText) {
    /** The number as JSON writes it: a number within a long's space, decimal text beyond. */
    public Object json() {
        return asText ? value.toString() : (Object) value.longValueExact();
    }

    @Override
    public String toString() {
        return value.toString();
    }
}
