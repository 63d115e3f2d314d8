package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.URI;
import org.forkscape.run.Json;
import tools.jackson.databind.JsonNode;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.openqa.selenium.By;
import org.openqa.selenium.WebElement;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.interactions.Actions;
import org.openqa.selenium.support.ui.ExpectedConditions;
import org.openqa.selenium.support.ui.Select;
import org.openqa.selenium.support.ui.WebDriverWait;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;

/**
 * The whole way through the tool in a real browser (headless Chromium): upload a CSV, build a plan in
 * the form (with a mistake shown beside its field, then corrected), run it, hover and click a
 * specification, untick an alternative, change the order, export the CSV and the figure; then a run large
 * enough to be drawn reduced; then a plan with a model decision (least squares and logit of a 0/1
 * outcome) built in the form and explored as fitted, one model at a time, and on the average-marginal-effect
 * scale. Screenshots go to target/screenshots.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class ExplorerBrowserTest {
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
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1440, 1800);
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
    void fromUploadToExportThroughThePages() throws Exception {
        Path csv = TEMP.resolve("outreach.csv");
        Files.writeString(csv, CivicTestData.csv(400, 5));
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));

        driver.get(base() + "/");
        driver.findElement(By.id("upload-file")).sendKeys(csv.toString());
        driver.findElement(By.id("upload-title-input")).sendKeys("Outreach and turnout");
        driver.findElement(By.cssSelector(".upload-form button[type=submit]")).click();
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("columns")));
        assertTrue(driver.findElement(By.id("columns")).getText().contains("outreach_hours"));
        BrowserDriver.screenshot(driver, "1-data");

        driver.findElement(By.linkText("Next: declare the plan")).click();
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("spec-count")));
        type(wait, "decisions[0].alternatives[0].label", "turnout");
        choose(wait, "decisions[0].alternatives[0].column", "turnout");
        press(wait, "Add an alternative to outcome");
        type(wait, "decisions[0].alternatives[1].label", "turnout change");
        choose(wait, "decisions[0].alternatives[1].column", "turnout_change");
        type(wait, "decisions[1].alternatives[0].label", "hours");
        choose(wait, "decisions[1].alternatives[0].column", "outreach_hours");
        press(wait, "Add an alternative to predictor");
        type(wait, "decisions[1].alternatives[1].label", "log hours");
        choose(wait, "decisions[1].alternatives[1].column", "outreach_hours");
        choose(wait, "decisions[1].alternatives[1].transform", "log");
        addDecision(wait, "controls");
        for (String control : List.of("median_age", "rainfall", "income_index")) {
            click(wait.until(d -> d.findElement(By.cssSelector("[data-path='decisions[2].optional'] input[value='"
                    + control + "']"))));
        }
        addDecision(wait, "errors");
        press(wait, "Add an alternative to errors");
        choose(wait, "decisions[3].alternatives[1]", "cluster");
        choose(wait, "decisions[3].alternatives[1].cluster", "district");
        // a second column makes it two-way clustering, written cluster:a+b; choosing none again removes it
        choose(wait, "decisions[3].alternatives[1].cluster-2", "region");
        wait.until(d -> ((String) driver.executeScript("return document.getElementById('plan-json').value"))
                .contains("\"cluster:district+region\""));
        assertEquals("region", new Select(field(wait, "decisions[3].alternatives[1].cluster-2"))
                .getFirstSelectedOption().getAttribute("value"));
        choose(wait, "decisions[3].alternatives[1].cluster-2", "");
        wait.until(d -> ((String) driver.executeScript("return document.getElementById('plan-json').value"))
                .contains("\"cluster:district\""));
        addDecision(wait, "sample");
        press(wait, "Add an alternative to rows");
        type(wait, "decisions[4].alternatives[1].label", "urban");
        type(wait, "decisions[4].alternatives[1].keep", "urban = 1");
        // the plan reader's message appears beside the expression it is about; the live check runs after
        // typing stops, so until then the field may still show the message for the empty expression
        String expected = "\"=\" at character 7 is not an operator";
        WebElement problem = wait.until(d -> {
            WebElement p = d.findElement(By.cssSelector("[data-path='decisions[4].alternatives[1].keep'] .problem"));
            return p.isDisplayed() && p.getText().contains(expected) ? p : null;
        });
        assertTrue(problem.getText().contains(expected), problem.getText());
        BrowserDriver.screenshot(driver, "2-plan-problem");
        WebElement keep = field(wait, "decisions[4].alternatives[1].keep");
        keep.clear();
        keep.sendKeys("urban == 1");
        // null draws of single rows under errors clustered on district: the explorer must say what they ignore
        type(wait, "nullDraws", "20");
        choose(wait, "nullCluster", "rows");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "ready to run"));
        assertEquals("128 specifications", driver.findElement(By.id("spec-count")).getText());
        BrowserDriver.screenshot(driver, "2-plan");
        // the plan exported from the form is the plan file the batch command reads
        click(driver.findElement(By.id("export-plan")));
        JsonNode planJson = Json.MAPPER.readTree(Files.readString(waitForFile(TEMP.resolve("downloads").resolve("plan.json"))));
        assertEquals("data.csv", planJson.path("data").asString());
        assertEquals(5, planJson.path("decisions").size());
        assertEquals("urban == 1", planJson.path("decisions").get(4).path("alternatives").get(1).path("keep").asString());
        assertEquals("cluster:district", planJson.path("decisions").get(3).path("alternatives").get(1).asString());
        assertEquals("rows", planJson.path("nullCluster").asString());
        click(wait.until(ExpectedConditions.elementToBeClickable(By.id("run-plan"))));

        // two outcomes times two codings of the key predictor: as fitted, one comparable group at a time
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 32 of 128"));
        assertEquals("fitted", new Select(driver.findElement(By.id("scale"))).getFirstSelectedOption().getAttribute("value"));
        assertTrue(driver.findElement(By.id("scale-note")).getText().contains(
                "the vertical axis is turnout per unit of predictor (hours)"), driver.findElement(By.id("scale-note")).getText());
        assertTrue(driver.findElement(By.id("curve-canvas")).getAttribute("aria-label")
                .endsWith("vertical axis: turnout per unit of predictor (hours)"));
        WebElement warning = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("null-draw-warning")));
        assertTrue(warning.getText().startsWith("The null draws resample single rows, as asked, so they split up the "
                + "clusters of \"district\""), warning.getText());
        // the joint tests of the curve shown: its comparable group's, as summary.json's by_scale has them
        JsonNode firstSummary = Json.MAPPER.readTree(HttpClient.newHttpClient().send(HttpRequest.newBuilder(
                URI.create(driver.getCurrentUrl().replaceAll("\\?.*", "") + "/files/summary.json")).build(),
                HttpResponse.BodyHandlers.ofString()).body());
        assertEquals(true, firstSummary.path("null").path("median_mixes_units").asBoolean());
        JsonNode shownGroup = firstSummary.path("by_scale").path("groups").get(0);
        assertEquals("turnout", shownGroup.path("outcome").asString());
        assertEquals("hours", shownGroup.path("predictor").asString());
        JsonNode groupMedian = shownGroup.path("null").path("tests").path("median");
        Object claim = driver.executeAsyncScript("const done = arguments[arguments.length - 1];"
                + "import('/js/numbers.js').then((n) => done(n.drawClaim(" + groupMedian.path("exceedances").asInt()
                + ", " + groupMedian.path("draws").asInt() + ")))");
        String cards = driver.findElement(By.id("curve-inference-cards")).getText();
        assertTrue(cards.contains("Joint test: median estimate\n" + claim + "\n"), cards);
        assertTrue(cards.contains("20 null draws (bootstrap, single rows) (the comparable group turnout on hours)"), cards);
        assertTrue(cards.contains("Smallest p in the comparable group turnout on hours"), cards);
        assertEquals("drawn", driver.findElement(By.id("curve-canvas")).getAttribute("data-null-band"));
        assertEquals("32", driver.findElement(By.id("curve-canvas")).getAttribute("data-null-band-ranks"),
                "the group's 32 specifications, every rank kept");
        // the page's own number module, in the browser, on values worked out by hand
        Object formatted = driver.executeAsyncScript("const done = arguments[arguments.length - 1];"
                + "import('/js/numbers.js').then((n) => done([n.number(-1.301e-5), n.number(-0.000203), n.number(4608),"
                + " n.number(1), n.number(2.5e6), n.share(0.9965), n.share(0.9999), n.share(0.0004), n.share(1),"
                + " n.share(0.625), n.pValue(0.0123), n.pValue(0.0004), n.count(4608), n.drawP(0, 300), n.drawP(4, 300),"
                + " n.drawP(0, 99)]))");
        assertEquals(List.of("-1.301\u00d710\u207b\u2075", "-0.000203", "4,608", "1", "2.5\u00d710\u2076", "99.7%",
                "> 99.9%", "< 0.1%", "100%", "62.5%", "0.012", "< 0.001", "4,608",
                "p < 0.0034 (1/301; none of 300 draws as extreme)", "p = 0.013 (4 of 300 draws)",
                "p < 0.01 (1/100; none of 99 draws as extreme)"), formatted);
        Thread.sleep(300);
        BrowserDriver.screenshot(driver, "3-explore");

        WebElement curve = driver.findElement(By.id("curve-canvas"));
        new Actions(driver).moveToElement(curve, 120, 0).perform();
        WebElement details = wait.until(d -> {
            WebElement e = d.findElement(By.id("tip-numbers"));
            return e.isDisplayed() ? e : null;
        });
        String estimate = match(details.getText(), "as fitted (-?[0-9.,]+)");
        String spec = match(driver.findElement(By.cssSelector("#curve-tip strong")).getText(), "Specification (\\d+)");
        BrowserDriver.screenshot(driver, "4-hover");
        driver.executeScript("document.getElementById('influence-title').scrollIntoView()");
        BrowserDriver.screenshot(driver, "4-influence");
        driver.executeScript("window.scrollTo(0, 0)");

        new Actions(driver).moveToElement(curve, 120, 0).click().perform();
        WebElement table = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("fit-table")));
        assertTrue(driver.findElement(By.id("fit-title")).getText().contains("Specification " + spec));
        WebElement keyRow = table.findElement(By.cssSelector("tr.key-row"));
        assertTrue(keyRow.getText().contains("(key predictor)"));
        double shown = Double.parseDouble(keyRow.findElements(By.cssSelector("td")).get(0).getText().replace(",", ""));
        assertEquals(Double.parseDouble(estimate.replace(",", "")), shown, Math.abs(shown) * 1e-3,
                "the full fit's key estimate is the curve's");
        BrowserDriver.screenshot(driver, "5-full-fit");
        driver.findElement(By.id("fit-close")).click();
        wait.until(d -> !d.findElement(By.id("fit-dialog")).isDisplayed());

        String fittedMedian = driver.findElement(By.id("card-median")).getText();
        assertTrue(fittedMedian.startsWith("Median, as fitted, turnout on hours"), fittedMedian);
        new Select(driver.findElement(By.id("group"))).selectByVisibleText("turnout change on log hours (32)");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("scale-note"),
                "the vertical axis is turnout change per unit of predictor (log hours)"));
        new Select(driver.findElement(By.id("scale"))).selectByValue("standardized");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 128 of 128"));
        assertTrue(driver.findElement(By.id("scale-note")).getText().contains(
                "the vertical axis is standard deviations of outcome per standard deviation of predictor"));
        assertTrue(driver.findElement(By.id("curve-canvas")).getAttribute("aria-label")
                .endsWith("vertical axis: standard deviations of outcome per standard deviation of predictor"));
        String standardizedMedian = driver.findElement(By.id("card-median")).getText();
        assertTrue(standardizedMedian.startsWith("Median, standardized coefficient"), standardizedMedian);
        assertNotEquals(fittedMedian.split("\n")[1], standardizedMedian.split("\n")[1], "the median follows the scale");
        assertTrue(!driver.findElement(By.id("group")).isDisplayed(), "no group selector on a unit-free scale");
        assertEquals("none", driver.findElement(By.id("curve-canvas")).getAttribute("data-null-band"));
        assertTrue(driver.findElement(By.id("null-overlay")).getText().contains(
                "not the standardized coefficient"), driver.findElement(By.id("null-overlay")).getText());
        new Select(driver.findElement(By.id("scale"))).selectByValue("t");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("scale-note"), "has no interval"));
        // on the t scale every specification shares the curve, and the band is the t curve's
        wait.until(ExpectedConditions.attributeToBe(By.id("curve-canvas"), "data-null-band-ranks", "128"));
        assertBandIs(firstSummary.path("by_scale").path("t_statistic").path("null").path("envelope"));
        assertTrue(driver.findElement(By.id("curve-inference-cards")).getText().contains(
                "(the t statistic of every specification with one)"));
        assertTrue(driver.findElement(By.id("card-bounds")).getText().contains("no intervals on this scale"));
        new Select(driver.findElement(By.id("scale"))).selectByValue("standardized");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("card-median"), "standardized"));

        driver.findElement(By.id("f0-l1")).click();
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 64 of 128"));
        assertTrue(driver.findElement(By.id("card-count")).getText().contains("64"));
        new Select(driver.findElement(By.id("sort"))).selectByValue("factor:5");
        wait.until(d -> d.getCurrentUrl().contains("sort=factor%3A5"));
        Thread.sleep(300);
        BrowserDriver.screenshot(driver, "6-filtered-grouped");

        String runId = driver.getCurrentUrl().replaceAll(".*/runs/([^/?]+).*", "$1");
        driver.findElement(By.id("export-csv")).click();
        Path exported = waitForFile(TEMP.resolve("downloads").resolve("outreach-and-turnout-" + runId
                + "-specifications.csv"));
        List<String> lines = Files.readAllLines(exported, StandardCharsets.UTF_8);
        assertEquals("spec,outcome,predictor,controls,errors,rows,estimate,std_error,statistic,df,p_value,ci_low,ci_high,std_estimate,"
                + "effect,effect_std_error,n_obs,n_params,r2,adj_r2,model_p_value,deviance,status", lines.get(0));
        assertEquals(129, lines.size());
        driver.findElement(By.id("export-png")).click();
        Path png = waitForFile(TEMP.resolve("downloads").resolve("outreach-and-turnout-" + runId + "-curve.png"));
        byte[] head = Arrays.copyOf(Files.readAllBytes(png), 8);
        assertArrayEquals(new byte[] {(byte) 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'}, head);
        Files.copy(png, Path.of("target", "screenshots", "7-exported-figure.png"),
                java.nio.file.StandardCopyOption.REPLACE_EXISTING);
        // the figure says what it shows and where it comes from, drawn and in the file's text chunks
        Map<String, String> text = pngText(png);
        assertEquals("Outreach and turnout", text.get("Title"));
        assertEquals("Forkscape " + org.forkscape.Version.current(), text.get("Software"));
        assertEquals(List.of("Showing 64 of 128 specifications; filter: specifications with outcome = turnout change "
                + "left out", "Order: grouped by errors, by estimate within each group",
                "Scale: standardized coefficient; vertical axis: standard deviations of outcome per standard deviation "
                + "of predictor; bars: 95% confidence intervals",
                "Run " + runId + " of the analysis \"Outreach and turnout\"; Forkscape " + org.forkscape.Version.current()),
                List.of(text.get("Description").split("\n")));
    }

    /** The tEXt chunks of a PNG, keyword to text, as the JDK's PNG reader gives them. */
    private static Map<String, String> pngText(Path png) throws IOException {
        Map<String, String> text = new java.util.LinkedHashMap<>();
        try (var in = javax.imageio.ImageIO.createImageInputStream(png.toFile())) {
            javax.imageio.ImageReader reader = javax.imageio.ImageIO.getImageReadersByFormatName("png").next();
            reader.setInput(in);
            org.w3c.dom.Node root = reader.getImageMetadata(0).getAsTree("javax_imageio_png_1.0");
            for (org.w3c.dom.Node n = root.getFirstChild(); n != null; n = n.getNextSibling()) {
                if (n.getNodeName().equals("tEXt")) {
                    for (org.w3c.dom.Node e = n.getFirstChild(); e != null; e = e.getNextSibling()) {
                        text.put(e.getAttributes().getNamedItem("keyword").getNodeValue(),
                                e.getAttributes().getNamedItem("value").getNodeValue());
                    }
                }
            }
            reader.dispose();
        }
        return text;
    }

    @Test
    void aLargeSetIsDrawnReducedAndStillAnswersAtThePointer() throws Exception {
        String id = upload();
        // a plan written by hand, imported into the form and run from there
        Path planFile = TEMP.resolve("hand-written.plan.json");
        Files.writeString(planFile, CivicTestData.plan(6).replace("\"data\": \"data.csv\"", "\"data\": \"outreach.csv\""));
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(base() + "/analyses/" + id + "/plan");
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("import-plan"))).sendKeys(planFile.toString());
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-notice"),
                "named the data file \"outreach.csv\"; here it uses this analysis's data"));
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "ready to run"));
        assertEquals("4,608 specifications", driver.findElement(By.id("spec-count")).getText());
        assertEquals("turnout", new Select(field(wait, "decisions[0].alternatives[0].column")).getFirstSelectedOption()
                .getAttribute("value"));
        click(driver.findElement(By.id("run-plan")));
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 1,152 of 4,608"));
        new Select(driver.findElement(By.id("scale"))).selectByValue("partial");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 4,608 of 4,608"));
        assertTrue(driver.findElement(By.id("figure-caption")).getText().contains("per pixel column"));
        // no null draws: the way to adjust the smallest p names the plan page's field, not a command-line option
        String cards = driver.findElement(By.id("curve-inference-cards")).getText();
        assertTrue(cards.contains("none: ask for null draws (\"Null draws for joint inference\" on the plan page)"),
                cards);
        assertFalse(cards.contains("--null-draws"), cards);
        // coloured by a decision in the reduced drawing: each column's median line takes its most used alternative
        new Select(driver.findElement(By.id("colour-by"))).selectByVisibleText("fixed effects");
        assertEquals(List.of("none", "region"), driver.findElements(By.cssSelector("#legend .legend-alternative"))
                .stream().map(WebElement::getText).toList());
        assertTrue(driver.findElement(By.id("figure-caption")).getText().contains("coloured by the fixed effects most"));
        new Actions(driver).moveToElement(driver.findElement(By.id("grid-canvas")), 200, 0).perform();
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("curve-tip"), "Specification"));
        Thread.sleep(300);
        BrowserDriver.screenshot(driver, "8-explore-reduced");
    }

    @Test
    void aModelDecisionIsAddedInTheFormAndTheEffectsOfBothModelsShareOneScale() throws Exception {
        String id = upload(CivicTestData.csvWithFollowUp(300, 21));
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(base() + "/analyses/" + id + "/plan");
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("spec-count")));
        type(wait, "decisions[0].alternatives[0].label", "follow-up");
        // first the outcome a logit cannot fit, to see the engine's message at the model
        choose(wait, "decisions[0].alternatives[0].column", "turnout");
        type(wait, "decisions[1].alternatives[0].label", "hours");
        choose(wait, "decisions[1].alternatives[0].column", "outreach_hours");
        addDecision(wait, "controls");
        for (String control : List.of("median_age", "rainfall")) {
            click(wait.until(d -> d.findElement(By.cssSelector("[data-path='decisions[2].optional'] input[value='"
                    + control + "']"))));
        }
        addDecision(wait, "model");
        assertEquals("ols", new Select(field(wait, "decisions[3].alternatives[0]")).getFirstSelectedOption()
                .getAttribute("value"));
        press(wait, "Add an alternative to model");
        assertEquals("logit", new Select(field(wait, "decisions[3].alternatives[1]")).getFirstSelectedOption()
                .getAttribute("value"), "the next model not yet listed");
        assertTrue(driver.findElement(By.cssSelector("[data-path='decisions[3].alternatives[1]'] .model-note")).getText()
                .contains("For an outcome coded 0/1"));
        String expected = "logit needs an outcome coded 0/1; \"turnout\" has other values";
        WebElement problem = wait.until(d -> d.findElements(By.cssSelector("[data-path='decisions[3].alternatives[1]'] "
                + ".problem")).stream().filter(p -> p.isDisplayed() && p.getText().contains(expected)).findFirst()
                .orElse(null));
        assertTrue(problem.getText().contains(expected), problem.getText());
        BrowserDriver.screenshot(driver, "9-plan-model-problem");
        choose(wait, "decisions[0].alternatives[0].column", "follow_up");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("plan-status"), "ready to run"));
        assertEquals("8 specifications", driver.findElement(By.id("spec-count")).getText());
        click(wait.until(ExpectedConditions.elementToBeClickable(By.id("run-plan"))));

        // as fitted: one model at a time, least squares first
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 4 of 8"));
        assertTrue(driver.findElement(By.id("curve-canvas")).getAttribute("aria-label")
                .endsWith("vertical axis: follow-up per unit of predictor (hours)"));
        new Select(driver.findElement(By.id("group"))).selectByVisibleText("follow-up on hours, logit (4)");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("scale-note"),
                "the vertical axis is log-odds of follow-up per unit of predictor (hours)"));
        String logitMedian = driver.findElement(By.id("card-median")).getText();
        assertTrue(logitMedian.startsWith("Median, as fitted, follow-up on hours, logit"), logitMedian);

        // a logit specification's full fit: the model, z, no df, McFadden, the test, the deviance, the effect
        new Actions(driver).moveToElement(driver.findElement(By.id("curve-canvas")), 60, 0).click().perform();
        WebElement table = wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("fit-table")));
        assertEquals(List.of("Term", "Estimate", "Std. error", "z", "p", "95% low", "95% high"),
                table.findElements(By.cssSelector("thead th")).stream().map(WebElement::getText).toList());
        String facts = driver.findElement(By.id("fit-facts")).getText();
        for (String fact : List.of("Model: logistic regression (logit)", "McFadden R\u00b2 = ",
                "Likelihood-ratio test against the intercept alone: p ", "Residual deviance = ",
                "Average marginal effect of the key predictor: ")) {
            assertTrue(facts.contains(fact), facts);
        }
        assertTrue(!facts.contains("df ="), "no degrees of freedom on the standard normal reference");
        BrowserDriver.screenshot(driver, "9-logit-full-fit");
        driver.findElement(By.id("fit-close")).click();
        wait.until(d -> !d.findElement(By.id("fit-dialog")).isDisplayed());

        // the effect scale: both models on one axis, in the outcome's own units
        new Select(driver.findElement(By.id("scale"))).selectByValue("effect");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 8 of 8"));
        assertTrue(driver.findElement(By.id("curve-canvas")).getAttribute("aria-label")
                .endsWith("vertical axis: change in the probability of follow-up per unit of predictor (hours)"));
        String effectMedian = driver.findElement(By.id("card-median")).getText();
        assertTrue(effectMedian.startsWith("Median, average marginal effect"), effectMedian);
        assertNotEquals(logitMedian.split("\n")[1], effectMedian.split("\n")[1], "the median follows the scale");
        assertTrue(!driver.findElement(By.id("group")).isDisplayed(), "one group of effects: no selector");
        // colour by the model decision: which model sits where on the common scale
        new Select(driver.findElement(By.id("colour-by"))).selectByVisibleText("model");
        assertEquals(List.of("ols", "logit"), driver.findElements(By.cssSelector("#legend .legend-alternative"))
                .stream().map(WebElement::getText).toList());
        Thread.sleep(300);
        BrowserDriver.screenshot(driver, "9-explore-effect");

        // a scale for least squares only: the logits are left out and counted, not drawn at 0
        new Select(driver.findElement(By.id("scale"))).selectByValue("partial");
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"),
                "Showing 4 of 8 specifications (4 more have no value on this scale)"));
        assertTrue(driver.findElement(By.id("scale-note")).getText().contains("4 specifications of the set fit a logit"));
    }

    /** One outcome and one coding (a single comparable group, so the run's bounds are shown) and 20 null draws. */
    private static final String ONE_GROUP_PLAN = """
            {
              "title": "Outreach and turnout, one group",
              "data": "data.csv",
              "seed": 7,
              "nullDraws": 20,
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "turnout", "column": "turnout"}]},
                {"name": "outreach", "kind": "predictor", "alternatives": [
                  {"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls", "optional": ["median_age", "rainfall", "income_index"]},
                {"name": "rows", "kind": "sample", "alternatives": [
                  {"label": "all"},
                  {"label": "urban", "keep": "urban == 1"},
                  {"label": "trimmed", "trim": {"column": "turnout", "z": 2.5}}]},
                {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
              ]
            }
            """;

    @Test
    void colourByADecisionTheTooltipTheLinksTheNullBandAndTheNarrowLayout() throws Exception {
        String id = upload();
        HttpResponse<String> started = HttpClient.newHttpClient().send(
                HttpRequest.newBuilder(URI.create(base() + "/api/analyses/" + id + "/runs"))
                        .header("Content-Type", "application/json")
                        .POST(HttpRequest.BodyPublishers.ofString(ONE_GROUP_PLAN)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(202, started.statusCode(), started.body());
        String runId = match(started.body(), "\"id\":\"([0-9a-z-]+)\"");
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(90));
        driver.get(base() + "/analyses/" + id + "/runs/" + runId);
        wait.until(ExpectedConditions.textToBePresentInElementLocated(By.id("set-count"), "Showing 48 of 48"));

        // colour by the rows decision: the legend lists its alternatives, and the choice stays in the address
        new Select(driver.findElement(By.id("colour-by"))).selectByVisibleText("rows");
        wait.until(d -> d.getCurrentUrl().contains("colour=5"));
        assertEquals(List.of("all", "urban", "trimmed"), driver.findElements(By.cssSelector("#legend .legend-alternative"))
                .stream().map(WebElement::getText).toList());
        assertTrue(driver.findElement(By.id("legend")).getText().contains("Colour: rows"));
        assertTrue(driver.findElement(By.id("figure-caption")).getText().contains("coloured by its rows"));
        new Select(driver.findElement(By.id("colour-by"))).selectByVisibleText("rainfall (in or out)");
        assertEquals(List.of("without rainfall", "with rainfall"), driver.findElements(
                By.cssSelector("#legend .legend-alternative")).stream().map(WebElement::getText).toList());

        // the exported figure carries the colours, the null band and their legend
        try (var old = Files.list(TEMP.resolve("downloads"))) {
            for (Path f : old.filter(f -> f.toString().endsWith(".png")).toList()) {
                Files.delete(f);
            }
        }
        click(driver.findElement(By.id("export-png")));
        Path png = waitForSuffix(".png");
        byte[] head = Arrays.copyOf(Files.readAllBytes(png), 8);
        assertArrayEquals(new byte[] {(byte) 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'}, head);
        Files.copy(png, Path.of("target", "screenshots", "12-exported-colour-by.png"),
                java.nio.file.StandardCopyOption.REPLACE_EXISTING);

        // the null draws' band is drawn under the curve, rank by rank, the three joint tests beside it
        assertEquals("drawn", driver.findElement(By.id("curve-canvas")).getAttribute("data-null-band"));
        JsonNode bandSummary = Json.MAPPER.readTree(HttpClient.newHttpClient().send(HttpRequest.newBuilder(
                URI.create(base() + "/analyses/" + id + "/runs/" + runId + "/files/summary.json")).build(),
                HttpResponse.BodyHandlers.ofString()).body());
        JsonNode envelope = bandSummary.path("by_scale").path("groups").get(0).path("null").path("envelope");
        assertEquals(48, envelope.path("ranks").size(), "every rank of 48 specifications");
        assertBandIs(envelope);
        JsonNode high = envelope.path("high");
        assertTrue(high.get(47).asDouble() > high.get(0).asDouble(), "the band follows the ranks, it is not flat");
        assertTrue(driver.findElement(By.id("null-overlay")).getText().contains("at each position of the sorted curve"));
        assertTrue(driver.findElement(By.cssSelector("#legend .legend-band")).getText().contains("null draws"));
        String overlay = driver.findElement(By.id("null-overlay")).getText();
        for (String test : List.of("median estimate: p", "share significant: p", "mean z (Stouffer): p")) {
            assertTrue(overlay.contains(test), overlay);
        }
        // the further sections as tables: observed against the null, the groups' weights, inclusion
        driver.findElement(By.cssSelector("#more-sections summary")).click();
        assertTrue(driver.findElement(By.id("null-quantiles")).getText().contains("median estimate"));
        assertTrue(driver.findElement(By.id("group-weights")).getText().contains("turnout on hours"));
        // per comparable group and unit-free scale, the draws' tests on that curve alone
        List<String> curves = driver.findElements(By.cssSelector("#by-scale tbody th")).stream().map(WebElement::getText)
                .toList();
        assertEquals(List.of("turnout on hours", "standardized coefficient, every specification with one",
                "partial correlation, every specification with one", "t statistic, every specification with one"), curves);
        JsonNode summary = Json.MAPPER.readTree(HttpClient.newHttpClient().send(HttpRequest.newBuilder(
                URI.create(base() + "/analyses/" + id + "/runs/" + runId + "/files/summary.json")).build(),
                HttpResponse.BodyHandlers.ofString()).body());
        java.util.Set<String> included = new java.util.LinkedHashSet<>();
        for (JsonNode g : summary.path("comparable_groups").path("groups")) {
            g.path("bic").path("inclusion").propertyNames().forEach(included::add);
        }
        assertTrue(!included.isEmpty());
        assertEquals(List.copyOf(included), driver.findElements(By.cssSelector("#group-inclusion tbody th")).stream()
                .map(WebElement::getText).toList(), "one row per control with an inclusion probability in some group");
        assertEquals(summary.path("comparable_groups").path("groups").size(),
                driver.findElements(By.cssSelector("#group-weights tbody tr")).size());

        // the tooltip follows the pointer: beside it, with the pointed specification's numbers
        WebElement curve = driver.findElement(By.id("curve-canvas"));
        driver.executeScript("arguments[0].scrollIntoView({block: 'center'})", curve);
        for (int dx : new int[] {-150, 100}) {
            new Actions(driver).moveToElement(curve, dx, 10).perform();
            WebElement tip = wait.until(d -> {
                WebElement t = d.findElement(By.id("curve-tip"));
                return t.isDisplayed() && !t.findElements(By.id("tip-numbers")).isEmpty() ? t : null;
            });
            assertTrue(tip.getText().contains("rows: "), tip.getText());
            org.openqa.selenium.Rectangle c = curve.getRect();
            double pointerX = c.getX() + c.getWidth() / 2.0 + dx;
            double pointerY = c.getY() + c.getHeight() / 2.0 + 10;
            org.openqa.selenium.Rectangle t = tip.getRect();
            double distanceX = Math.max(0, Math.max(t.getX() - pointerX, pointerX - (t.getX() + t.getWidth())));
            double distanceY = Math.max(0, Math.max(t.getY() - pointerY, pointerY - (t.getY() + t.getHeight())));
            assertTrue(distanceX <= 30 && distanceY <= 30, "the tooltip sits beside the pointer: " + t + " vs "
                    + pointerX + "," + pointerY);
        }
        BrowserDriver.screenshot(driver, "10-colour-by-and-tooltip");
        new Actions(driver).moveToElement(driver.findElement(By.id("figure-title"))).perform();

        // the smallest p and the ends of the bounds open their specifications
        for (String[] link : new String[][] {{"best-spec-link", String.valueOf(summary.path("best").path("spec").asLong())},
                {"lower-bound-link", String.valueOf(summary.path("interval_bounds").path("lower_spec").asLong())},
                {"upper-bound-link", String.valueOf(summary.path("interval_bounds").path("upper_spec").asLong())}}) {
            click(driver.findElement(By.id(link[0])));
            wait.until(ExpectedConditions.visibilityOfElementLocated(By.id("fit-table")));
            assertTrue(driver.findElement(By.id("fit-title")).getText().startsWith("Specification " + link[1] + ":"),
                    driver.findElement(By.id("fit-title")).getText());
            driver.findElement(By.id("fit-close")).click();
            wait.until(d -> !d.findElement(By.id("fit-dialog")).isDisplayed());
            assertEquals("Specification " + link[1], driver.findElement(By.cssSelector("#spec-details strong")).getText(),
                    "selected in the curve, its details below the grid");
        }

        // from 800 px up nothing covers anything: the choices panel goes above, in the flow of the page
        for (int width : new int[] {800, 900}) {
            driver.manage().window().setSize(new org.openqa.selenium.Dimension(width, 1100));
            Thread.sleep(400);
            for (String other : List.of("summary-cards", "figure-title", "figure", "influence-table", "whole-run-cards")) {
                driver.executeScript("document.getElementById(arguments[0]).scrollIntoView({block: 'center'})", other);
                assertTrue(!overlaps(By.cssSelector(".filters"), By.id(other)),
                        "at " + width + " px the choices panel covers #" + other);
            }
            assertTrue(!overlaps(By.id("curve-box"), By.id("grid-box")), "the curve and the grid stay apart");
            BrowserDriver.screenshot(driver, "11-layout-" + width);
        }
        driver.manage().window().setSize(new org.openqa.selenium.Dimension(1440, 1800));
    }

    /** Whether two elements' boxes, as the page lays them out now (in the window), intersect. */
    private static boolean overlaps(By a, By b) {
        Object hit = driver.executeScript("const r = arguments[0].getBoundingClientRect();"
                + "const s = arguments[1].getBoundingClientRect();"
                + "return r.width > 0 && s.width > 0 && r.left < s.right && s.left < r.right && r.top < s.bottom"
                + " && s.top < r.bottom;", driver.findElement(a), driver.findElement(b));
        return Boolean.TRUE.equals(hit);
    }

    private String upload() throws Exception {
        return upload(CivicTestData.csv(300, 11));
    }

    private String upload(String csv) throws Exception {
        return BrowserDriver.upload(base(), "outreach.csv", csv);
    }

    private String base() {
        return "http://localhost:" + port;
    }

    private static WebElement field(WebDriverWait wait, String path) {
        WebElement e = wait.until(d -> d.findElement(By.cssSelector("[data-path='" + path + "'] input, [data-path='"
                + path + "'] select, [data-path='" + path + "'] textarea")));
        driver.executeScript("arguments[0].scrollIntoView({block: 'center'})", e);
        return e;
    }

    /** The band on the curve joins exactly the envelope summary.json records, rank by rank. */
    private static void assertBandIs(JsonNode envelope) throws Exception {
        JsonNode drawn = Json.MAPPER.readTree(driver.findElement(By.id("curve-canvas")).getAttribute("data-null-band-values"));
        assertEquals(envelope.path("ranks").size(), drawn.path("ranks").size());
        for (int k = 0; k < drawn.path("ranks").size(); k++) {
            assertEquals(envelope.path("ranks").get(k).asInt(), drawn.path("ranks").get(k).asInt());
            assertEquals(envelope.path("low").get(k).asDouble(), drawn.path("low").get(k).asDouble(), 0, "rank " + k);
            assertEquals(envelope.path("high").get(k).asDouble(), drawn.path("high").get(k).asDouble(), 0, "rank " + k);
        }
    }

    private static void type(WebDriverWait wait, String path, String text) {
        WebElement input = field(wait, path);
        input.clear();
        input.sendKeys(text);
    }

    private static void choose(WebDriverWait wait, String path, String value) {
        new Select(field(wait, path)).selectByValue(value);
    }

    private static void press(WebDriverWait wait, String label) {
        click(wait.until(d -> d.findElement(By.cssSelector("button[aria-label='" + label + "']"))));
    }

    private static void addDecision(WebDriverWait wait, String kind) {
        new Select(wait.until(d -> d.findElement(By.id("new-decision-kind")))).selectByValue(kind);
        click(driver.findElement(By.id("add-decision")));
    }

    /** Clicks after scrolling the element to the middle of the window, clear of the sticky plan toolbar. */
    private static void click(WebElement element) {
        driver.executeScript("arguments[0].scrollIntoView({block: 'center'})", element);
        element.click();
    }

    private static String match(String text, String regex) {
        Matcher m = Pattern.compile(regex).matcher(text);
        assertTrue(m.find(), text + " has no " + regex);
        return m.group(1);
    }

    private static Path waitForFile(Path file) throws InterruptedException {
        // the browser may create the file before it has written it: wait for its content too
        for (int i = 0; i < 200 && !(Files.isRegularFile(file) && file.toFile().length() > 0); i++) {
            Thread.sleep(100);
        }
        assertTrue(Files.isRegularFile(file), "no download " + file);
        return file;
    }

    private static Path waitForSuffix(String suffix) throws Exception {
        Path dir = TEMP.resolve("downloads");
        for (int i = 0; i < 200; i++) {
            try (var files = Files.list(dir)) {
                var found = files.filter(f -> f.getFileName().toString().endsWith(suffix)).findFirst();
                if (found.isPresent()) {
                    return found.get();
                }
            }
            Thread.sleep(100);
        }
        throw new AssertionError("no " + suffix + " download in " + dir);
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-browser-");
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
