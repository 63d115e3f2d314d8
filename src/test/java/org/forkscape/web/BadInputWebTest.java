package org.forkscape.web;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URISyntaxException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.forkscape.run.Workspace;
import org.forkscape.web.plan.PlanCheck;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockHttpServletResponse;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.web.servlet.MvcResult;
import org.springframework.web.util.HtmlUtils;
import tools.jackson.databind.JsonNode;

/**
 * The bad-input corpus of the batch command ({@code src/test/resources/bad-input/expected.tsv}) through
 * the web pages and their JSON API. A bad data file is uploaded under its own name; a bad plan is sent, with
 * its {@code data} pointing at the analysis's data file, to the plan check, the plan save, the run start and
 * the plain plan form. Each answers with the corpus's message, at the field it names (the file and line,
 * or the JSON path), with a 4xx status (the check, which always answers, marks the plan invalid), never
 * with a stack trace; the workspace is left exactly as it was; and the next good request is served. A plan
 * whose every specification is degenerate for a reason the check cannot decide from the columns is only
 * found out by its run, which fails with the same message and writes nothing but its record and log.
 *
 * <p>Not sent through the web: the command line's own options ({@code cli-*}), files that are not there
 * (the web has only what is uploaded), and a plan file that is not UTF-8 (a browser sends text).
 */
class BadInputWebTest extends WebTest {
    private static final Pattern DATA_REFERENCE = Pattern.compile("\"\\.\\./data/([^\"]+)\"");
    private static final Set<String> NOT_ON_THE_WEB = Set.of("csv-missing-file", "plan-missing-file", "plan-not-utf8");
    private static final Map<String, String> ANALYSIS_OF_DATA = new HashMap<>();

    @Autowired
    Workspace workspace;

    record Case(String name, String plan, String fragment) {
        @Override
        public String toString() {
            return name;
        }

        boolean dataFile() {
            return name.startsWith("csv-");
        }

        boolean degenerate() {
            return name.startsWith("degenerate-");
        }

        String planName() {
            return Path.of(plan).getFileName().toString();
        }

        /** The field the problem is attached to and the message, from the one line the command prints. */
        String[] whereAndMessage() {
            String rest = fragment;
            if (rest.startsWith(planName() + ": ")) {
                return new String[] {"", rest.substring(planName().length() + 2)};
            }
            if (rest.startsWith(planName() + ", ")) {
                rest = rest.substring(planName().length() + 2);
            }
            int colon = rest.indexOf(": ");
            return new String[] {rest.substring(0, colon), rest.substring(colon + 2)};
        }
    }

    static List<Case> cases() throws IOException {
        List<Case> out = new ArrayList<>();
        for (String line : Files.readAllLines(corpus().resolve("expected.tsv"), StandardCharsets.UTF_8)) {
            if (line.isBlank() || line.startsWith("#")) {
                continue;
            }
            String[] f = line.split("\t", -1);
            if (!f[0].startsWith("cli-") && !NOT_ON_THE_WEB.contains(f[0])) {
                out.add(new Case(f[0], f[1], f[3]));
            }
        }
        return out;
    }

