package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.run.Json;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.condition.EnabledIfSystemProperty;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;

/**
 * The load test: the server as its own process on the loopback address, a finished run of 98,304
 * specifications (every one of its plan, 16 factors), and 20 clients exploring it at once for 30 seconds (curves under random filters and
 * orders, the specification under the pointer, full fits, the layout), each sending its next request as
 * soon as the last is answered, while another run computes. Every answer must be a success; the report
 * gives the response times, overall and per kind of request, with the 95th percentile. Bounded twice: by
 * the 30 seconds and by at most {@value #MAX_REQUESTS_PER_CLIENT} requests per client.
 *
 * <p>Not part of the default build (it takes about a minute): run it with
 * {@code mvn -o test -Dtest=LoadTest -Dforkscape.load=true}; the report goes to
 * {@code target/load-test.txt}.
 */
@Tag("load")
@EnabledIfSystemProperty(named = "forkscape.load", matches = "true")
class LoadTest {
    private static final int CLIENTS = 20;
    private static final Duration WINDOW = Duration.ofSeconds(30);
    private static final int MAX_REQUESTS_PER_CLIENT = 5_000;
    private static final int SPECIFICATIONS = 98_304;

    @TempDir
    Path temp;
    private Process server;
    private final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
    private String base;

    @AfterEach
    void stop() throws InterruptedException {
        if (server != null && server.isAlive()) {
            server.destroy();
            server.waitFor();
        }
    }

    @Test
    void twentyClientsExploreALargeRunWhileAnotherComputes() throws Exception {
        int port = freePort();
        base = "http://127.0.0.1:" + port;
        server = start(port);
        waitUntilServing();

        // the run to explore: 2 x 2 x 2^12 x 2 x 3 = 98,304 specifications, every one fitted
        String explored = upload("commutes.csv", CommuteData.csv(3_000, 1));
        String exploredRun = startRun(explored, CommuteData.plan(12, "[\"classical\", \"HC0\", \"HC1\"]", 0));
        long fitStart = System.nanoTime();
        waitFor(explored, exploredRun, "finished");
        double runSeconds = (System.nanoTime() - fitStart) / 1e9;
        String runBase = "/api/analyses/" + explored + "/runs/" + exploredRun;
        JsonNode layout = json(get(runBase + "/layout").body());
        assertEquals(SPECIFICATIONS, layout.path("fitted").asInt() + layout.path("unfitted").asInt());
        get(runBase + "/curve");

        // the run that computes meanwhile: row-pass errors on a larger table, far more than 30 seconds of work
        String busy = upload("commutes-large.csv", CommuteData.csv(40_000, 2));
        String busyRun = startRun(busy, CommuteData.plan(12, "[\"HC3\", \"HC2\"]", 0));
        waitFor(busy, busyRun, "running");

        List<int[]> factors = new ArrayList<>();
        for (JsonNode f : layout.path("factors")) {
            factors.add(new int[] {f.path("id").asInt(), f.path("levels").size()});
        }
        Map<String, List<Long>> times = new ConcurrentHashMap<>();
        AtomicLong errors = new AtomicLong();
        List<String> errorSamples = new ArrayList<>();
        long deadline = System.nanoTime() + WINDOW.toNanos();
        ExecutorService clients = Executors.newFixedThreadPool(CLIENTS);
        List<Future<?>> done = new ArrayList<>();
        for (int c = 0; c < CLIENTS; c++) {
            SplittableRandom random = new SplittableRandom(100 + c);
            done.add(clients.submit(() -> explore(runBase, factors, random, deadline, times, errors, errorSamples)));
        }
        for (Future<?> f : done) {
            f.get(WINDOW.toSeconds() + 120, TimeUnit.SECONDS);
        }
        clients.shutdown();
        JsonNode busyStatus = json(get("/api/analyses/" + busy + "/runs/" + busyRun).body());
        post("/api/analyses/" + busy + "/runs/" + busyRun + "/cancel", "");

        String report = report(times, errors.get(), runSeconds, busyStatus);
        Files.createDirectories(Path.of("target"));
        Files.writeString(Path.of("target", "load-test.txt"), report);
        System.out.println(report);
        assertEquals(0, errors.get(), "failed requests, for example: " + errorSamples);
        assertEquals("running", busyStatus.path("state").asString(), "the other run computed throughout");
    }

