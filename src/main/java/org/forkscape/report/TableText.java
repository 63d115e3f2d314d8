package org.forkscape.report;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.text.HumanNumbers;

/**
 * The headline table's cells as text, shared by the LaTeX, Markdown and HTML tables so that the three say
 * the same: numbers with four significant digits and shares as percentages (the explorer's rules,
 * {@link HumanNumbers}), joint-test p-values with their draws.
 */
final class TableText {
    static final List<String> HEADER = List.of("Comparable group", "Specifications", "Median", "Lower quartile",
            "Upper quartile", "Positive", "Significant positive", "Significant negative", "Lowest bound",
            "Highest bound");
    static final List<String> TEST_HEADER = List.of("Joint test", "Observed", "Draws as extreme", "Draws", "p");

    private TableText() {
    }

    static List<List<String>> rows(HeadlineTable table) {
        List<List<String>> rows = new ArrayList<>();
        for (HeadlineTable.Row r : table.rows()) {
            rows.add(List.of(r.title(), HumanNumbers.count(r.specifications()), number(r.median()),
                    number(r.lowerQuartile()), number(r.upperQuartile()), HumanNumbers.share(r.sharePositive()),
                    HumanNumbers.share(r.shareSignificantPositive()), HumanNumbers.share(r.shareSignificantNegative()),
                    number(r.lowestBound()), number(r.highestBound())));
        }
        return rows;
    }

    static List<List<String>> tests(HeadlineTable table) {
        List<List<String>> rows = new ArrayList<>();
        for (HeadlineTable.JointTest t : table.jointTests()) {
            String observed = t.key().equals("share_significant") ? HumanNumbers.share(t.observed())
                    : number(t.observed());
            rows.add(List.of(t.name(), observed, HumanNumbers.count(t.exceedances()), HumanNumbers.count(t.draws()),
                    HumanNumbers.drawP(t.exceedances(), t.draws())));
        }
        return rows;
    }

    /** What the table shows, in one sentence (its caption). */
    static String caption(HeadlineTable table) {
        String level = HumanNumbers.number(100 * table.confidence()) + "%";
        return "Headline numbers on the " + table.scale().title() + " scale"
                + (table.scale().unitFree() ? " (unit-free, over every comparable group)" : ", per comparable group")
                + ": fitted specifications, median and quartiles of the estimates (type 7 quantiles), shares "
                + "positive and significant at " + level + " confidence by sign, and the extreme bounds (the "
                + "lowest lower and highest upper " + level + " interval bound" + (table.scale().hasInterval() ? ""
                : "; none on the t scale, which has no interval") + "). " + units(table);
    }

    /** The unit of each row: the rows of a scale with units are in different units and must not be compared. */
    private static String units(HeadlineTable table) {
        if (table.rows().size() == 1) {
            return "Unit: " + table.rows().get(0).unit() + ".";
        }
        List<String> units = new ArrayList<>();
        for (HeadlineTable.Row r : table.rows()) {
            units.add(r.title() + ": " + r.unit());
        }
        return "Units (estimates of different rows are not comparable): " + String.join("; ", units) + ".";
    }

    static String testsCaption(HeadlineTable table) {
        return "Joint tests of the null draws over the whole run: the share of draws at least as extreme as the "
                + "observed curve." + (table.pooledJointTests() ? " The run's specifications span several "
                + "comparable groups, so the median estimate's test pools their units." : "");
    }

    static String number(double v) {
        return Double.isFinite(v) ? HumanNumbers.number(v) : "undefined";
    }
}
