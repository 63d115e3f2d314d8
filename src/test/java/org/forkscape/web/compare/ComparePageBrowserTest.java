package org.forkscape.web.compare;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintStream;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.cli.CommandLine;
import org.forkscape.run.Json;
import org.forkscape.web.BrowserDriver;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.WebElement;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.Select;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import tools.jackson.databind.JsonNode;

/**
 * The compare page in headless Chromium, against the batch command: two runs of one analysis (B adds a control
 * and an outcome alternative, both with null draws) are picked on the page, and every number it shows (the
 * specification counts, the whole run's headline numbers and joint tests, each group's) is the number of the
 * compare.json that {@code compare RUN_A RUN_B --out DIR} writes for the same two run folders; the curves hold
 * as many specifications, and as many added ones, as that command's compare.csv. The same run B uploaded as a
 * zip of its three files gives the same comparison, and a zip without summary.json is refused in one sentence.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class ComparePageBrowserTest {
    private static final Path TEMP = temp();
    private static final String PLAN = """
            {
              "data": "data.csv", "nullDraws": 19, "seed": 5,
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [%s]},
                {"name": "outreach", "kind": "predictor", "alternatives": [{"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls", "optional": [%s]},
                {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
              ]
            }
            """;
    private static final String TURNOUT = "{\"label\": \"turnout\", \"column\": \"turnout\"}";
    private static final String CHANGE = "{\"label\": \"turnout change\", \"column\": \"turnout_change\"}";
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
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1440, 1400);
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
    void thePageShowsTheBatchCommandsNumbersForTwoRunsAndForAnUploadedRun() throws Exception {
        String analysis = BrowserDriver.upload(base(), "outreach.csv", CivicTestData.csv(200, 3));
        String runA = runToEnd(analysis, PLAN.formatted(TURNOUT, "\"median_age\""));
        String runB = runToEnd(analysis, PLAN.formatted(TURNOUT + ", " + CHANGE, "\"median_age\", \"rainfall\""));
        Path folderA = runFolder(analysis, runA);
        Path folderB = runFolder(analysis, runB);
        Path batch = TEMP.resolve("batch");
        assertEquals(0, CommandLine.execute(new String[] {"compare", folderA.toString(), folderB.toString(), "--out",
                batch.toString()}, quiet(), quiet()));
        JsonNode expected = Json.MAPPER.readTree(batch.resolve("compare.json").toFile());
        List<CSVRecord> csv = records(batch.resolve("compare.csv"));

        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));
        driver.get(base() + "/analyses/" + analysis + "/runs/" + runA);
        wait.until(ExpectedConditions.elementToBeClickable(By.id("compare-link"))).click();
        new Select(wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("run-a")))).selectByValue(runA);
        new Select(driver.findElement(By.id("run-b"))).selectByValue(runB);
        driver.findElement(By.id("compare-runs")).click();
        checkPage(wait, expected, csv);
        BrowserDriver.screenshot(driver, "compare-page");
        driver.executeScript("document.getElementById('curves-title').scrollIntoView()");
        BrowserDriver.screenshot(driver, "compare-page-curves");
        JsonNode downloaded = Json.MAPPER.readTree(get(driver.findElement(By.id("download-compare-json"))
                .getAttribute("href")));
        assertEquals(withoutFolders(expected), withoutFolders(downloaded), "the page's compare.json is the batch one");
        assertEquals("runs/" + runA, downloaded.get("a").asString(), "no server path in a download");
        assertEquals(Files.readString(batch.resolve("compare.csv")),
                get(driver.findElement(By.id("download-compare-csv")).getAttribute("href")));

        driver.get(base() + "/analyses/" + analysis + "/compare?a=" + runA);
        Path zip = zipOf(folderB, "reviewer.zip", List.of("specifications.csv", "summary.json", "plan.json"));
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("run-b-zip"))).sendKeys(zip.toString());
        driver.findElement(By.id("compare-upload")).click();
        checkPage(wait, expected, csv);
        assertEquals("the uploaded reviewer.zip", driver.findElement(By.id("uploaded-b")).getText());

        driver.get(base() + "/analyses/" + analysis + "/compare?a=" + runA);
        Path partial = zipOf(folderB, "partial.zip", List.of("specifications.csv", "plan.json"));
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("run-b-zip"))).sendKeys(partial.toString());
        driver.findElement(By.id("compare-upload")).click();
        WebElement problem = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("compare-problem")));
        assertEquals("partial.zip has no summary.json; zip a run folder's specifications.csv, summary.json, "
                + "plan.json, as run wrote them", problem.getText());
        List<String> console = BrowserDriver.severeConsoleMessages(driver);
        assertEquals(1, console.size(), console.toString());
        assertTrue(console.get(0).contains("/comparisons/upload") && console.get(0).contains("status of 400"),
                "the refusal is answered 400: " + console);
    }

    private void checkPage(WebDriverWait wait, JsonNode expected, List<CSVRecord> csv) {
        wait.until(ExpectedConditions.attributeToBe(By.id("comparison"), "data-loaded", "yes"));
        assertTrue(driver.getCurrentUrl().matches(".*/analyses/[0-9a-z-]+/comparisons/[0-9a-z-]+"),
                driver.getCurrentUrl());
        assertEquals(expected.get("sentence").asString(), driver.findElement(By.id("compare-sentence")).getText());
        JsonNode specs = expected.get("specifications");
        assertEquals(4, specs.get("shared").asInt(), "2 control subsets x 2 error types of turnout, in both");
        assertEquals(16 - 4, specs.get("only_b").asInt(), "B: 2 outcomes x 4 subsets x 2 error types, less those");
        for (String key : List.of("a", "b", "shared", "only_a", "only_b", "shared_differing")) {
            assertEquals(specs.get(key).asLong(), Long.parseLong(cell("#specification-counts tr[data-key='" + key
                    + "'] td").getAttribute("data-value")), key);
        }
        // turnout change has missing cells, and a run leaves out the rows any outcome alternative misses
        assertEquals(specs.get("shared_identical").asBoolean() ? "All 4 shared specifications have identical numbers."
                : specs.get("shared_differing").asInt() + " of the 4 shared specifications have numbers that differ.",
                driver.findElement(By.id("shared-verdict")).getText());
        assertEquals(specs.get("differences").size(), driver.findElements(By.cssSelector("#differences tbody tr")).size());
        JsonNode headline = expected.get("headline");
        for (String key : List.of("specifications", "fitted", "median_estimate", "share_positive",
                "share_significant_positive", "share_significant_negative")) {
            headlineRow(key, headline.get("a").get(key), headline.get("b").get(key));
        }
        for (String key : List.of("draws", "p_median", "p_share_significant", "p_stouffer")) {
            headlineRow("joint_tests." + key, headline.get("a").get("joint_tests").get(key),
                    headline.get("b").get("joint_tests").get(key));
        }
        JsonNode bound = headline.get("a").get("joint_tests").get("p_bounds").get("median");
        String shown = driver.findElements(By.cssSelector("#headline tr[data-key='joint_tests.p_median'] td")).get(0)
                .getText();
        // 19 draws: a p of 0 says only p < 1/20 (README, "Joint inference")
        assertEquals(bound.isNull() ? "p = " + headline.get("a").get("joint_tests").get("p_median").asString()
                : "p < 0.05", shown);
        List<WebElement> groupRows = driver.findElements(By.cssSelector("#groups tbody tr"));
        JsonNode groups = expected.get("groups");
        assertEquals(2 * groups.size(), groupRows.size());
        for (int i = 0; i < groups.size(); i++) {
            for (String side : List.of("a", "b")) {
                JsonNode g = groups.get(i).get(side);
                List<WebElement> cells = groupRows.get(2 * i + (side.equals("a") ? 0 : 1)).findElements(By.tagName("td"));
                if (g.isNull()) {
                    assertTrue(cells.get(2).getText().contains("has no such group"), cells.get(2).getText());
                    continue;
                }
                assertEquals(g.get("specifications").asLong(), Long.parseLong(cells.get(2).getAttribute("data-value")));
                assertEquals(g.get("median").doubleValue(), Double.parseDouble(cells.get(3).getAttribute("data-value")));
                assertEquals(g.get("joint_tests").get("p_stouffer").doubleValue(),
                        Double.parseDouble(cells.get(9).getAttribute("data-value")));
            }
        }
        WebElement canvas = driver.findElement(By.id("compare-curves"));
        String firstGroup = "turnout, hours";
        assertEquals(firstGroup, new Select(driver.findElement(By.id("curve-group"))).getFirstSelectedOption().getText());
        long inA = csv.stream().filter(r -> r.get("outcome").equals("turnout") && r.get("in_a").equals("yes")).count();
        long inB = csv.stream().filter(r -> r.get("outcome").equals("turnout") && r.get("in_b").equals("yes")).count();
        long added = csv.stream().filter(r -> r.get("outcome").equals("turnout") && r.get("in_a").equals("no")).count();
        assertEquals(String.valueOf(inA), canvas.getAttribute("data-count-a"));
        assertEquals(String.valueOf(inB), canvas.getAttribute("data-count-b"));
        assertEquals(String.valueOf(added), canvas.getAttribute("data-added"));
        assertEquals(4, added, "the 4 specifications with rainfall among turnout's");
        assertEquals(canvas.getAttribute("data-count-a"), canvas.getAttribute("data-drawn-a"), "below 2,000: all drawn");
        assertEquals(canvas.getAttribute("data-count-b"), canvas.getAttribute("data-drawn-b"));
    }

    private void headlineRow(String key, JsonNode a, JsonNode b) {
        List<WebElement> cells = driver.findElements(By.cssSelector("#headline tr[data-key='" + key + "'] td"));
        assertEquals(2, cells.size(), key);
        assertEquals(a.doubleValue(), Double.parseDouble(cells.get(0).getAttribute("data-value")), key + " of A");
        assertEquals(b.doubleValue(), Double.parseDouble(cells.get(1).getAttribute("data-value")), key + " of B");
        assertTrue(!cells.get(0).getText().isEmpty() && !cells.get(1).getText().isEmpty(), key);
    }

    private WebElement cell(String css) {
        return driver.findElement(By.cssSelector(css));
    }

    private static JsonNode withoutFolders(JsonNode compare) {
        tools.jackson.databind.node.ObjectNode copy = (tools.jackson.databind.node.ObjectNode) compare.deepCopy();
        copy.remove("a");
        copy.remove("b");
        return copy;
    }

    private static List<CSVRecord> records(Path file) throws IOException {
        try (Reader r = Files.newBufferedReader(file)) {
            return CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get().parse(r).getRecords();
        }
    }

    private static Path zipOf(Path folder, String name, List<String> files) throws IOException {
        Path zip = TEMP.resolve(name);
        try (ZipOutputStream out = new ZipOutputStream(Files.newOutputStream(zip))) {
            for (String f : files) {
                out.putNextEntry(new ZipEntry("run-b/" + f));
                out.write(Files.readAllBytes(folder.resolve(f)));
                out.closeEntry();
            }
        }
        return zip;
    }

    private Path runFolder(String analysis, String run) {
        return TEMP.resolve("workspace").resolve("analyses").resolve(analysis).resolve("runs").resolve(run);
    }

    private String runToEnd(String analysis, String plan) throws Exception {
        HttpResponse<String> started = HttpClient.newHttpClient().send(HttpRequest.newBuilder(URI.create(base()
                + "/api/analyses/" + analysis + "/runs")).header("Content-Type", "application/json")
                .POST(HttpRequest.BodyPublishers.ofString(plan)).build(), HttpResponse.BodyHandlers.ofString());
        assertEquals(202, started.statusCode(), started.body());
        String run = Json.MAPPER.readTree(started.body()).get("id").asString();
        for (int i = 0; i < 1200; i++) {
            String state = Json.MAPPER.readTree(get(base() + "/api/analyses/" + analysis + "/runs/" + run))
                    .get("state").asString();
            if (state.equals("finished")) {
                return run;
            }
            assertTrue(state.equals("queued") || state.equals("running"), state);
            Thread.sleep(50);
        }
        throw new AssertionError("run " + run + " did not finish");
    }

    private static String get(String url) throws Exception {
        HttpResponse<String> r = HttpClient.newHttpClient().send(HttpRequest.newBuilder(URI.create(url)).GET().build(),
                HttpResponse.BodyHandlers.ofString(StandardCharsets.UTF_8));
        assertEquals(200, r.statusCode(), url + ": " + r.body());
        return r.body();
    }

    private String base() {
        return "http://localhost:" + port;
    }

    private static PrintStream quiet() {
        return new PrintStream(OutputStream.nullOutputStream(), true, StandardCharsets.UTF_8);
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-compare-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
