package org.forkscape.report;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.Version;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.check.RuleResult;
import org.forkscape.text.HumanNumbers;
import org.springframework.web.util.HtmlUtils;
import tools.jackson.databind.JsonNode;

/**
 * report.html: one self-contained page for a review meeting, with the figure inline as SVG, the headline
 * table and joint tests, the reported specification (summary.json's {@code reported}, when the plan names
 * one), the influence of each decision (summary.json's {@code influence} and {@code influence_overall}), the
 * release check (the run folder's check.json, when one was run), the cautions and the provenance. Its content security policy forbids every
 * fetch, so opening it makes no request; there is no script.
 */
final class HtmlReport {
    private static final String STYLE = String.join("\n",
            "body { font-family: 'DejaVu Sans', sans-serif; color: #1F1F1F; max-width: 60rem; margin: 2rem auto; "
                    + "padding: 0 1rem; line-height: 1.45; }",
            "table { border-collapse: collapse; margin: 0.5rem 0 1.5rem; font-size: 0.9rem; }",
            "th, td { padding: 0.2rem 0.6rem; text-align: right; border-bottom: 1px solid #C8C8C2; }",
            "th:first-child, td:first-child { text-align: left; }",
            "thead th { border-bottom: 2px solid #1F1F1F; }",
            ".caution { border-left: 4px solid #8C3B12; padding: 0.5rem 1rem; background: #FAF6F0; }",
            "figure { margin: 1rem 0; } figure svg { width: 100%; max-width: 40rem; height: auto; }");

    private HtmlReport() {
    }

