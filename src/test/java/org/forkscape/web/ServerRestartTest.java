package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.NetworkInterface;
import java.net.ServerSocket;
import java.net.Socket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import org.forkscape.run.Json;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;

/**
 * The server as a separate process: it loads the demo at its first start, listens on the loopback
 * address only, refuses an oversized upload while it streams and paths that leave the workspace; killed
 * in the middle of a run and started again, it finds every earlier run exactly as it was, the demo once,
 * and the killed run marked interrupted.
 */
class ServerRestartTest {
    @TempDir
    Path temp;
    private Process server;
    /** The server process's system temporary folder, which must stay empty. */
    private Path systemTemp;
    private final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();

    @org.junit.jupiter.api.BeforeEach
    void temporaryFolder() {
        systemTemp = temp.resolve("system-tmp");
    }

    @AfterEach
    void stop() throws InterruptedException {
        if (server != null && server.isAlive()) {
            server.destroy();
            server.waitFor();
        }
    }

    @Test
    void killedMidRunAndStartedAgainEveryFinishedRunIsIntact() throws Exception {
        Path demo = temp.resolve("demo");
        Files.createDirectories(demo);
        Files.writeString(demo.resolve("civic-demo.csv"), CivicTestData.csv(300, 21));
        Files.writeString(demo.resolve("civic-demo.plan.json"),
                CivicTestData.plan().replace("\"data\": \"data.csv\"", "\"data\": \"civic-demo.csv\""));
        for (String panelFile : List.of("stream-panel.csv", "stream-panel.plan.json")) {
            Files.copy(Path.of("sample-data", panelFile), demo.resolve(panelFile));
        }
        Path workspace = temp.resolve("workspace");
        int port = freePort();
        String base = "http://localhost:" + port;

        server = start(workspace, demo, port);
        JsonNode demoAnalysis = waitForDemo(base);
        String demoId = demoAnalysis.path("id").asString();
        String demoRun = waitForFinishedRun(base, demoId);
        String files = base + "/analyses/" + demoId + "/runs/" + demoRun + "/files/";
        byte[] csvBefore = bytes(files + "specifications.csv");
        byte[] summaryBefore = bytes(files + "summary.json");
        String layoutBefore = text(base + "/api/analyses/" + demoId + "/runs/" + demoRun + "/curve?drop=0.1");

        refusesWhatItMust(base, demoId, demoRun);
        answersWhatTheContainerRefusesInPlainWords(port);
        assertListensOnLoopbackOnly(port);

        // a run long enough to be caught in the middle: 20,000 rows, row-pass errors, 4,608 specifications
        String big = upload(base, "large.csv", CivicTestData.csv(20_000, 22));
        String plan = CivicTestData.plan(6).replace("[\"classical\", \"HC1\", \"cluster:district\"]",
                "[\"HC3\", \"HC2\", \"cluster:district\"]");
        HttpResponse<String> started = http.send(HttpRequest.newBuilder(URI.create(base + "/api/analyses/" + big + "/runs"))
                .header("Content-Type", "application/json").POST(HttpRequest.BodyPublishers.ofString(plan)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(202, started.statusCode(), started.body());
        String bigRun = json(started.body()).path("id").asString();
        String state = "";
        for (int i = 0; i < 600 && !state.equals("running"); i++) {
            state = json(text(base + "/api/analyses/" + big + "/runs/" + bigRun)).path("state").asString();
            Thread.sleep(20);
        }
        assertEquals("running", state);
        server.destroyForcibly();
        server.waitFor();
        // what a killed upload leaves: a spooled part in the workspace, which the next start clears
        Path part = workspace.resolve(".incoming").resolve("parts").resolve("upload_left_by_a_kill.tmp");
        Files.writeString(part, "a,b\n1,2\n");

        server = start(workspace, demo, port);
        waitForDemo(base);
        JsonNode analyses = json(text(base + "/api/analyses"));
        long demos = 0;
        for (JsonNode a : analyses) {
            demos += a.path("demo").asBoolean() ? 1 : 0;
        }
        assertEquals(2, demos, "each of the two demos is loaded once");
        assertArrayEquals(csvBefore, bytes(files + "specifications.csv"));
        assertArrayEquals(summaryBefore, bytes(files + "summary.json"));
        assertEquals(layoutBefore, text(base + "/api/analyses/" + demoId + "/runs/" + demoRun + "/curve?drop=0.1"),
                "the finished run opens exactly as it was");
        JsonNode interrupted = json(text(base + "/api/analyses/" + big + "/runs/" + bigRun));
        assertEquals("interrupted", interrupted.path("state").asString());
        assertTrue(text(base + "/analyses/" + big + "/runs/" + bigRun).contains("Run this plan again"));
        assertFalse(Files.exists(workspace.resolve("analyses").resolve(big).resolve("runs").resolve(bigRun)
                .resolve("specifications.csv")));
        assertFalse(Files.exists(part), "a spooled part left by a kill is cleared at start");
        // the server's own files (uploads larger than the 1 MB threshold were spooled) stay in the workspace
        try (java.util.stream.Stream<Path> left = Files.list(systemTemp)) {
            assertEquals(List.of(), left.map(q -> q.getFileName().toString()).toList(),
                    "nothing of the server's in the system temporary folder");
        }
        assertTrue(Files.isDirectory(workspace.resolve(".server")));
    }

    /**
     * What the servlet container answers itself: an address that is not a valid URL, a method an
     * address does not take, the error dispatch address asked for directly. Each carries the security
     * headers, and none is the container's HTML report.
     */
    private void answersWhatTheContainerRefusesInPlainWords(int port) throws IOException {
        String invalid = raw(port, "GET /analyses/%zz HTTP/1.1");
        assertTrue(invalid.startsWith("HTTP/1.1 400"), invalid);
        assertTrue(invalid.contains("Content-Security-Policy: default-src 'self'"), invalid);
        assertTrue(invalid.contains("cannot be served as sent") && !invalid.contains("<html"), invalid);
        String trace = raw(port, "TRACE / HTTP/1.1");
        assertTrue(trace.startsWith("HTTP/1.1 405") && trace.contains("Content-Security-Policy: "), trace);
        String error = raw(port, "GET /error HTTP/1.1");
        assertTrue(error.startsWith("HTTP/1.1 404") && error.contains("X-Frame-Options: DENY"), error);
    }

    /** One request as written, on its own connection; the whole answer as text. */
    private static String raw(int port, String requestLine) throws IOException {
        try (Socket socket = new Socket(InetAddress.getLoopbackAddress(), port)) {
            socket.setSoTimeout(10_000);
            socket.getOutputStream().write((requestLine + "\r\nHost: localhost:" + port + "\r\nConnection: close\r\n\r\n")
                    .getBytes(java.nio.charset.StandardCharsets.US_ASCII));
            return new String(socket.getInputStream().readAllBytes(), java.nio.charset.StandardCharsets.UTF_8);
        }
    }

    private void refusesWhatItMust(String base, String analysis, String run) throws Exception {
        // larger than the limit set for this server (3 MB): refused with the reason, nothing kept
        StringBuilder huge = new StringBuilder("a,b\n");
        SplittableRandom random = new SplittableRandom(1);
        while (huge.length() < 3_300_000) {
            huge.append(random.nextInt()).append(',').append(random.nextInt()).append('\n');
        }
        int before = json(text(base + "/api/analyses")).size();
        HttpResponse<String> tooLarge = postFile(base, "huge.csv", huge.toString());
        assertEquals(413, tooLarge.statusCode(), tooLarge.body());
        assertTrue(tooLarge.body().contains("larger than this server accepts (3 MB"), tooLarge.body());
        assertEquals(before, json(text(base + "/api/analyses")).size());
        // paths that would leave the workspace, encoded or not, reach nothing
        for (String path : List.of("/analyses/..%2f..%2f..%2fetc%2fpasswd", "/analyses/%2e%2e/%2e%2e/etc/passwd",
                "/analyses/" + analysis + "/runs/" + run + "/files/..%2f..%2f" + "data.csv",
                "/analyses/" + analysis + "/runs/" + run + "/files/%2e%2e%2fplan.json",
                "/api/analyses/%2Fetc%2Fpasswd", "/analyses/" + analysis + "/runs/..%2f..%2f/files/data.csv")) {
            HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create(base + path)).build(),
                    HttpResponse.BodyHandlers.ofString());
            assertTrue(r.statusCode() == 400 || r.statusCode() == 404, path + " answered " + r.statusCode());
            assertFalse(r.body().contains("root:"), path);
            assertFalse(r.body().contains("Exception"), path);
        }
    }