    /** One client: a closed loop of the explorer's requests until the window ends or its quota is spent. */
    private void explore(String runBase, List<int[]> factors, SplittableRandom random, long deadline,
            Map<String, List<Long>> times, AtomicLong errors, List<String> errorSamples) {
        for (int i = 0; i < MAX_REQUESTS_PER_CLIENT && System.nanoTime() < deadline; i++) {
            String drop = drop(factors, random);
            String sort = random.nextInt(3) == 0 ? "factor:" + factors.get(random.nextInt(factors.size()))[0] : "estimate";
            String filter = "drop=" + drop + "&sort=" + sort;
            int action = random.nextInt(20);
            try {
                if (action < 8) {
                    timed("curve", runBase + "/curve?" + filter + "&width=" + (600 + random.nextInt(1000)), times);
                } else if (action < 18) {
                    HttpResponse<String> curve = timed("curve", runBase + "/curve?" + filter + "&width=1000", times);
                    int count = json(curve.body()).path("summary").path("count").asInt();
                    if (count > 0) {
                        HttpResponse<String> at = timed("at", runBase + "/at?position=" + random.nextInt(count) + "&"
                                + filter, times);
                        if (action >= 15) {
                            timed("fit", runBase + "/specifications/" + json(at.body()).path("spec").asLong() + "/fit",
                                    times);
                        }
                    }
                } else {
                    timed("layout", runBase + "/layout", times);
                }
            } catch (IOException | RuntimeException e) {
                errors.incrementAndGet();
                synchronized (errorSamples) {
                    if (errorSamples.size() < 5) {
                        errorSamples.add(e.toString());
                    }
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return;
            }
        }
    }

    /** Up to three alternatives unticked, each of a different factor, as the filter panel sends them. */
    private static String drop(List<int[]> factors, SplittableRandom random) {
        List<String> out = new ArrayList<>();
        List<Integer> used = new ArrayList<>();
        for (int k = random.nextInt(4); k > 0; k--) {
            int f = random.nextInt(factors.size());
            if (!used.contains(f)) {
                used.add(f);
                out.add(factors.get(f)[0] + "." + random.nextInt(factors.get(f)[1]));
            }
        }
        return String.join(",", out);
    }

    private HttpResponse<String> timed(String kind, String path, Map<String, List<Long>> times)
            throws IOException, InterruptedException {
        long start = System.nanoTime();
        HttpResponse<String> r = get(path);
        long elapsed = System.nanoTime() - start;
        if (r.statusCode() != 200) {
            throw new IOException(path + " answered " + r.statusCode() + ": " + r.body());
        }
        times.computeIfAbsent(kind, k -> java.util.Collections.synchronizedList(new ArrayList<>())).add(elapsed);
        return r;
    }

    private static String report(Map<String, List<Long>> times, long errors, double runSeconds, JsonNode busy) {
        StringBuilder b = new StringBuilder();
        b.append(String.format(Locale.ROOT, "Load test, %s, %d processors (one-minute load average %.1f at the end, "
                + "this test's own threads included), %s %s, Java %s%n", LocalDate.now(), Runtime.getRuntime().availableProcessors(),
                ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage(), System.getProperty("os.name"),
                System.getProperty("os.arch"), System.getProperty("java.version")));
        b.append(String.format(Locale.ROOT, "explored run: %,d specifications fitted in %.1f s (with its inference "
                + "stage); %d clients for %d s; the other run %s, %,d of %,d specifications done%n", SPECIFICATIONS,
                runSeconds, CLIENTS, WINDOW.toSeconds(), busy.path("state").asString(), busy.path("done").asLong(),
                busy.path("total").asLong()));
        List<Long> all = new ArrayList<>();
        Map<String, List<Long>> sorted = new TreeMap<>(times);
        sorted.values().forEach(all::addAll);
        b.append(String.format(Locale.ROOT, "%-8s %8s %9s %9s %9s %9s %9s%n", "request", "count", "per s", "median",
                "p95", "p99", "max"));
        b.append(line("all", all));
        sorted.forEach((kind, list) -> b.append(line(kind, list)));
        b.append(String.format(Locale.ROOT, "failed requests: %d%n", errors));
        return b.toString();
    }

    private static String line(String kind, List<Long> nanos) {
        long[] t = nanos.stream().mapToLong(Long::longValue).sorted().toArray();
        return String.format(Locale.ROOT, "%-8s %8d %9.1f %7.0f ms %7.0f ms %7.0f ms %7.0f ms%n", kind, t.length,
                t.length / (double) WINDOW.toSeconds(), ms(t, 0.5), ms(t, 0.95), ms(t, 0.99), ms(t, 1.0));
    }

    /** The q quantile of sorted times, in milliseconds (nearest rank). */
    private static double ms(long[] sorted, double q) {
        if (sorted.length == 0) {
            return Double.NaN;
        }
        int rank = (int) Math.ceil(q * sorted.length);
        return sorted[Math.max(0, Math.min(sorted.length, rank) - 1)] / 1e6;
    }

    private Process start(int port) throws IOException {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        List<String> command = new ArrayList<>(Arrays.asList(java, "-Xmx2g", "-cp", System.getProperty("java.class.path"),
                "org.forkscape.ForkscapeApplication", "--server.port=" + port,
                "--forkscape.workspace=" + temp.resolve("workspace"), "--forkscape.demo.enabled=false"));
        return new ProcessBuilder(command).redirectErrorStream(true).redirectOutput(temp.resolve("server.log").toFile())
                .start();
    }

    private void waitUntilServing() throws Exception {
        for (int i = 0; i < 600; i++) {
            try {
                if (get("/api/analyses").statusCode() == 200) {
                    return;
                }
            } catch (IOException notYet) {
                // still starting
            }
            assertTrue(server.isAlive(), "the server stopped; see " + temp.resolve("server.log"));
            Thread.sleep(100);
        }
        throw new AssertionError("the server did not start");
    }

    private void waitFor(String analysis, String run, String state) throws Exception {
        for (int i = 0; i < 6000; i++) {
            JsonNode s = json(get("/api/analyses/" + analysis + "/runs/" + run).body());
            String now = s.path("state").asString();
            if (now.equals(state)) {
                return;
            }
            assertTrue(now.equals("queued") || now.equals("running"), s.toString());
            Thread.sleep(100);
        }
        throw new AssertionError("run " + run + " did not become " + state);
    }

    private String upload(String name, String csv) throws Exception {
        String boundary = "----forkscape-load-" + System.nanoTime();
        String body = "--" + boundary + "\r\nContent-Disposition: form-data; name=\"file\"; filename=\"" + name
                + "\"\r\nContent-Type: text/csv\r\n\r\n" + csv + "\r\n--" + boundary + "--\r\n";
        HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create(base + "/api/analyses"))
                .header("Content-Type", "multipart/form-data; boundary=" + boundary)
                .POST(HttpRequest.BodyPublishers.ofString(body, StandardCharsets.UTF_8)).build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(201, r.statusCode(), r.body());
        return json(r.body()).path("analysis").path("id").asString();
    }

