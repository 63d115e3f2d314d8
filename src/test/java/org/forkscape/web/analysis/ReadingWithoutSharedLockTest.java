package org.forkscape.web.analysis;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.nio.charset.StandardCharsets;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.forkscape.web.system.MemoryBudget;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.mock.web.MockMultipartFile;

/**
 * While one upload is parsed (its memory reservation held), other requests (a run's status, the list of
 * analyses, another analysis's data page) are answered: the parse holds no lock they need. The check is
 * by order, not by time: every one of those answers comes while the reservation is still held.
 */
class ReadingWithoutSharedLockTest extends WebTest {
    @Autowired
    MemoryBudget budget;

    @Test
    void otherRequestsAreAnsweredWhileAnUploadIsParsed() throws Exception {
        String other = upload("other.csv", CivicTestData.csv(160, 31));
        String run = runToEnd(other, CivicTestData.plan());
        // 1,000,000 rows of 8 one-digit numbers: 8 million cells, parsed in about a second
        StringBuilder csv = new StringBuilder("a,b,c,d,e,f,g,h\n");
        for (int i = 0; i < 1_000_000; i++) {
            csv.append("1,2,3,4,5,6,7,").append(i % 10).append('\n');
        }
        MockMultipartFile file = new MockMultipartFile("file", "large.csv", "text/csv",
                csv.toString().getBytes(StandardCharsets.UTF_8));
        CompletableFuture<Integer> large = CompletableFuture.supplyAsync(() -> {
            try {
                return mvc.perform(multipart("/api/analyses").file(file)).andReturn().getResponse().getStatus();
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        });
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
        while (budget.held() == 0 && !large.isDone() && System.nanoTime() < deadline) {
            Thread.sleep(1);
        }
        assertTrue(budget.held() > 0, "the upload's parse did not start");
        for (int i = 0; i < 3; i++) {
            mvc.perform(get("/api/analyses/" + other + "/runs/" + run)).andExpect(status().isOk());
            mvc.perform(get("/api/analyses")).andExpect(status().isOk());
            mvc.perform(get("/analyses/" + other)).andExpect(status().isOk());
        }
        assertTrue(budget.held() > 0, "the parse ended before the other requests were answered: make the file larger");
        assertEquals(201, large.get(120, TimeUnit.SECONDS));
        assertEquals(0, budget.held());
    }
}
