package org.forkscape.web.analysis;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Arrays;
import java.util.List;
import org.forkscape.data.CsvTableReader;
import org.forkscape.bench.ParquetCopy;
import org.forkscape.run.Workspace;
import org.forkscape.web.BrowserDriver;
import org.forkscape.web.CivicTestData;
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
import org.springframework.boot.test.web.server.LocalServerPort;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;

/**
 * A Parquet file chosen in the home page's upload form of a real browser (headless Chromium): the data
 * page lists its columns, the analysis keeps it as data.parquet, and the plan page names that file; a cut
 * file comes back as the form's alert naming the uploaded file. Screenshots go to target/screenshots.
 */
@SpringBootTest(webEnvironment = SpringBootTest.WebEnvironment.RANDOM_PORT)
class ParquetUploadBrowserTest {
    private static final Path TEMP = temp();
    private static ChromeDriver driver;

    @LocalServerPort
    int port;
    @Autowired
    Workspace workspace;

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", () -> TEMP.resolve("workspace").toString());
        registry.add("forkscape.demo.enabled", () -> "false");
    }

    @BeforeAll
    static void browser() throws IOException {
        Files.createDirectories(TEMP.resolve("downloads"));
        driver = BrowserDriver.start(TEMP.resolve("profile"), TEMP.resolve("downloads"), 1280, 1200);
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

    private Path parquetCopy(String csv, String name) throws IOException {
        Path file = Files.writeString(TEMP.resolve(name + ".csv"), csv);
        return ParquetCopy.write(new CsvTableReader().read(file), TEMP.resolve(name + ".parquet"));
    }

    @Test
    void aParquetFileUploadsThroughTheFormAndItsPlanNamesIt() throws Exception {
        Path parquet = parquetCopy(CivicTestData.csv(120, 6), "districts");
        WebDriverWait wait = new WebDriverWait(driver, Duration.ofSeconds(60));
        driver.get("http://localhost:" + port + "/");
        assertTrue(driver.findElement(By.id("upload-file")).getAttribute("accept").contains(".parquet"),
                "the file chooser offers Parquet files");
        driver.findElement(By.id("upload-file")).sendKeys(parquet.toString());
        driver.findElement(By.cssSelector(".upload-form button[type=submit]")).click();
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("columns")));
        String columns = driver.findElement(By.id("columns")).getText();
        for (String name : List.of("district", "region", "outreach_hours", "rainfall", "turnout")) {
            assertTrue(columns.contains(name), name + " in " + columns);
        }
        String id = driver.getCurrentUrl().replaceAll(".*/analyses/([^/?#]+).*", "$1");
        assertEquals(workspace.analysisFolder(id).resolve(Workspace.DATA_PARQUET), workspace.dataFile(id),
                "the upload was kept as Parquet");
        assertEquals("districts.parquet", workspace.analysis(id).orElseThrow().dataName());
        BrowserDriver.screenshot(driver, "parquet-1-data");

        driver.findElement(By.linkText("Next: declare the plan")).click();
        wait.until(ExpectedConditions.presenceOfElementLocated(By.id("spec-count")));
        wait.until(d -> d.findElement(By.id("plan-editor")).getText().contains("Data: this analysis\u2019s file (data.parquet)."));
        assertTrue(driver.findElement(By.cssSelector(".lead-small code")).getText().equals("data.parquet"));
        BrowserDriver.screenshot(driver, "parquet-2-plan");
    }

    @Test
    void aCutParquetFileComesBackAsTheFormsAlert() throws Exception {
        byte[] good = Files.readAllBytes(parquetCopy(CivicTestData.csv(40, 7), "whole"));
        Path cut = Files.write(TEMP.resolve("cut.parquet"), Arrays.copyOf(good, good.length / 2));
        int before = workspace.analyses().size();
        driver.get("http://localhost:" + port + "/");
        driver.findElement(By.id("upload-file")).sendKeys(cut.toString());
        driver.findElement(By.cssSelector(".upload-form button[type=submit]")).click();
        String alert = new WebDriverWait(driver, Duration.ofSeconds(30))
                .until(ExpectedConditions.visibilityOfElementLocated(By.id("upload-problem"))).getText();
        assertTrue(alert.startsWith("cut.parquet: is not a Parquet file"), alert);
        assertEquals(before, workspace.analyses().size(), "nothing kept");
        BrowserDriver.screenshot(driver, "parquet-3-refused");
        // the browser logs the refusal's 400 itself; it must be the only message
        List<String> messages = BrowserDriver.severeConsoleMessages(driver);
        assertEquals(1, messages.size(), messages.toString());
        assertTrue(messages.get(0).contains("/analyses - Failed to load resource: the server responded with a status "
                + "of 400"), messages.toString());
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-parquet-browser-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
