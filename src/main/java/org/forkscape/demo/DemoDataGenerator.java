package org.forkscape.demo;

import java.io.IOException;
import java.io.StringWriter;
import java.io.UncheckedIOException;
import java.math.BigDecimal;
import java.math.RoundingMode;
import java.nio.charset.StandardCharsets;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;

/**
 * The bundled demo's files: the tutoring data with a planted effect, the same pupils in a world where
 * tutoring does nothing, a plan for each, and a plan that fits the first world's fluency by least squares
 * and by Poisson regression; and the panel demo's stream readings with their plan. Generated from
 * {@link TutoringScenario#SEED} and {@link StreamPanelScenario#SEED}, so the
 * committed copies under {@code sample-data/} can be checked byte for byte against this code.
 */
public final class DemoDataGenerator {
    public static final String DATA = "civic-demo.csv";
    public static final String NULL_DATA = "civic-demo-null.csv";
    public static final String PLAN = "civic-demo.plan.json";
    public static final String NULL_PLAN = "civic-demo-null.plan.json";
    public static final String MODELS_PLAN = "civic-demo-models.plan.json";
    public static final String PANEL_DATA = "stream-panel.csv";
    public static final String PANEL_PLAN = "stream-panel.plan.json";

    static final List<String> COLUMNS = List.of("pupil", "school", "zone", "year_group", "free_meals",
            "english_additional", "prior_score", "attendance", "home_reading", "class_size", "tutoring_hours",
            "reading_score", "reading_fluency");
    static final List<String> PANEL_COLUMNS = List.of("site", "catchment", "season", "catchment_season", "buffer_ha",
            "buffer_share", "rainfall_mm", "water_temp", "flow", "cropland_share", "samples", "nitrate");

    private DemoDataGenerator() {
    }

    /** File name to content, in the order they are written. */
    public static Map<String, byte[]> files() {
        List<TutoringScenario.Pupil> pupils = TutoringScenario.pupils();
        Map<String, byte[]> files = new LinkedHashMap<>();
        files.put(DATA, csv(pupils, false));
        files.put(NULL_DATA, csv(pupils, true));
        files.put(PLAN, DemoPlan.json(DATA, "After-school tutoring and reading (invented demo)",
                "Invented data: " + pupils.size() + " pupils of " + TutoringScenario.SCHOOLS + " schools. The true "
                        + "effect planted in the data is " + plain(TutoringScenario.SCORE_EFFECT_PER_HOUR)
                        + " reading-score points and " + plain(TutoringScenario.LOG_FLUENCY_EFFECT_PER_HOUR)
                        + " log words per minute per hour of tutoring.").getBytes(StandardCharsets.UTF_8));
        files.put(NULL_PLAN, DemoPlan.json(NULL_DATA, "After-school tutoring and reading, null world (invented demo)",
                "The same invented pupils, but tutoring has no effect on either outcome: what a multiverse "
                        + "looks like when there is nothing to find.").getBytes(StandardCharsets.UTF_8));
        files.put(MODELS_PLAN, DemoPlan.modelsJson(DATA, "Tutoring and reading fluency, least squares and Poisson "
                + "(invented demo)", "The same invented pupils: words read correctly per minute, fitted by least "
                + "squares and by Poisson regression. On the log link the Poisson coefficient is the planted "
                + plain(TutoringScenario.LOG_FLUENCY_EFFECT_PER_HOUR) + " log words per minute per hour of tutoring; "
                + "the average marginal effect puts both models in words per minute.").getBytes(StandardCharsets.UTF_8));
        List<StreamPanelScenario.Reading> readings = StreamPanelScenario.readings();
        files.put(PANEL_DATA, panelCsv(readings));
        files.put(PANEL_PLAN, DemoPlan.panelJson(PANEL_DATA, "Stream buffers and nitrate, a panel (invented demo)",
                "Invented data: " + readings.size() + " readings of " + StreamPanelScenario.SITES + " stream sites over "
                        + StreamPanelScenario.SEASONS + " seasons, unbalanced. The true effect planted in the data is "
                        + plain(StreamPanelScenario.NITRATE_EFFECT_PER_HECTARE) + " mg/L of nitrate per hectare of "
                        + "planted buffer; the programme enrolled the sites with the most nitrate, and nitrate fell "
                        + "everywhere over the years, so the estimate depends on the fixed effects.")
                .getBytes(StandardCharsets.UTF_8));
        return files;
    }

    private static byte[] csv(List<TutoringScenario.Pupil> pupils, boolean nullWorld) {
        StringWriter text = new StringWriter();
        try (CSVPrinter out = new CSVPrinter(text, CSVFormat.RFC4180.builder().setRecordSeparator("\n").get())) {
            out.printRecord(COLUMNS);
            for (TutoringScenario.Pupil p : pupils) {
                out.printRecord(p.id(), p.school(), p.zone(), p.yearGroup(), p.freeMeals(), p.englishAdditional(),
                        decimal(p.priorScore()), decimal(p.attendance()), whole(p.homeReading()), p.classSize(),
                        whole(p.tutoringHours()), decimal(nullWorld ? p.nullReadingScore() : p.readingScore()),
                        whole(nullWorld ? p.nullReadingFluency() : p.readingFluency()));
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return text.toString().getBytes(StandardCharsets.UTF_8);
    }

    private static byte[] panelCsv(List<StreamPanelScenario.Reading> readings) {
        StringWriter text = new StringWriter();
        try (CSVPrinter out = new CSVPrinter(text, CSVFormat.RFC4180.builder().setRecordSeparator("\n").get())) {
            out.printRecord(PANEL_COLUMNS);
            for (StreamPanelScenario.Reading r : readings) {
                out.printRecord(r.site(), r.catchment(), r.season(), r.catchmentSeason(), fixed(r.bufferHectares(), 1),
                        fixed(r.bufferShare(), 1), fixed(r.rainfall(), 0), fixed(r.waterTemperature(), 1),
                        fixed(r.flow(), 2), fixed(r.cropland(), 3), r.samples(), fixed(r.nitrate(), 2));
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return text.toString().getBytes(StandardCharsets.UTF_8);
    }

    private static String fixed(double v, int decimals) {
        return cell(v, x -> new BigDecimal(x).setScale(decimals, RoundingMode.HALF_EVEN).toPlainString());
    }

    private static String plain(double v) {
        return BigDecimal.valueOf(v).stripTrailingZeros().toPlainString();
    }

    private static String decimal(double v) {
        return cell(v, x -> new BigDecimal(x).setScale(1, RoundingMode.HALF_EVEN).toPlainString());
    }

    private static String whole(double v) {
        return cell(v, x -> Long.toString(StrictMath.round(x)));
    }

    private static String cell(double v, Function<Double, String> format) {
        return Double.isNaN(v) ? "NA" : format.apply(v);
    }
}
