package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.logging.Level;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.openqa.selenium.OutputType;
import org.openqa.selenium.TakesScreenshot;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.chrome.ChromeDriverService;
import org.openqa.selenium.chrome.ChromeOptions;
import org.openqa.selenium.logging.LogEntry;
import org.openqa.selenium.logging.LogType;
import org.openqa.selenium.logging.LoggingPreferences;

/**
 * Headless Debian Chromium driven through Debian's chromedriver, both named explicitly so that Selenium
 * never looks for (or downloads) a browser or driver. src/test/setup/install-test-tools.sh installs them
 * on a fresh machine.
 */
public final class BrowserDriver {
    public static final Path CHROMIUM = Path.of("/usr/bin/chromium");
    public static final Path CHROMEDRIVER = Path.of("/usr/bin/chromedriver");

    private BrowserDriver() {
    }

    /** A fresh browser with its own profile, downloading into {@code downloads}. */
    public static ChromeDriver start(Path profile, Path downloads, int width, int height) {
        return start(profile, downloads, width, height, false);
    }

    /**
     * The same, and when {@code recordRequests} also recording the DevTools network events in the
     * performance log ({@link #requestedUrls}).
     */
    public static ChromeDriver start(Path profile, Path downloads, int width, int height, boolean recordRequests) {
        ChromeOptions options = new ChromeOptions();
        options.setBinary(CHROMIUM.toFile());
        options.addArguments("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                "--disable-background-networking", "--disable-component-update", "--disable-sync",
                "--disable-dev-shm-usage", "--user-data-dir=" + profile, "--window-size=" + width + "," + height,
                "--force-device-scale-factor=1", "--lang=en-GB");
        // the browser's console is read after each test: a script error or a blocked resource fails it
        LoggingPreferences logs = new LoggingPreferences();
        logs.enable(LogType.BROWSER, Level.ALL);
        if (recordRequests) {
            logs.enable(LogType.PERFORMANCE, Level.ALL);
        }
        options.setCapability("goog:loggingPrefs", logs);
        options.setExperimentalOption("prefs", Map.of("download.default_directory", downloads.toString(),
                "download.prompt_for_download", false, "safebrowsing.enabled", false));
        ChromeDriverService service = new ChromeDriverService.Builder().usingDriverExecutable(CHROMEDRIVER.toFile())
                .usingAnyFreePort().build();
        return new ChromeDriver(service, options);
    }

    /** The console messages of level SEVERE since the last call (script errors, refused resources, CSP reports). */
    public static List<String> severeConsoleMessages(ChromeDriver driver) {
        return driver.manage().logs().get(LogType.BROWSER).getAll().stream()
                .filter(e -> e.getLevel().intValue() >= Level.SEVERE.intValue()).map(LogEntry::getMessage).toList();
    }

    /**
     * The URLs of every request the browser sent since the last call (Network.requestWillBeSent events of
     * the performance log), for a browser started with {@code recordRequests}.
     */
    public static List<String> requestedUrls(ChromeDriver driver) {
        java.util.regex.Pattern url = java.util.regex.Pattern.compile(
                "\"method\":\"Network\\.requestWillBeSent\".*?\"request\":\\{.*?\"url\":\"([^\"]*)\"");
        return driver.manage().logs().get(LogType.PERFORMANCE).getAll().stream().map(LogEntry::getMessage)
                .map(url::matcher).filter(java.util.regex.Matcher::find).map(m -> m.group(1)).toList();
    }

    public static void screenshot(ChromeDriver driver, String name) {
        try {
            Path dir = Path.of("target", "screenshots");
            Files.createDirectories(dir);
            Files.write(dir.resolve(name + ".png"), ((TakesScreenshot) driver).getScreenshotAs(OutputType.BYTES));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /**
     * Uploads {@code csv} as a new analysis through the server's API at {@code base}, as the data page does,
     * and returns the analysis's id; asserts the 201.
     */
    public static String upload(String base, String fileName, String csv) throws Exception {
        String boundary = "----forkscape-test";
        String body = "--" + boundary + "\r\nContent-Disposition: form-data; name=\"file\"; filename=\"" + fileName
                + "\"\r\nContent-Type: text/csv\r\n\r\n" + csv + "\r\n--" + boundary + "--\r\n";
        HttpResponse<String> r = HttpClient.newHttpClient().send(
                HttpRequest.newBuilder(URI.create(base + "/api/analyses"))
                        .header("Content-Type", "multipart/form-data; boundary=" + boundary)
                        .POST(HttpRequest.BodyPublishers.ofString(body)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(201, r.statusCode(), r.body());
        Matcher m = Pattern.compile("\"id\":\"([0-9a-z-]+)\"").matcher(r.body());
        assertTrue(m.find(), r.body());
        return m.group(1);
    }
}