    static String of(String title, String svg, HeadlineTable table, String methods, JsonNode summary,
            Optional<ReleaseCheck> check, String runWords) {
        StringBuilder b = new StringBuilder();
        b.append("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
        b.append("<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
                + "style-src 'unsafe-inline'; img-src data:\">\n");
        b.append("<title>").append(e(title)).append("</title>\n<style>\n").append(STYLE).append("\n</style>\n");
        b.append("</head>\n<body>\n<h1>").append(e(title)).append("</h1>\n");
        b.append("<p>").append(e(runWords)).append(", Forkscape ").append(e(Version.current())).append(".</p>\n");
        b.append("<div class=\"caution\" id=\"cautions\"><p><strong>A robust curve is not proof of a causal effect."
                + "</strong> It shows that the estimate holds across the choices listed; it says nothing about choices "
                + "that were not listed, nor about confounding the specifications share.</p><p><strong>The set of "
                + "specifications must be decided in advance</strong>, from theory, before the results are seen; "
                + "choosing what to report after seeing this page is the very selection it exists to expose.</p>"
                + "</div>\n");
        b.append("<h2>Specification curve</h2>\n<figure id=\"figure\">\n")
                .append(svg.replaceFirst("^<\\?xml[^>]*>\\s*", "")).append("</figure>\n");
        b.append("<h2>Headline numbers</h2>\n<p>").append(e(TableText.caption(table))).append("</p>\n");
        table(b, "headline", TableText.HEADER, TableText.rows(table));
        if (!table.jointTests().isEmpty()) {
            b.append("<p>").append(e(TableText.testsCaption(table))).append("</p>\n");
            table(b, "joint-tests", TableText.TEST_HEADER, TableText.tests(table));
        }
        reported(b, summary.path("reported"));
        influence(b, summary);
        releaseCheck(b, check);
        b.append("<h2>Methods</h2>\n<p>").append(e(methods.replaceFirst("^# Methods\\s*", "").strip()))
                .append("</p>\n");
        provenance(b, summary.path("provenance"));
        b.append("</body>\n</html>\n");
        return b.toString();
    }

    /** summary.json's scale keys of {@code reported.scales}, with the scale's name in words. */
    private static final List<List<String>> REPORTED_SCALES = List.of(List.of("as_fitted", "as fitted"),
            List.of("average_marginal_effect", "average marginal effect"), List.of("standardized",
                    "standardized coefficient"), List.of("partial_correlation", "partial correlation"),
            List.of("t_statistic", "t statistic"));

    /** Where the plan's reported specification sits, scale by scale, from summary.json's {@code reported}. */
    private static void reported(StringBuilder b, JsonNode reported) {
        b.append("<h2>The reported specification</h2>\n");
        if (!reported.isObject()) {
            b.append("<p id=\"reported-sentence\">The plan names no reported specification (its key "
                    + "<code>reported</code>), so this report cannot say where the estimate the paper shows sits."
                    + "</p>\n");
            return;
        }
        List<String> labels = new ArrayList<>();
        reported.path("labels").properties().forEach(l -> labels.add(l.getKey() + ": " + l.getValue().asString()));
        String spec = "The reported specification (number " + reported.path("spec").asString() + "; "
                + String.join(", ", labels) + ")";
        if (!reported.path("in_run").asBoolean(true)) {
            b.append("<p id=\"reported-sentence\">").append(e(spec + " is not in this run: "
                    + reported.path("note").asString())).append("</p>\n");
            return;
        }
        JsonNode scales = reported.path("scales");
        if (!scales.isObject()) {
            b.append("<p id=\"reported-sentence\">").append(e(spec + " did not fit: "
                    + reported.path("status").asString())).append("</p>\n");
            return;
        }
        JsonNode fitted = scales.path("as_fitted");
        b.append("<p id=\"reported-sentence\">").append(e(spec + ": the reported estimate, "
                + HumanNumbers.number(reported.path("estimate").asDouble(Double.NaN)) + " (p "
                + withRelation(HumanNumbers.pValue(reported.path("p_value").asDouble(Double.NaN)))
                + "), is larger than "
                + HumanNumbers.share(fitted.path("share_smaller").asDouble(Double.NaN)) + " of the "
                + HumanNumbers.count(fitted.path("specifications").asLong()) + " specifications of its comparable "
                + "group as fitted" + (fitted.has("title") ? " (" + fitted.path("title").asString() + ")" : "")
                + "; its percentile is " + HumanNumbers.number(fitted.path("percentile").asDouble(Double.NaN), 3)
                + ".")).append("</p>\n");
        List<List<String>> rows = new ArrayList<>();
        for (List<String> scale : REPORTED_SCALES) {
            JsonNode place = scales.path(scale.get(0));
            if (!place.isObject()) {
                continue;
            }
            if (place.path("value").isNull()) {
                rows.add(List.of(scale.get(1), "\u2013", "", "", "", "", place.path("note").asString("")));
                continue;
            }
            rows.add(List.of(scale.get(1), HumanNumbers.number(place.path("value").asDouble()),
                    HumanNumbers.count(place.path("rank").asLong()) + " of "
                            + HumanNumbers.count(place.path("specifications").asLong()),
                    HumanNumbers.number(place.path("percentile").asDouble(), 3),
                    HumanNumbers.share(place.path("share_smaller").asDouble()),
                    place.path("share_significant_same_sign").isNull() ? "\u2013"
                            : HumanNumbers.share(place.path("share_significant_same_sign").asDouble()),
                    place.path("title").asString("")));
        }
        table(b, "reported", List.of("Scale", "Value", "Rank (1 = smallest)", "Percentile", "Share smaller",
                "Share significant in its sign", "Among"), rows);
    }

    /** The release check recorded in the run folder's check.json: each rule, what it measured, its verdict. */
    private static void releaseCheck(StringBuilder b, Optional<ReleaseCheck> check) {
        b.append("<h2>Release check</h2>\n");
        if (check.isEmpty()) {
            b.append("<p id=\"check-verdict\">No release check was run on this run (its folder has no check.json; "
                    + "see the check command).</p>\n");
            return;
        }
        ReleaseCheck c = check.get();
        b.append("<p id=\"check-verdict\">").append(e(c.passed() ? "Passed: every rule passes or does not apply."
                : "Failed: " + c.failures() + " of " + c.results().size() + " rules.")).append(" The rules and "
                + "their levels are the review group's judgement, not a standard; passing them does not show that "
                + "the effect is causal.</p>\n");
        List<List<String>> rows = new ArrayList<>();
        for (RuleResult r : c.results()) {
            rows.add(List.of(r.rule(), r.verdict().word(), r.detail(), r.measured() == null ? "\u2013"
                    : r.measured() instanceof JsonNode n && n.isString() ? n.asString() : String.valueOf(r.measured()),
                    r.requirement()));
        }
        table(b, "release-check", List.of("Rule", "Result", "Measured", "Measured, as in check.json", "Required"),
                rows);
    }

    private static void influence(StringBuilder b, JsonNode summary) {
        JsonNode factors = summary.path("influence");
        if (!factors.isArray()) {
            return;
        }
        b.append("<h2>Which decisions move the estimate</h2>\n");
        JsonNode overall = summary.path("influence_overall");
        if (overall.isObject()) {
            b.append("<p>").append(e(capitalised(overall.path("sentence").asString()))).append(". The decisions' "
                    + "main effects explain ").append(e(HumanNumbers.share(overall.path("main_effects_share")
                    .asDouble()))).append(" of the variance of the estimates; interactions the rest.</p>\n");
        }
        boolean pooled = false;
        for (JsonNode k : summary.path("scales").path("pooled_as_fitted")) {
            pooled |= k.asString().equals("influence");
        }
        if (pooled) {
            b.append("<p>These shares are over every estimate as fitted, whose units differ between the run's "
                    + "comparable groups; read them with care.</p>\n");
        }
        List<List<String>> rows = new java.util.ArrayList<>();
        for (JsonNode f : factors) {
            StringBuilder levels = new StringBuilder();
            for (Map.Entry<String, JsonNode> level : f.path("levels").properties()) {
                if (levels.length() > 0) {
                    levels.append("; ");
                }
                levels.append(level.getKey()).append(": ").append(TableText.number(
                        level.getValue().isNumber() ? level.getValue().asDouble() : Double.NaN));
            }
            rows.add(List.of(f.path("factor").asString(), f.path("decision").asString(),
                    HumanNumbers.share(f.path("variance_share").asDouble(Double.NaN)), levels.toString()));
        }
        table(b, "influence", List.of("Factor", "Decision", "Share of variance", "Mean estimate by alternative"), rows);
    }

    private static void provenance(StringBuilder b, JsonNode provenance) {
        b.append("<h2>Provenance</h2>\n");
        List<List<String>> rows = new java.util.ArrayList<>();
        for (Map.Entry<String, JsonNode> entry : provenance.properties()) {
            rows.add(List.of(entry.getKey(), entry.getValue().isString() ? entry.getValue().asString()
                    : entry.getValue().toString()));
        }
        table(b, "provenance", List.of("Key", "Value"), rows);
    }

    private static void table(StringBuilder b, String id, List<String> header, List<List<String>> rows) {
        b.append("<table id=\"").append(id).append("\">\n<thead><tr>");
        header.forEach(h -> b.append("<th>").append(e(h)).append("</th>"));
        b.append("</tr></thead>\n<tbody>\n");
        for (List<String> row : rows) {
            b.append("<tr>");
            row.forEach(c -> b.append("<td>").append(e(c)).append("</td>"));
            b.append("</tr>\n");
        }
        b.append("</tbody>\n</table>\n");
    }

    /** "= 0.012" or "< 0.001", after a "p". */
    private static String withRelation(String p) {
        return p.startsWith("<") ? p : "= " + p;
    }

    private static String e(String text) {
        return HtmlUtils.htmlEscape(text, "UTF-8");
    }

    private static String capitalised(String s) {
        return s.isEmpty() ? s : Character.toUpperCase(s.charAt(0)) + s.substring(1);
    }
}
