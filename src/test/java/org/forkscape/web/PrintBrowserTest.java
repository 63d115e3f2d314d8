package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.apache.pdfbox.Loader;
import org.apache.pdfbox.pdmodel.PDDocument;
import org.forkscape.cli.CommandLine;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.Select;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;

/**
 * The figures for print in headless Chromium: the batch command's report.html opens from disk with no
 * request but its own file, and the explorer's "Figure for print" downloads the current view, drawn by the
 * server, under the analysis's and the run's names.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class PrintBrowserTest {
    private static final Path TEMP = temp();
    private static final double MM = 72 / 25.4;
    private static final String PLAN = """
            {
              "title": "Outreach and turnout, for print",
              "data": "data.csv",
              "seed": 7,
              "nullDraws": 19,
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

    /** Every request the page made is the report file itself: nothing left the file. */
    @Test
    void theHtmlReportLoadsWithNoNetworkRequest() throws Exception {
        Path dir = TEMP.resolve("batch");
        Files.createDirectories(dir);
        Files.writeString(dir.resolve("data.csv"), CivicTestData.csv(200, 3));
        Files.writeString(dir.resolve("plan.json"), PLAN);
        assertEquals(0, cli("run", dir.resolve("plan.json").toString(), "--out", dir.resolve("run").toString()));
        assertEquals(0, cli("report", dir.resolve("run").toString(), "--out", dir.resolve("report").toString()));
        Path html = dir.resolve("report").resolve("report.html");
        BrowserDriver.requestedUrls(driver);
        String url = html.toUri().toString();
        driver.get(url);
        new WebDriverWait(driver, Duration.ofSeconds(30)).until(ExpectedConditions.presenceOfElementLocated(
                By.id("provenance")));
        List<String> requests = BrowserDriver.requestedUrls(driver);
        assertFalse(requests.isEmpty(), "the browser recorded no request at all, not even the page's own");
        for (String r : requests) {
            assertTrue(r.startsWith("file:") && Path.of(URI.create(r)).equals(html.toAbsolutePath()),
                    "a request left the file: " + requests);
        }
        assertEquals(16, driver.findElements(By.cssSelector("#figure svg g[id^='spec-']")).size());
        assertTrue(driver.findElement(By.id("cautions")).getText().contains("A robust curve is not proof of a causal "
                + "effect"));
        assertTrue(driver.findElement(By.id("cautions")).getText().contains("must be decided in advance"));
        assertEquals(4, driver.findElements(By.cssSelector("#joint-tests tr")).size());
        assertTrue(driver.findElement(By.id("influence")).getText().contains("median_age"));
        assertTrue(driver.findElement(By.id("provenance")).getText().contains("data_sha256"));
        BrowserDriver.screenshot(driver, "print-1-report-html");
    }

    @Test
    void theExplorersFigureForPrintDownloadsTheViewAsPdf() throws Exception {
        String analysis = upload(CivicTestData.csv(200, 3));
        HttpResponse<String> started = HttpClient.newHttpClient().send(
                HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + analysis + "/runs"))
                        .header("Content-Type", "application/json")
                        .POST(HttpRequest.BodyPublishers.ofString(PLAN)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(202, started.statusCode(), started.body());
        String run = match(started.body(), "\"id\":\"([0-9a-z-]+)\"");
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(base() + "/analyses/" + analysis + "/runs/" + run);
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 16 of 16"));
        new Select(driver.findElement(By.id("colour-by"))).selectByVisibleText("errors");
        new Select(driver.findElement(By.id("print-format"))).selectByValue("pdf");
        new Select(driver.findElement(By.id("print-size"))).selectByValue("page");
        driver.findElement(By.id("export-print")).click();
        String href = driver.findElement(By.id("export-print")).getAttribute("href");
        assertTrue(href.contains("/figure?") && href.contains("format=pdf") && href.contains("size=page")
                && href.contains("colour="), href);
        Path pdf = waitFor(TEMP.resolve("downloads").resolve("specification-curve-" + analysis + "-run-" + run
                + "-fitted.pdf"));
        try (PDDocument d = Loader.loadPDF(pdf.toFile())) {
            assertEquals(1, d.getNumberOfPages());
            assertEquals(183 * MM, d.getPage(0).getMediaBox().getWidth(), 0.01);
        }
    }

    private static int cli(String... args) {
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(args, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(0, code, err.toString(StandardCharsets.UTF_8));
        return code;
    }

    private String base() {
        return "http://localhost:" + port;
    }

    private String upload(String csv) throws Exception {
        return BrowserDriver.upload(base(), "outreach.csv", csv);
    }

    private static String match(String text, String regex) {
        Matcher m = Pattern.compile(regex).matcher(text);
        assertTrue(m.find(), text + " has no " + regex);
        return m.group(1);
    }

    private static Path waitFor(Path file) throws InterruptedException {
        for (int i = 0; i < 300 && !Files.isRegularFile(file); i++) {
            Thread.sleep(100);
        }
        assertTrue(Files.isRegularFile(file), "no download " + file);
        return file;
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-print-");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
