package org.forkscape.web.explore;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/**
 * The colour-by palette in frontend/js/helpers.js, read as the browser gets it: its colours must stay apart
 * when printed or viewed in greyscale. Lightness is CIE 1976 L* of the sRGB colour (sRGB transfer function
 * of IEC 61966-2-1 and the Rec. 709 luminance weights, from memory).
 */
class AlternativePaletteTest {
    /** Least L* difference between any two colours of the palette: common practice for telling greys apart. */
    private static final double LEAST_LIGHTNESS_STEP = 6;

    @Test
    void everyTwoAlternativeColoursDifferInLightness() throws Exception {
        String helpers = Files.readString(Path.of("frontend", "js", "helpers.js"));
        Matcher list = Pattern.compile("ALTERNATIVE_COLOURS = Object\\.freeze\\(\\[([^\\]]*)\\]\\)").matcher(helpers);
        assertTrue(list.find(), "helpers.js declares ALTERNATIVE_COLOURS");
        List<Double> lightness = new ArrayList<>();
        Matcher colour = Pattern.compile("'#([0-9A-Fa-f]{6})'").matcher(list.group(1));
        while (colour.find()) {
            lightness.add(lightness(colour.group(1)));
        }
        assertEquals(6, lightness.size());
        for (int a = 0; a < lightness.size(); a++) {
            for (int b = a + 1; b < lightness.size(); b++) {
                double step = Math.abs(lightness.get(a) - lightness.get(b));
                assertTrue(step >= LEAST_LIGHTNESS_STEP, "colours " + a + " and " + b + " differ by only " + step + " L*");
            }
        }
        // a reference point of the formula: sRGB mid-grey #777777 has L* close to 50 (from memory: 50.03)
        assertEquals(50.03, lightness("777777"), 0.05);
    }

    private static double lightness(String hex) {
        int v = Integer.parseInt(hex, 16);
        double r = linear(((v >> 16) & 255) / 255.0);
        double g = linear(((v >> 8) & 255) / 255.0);
        double b = linear((v & 255) / 255.0);
        double y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
        double f = y > 216.0 / 24389 ? Math.cbrt(y) : (24389.0 / 27 * y + 16) / 116;
        return 116 * f - 16;
    }

    private static double linear(double c) {
        return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
    }
}
