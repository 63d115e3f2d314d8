package org.forkscape.web.check;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
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
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import tools.jackson.databind.JsonNode;

/**
 * The release-check panel in headless Chromium: a policy typed on the explore page is checked, each rule's
 * verdict is shown with the numbers check.json holds, and a bad policy comes back as its one sentence.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class ReleaseCheckBrowserTest {
    private static final Path TEMP = temp();
    private static final String PLAN = """
            {
              "data": "data.csv",
              "reported": {"outcome": "turnout", "outreach": "hours", "controls": "rainfall", "errors": "HC1"},
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "turnout", "column": "turnout"}]},
                {"name": "outreach", "kind": "predictor", "alternatives": [
                  {"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls", "optional": ["median_age", "rainfall"]},
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

    private void typePolicy(WebDriverWait wait, String policy) {
        WebElement field = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("policy")));
        field.clear();
        field.sendKeys(policy);
        driver.findElement(By.id("run-check")).click();
    }

    @Test
    void aTypedPolicyIsCheckedAndShownRuleByRuleAndABadOneNamesItsPath() throws Exception {
        String analysis = upload(CivicTestData.csv(200, 3));
        HttpResponse<String> started = send(HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + analysis
                + "/runs")).header("Content-Type", "application/json").POST(HttpRequest.BodyPublishers.ofString(PLAN)));
        assertEquals(202, started.statusCode(), started.body());
        String run = match(started.body(), "\"id\":\"([0-9a-z-]+)\"");
        String page = base() + "/analyses/" + analysis + "/runs/" + run;
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(page);
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 8 of 8"));
        assertTrue(driver.findElement(By.id("policy")).getAttribute("value").contains("\"plan_locked\": {}"),
                "the form starts from every rule with its defaults");

        typePolicy(wait, "{\"rows_per_coefficient\": {\"at_least\": 1}, \"reported_percentile\": {\"from\": 0, "
                + "\"to\": 100}, \"plan_locked\": {}}");
        WebElement verdict = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("check-verdict")));
        assertEquals("Failed: 1 of 3 rules.", verdict.getText(), "an unlocked plan fails plan_locked");
        JsonNode check = Json.MAPPER.readTree(send(HttpRequest.newBuilder(URI.create(page + "/files/check.json")).GET())
                .body());
        List<WebElement> rows = driver.findElements(By.cssSelector("#check-result tbody tr"));
        assertEquals(3, rows.size());
        for (int i = 0; i < 3; i++) {
            JsonNode rule = check.get("rules").get(i);
            assertEquals(rule.get("rule").asString(), rows.get(i).getAttribute("data-rule"));
            assertEquals(rule.get("result").asString(), rows.get(i).getAttribute("data-result"));
            assertTrue(rows.get(i).getText().contains(rule.get("detail").asString()), rows.get(i).getText());
        }
        assertEquals(List.of("pass", "pass", "fail"), rows.stream().map(r -> r.getAttribute("data-result")).toList());
        JsonNode summary = Json.MAPPER.readTree(send(HttpRequest.newBuilder(URI.create(page
                + "/files/summary.json")).GET()).body());
        assertEquals(summary.get("reported").get("scales").get("as_fitted").get("percentile").doubleValue(),
                check.get("rules").get(1).get("measured").doubleValue());

        typePolicy(wait, "{\"joint_tests\": {\"tests\": [\"mean\"]}}");
        WebElement problem = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("check-problem")));
        assertEquals("policy, joint_tests.tests[0]: must be one of median, share_significant, stouffer",
                problem.getText());
        assertEquals("Failed: 1 of 3 rules.", driver.findElement(By.id("check-verdict")).getText(),
                "the bad policy wrote nothing: the last check stands");
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
            return Files.createTempDirectory("forkscape-check-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
