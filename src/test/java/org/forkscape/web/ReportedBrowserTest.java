package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.forkscape.run.Json;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.WebElement;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import tools.jackson.databind.JsonNode;

/**
 * The reported specification in headless Chromium: a run of a plan that names one shows it as a dashed line
 * at its place in the curve and in the grid, and says in a sentence where it sits, with summary.json's numbers;
 * a filter that leaves it out removes the line and the sentence says why.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class ReportedBrowserTest {
    private static final Path TEMP = temp();
    /** 8 control subsets x 2 error types; the reported one is subset 3 (median_age, rainfall) with HC1: number 8. */
    private static final String PLAN = """
            {
              "data": "data.csv",
              "reported": {"outcome": "turnout", "outreach": "hours", "controls": "rainfall + median_age",
                "errors": "HC1"},
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "turnout", "column": "turnout"}]},
                {"name": "outreach", "kind": "predictor", "alternatives": [
                  {"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls", "optional": ["median_age", "rainfall", "income_index"]},
                {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
              ]
            }
            """;
    private static ChromeDriver driver;

    @LocalServerPort
    int port;

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", () -> TEMP.resolve("workspace").toString());
        registry.add("forkscape.demo.enabled", () -> "false");
    }

    @BeforeAll
    static void browser() throws IOException {
        Files.createDirectories(TEMP.resolve("downloads"));
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1440, 1400, true);
    }

    @AfterEach
    void noScriptErrors() {
        assertEquals(List.of(), BrowserDriver.severeConsoleMessages(driver), "the browser console reported errors");
    }

    @AfterAll
    static void close() {
        if (driver != null) {
            driver.quit();
        }
    }

    @Test
    void theReportedSpecificationIsMarkedAndPlacedInASentence() throws Exception {
        String analysis = upload(CivicTestData.csv(200, 3));
        HttpResponse<String> started = send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + analysis
                + "/runs")).header("Content-Type", "application/json").POST(HttpRequest.BodyPublishers.ofString(PLAN)));
        assertEquals(202, started.statusCode(), started.body());
        String run = match(started.body(), "\"id\":\"([0-9a-z-]+)\"");
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(base() + "/analyses/" + analysis + "/runs/" + run);
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 16 of 16"));

        JsonNode layout = Json.MAPPER.readTree(send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/"
                + analysis + "/runs/" + run + "/layout")).GET()).body());
        JsonNode reported = layout.get("summary").get("reported");
        assertEquals(8, reported.get("spec").intValue());
        JsonNode place = reported.get("scales").get("as_fitted");
        WebElement note = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("reported-note")));
        wait.until(d -> note.getText().contains("dashed line"));
        // as the page's numbers.js writes a share: one decimal, ".0" dropped (0% only when exact)
        String percent = String.format(java.util.Locale.ROOT, "%.1f", 100 * place.get("share_smaller").doubleValue())
                .replaceFirst("\\.0$", "");
        String sentence = note.getText();
        assertTrue(sentence.startsWith("The reported specification (number 8): the reported estimate, "), sentence);
        assertTrue(sentence.contains("is larger than " + percent + "% of the 16 specifications of the run in its "
                + "comparable group"), sentence);
        assertTrue(sentence.contains("its rank is " + place.get("rank").intValue() + " from the smallest"), sentence);

        // the line stands where the server puts specification 8 in the curve shown, the same in both panels;
        // its classical twin has the same estimate and ties share the lowest rank, so it stands at rank - 1 or rank
        WebElement curve = driver.findElement(By.id("curve-canvas"));
        WebElement grid = driver.findElement(By.id("grid-canvas"));
        String position = curve.getAttribute("data-reported-position");
        assertEquals(position, grid.getAttribute("data-reported-position"));
        JsonNode at = Json.MAPPER.readTree(send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + analysis
                + "/runs/" + run + "/at?position=" + position)).GET()).body());
        assertEquals(8, at.get("spec").intValue());
        int rank = place.get("rank").intValue();
        assertTrue(Integer.parseInt(position) == rank - 1 || Integer.parseInt(position) == rank, position + ", rank " + rank);
        int curveX = Integer.parseInt(curve.getAttribute("data-reported-x"));
        int gridX = Integer.parseInt(grid.getAttribute("data-reported-x"));
        assertTrue(Math.abs(curveX - gridX) <= 1, curveX + " in the curve, " + gridX + " in the grid");
        BrowserDriver.screenshot(driver, "reported-1-marked");

        // dropping HC1 drops it: no line, and the sentence says so
        int errors = -1;
        for (JsonNode f : layout.get("factors")) {
            if (f.get("name").stringValue().equals("errors")) {
                errors = f.get("id").intValue();
            }
        }
        driver.findElement(By.cssSelector("input[data-level='" + errors + ".1']")).click();
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 8 of 16"));
        wait.until(d -> note.getText().contains("The set shown does not hold it"));
        assertNull(curve.getAttribute("data-reported-position"));
        assertNull(grid.getAttribute("data-reported-x"));
    }

    /** The plan form has no field for the key; an edit saved through the form keeps it as written. */
    @Test
    void thePlanFormKeepsTheKeyWhenItSaves() throws Exception {
        String analysis = upload(CivicTestData.csv(200, 3));
        HttpResponse<String> put = send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + analysis + "/plan"))
                .header("Content-Type", "application/json").PUT(HttpRequest.BodyPublishers.ofString(PLAN)));
        assertEquals(200, put.statusCode(), put.body());
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));
        driver.get(base() + "/analyses/" + analysis + "/plan");
        WebElement title = wait.until(d -> d.findElement(By.cssSelector("[data-path='title'] input")));
        title.sendKeys("Outreach and turnout, as reported");
        driver.findElement(By.id("save-plan")).click();
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "Saved."));
        JsonNode plan = Json.MAPPER.readTree(send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/"
                + analysis + "/plan")).GET()).body()).get("plan");
        assertEquals("Outreach and turnout, as reported", plan.get("title").stringValue());
        assertEquals("rainfall + median_age", plan.get("reported").get("controls").stringValue());
        assertEquals("HC1", plan.get("reported").get("errors").stringValue());
    }

    private String base() {
        return "http://localhost:" + port;
    }

    private static HttpResponse<String> send(HttpRequest.Builder request) throws Exception {
        return HttpClient.newHttpClient().send(request.build(), HttpResponse.BodyHandlers.ofString());
    }

    private String upload(String csv) throws Exception {
        return BrowserDriver.upload(base(), "outreach.csv", csv);
    }

    private static String match(String text, String regex) {
        Matcher m = Pattern.compile(regex).matcher(text);
        assertTrue(m.find(), text + " has no " + regex);
        return m.group(1);
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-reported-");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
