package org.forkscape.web.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.web.BrowserDriver;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.Dimension;
import org.openqa.selenium.Keys;
import org.openqa.selenium.WebElement;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.Select;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;

/**
 * The plan form in a real browser (headless Chromium): a new plan opens without an error; every problem
 * is shown at once at its field, in words, with its JSON path as the title; empty settings show the plan
 * reader's defaults; each technical choice has its explanation and source beside it; nothing covers
 * anything at 800 and 900 px; a tick changes the plan without drawing the form again, and the live check
 * waits for typing to stop. Screenshots go to target/screenshots.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class PlanFormBrowserTest {
    private static final Path TEMP = temp();
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
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1280, 1400);
    }

    @AfterEach
    void noScriptErrors() {
        driver.manage().window().setSize(new Dimension(1280, 1400));
        assertEquals(List.of(), BrowserDriver.severeConsoleMessages(driver), "the browser console reported errors");
    }

    @AfterAll
    static void close() {
        if (driver != null) {
            driver.quit();
        }
    }

    @Test
    void aNewPlanOpensWithoutAnErrorAndCheckingShowsEveryProblemAtItsFieldInWords() throws Exception {
        WebDriverWait wait = openNewPlan();
        // the check has answered (the route taken: four empty fields held back), and nothing is shown as wrong
        WebElement status = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("plan-status")));
        wait.until(d -> status.getText().startsWith("Not ready:"));
        assertEquals("Not ready: 4 more at fields not filled in yet (\u201cCheck the plan\u201d shows them).",
                status.getText());
        assertEquals(List.of(), visibleProblems());
        assertEquals(0, driver.findElements(By.cssSelector("#plan-editor .has-problem, #plan-editor [aria-invalid]")).size());
        BrowserDriver.screenshot(driver, "plan-1-fresh");

        // a field filled in has no problem; one touched and left empty shows its own, the others stay quiet
        type(wait, "decisions[0].alternatives[0].label", "turnout");
        type(wait, "decisions[1].alternatives[0].label", "x");
        type(wait, "decisions[1].alternatives[0].label", "");
        wait.until(d -> status.getText().contains("1 problem, each shown at its field"));
        assertEquals(List.of("decisions[1].alternatives[0].label"),
                visibleProblems().stream().map(p -> p.get("where")).toList());
        assertTrue(status.getText().contains("2 more at fields not filled in yet"), status.getText());

        // asked for, every problem at once, each at its own field, in words, with its JSON path as the title
        click(driver.findElement(By.id("check-plan")));
        wait.until(d -> visibleProblems().size() == 3);
        List<Map<String, String>> shown = visibleProblems();
        assertEquals(List.of(
                Map.of("where", "decisions[0].alternatives[0].column", "field", "decisions[0].alternatives[0].column",
                        "text", "Decision 1 (outcome), first alternative: the column is required: the column this "
                                + "alternative uses"),
                Map.of("where", "decisions[1].alternatives[0].label", "field", "decisions[1].alternatives[0].label",
                        "text", "Decision 2 (predictor), first alternative: the label is empty; every alternative "
                                + "needs a label"),
                Map.of("where", "decisions[1].alternatives[0].column", "field", "decisions[1].alternatives[0].column",
                        "text", "Decision 2 (predictor), first alternative: the column is required: the column this "
                                + "alternative uses")),
                shown);
        for (Map<String, String> p : shown) {
            assertFalse(p.get("text").contains("decisions["), "a JSON path in the words: " + p);
        }
        assertEquals("Not ready: 3 problems, each shown at its field.", status.getText());
        BrowserDriver.screenshot(driver, "plan-2-every-problem");
    }

    /** A failed save reveals the held-back problems; the data's problems (the checker's) come all at once too. */
    @Test
    void aFailedSaveShowsEveryProblemAndSoDoTheDatasProblems() throws Exception {
        WebDriverWait wait = openNewPlan();
        type(wait, "decisions[0].alternatives[0].label", "turnout");
        click(driver.findElement(By.id("save-plan")));
        WebElement status = driver.findElement(By.id("plan-status"));
        wait.until(d -> status.getText().startsWith("Not saved."));
        wait.until(d -> visibleProblems().size() == 3);
        assertEquals(List.of("decisions[0].alternatives[0].column", "decisions[1].alternatives[0].label",
                "decisions[1].alternatives[0].column"), visibleProblems().stream().map(p -> p.get("where")).toList());

        new Select(field("decisions[0].alternatives[0].column")).selectByValue("turnout");
        type(wait, "decisions[1].alternatives[0].label", "hours");
        new Select(field("decisions[1].alternatives[0].column")).selectByValue("turnout");
        addDecision("controls");
        click(driver.findElement(By.cssSelector("[data-path='decisions[2].optional'] input[value='turnout']")));
        wait.until(d -> visibleProblems().size() == 2);
        assertEquals(List.of(
                Map.of("where", "decisions[1].alternatives[0].column", "field", "decisions[1].alternatives[0].column",
                        "text", "Decision 2 (predictor), first alternative, the column: \"turnout\" is also an "
                                + "alternative of the outcome; a column cannot be both the outcome and the key predictor"),
                Map.of("where", "decisions[2].optional[0]", "field", "decisions[2].optional",
                        "text", "Decision 3 (controls), the first optional control: \"turnout\" is also an "
                                + "alternative of the key predictor; a column cannot be both")),
                visibleProblems());
    }

    @Test
    void emptySettingsShowThePlanReadersDefaults() throws Exception {
        WebDriverWait wait = openNewPlan();
        Map<String, String> expected = Map.of(
                "confidence", String.valueOf(PlanReader.DEFAULT_CONFIDENCE),
                "sample", String.valueOf(PlanReader.DEFAULT_SAMPLE),
                "seed", String.valueOf(PlanReader.DEFAULT_SEED),
                "maxSpecifications", String.valueOf(Plan.DEFAULT_MAX_SPECIFICATIONS),
                "nullDraws", String.valueOf(PlanReader.DEFAULT_NULL_DRAWS));
        for (Map.Entry<String, String> e : expected.entrySet()) {
            WebElement input = field(e.getKey());
            assertEquals("", input.getAttribute("value"), e.getKey() + " is empty in a new plan");
            assertEquals(e.getValue(), input.getAttribute("placeholder"), e.getKey());
            String hint = driver.findElement(By.id(input.getAttribute("aria-describedby"))).getText();
            assertTrue(hint.startsWith("Left empty: "), hint);
        }
        assertTrue(hintOf("maxSpecifications").contains("1,000,000"), hintOf("maxSpecifications"));
        assertTrue(hintOf("seed").startsWith("Left empty: " + PlanReader.DEFAULT_SEED + " "), hintOf("seed"));
        assertEquals("each specification uses its own complete rows (the default)",
                new Select(field("missing")).getFirstSelectedOption().getText());
        assertEquals("resampling (bootstrap) (the default)",
                new Select(field("nullMethod")).getFirstSelectedOption().getText());
        // a value typed and then cleared leaves the key out of the plan, so the default applies again
        type(wait, "seed", "42");
        wait.until(d -> jsonText().contains("\"seed\": 42"));
        type(wait, "seed", "");
        wait.until(d -> !jsonText().contains("\"seed\""));
    }

    @Test
    void everyTechnicalChoiceIsExplainedWithItsSource() throws Exception {
        WebDriverWait wait = openNewPlan();
        addDecision("errors");
        Map<String, String> errors = Map.of(
                "classical", "same variance",
                "HC0", "White 1980, Econometrica 48(4)",
                "HC1", "MacKinnon & White 1985, Journal of Econometrics 29(3)",
                "HC2", "MacKinnon & White 1985, Journal of Econometrics 29(3)",
                "HC3", "Long & Ervin 2000, The American Statistician 54(3)",
                "cluster", "Cameron, Gelbach & Miller 2008, Review of Economics and Statistics 90(3); Cameron & "
                        + "Miller 2015, Journal of Human Resources 50(2)");
        for (Map.Entry<String, String> e : errors.entrySet()) {
            new Select(field("decisions[2].alternatives[0]")).selectByValue(e.getKey());
            String note = wait.until(d -> {
                String text = noteOf("decisions[2].alternatives[0]");
                return text.contains(e.getValue()) ? text : null;
            });
            assertTrue(note.contains("Source: "), note);
        }
        new Select(field("decisions[2].alternatives[0]")).selectByValue("cluster");
        wait.until(d -> noteOf("decisions[2].alternatives[0]").startsWith("Cluster-robust (CR1)"));
        Map<String, Map<String, String>> settings = Map.of(
                "nullMethod", Map.of("bootstrap", "Efron 1979, Annals of Statistics 7(1)",
                        "permute", "Fisher 1935, The Design of Experiments"),
                "missing", Map.of("per-specification", "drops only the rows missing one of its own variables",
                        "common", "those complete on every variable the plan names"));
        for (Map.Entry<String, Map<String, String>> s : settings.entrySet()) {
            for (Map.Entry<String, String> e : s.getValue().entrySet()) {
                new Select(field(s.getKey())).selectByValue(e.getKey());
                String note = noteOf(s.getKey());
                assertTrue(note.contains(e.getValue()) && note.contains("Source: "), s.getKey() + "=" + e.getKey()
                        + ": " + note);
            }
        }
    }

    /** The weights decision: a weight column per alternative, its help and source, its problems at its fields. */
    @Test
    void theWeightsDecisionShowsItsHelpAndItsProblemsAtItsFields() throws Exception {
        WebDriverWait wait = openNewPlan();
        type(wait, "decisions[0].alternatives[0].label", "turnout");
        new Select(field("decisions[0].alternatives[0].column")).selectByValue("turnout");
        type(wait, "decisions[1].alternatives[0].label", "hours");
        new Select(field("decisions[1].alternatives[0].column")).selectByValue("outreach_hours");
        addDecision("weights");
        type(wait, "decisions[2].alternatives[1].label", "by region");
        new Select(field("decisions[2].alternatives[1].column")).selectByValue("region");
        WebElement note = driver.findElement(By.cssSelector("[data-path='decisions[2].alternatives[1].column'] .choice-note"));
        assertTrue(note.getText().contains("lm(weights = w)") && note.getText().contains("Source:"), note.getText());
        click(driver.findElement(By.id("check-plan")));
        wait.until(d -> visibleProblems().size() == 1);
        Map<String, String> problem = visibleProblems().get(0);
        assertEquals("decisions[2].alternatives[1].column", problem.get("where"));
        assertEquals("decisions[2].alternatives[1].column", problem.get("field"));
        assertTrue(problem.get("text").startsWith("Decision 3 (weights), second alternative, the column: \"region\" is "
                + "categorical; weights must be a numeric column"), problem.get("text"));
        new Select(field("decisions[2].alternatives[1].column")).selectByValue("density");
        wait.until(d -> visibleProblems().isEmpty());
        assertEquals("2", driver.findElement(By.id("spec-count")).getText().replaceAll("[^0-9]", ""));
        BrowserDriver.screenshot(driver, "plan-weights");
    }

    @Test
    void nothingCoversAnythingAt800And900Pixels() throws Exception {
        WebDriverWait wait = openNewPlan();
        addDecision("controls");
        for (String control : List.of("median_age", "rainfall")) {
            click(driver.findElement(By.cssSelector("[data-path='decisions[2].optional'] input[value='" + control + "']")));
        }
        addDecision("errors");
        press("Add an alternative to errors");
        new Select(field("decisions[3].alternatives[1]")).selectByValue("cluster");
        addDecision("sample");
        press("Add an alternative to rows");
        type(wait, "decisions[4].alternatives[1].label", "urban");
        new Select(field("decisions[4].alternatives[1].rule")).selectByValue("trim");
        addDecision("absorb");
        type(wait, "title", "Outreach and turnout in the districts, by hours of outreach and by mailers sent");
        click(driver.findElement(By.id("check-plan")));
        wait.until(d -> visibleProblems().size() >= 4);
        for (int width : List.of(800, 900)) {
            driver.manage().window().setSize(new Dimension(width, 900));
            wait.until(d -> ((Number) driver.executeScript("return window.innerWidth")).intValue() <= width);
            // the title box takes the width of its panel, so a long title is seen whole
            WebElement title = field("title");
            long titleWidth = ((Number) driver.executeScript("return arguments[0].getBoundingClientRect().width", title))
                    .longValue();
            long panelWidth = ((Number) driver.executeScript(
                    "return arguments[0].closest('.field').getBoundingClientRect().width", title)).longValue();
            assertEquals(panelWidth, titleWidth, 1, "the title box at " + width + " px");
            // with each problem and the add button brought to the bottom edge of the window in turn, as
            // scrolling down to them does, no two elements overlap (a pinned bar would lie over them there)
            // each found again in turn: a check still answering (the title's, debounced) draws the lines anew
            // (found, scrolled to and named in one script, so that no reference to a redrawn line is kept)
            int lines = driver.findElements(By.cssSelector(".problem-line")).size();
            for (int i = 0; i <= lines; i++) {
                String target = (String) driver.executeScript("const lines = document.querySelectorAll('.problem-line');"
                        + "const t = arguments[0] < lines.length ? lines[arguments[0]] : document.getElementById('add-decision');"
                        + "t.scrollIntoView({block: 'end'}); return t.textContent;", i);
                List<String> overlaps = overlaps();
                assertEquals(List.of(), overlaps, "at " + width + " px with " + target + " at the bottom");
            }
            BrowserDriver.screenshot(driver, "plan-3-at-" + width);
        }
    }

    @Test
    void aTickChangesThePlanWithoutDrawingTheFormAgainAndTheCheckWaitsForTyping() throws Exception {
        WebDriverWait wait = openNewPlan();
        addDecision("controls");
        driver.executeScript("window.probe = document.querySelector(\"[data-path='decisions[0]']\");"
                + "window.probeBox = document.querySelector(\"[data-path='decisions[2].optional'] input\");");
        for (String control : List.of("median_age", "rainfall", "income_index")) {
            click(driver.findElement(By.cssSelector("[data-path='decisions[2].optional'] input[value='" + control + "']")));
        }
        assertEquals("8 specifications", driver.findElement(By.id("spec-count")).getText());
        assertEquals("8 alternatives", driver.findElement(By.cssSelector("[data-path='decisions[2]'] .alternative-count"))
                .getText());
        assertTrue(driver.findElement(By.cssSelector("[data-path='decisions[2].optional'] legend")).getText()
                .contains("(3 chosen, 8 subsets)"));
        assertTrue(jsonText().contains("\"optional\": [\n        \"median_age\",\n        \"rainfall\",\n        "
                + "\"income_index\"\n      ]"), jsonText());
        assertEquals(Boolean.TRUE, driver.executeScript("return window.probe.isConnected && window.probe === "
                + "document.querySelector(\"[data-path='decisions[0]']\") && window.probeBox.isConnected"),
                "the form was drawn again by a tick");

        // ten keys typed at once reach the server as far fewer checks
        driver.executeScript("window.checks = 0; const f = window.fetch; window.fetch = (u, o) => {"
                + " if (String(u).endsWith('/plan/check')) window.checks += 1; return f(u, o); };");
        field("decisions[0].alternatives[0].label").sendKeys("turnout 20");
        Thread.sleep(1500);
        long checks = ((Number) driver.executeScript("return window.checks")).longValue();
        assertTrue(checks >= 1 && checks <= 2, checks + " checks for 10 keys");
    }

    /**
     * An absorb alternative edits several columns, one field each, with one more offered, and the check reports
     * nothing for HC3 beside two or three columns, of least squares or of a logit (their leverages are exact), nor
     * for the logit beside them.
     */
    @Test
    void anAbsorbAlternativeTakesTwoOrThreeColumnsAndALogitOrHc3BesideThemIsNoProblem() throws Exception {
        WebDriverWait wait = openNewPlan();
        type(wait, "decisions[0].alternatives[0].label", "turnout");
        new Select(field("decisions[0].alternatives[0].column")).selectByValue("turnout");
        type(wait, "decisions[1].alternatives[0].label", "hours");
        new Select(field("decisions[1].alternatives[0].column")).selectByValue("outreach_hours");
        addDecision("absorb");
        press("Add an alternative to fixed effects");
        type(wait, "decisions[2].alternatives[1].label", "district and urban");
        new Select(field("decisions[2].alternatives[1].columns[0]")).selectByValue("district");
        new Select(wait.until(d -> field("decisions[2].alternatives[1].columns[1]"))).selectByValue("urban");
        wait.until(d -> jsonText().contains("\"columns\": [\n            \"district\",\n            \"urban\"\n          ]"));
        assertTrue(driver.findElement(By.cssSelector("[data-path='decisions[2].alternatives[1].columns'] .absorb-note"))
                .getText().contains("Gaure 2013"));

        addDecision("errors");
        new Select(field("decisions[3].alternatives[0]")).selectByValue("HC3");
        addDecision("model");
        press("Add an alternative to model");
        checkIsClean(wait, "HC3 of least squares and of a logit beside two absorbed columns");

        // a third column is offered and taken; HC3 and the logit beside three are no problem either
        new Select(wait.until(d -> field("decisions[2].alternatives[1].columns[2]"))).selectByValue("region");
        wait.until(d -> jsonText().contains("\"columns\": [\n            \"district\",\n            \"urban\",\n"
                + "            \"region\"\n          ]"));
        assertEquals(1, driver.findElements(By.cssSelector("[data-path='decisions[2].alternatives[1].columns[3]']"))
                .size(), "a fourth column is offered");
        checkIsClean(wait, "HC3 of least squares and of a logit beside three absorbed columns");
        new Select(field("decisions[2].alternatives[1].columns[2]")).selectByValue("");
        wait.until(d -> jsonText().contains("\"columns\": [\n            \"district\",\n            \"urban\"\n          ]"));
        BrowserDriver.screenshot(driver, "plan-absorb-two-columns");

        // choosing no column for the second field leaves one absorbed column
        new Select(field("decisions[2].alternatives[1].columns[1]")).selectByValue("");
        wait.until(d -> jsonText().contains("\"columns\": [\n            \"district\"\n          ]"));
    }

    /**
     * Checks the plan and waits for the server's answer, which flags the logit of an outcome not coded 0/1 at the
     * model decision (so that the answer is known to have come), and nothing at the absorb or errors decisions.
     */
    private void checkIsClean(WebDriverWait wait, String what) {
        driver.executeScript("document.querySelectorAll('.problem').forEach(p => { p.hidden = true; });");
        click(driver.findElement(By.id("check-plan")));
        wait.until(d -> visibleProblems().stream().anyMatch(p -> p.get("where").startsWith("decisions[4]")));
        List<Map<String, String>> shown = visibleProblems();
        assertTrue(shown.stream().noneMatch(p -> p.get("where").startsWith("decisions[2]")
                || p.get("where").startsWith("decisions[3]")), what + " is not a problem: " + shown);
    }

    /** The estimate times a few specifications on the server, so only its form is checked. */
    @Test
    void theEstimateSaysHowLongARunWouldTakeOnThisServer() throws Exception {
        WebDriverWait wait = openNewPlan();
        // the JSON box's own button (the box is folded away under its summary)
        driver.executeScript("document.getElementById('plan-json').value = arguments[0];"
                + "document.getElementById('apply-json').click();", CivicTestData.plan());
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "ready to run"));
        click(driver.findElement(By.id("estimate-plan")));
        wait.until(d -> d.findElement(By.id("plan-estimate")).getText().startsWith("Time: "));
        String text = driver.findElement(By.id("plan-estimate")).getText();
        assertTrue(text.contains("of the 576 specifications fitted on this machine") && text.contains("Memory: about")
                && text.contains("of this server's limit"), text);
    }

    /**
     * Each save from the form appears at once in the list of saved versions, with the SHA-256 of the saved
     * file (the JDK's MessageDigest over the analysis folder's plan.json); restoring an older version makes it
     * the working plan again, as a new version that says so.
     */
    @Test
    void savedVersionsAreListedAsTheyAreSavedAndAnOlderOneCanBeRestored() throws Exception {
        WebDriverWait wait = openNewPlan();
        assertEquals("No version yet: the first save of the plan is version 1.",
                driver.findElement(By.id("no-versions")).getText());
        List<String> plans = List.of(CivicTestData.plan(1), CivicTestData.plan(2));
        for (int i = 0; i < plans.size(); i++) {
            driver.executeScript("document.getElementById('plan-json').value = arguments[0];"
                    + "document.getElementById('apply-json').click();", plans.get(i));
            wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "ready to run"));
            click(driver.findElement(By.id("save-plan")));
            int versions = i + 1;
            // the rows are drawn once the save has answered, without reloading the page
            wait.until(d -> d.findElements(By.cssSelector("#plan-versions tbody tr")).size() == versions);
            driver.navigate().refresh();
            wait.until(d -> !d.findElement(By.id("plan-status")).getText().isEmpty());
        }
        String analysis = driver.findElement(By.id("plan-editor")).getAttribute("data-analysis");
        Path saved = TEMP.resolve("workspace/analyses/" + analysis + "/plan.json");
        String sha = java.util.HexFormat.of().formatHex(java.security.MessageDigest.getInstance("SHA-256")
                .digest(Files.readAllBytes(saved)));
        WebElement newest = driver.findElement(By.cssSelector("#plan-versions tbody tr"));
        assertEquals("2", newest.getAttribute("data-version"));
        assertEquals(sha, newest.getAttribute("data-sha256"));
        assertTrue(newest.getText().contains("working plan"), newest.getText());
        assertTrue(driver.findElements(By.id("no-versions")).stream().noneMatch(WebElement::isDisplayed));
        driver.executeScript("document.getElementById('plan-history').scrollIntoView()");
        BrowserDriver.screenshot(driver, "plan-8-versions");

        click(driver.findElement(By.id("restore-version-1")));
        wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("restored-note")));
        List<WebElement> rows = driver.findElements(By.cssSelector("#plan-versions tbody tr"));
        assertEquals(List.of("3", "2", "1"), rows.stream().map(r -> r.getAttribute("data-version")).toList());
        assertTrue(rows.get(0).getText().contains("(restores version 1)"), rows.get(0).getText());
        assertEquals(rows.get(2).getAttribute("data-sha256"), rows.get(0).getAttribute("data-sha256"));
        assertEquals(Files.readString(saved.resolveSibling("plan-history").resolve("1.json")), Files.readString(saved),
                "version 1's text is the working plan");
    }

    /**
     * "Lock this plan" saves and locks the plan: the page shows the time and fingerprint of the lock file
     * written into the analysis folder, and asks before locking anew.
     */
    @Test
    void lockThisPlanShowsTheFingerprintOfTheLockInTheAnalysisFolder() throws Exception {
        String id = upload(CivicTestData.csv(200, 7));
        HttpResponse<String> saved = HttpClient.newHttpClient().send(HttpRequest.newBuilder(URI.create(base()
                + "/api/analyses/" + id + "/plan")).header("Content-Type", "application/json")
                .PUT(HttpRequest.BodyPublishers.ofString(CivicTestData.plan())).build(), HttpResponse.BodyHandlers.ofString());
        assertEquals(200, saved.statusCode(), saved.body());
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(30));
        driver.get(base() + "/analyses/" + id + "/plan");
        WebElement note = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("plan-lock")));
        wait.until(d -> note.getText().startsWith("Not locked."));
        click(driver.findElement(By.id("lock-plan")));
        wait.until(d -> note.getText().startsWith("Locked at "));
        Path lockFile = TEMP.resolve("workspace/analyses/" + id + "/plan.lock.json");
        String lock = Files.readString(lockFile);
        Matcher fingerprint = Pattern.compile("\"fingerprint\" : \"([0-9a-f-]+)\"").matcher(lock);
        Matcher locked = Pattern.compile("\"locked\" : \"([^\"]+)\"").matcher(lock);
        assertTrue(fingerprint.find() && locked.find(), lock);
        assertEquals("Locked at " + locked.group(1) + ", fingerprint " + fingerprint.group(1) + ". The saved plan and "
                + "the data match the lock; runs record it.", note.getText());
        BrowserDriver.screenshot(driver, "plan-7-locked");

        // locked already: the page asks, and a refusal keeps the lock as it was
        click(driver.findElement(By.id("lock-plan")));
        wait.until(ExpectedConditions.alertIsPresent());
        assertTrue(driver.switchTo().alert().getText().startsWith("The plan was locked at " + locked.group(1)),
                driver.switchTo().alert().getText());
        driver.switchTo().alert().dismiss();
        assertEquals(lock, Files.readString(lockFile));
    }

    private WebDriverWait openNewPlan() throws Exception {
        String id = upload(CivicTestData.csv(200, 7));
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(30));
        driver.get(base() + "/analyses/" + id + "/plan");
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("spec-count")));
        wait.until(d -> !d.findElement(By.id("plan-status")).getText().isEmpty());
        return wait;
    }

    /** The problem lines shown, in page order: {where (their title), field (data-path of the note's field), text}. */
    @SuppressWarnings("unchecked")
    private static List<Map<String, String>> visibleProblems() {
        return (List<Map<String, String>>) driver.executeScript(
                "return [...document.querySelectorAll('#plan-editor .problem')].filter(p => !p.hidden"
                        + " && p.getBoundingClientRect().height > 0).flatMap(p => [...p.querySelectorAll('.problem-line')]"
                        + ".map(l => ({where: l.title, field: p.closest('[data-path]').getAttribute('data-path'),"
                        + " text: l.textContent})));");
    }

    /** Pairs of visible elements in the window whose boxes overlap, neither inside the other. */
    @SuppressWarnings("unchecked")
    private static List<String> overlaps() {
        return (List<String>) driver.executeScript(
                "const sel = 'main input:not(.visually-hidden), main select, main textarea, main button, main label,"
                        + " main legend, main .problem-line, main .hint, main h1, main h2, main .kind,"
                        + " main .alternative-count, main .count, main .plan-status, main summary';"
                        + "const vh = window.innerHeight;"
                        + "const items = [...document.querySelectorAll(sel)].map(e => [e, e.getBoundingClientRect()])"
                        + ".filter(([e, r]) => r.width > 1 && r.height > 1 && r.bottom > 0 && r.top < vh"
                        + " && getComputedStyle(e).visibility !== 'hidden');"
                        + "const name = e => e.tagName.toLowerCase() + (e.id ? '#' + e.id : '')"
                        + " + (e.closest('[data-path]') ? '@' + e.closest('[data-path]').getAttribute('data-path') : '')"
                        + " + ' ' + (e.textContent || '').trim().slice(0, 30);"
                        + "const out = [];"
                        + "for (let i = 0; i < items.length; i++) for (let j = i + 1; j < items.length; j++) {"
                        + " const [a, ra] = items[i]; const [b, rb] = items[j];"
                        + " if (a.contains(b) || b.contains(a)) continue;"
                        + " const w = Math.min(ra.right, rb.right) - Math.max(ra.left, rb.left);"
                        + " const h = Math.min(ra.bottom, rb.bottom) - Math.max(ra.top, rb.top);"
                        + " if (w > 1 && h > 1) out.push(name(a) + ' / ' + name(b)); }"
                        + "return out;");
    }

    private static String jsonText() {
        return (String) driver.executeScript("return document.getElementById('plan-json').value");
    }

    private static String noteOf(String path) {
        return driver.findElement(By.cssSelector("[data-path='" + path + "'] .choice-note")).getText();
    }

    private static String hintOf(String path) {
        return driver.findElement(By.cssSelector("[data-path='" + path + "'] .default-hint")).getText();
    }

    private static WebElement field(String path) {
        WebElement e = driver.findElement(By.cssSelector("[data-path='" + path + "'] input, [data-path='" + path
                + "'] select, [data-path='" + path + "'] textarea"));
        driver.executeScript("arguments[0].scrollIntoView({block: 'center'})", e);
        return e;
    }

    /** Types into a field (clearing it first); {@code null} only waits for the field. */
    private static void type(WebDriverWait wait, String path, String text) {
        WebElement input = wait.until(d -> field(path));
        if (text == null) {
            return;
        }
        // select and delete, as a user does: WebElement.clear() changes the value without an input event
        input.sendKeys(Keys.chord(Keys.CONTROL, "a"), Keys.BACK_SPACE);
        if (!text.isEmpty()) {
            input.sendKeys(text);
        }
    }

    private static void press(String label) {
        click(driver.findElement(By.cssSelector("button[aria-label='" + label + "']")));
    }

    private static void addDecision(String kind) {
        new Select(driver.findElement(By.id("new-decision-kind"))).selectByValue(kind);
        click(driver.findElement(By.id("add-decision")));
    }

    private static void click(WebElement element) {
        driver.executeScript("arguments[0].scrollIntoView({block: 'center'})", element);
        element.click();
    }

    private String upload(String csv) throws Exception {
        return BrowserDriver.upload(base(), "districts.csv", csv);
    }

    private String base() {
        return "http://localhost:" + port;
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-plan-browser-");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
