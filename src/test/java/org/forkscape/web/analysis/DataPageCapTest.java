package org.forkscape.web.analysis;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;

/**
 * The data page of a file with a 3-million-character cell and name, and of one with more columns than the
 * page lists: each text is cut to 100 characters with an ellipsis and its length, the columns to the first
 * 1,000, each with a note, and the JSON keeps everything whole.
 */
class DataPageCapTest extends WebTest {
    private static final int HUGE = 3_000_000;

    @Test
    void aHugeCellAndNameShowTheirFirstHundredCharactersAndTheirLength() throws Exception {
        String name = "n".repeat(HUGE);
        String cell = "c".repeat(HUGE);
        String id = upload("huge.csv", "ward," + name + "\n1," + cell + "\n2,short\n");
        String page = mvc.perform(get("/analyses/" + id)).andExpect(status().isOk())
                .andExpect(view().name(HomeController.DATA)).andReturn().getResponse().getContentAsString();
        String cut = "\u2026 (3,000,000 characters)";
        assertTrue(page.contains("c".repeat(100) + cut), "the level, cut");
        assertTrue(page.contains(">" + "n".repeat(100) + cut + "<"), "the name, cut");
        assertFalse(page.contains("c".repeat(101)), "no more of the cell than the cut");
        assertFalse(page.contains("n".repeat(101)), "no more of the name than the cut");
        assertTrue(page.length() < 100_000, "page of " + page.length() + " characters");
        assertTrue(page.contains("id=\"text-cut\""), "the note on cut texts");
        String api = mvc.perform(get("/api/analyses/" + id)).andExpect(status().isOk()).andReturn().getResponse()
                .getContentAsString();
        assertEquals(HUGE, json(api).path("columns").path(1).path("name").asString().length());
        assertTrue(api.contains(cell), "the JSON has the level whole");
    }

    @Test
    void aPageListsTheFirstThousandColumnsAndSaysHowManyMore() throws Exception {
        StringBuilder header = new StringBuilder();
        StringBuilder row = new StringBuilder();
        for (int j = 0; j < 1_200; j++) {
            header.append(j > 0 ? "," : "").append("col").append(j);
            row.append(j > 0 ? "," : "").append(j % 10);
        }
        String id = upload("many.csv", header + "\n" + row + "\n" + row + "\n");
        String page = mvc.perform(get("/analyses/" + id)).andExpect(status().isOk()).andReturn().getResponse()
                .getContentAsString();
        assertTrue(page.contains(">col999<") && !page.contains(">col1000<"), "the first 1,000 listed");
        assertTrue(page.contains("The first 1,000 columns are listed here; the other 200 are in the data and in the "
                + "JSON at /api/analyses/" + id + "."), "the note");
        assertFalse(page.contains("id=\"text-cut\""), "no text was cut");
        String api = mvc.perform(get("/api/analyses/" + id)).andReturn().getResponse().getContentAsString();
        assertEquals(1_200, json(api).path("columns").size());
    }
}