    @Test
    void mostOfTheCorpusReachesTheWeb() throws IOException {
        List<Case> cases = cases();
        assertTrue(cases.size() >= 45, cases.size() + " cases");
        assertTrue(cases.stream().filter(Case::dataFile).count() >= 11);
        // the plans the check can tell are bound to fail are refused at the check (plan-bound-to-fail-*)
        assertTrue(cases.stream().filter(Case::degenerate).count() >= 2);
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void isRefusedWithTheSameMessageAtItsFieldAndNothingIsWritten(Case c) throws Exception {
        if (c.dataFile()) {
            uploadIsRefused(c);
        } else if (c.degenerate()) {
            runFails(c);
        } else {
            planIsRefused(c);
        }
        theServerKeepsServing();
    }

    private void uploadIsRefused(Case c) throws Exception {
        String name = dataName(c);
        byte[] bytes = name.equals("million-columns.csv") ? millionColumnHeader()
                : Files.readAllBytes(corpus().resolve("data").resolve(name));
        String[] expected = c.whereAndMessage();
        Set<String> before = analysisFolders();
        MockMultipartFile file = new MockMultipartFile("file", name, "text/csv", bytes);
        MockHttpServletResponse api = mvc.perform(multipart("/api/analyses").file(file)).andReturn().getResponse();
        assertEquals(400, api.getStatus(), api.getContentAsString());
        JsonNode problem = json(api.getContentAsString());
        assertEquals(expected[0], problem.path("where").asString());
        assertTrue(problem.path("message").asString().contains(expected[1]), problem.toString());
        noTrace(api);

        MvcResult form = mvc.perform(multipart("/analyses").file(file)).andReturn();
        assertEquals(400, form.getResponse().getStatus());
        String shown = (String) form.getModelAndView().getModel().get("uploadProblem");
        assertTrue(shown.contains(c.fragment()), shown);
        assertTrue(form.getResponse().getContentAsString().contains(HtmlUtils.htmlEscape(c.fragment())));
        noTrace(form.getResponse());
        assertEquals(before, analysisFolders(), "an upload that cannot be used leaves nothing in the workspace");
    }

    private void planIsRefused(Case c) throws Exception {
        String analysis = analysisFor(dataName(c));
        String plan = webPlan(c);
        String[] expected = c.whereAndMessage();
        Path folder = workspace.analysisFolder(analysis);
        Set<String> before = tree(folder);

        MockHttpServletResponse check = mvc.perform(post("/api/analyses/" + analysis + "/plan/check")
                .contentType(MediaType.APPLICATION_JSON).content(plan)).andReturn().getResponse();
        assertEquals(200, check.getStatus(), "the check always answers");
        JsonNode answer = json(check.getContentAsString());
        assertFalse(answer.path("valid").asBoolean(), answer.toString());
        assertEquals(expected[0], answer.path("where").asString(), answer.toString());
        assertTrue(answer.path("message").asString().contains(expected[1]), answer.toString());
        noTrace(check);

        List<MockHttpServletResponse> refusals = new ArrayList<>();
        refusals.add(mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(plan)).andReturn().getResponse());
        if (!plan.isBlank()) {
            // (a run started with an empty body runs the saved plan)
            refusals.add(mvc.perform(post("/api/analyses/" + analysis + "/runs").contentType(MediaType.APPLICATION_JSON)
                    .content(plan)).andReturn().getResponse());
        }
        for (MockHttpServletResponse refused : refusals) {
            assertEquals(400, refused.getStatus(), refused.getContentAsString());
            JsonNode problem = json(refused.getContentAsString());
            assertEquals(expected[0], problem.path("where").asString());
            assertTrue(problem.path("message").asString().contains(expected[1]), problem.toString());
            noTrace(refused);
        }

        MvcResult form = mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", plan)).andReturn();
        assertEquals(400, form.getResponse().getStatus());
        PlanCheck shown = (PlanCheck) form.getModelAndView().getModel().get("check");
        assertEquals(expected[0], shown.where());
        assertTrue(shown.message().contains(expected[1]), shown.message());
        assertTrue(form.getResponse().getContentAsString().contains(HtmlUtils.htmlEscape(expected[1])));
        noTrace(form.getResponse());
        assertEquals(before, tree(folder), "a refused plan leaves the analysis as it was");
    }

    private void runFails(Case c) throws Exception {
        String analysis = analysisFor(dataName(c));
        String plan = webPlan(c);
        String[] expected = c.whereAndMessage();
        MockHttpServletResponse check = mvc.perform(post("/api/analyses/" + analysis + "/plan/check")
                .contentType(MediaType.APPLICATION_JSON).content(plan)).andReturn().getResponse();
        assertTrue(json(check.getContentAsString()).path("valid").asBoolean(), "only a run can find this out");
        String run = runToEnd(analysis, plan);
        JsonNode status = json(mvc.perform(get("/api/analyses/" + analysis + "/runs/" + run)).andReturn().getResponse()
                .getContentAsString());
        assertEquals("failed", status.path("state").asString());
        assertEquals(expected[0], status.path("problemWhere").asString());
        assertTrue(status.path("problem").asString().contains(expected[1]), status.toString());
        MockHttpServletResponse page = mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andReturn()
                .getResponse();
        assertEquals(200, page.getStatus());
        assertTrue(page.getContentAsString().contains(HtmlUtils.htmlEscape(expected[1])));
        noTrace(page);
        assertEquals(Set.of(Workspace.PLAN, Workspace.STATUS, Workspace.RUN_RECORD, Workspace.LOG),
                fileNames(workspace.runFolder(analysis, run)), "a failed run keeps its record and log, nothing else");
    }

