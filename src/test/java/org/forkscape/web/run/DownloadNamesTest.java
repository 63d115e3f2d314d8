package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** The analysis's part of a download's name: plain lower-case words joined by hyphens (common practice for slugs). */
class DownloadNamesTest {
    @Test
    void titlesBecomeSlugsThatAnyFileSystemTakes() {
        assertEquals("outreach-and-turnout", DownloadNames.slug("Outreach and turnout"));
        assertEquals("ecole-reading-2026", DownloadNames.slug("  École: reading / 2026! "));
        assertEquals("analysis", DownloadNames.slug("../.."));
        assertEquals("analysis", DownloadNames.slug(""));
        // cut at the last word boundary within 40 characters
        assertEquals("tree-cover-and-summer-heat-in-the-city", DownloadNames.slug(
                "Tree cover and summer heat in the city districts, 2019 to 2025"));
    }
}
