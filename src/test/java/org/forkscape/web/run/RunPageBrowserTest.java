package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.BrowserDriver;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.analysis.AnalysisService;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.context.TestConfiguration;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.context.annotation.Bean;
import org.springframework.context.annotation.Import;
import org.springframework.context.annotation.Primary;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;

/**
 * The run page in a real browser (headless Chromium): while the inference stage runs (held here until the
 * test lets it go) the page shows the fit done and the inference under way, each with its own line; once
 * the run ends it becomes the explorer. A run that fits nothing shows what happened and what to do, with
 * no progress bar, no count of specifications and no cancel button.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
@Import(RunPageBrowserTest.HeldInference.class)
class RunPageBrowserTest {
    private static final Path TEMP = temp();
    private static final CountDownLatch IN_INFERENCE = new CountDownLatch(1);
    private static final CountDownLatch RELEASE = new CountDownLatch(1);
    private static ChromeDriver driver;

    @LocalServerPort
    int port;
    @Autowired
    AnalysisService analyses;
    @Autowired
    RunQueue queue;
    @Autowired
    Workspace workspace;

    /** The real inference stage, entered only once the test lets it go. */
    @TestConfiguration
    static class HeldInference {
        @Bean
        @Primary
        SummarySections held(InferenceSummary real) {
            return (run, progress, cancel) -> {
                IN_INFERENCE.countDown();
                try {
                    RELEASE.await(60, TimeUnit.SECONDS);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                return real.of(run, progress, cancel);
            };
        }
    }

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", () -> TEMP.resolve("workspace").toString());
        registry.add("forkscape.demo.enabled", () -> "false");
    }

    @BeforeAll
    static void browser() throws IOException {
        Files.createDirectories(TEMP.resolve("downloads"));
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1200, 1000);
    }

    @AfterEach
    void noScriptErrors() {
        RELEASE.countDown();
        assertEquals(List.of(), BrowserDriver.severeConsoleMessages(driver), "the browser console reported errors");
    }

    @AfterAll
    static void close() {
        if (driver != null) {
            driver.quit();
        }
    }

    @Test
    void eachPhaseAfterTheFitShowsItsOwnProgressThenThePageBecomesTheExplorer() throws Exception {
        StoredAnalysis analysis = analysis("Outreach and turnout, phases");
        StoredRun run = queue.submit(analysis, CivicTestData.plan());
        assertTrue(IN_INFERENCE.await(60, TimeUnit.SECONDS));
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));
        driver.get(page(analysis, run));
        wait.until(ExpectedConditions.attributeContains(By.id("phase-inference"), "class", "phase-current"));
        assertTrue(driver.findElement(By.id("phase-fitting")).getAttribute("class").contains("phase-done"));
        assertFalse(driver.findElement(By.id("phase-writing")).getAttribute("class").contains("phase-current"));
        assertEquals("576", driver.findElement(By.id("run-done")).getText());
        assertEquals("576", driver.findElement(By.id("run-total")).getText());
        // no null draws: the inference has nothing to count, and says what it is doing instead of a time left
        assertTrue(driver.findElement(By.id("inference-text")).getText().startsWith("computing the summaries"),
                driver.findElement(By.id("inference-text")).getText());
        assertEquals(null, driver.findElement(By.id("inference-bar")).getDomAttribute("value"), "an indeterminate bar");
        assertTrue(driver.findElement(By.id("cancel-run")).isDisplayed());
        BrowserDriver.screenshot(driver, "run-inference-phase");

        RELEASE.countDown();
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("export-png")));
        String log = Files.readString(workspace.runFolder(analysis.id(), run.id()).resolve(Workspace.LOG));
        assertTrue(log.indexOf("inference") < log.indexOf("writing files") && log.contains("finished"), log);
    }

    @Test
    void aRunThatFitsNothingSaysWhatHappenedWithoutProgressOrCancel() throws Exception {
        StoredAnalysis analysis = analysis("Outreach and turnout, urban only");
        // the key predictor varies in the data, but not in the only rows the plan keeps: the fit finds out
        String plan = """
                {"data": "data.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "turnout", "column": "turnout"}]},
                  {"name": "place", "kind": "predictor", "alternatives": [{"label": "urban", "column": "urban"}]},
                  {"name": "rows", "kind": "sample", "alternatives": [{"label": "urban", "keep": "urban == 1"}]}]}
                """;
        StoredRun run = queue.submit(analysis, plan);
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));
        driver.get(page(analysis, run));
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("run-failed")));
        String failed = driver.findElement(By.id("run-failed")).getText();
        assertTrue(failed.contains("no specification could be fitted: the only specification failed"), failed);
        assertTrue(failed.contains("Correct the plan"), failed);
        assertEquals(List.of(), driver.findElements(By.tagName("progress")));
        assertEquals(List.of(), driver.findElements(By.id("cancel-run")));
        assertEquals(List.of(), driver.findElements(By.id("run-progress")));
        assertFalse(driver.findElement(By.tagName("main")).getText().contains("specifications fitted"));
        BrowserDriver.screenshot(driver, "run-failed");
    }

    private StoredAnalysis analysis(String title) {
        return analyses.create(title, "data.csv", new ByteArrayInputStream(CivicTestData.csv(120, 4)
                .getBytes(StandardCharsets.UTF_8)), false);
    }

    private String page(StoredAnalysis analysis, StoredRun run) {
        return "http://localhost:" + port + "/analyses/" + analysis.id() + "/runs/" + run.id();
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-run-page-");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