    /** A good request right after the bad one is answered as usual. */
    private void theServerKeepsServing() throws Exception {
        String analysis = analysisFor("schools.csv");
        String valid = Files.readString(corpus().resolve("plans/valid.json")).replace("\"../data/schools.csv\"",
                "\"data.csv\"");
        JsonNode answer = json(mvc.perform(post("/api/analyses/" + analysis + "/plan/check")
                .contentType(MediaType.APPLICATION_JSON).content(valid)).andReturn().getResponse().getContentAsString());
        assertTrue(answer.path("valid").asBoolean(), answer.toString());
        assertEquals(16, answer.path("specifications").asInt());
        assertEquals(200, mvc.perform(get("/")).andReturn().getResponse().getStatus());
    }

    private static void noTrace(MockHttpServletResponse response) throws IOException {
        String body = response.getContentAsString();
        for (String trace : List.of("Exception", "\tat ", "org.forkscape.", "java.lang.")) {
            assertFalse(body.contains(trace), "the answer shows \"" + trace + "\": " + body);
        }
    }

    /** The data file a case's plan names (the first one the corpus holds), or the corpus's shared one. */
    private static String dataName(Case c) throws IOException {
        Matcher m = DATA_REFERENCE.matcher(Files.readString(corpus().resolve(c.plan()), StandardCharsets.ISO_8859_1));
        while (m.find()) {
            if (c.dataFile() || Files.exists(corpus().resolve("data").resolve(m.group(1)))) {
                return m.group(1);
            }
        }
        return "schools.csv";
    }

    /** The plan as the web takes it: its data is the analysis's own file (except where leaving is the test). */
    private static String webPlan(Case c) throws IOException {
        String text = Files.readString(corpus().resolve(c.plan()), StandardCharsets.UTF_8);
        return DATA_REFERENCE.matcher(text).replaceAll("\"" + Workspace.DATA + "\"");
    }

    private String analysisFor(String dataName) throws Exception {
        String id = ANALYSIS_OF_DATA.get(dataName);
        if (id == null) {
            id = upload(dataName, Files.readString(corpus().resolve("data").resolve(dataName), StandardCharsets.UTF_8));
            ANALYSIS_OF_DATA.put(dataName, id);
        }
        return id;
    }

    /** The analyses' folders, the half-made ones included, and the uploads in progress. */
    private Set<String> analysisFolders() throws IOException {
        Set<String> names = new TreeSet<>();
        for (String sub : List.of("analyses", ".incoming")) {
            try (Stream<Path> list = Files.list(workspace.root().resolve(sub))) {
                list.forEach(p -> names.add(sub + "/" + p.getFileName()));
            }
        }
        return names;
    }

    /** Every file under a folder, with its size and time of last change. */
    private static Set<String> tree(Path folder) throws IOException {
        Set<String> files = new TreeSet<>();
        try (Stream<Path> walk = Files.walk(folder)) {
            for (Path p : (Iterable<Path>) walk::iterator) {
                if (Files.isRegularFile(p)) {
                    files.add(folder.relativize(p) + " " + Files.size(p) + " " + Files.getLastModifiedTime(p));
                }
            }
        }
        return files;
    }

    private static Set<String> fileNames(Path folder) throws IOException {
        try (Stream<Path> list = Files.list(folder)) {
            return new TreeSet<>(list.map(p -> p.getFileName().toString()).toList());
        }
    }

    /** The corpus's header of a million column names (not committed: it is written here). */
    private static byte[] millionColumnHeader() {
        StringBuilder b = new StringBuilder();
        for (int j = 1; j <= 1_000_000; j++) {
            b.append(j == 1 ? "c1" : ",c" + j);
        }
        return b.append('\n').toString().getBytes(StandardCharsets.UTF_8);
    }

    private static Path corpus() {
        try {
            return Path.of(BadInputWebTest.class.getResource("/bad-input").toURI());
        } catch (URISyntaxException e) {
            throw new UncheckedIOException(new IOException(e));
        }
    }
}
