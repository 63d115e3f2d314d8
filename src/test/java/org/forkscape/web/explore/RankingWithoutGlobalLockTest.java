package org.forkscape.web.explore;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.forkscape.data.CsvLimits;
import org.forkscape.data.Table;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.system.ForkscapeSettings;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;

/**
 * A run being ranked holds up the requests for that run only: while one run's ranking is stopped inside
 * its data read, another run is ranked and served, and the stopped one, once let go, is ranked once.
 */
class RankingWithoutGlobalLockTest extends WebTest {
    /** Long enough for any machine to rank a 576-specification run; reached only when a lock is shared. */
    private static final long DEADLOCK_SECONDS = 60;

    @Autowired
    Workspace workspace;
    @Autowired
    CsvLimits limits;
    @Autowired
    InfluenceAnalysis influence;
    @Autowired
    ForkscapeSettings settings;

    @Test
    void anotherRunIsRankedWhileOneIsBeingRanked() throws Exception {
        String slowId = upload("slow.csv", CivicTestData.csv(160, 21));
        String slowRun = runToEnd(slowId, CivicTestData.plan());
        String quickId = upload("quick.csv", CivicTestData.csv(160, 22));
        String quickRun = runToEnd(quickId, CivicTestData.plan());
        StoredAnalysis slow = workspace.analysis(slowId).orElseThrow();
        StoredAnalysis quick = workspace.analysis(quickId).orElseThrow();

        CountDownLatch reading = new CountDownLatch(1);
        CountDownLatch letGo = new CountDownLatch(1);
        AnalysisService stoppingOnSlow = new AnalysisService(workspace, limits) {
            @Override
            public Table table(StoredAnalysis analysis) {
                if (analysis.id().equals(slowId)) {
                    reading.countDown();
                    try {
                        letGo.await();
                    } catch (InterruptedException e) {
                        Thread.currentThread().interrupt();
                    }
                }
                return super.table(analysis);
            }
        };
        ExploreService service = new ExploreService(workspace, stoppingOnSlow, influence, settings);
        StoredRun slowStored = workspace.run(slowId, slowRun).orElseThrow();
        CompletableFuture<RankedRun> first = CompletableFuture.supplyAsync(() -> service.ranked(slow, slowStored));
        CompletableFuture<RankedRun> second = CompletableFuture.supplyAsync(() -> service.ranked(slow, slowStored));
        reading.await(DEADLOCK_SECONDS, TimeUnit.SECONDS);

        CompletableFuture<RankedRun> other = CompletableFuture.supplyAsync(
                () -> service.ranked(quick, workspace.run(quickId, quickRun).orElseThrow()));
        // 576 specifications, every one fitted (CivicTestData.plan)
        assertEquals(576, other.get(DEADLOCK_SECONDS, TimeUnit.SECONDS).size());

        letGo.countDown();
        assertSame(first.get(DEADLOCK_SECONDS, TimeUnit.SECONDS), second.get(DEADLOCK_SECONDS, TimeUnit.SECONDS),
                "the run was ranked once for both requests");
    }
}