    private static void assertListensOnLoopbackOnly(int port) throws IOException {
        try (Socket s = new Socket()) {
            s.connect(new InetSocketAddress(InetAddress.getLoopbackAddress(), port), 2000);
        }
        for (NetworkInterface nic : Collections.list(NetworkInterface.getNetworkInterfaces())) {
            for (InetAddress address : Collections.list(nic.getInetAddresses())) {
                if (address.isLoopbackAddress() || address.isLinkLocalAddress()) {
                    continue;
                }
                try (Socket s = new Socket()) {
                    s.connect(new InetSocketAddress(address, port), 1000);
                    throw new AssertionError("the server answers on " + address + " although it should not");
                } catch (IOException refused) {
                    // expected: only the loopback address is bound
                }
            }
        }
    }

    private Process start(Path workspace, Path demo, int port) throws IOException {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Files.createDirectories(systemTemp);
        List<String> command = new ArrayList<>(List.of(java, "-Xmx1g", "-Djava.io.tmpdir=" + systemTemp, "-cp",
                System.getProperty("java.class.path"),
                "org.forkscape.ForkscapeApplication", "--server.port=" + port, "--forkscape.workspace=" + workspace,
                "--forkscape.demo.data=file:" + demo.resolve("civic-demo.csv"),
                "--forkscape.demo.plan=file:" + demo.resolve("civic-demo.plan.json"),
                "--forkscape.demo.panel-data=file:" + demo.resolve("stream-panel.csv"),
                "--forkscape.demo.panel-plan=file:" + demo.resolve("stream-panel.plan.json"),
                "--forkscape.data.max-upload=3MB"));
        Path log = temp.resolve("server-" + System.nanoTime() + ".log");
        return new ProcessBuilder(command).redirectErrorStream(true).redirectOutput(log.toFile()).start();
    }

