package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import tools.jackson.databind.json.JsonMapper;

/** The numbers the JSON API writes, through the server's own mapper. */
class ApiNumbersTest extends WebTest {
    @Autowired
    JsonMapper mapper;

    private record Bins(double[] values, Double one) {
    }

    @Test
    void undefinedNumbersAreNullAndDoublesTheShortestDecimalThatReadsBack() {
        // 2.82879384806159E17: Java 17's Double.toString writes 2.82879384806159008E17, not the shortest
        // decimal of the double (JDK-4511638, its example); the Schubfach writer gives the shortest, so this
        // fails if the API falls back to Double.toString
        double notShortestBefore = 2.82879384806159E17;
        String json = mapper.writeValueAsString(new Bins(new double[] {notShortestBefore, Double.NaN, 0.1,
            Double.NEGATIVE_INFINITY}, Double.POSITIVE_INFINITY));
        assertEquals("{\"values\":[2.82879384806159E17,null,0.1,null],\"one\":null}", json);
        assertEquals(notShortestBefore, Double.parseDouble("2.82879384806159E17"));
    }
}