    private String startRun(String analysis, String plan) throws Exception {
        HttpResponse<String> r = post("/api/analyses/" + analysis + "/runs", plan);
        assertEquals(202, r.statusCode(), r.body());
        return json(r.body()).path("id").asString();
    }

    private HttpResponse<String> get(String path) throws IOException, InterruptedException {
        return http.send(HttpRequest.newBuilder(URI.create(base + path)).timeout(Duration.ofSeconds(60)).build(),
                HttpResponse.BodyHandlers.ofString());
    }

    private HttpResponse<String> post(String path, String json) throws IOException, InterruptedException {
        return http.send(HttpRequest.newBuilder(URI.create(base + path)).header("Content-Type", "application/json")
                .POST(HttpRequest.BodyPublishers.ofString(json)).build(), HttpResponse.BodyHandlers.ofString());
    }

    private static JsonNode json(String text) {
        return Json.MAPPER.readTree(text);
    }

    private static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    /**
     * Invented commuting data for the load test: per neighbourhood block, commute minutes and cycling
     * share against the kilometres of protected cycle lane nearby, with 15 neighbourhood measures, a
     * district and a flag for blocks by the river. Seeded.
     */
    static final class CommuteData {
        private CommuteData() {
        }

        static String csv(int rows, long seed) {
            SplittableRandom r = new SplittableRandom(seed);
            StringBuilder b = new StringBuilder("district,riverside,lane_km,commute_minutes,cycling_share");
            for (int j = 1; j <= 15; j++) {
                b.append(",m").append(j);
            }
            b.append('\n');
            for (int i = 0; i < rows; i++) {
                double lanes = 0.2 + 8 * r.nextDouble();
                double[] m = new double[16];
                for (int j = 1; j <= 15; j++) {
                    m[j] = 0.3 * lanes + r.nextGaussian();
                }
                b.append(String.format(Locale.ROOT, "d%02d,%d,%.3f,%.2f,%.4f", r.nextInt(30), r.nextInt(4) == 0 ? 1 : 0,
                        lanes, 35 - 0.8 * lanes + 2 * m[1] - m[2] + 6 * r.nextGaussian(),
                        0.05 + 0.01 * lanes + 0.01 * m[3] + 0.03 * r.nextGaussian()));
                for (int j = 1; j <= 15; j++) {
                    b.append(String.format(Locale.ROOT, ",%.4f", m[j]));
                }
                b.append('\n');
            }
            return b.toString();
        }

        /**
         * 2 outcomes x 2 codings x every subset of {@code optional} controls x 2 row rules x the error types.
         *
         * @param sample specifications to fit, 0 for all
         */
        static String plan(int optional, String errors, int sample) {
            StringBuilder controls = new StringBuilder();
            for (int j = 1; j <= optional; j++) {
                controls.append(j > 1 ? ", " : "").append("\"m").append(j).append('"');
            }
            return """
                    {"data": "data.csv", "seed": 5, %s
                     "decisions": [
                      {"name": "outcome", "kind": "outcome", "alternatives": [
                        {"label": "commute minutes", "column": "commute_minutes"},
                        {"label": "cycling share", "column": "cycling_share"}]},
                      {"name": "lanes", "kind": "predictor", "alternatives": [
                        {"label": "km", "column": "lane_km"}, {"label": "log km", "column": "lane_km", "transform": "log"}]},
                      {"name": "neighbourhood", "kind": "controls", "optional": [%s]},
                      {"name": "blocks", "kind": "sample", "alternatives": [
                        {"label": "all"}, {"label": "away from the river", "keep": "riverside == 0"}]},
                      {"name": "errors", "kind": "errors", "alternatives": %s}
                     ]}
                    """.formatted(sample > 0 ? "\"sample\": " + sample + "," : "", controls, errors);
        }
    }
}