    /** Waits until both demos are analyses; returns the tutoring one. */
    private JsonNode waitForDemo(String base) throws Exception {
        for (int i = 0; i < 1200; i++) {
            try {
                JsonNode tutoring = null;
                int demos = 0;
                for (JsonNode a : json(text(base + "/api/analyses"))) {
                    if (a.path("demo").asBoolean()) {
                        demos++;
                        if (a.toString().contains("civic-demo.csv")) {
                            tutoring = a;
                        }
                    }
                }
                if (demos == 2 && tutoring != null) {
                    return tutoring;
                }
            } catch (IOException notYet) {
                // the server is still starting
            }
            assertTrue(server.isAlive(), "the server stopped");
            Thread.sleep(100);
        }
        throw new AssertionError("no demo analysis appeared");
    }

    private String waitForFinishedRun(String base, String analysis) throws Exception {
        for (int i = 0; i < 1200; i++) {
            for (JsonNode r : json(text(base + "/api/analyses/" + analysis + "/runs"))) {
                if (r.path("state").asString().equals("finished")) {
                    return r.path("id").asString();
                }
                assertNotEquals("failed", r.path("state").asString(), r.toString());
            }
            Thread.sleep(100);
        }
        throw new AssertionError("the demo run did not finish");
    }

    private String upload(String base, String name, String csv) throws Exception {
        HttpResponse<String> r = postFile(base, name, csv);
        assertEquals(201, r.statusCode(), r.body());
        return json(r.body()).path("analysis").path("id").asString();
    }

    private HttpResponse<String> postFile(String base, String name, String csv) throws Exception {
        String boundary = "----forkscape-" + Long.toHexString(System.nanoTime()).toLowerCase(Locale.ROOT);
        String body = "--" + boundary + "\r\nContent-Disposition: form-data; name=\"file\"; filename=\"" + name
                + "\"\r\nContent-Type: text/csv\r\n\r\n" + csv + "\r\n--" + boundary + "--\r\n";
        return http.send(HttpRequest.newBuilder(URI.create(base + "/api/analyses"))
                .header("Content-Type", "multipart/form-data; boundary=" + boundary)
                .POST(HttpRequest.BodyPublishers.ofString(body, StandardCharsets.UTF_8)).build(),
                HttpResponse.BodyHandlers.ofString());
    }

    private String text(String url) throws IOException, InterruptedException {
        HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create(url)).build(),
                HttpResponse.BodyHandlers.ofString());
        if (r.statusCode() != 200) {
            throw new IOException(url + " answered " + r.statusCode() + ": " + r.body());
        }
        return r.body();
    }

    private byte[] bytes(String url) throws IOException, InterruptedException {
        HttpResponse<byte[]> r = http.send(HttpRequest.newBuilder(URI.create(url)).build(),
                HttpResponse.BodyHandlers.ofByteArray());
        assertEquals(200, r.statusCode(), url);
        return r.body();
    }

    private static JsonNode json(String text) {
        return Json.MAPPER.readTree(text);
    }

    private static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }
}
