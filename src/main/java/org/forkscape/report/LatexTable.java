package org.forkscape.report;

import java.util.List;
import org.forkscape.Version;

/**
 * The headline table as a LaTeX fragment for {@code \input}, with the rules of the booktabs package
 * (Fear, "Publication quality tables in LaTeX", the booktabs package's manual): no vertical rules, a heavier rule
 * above and below. The document's preamble must load booktabs.
 */
final class LatexTable {
    private LatexTable() {
    }

    static String of(HeadlineTable table, String runWords) {
        StringBuilder b = new StringBuilder();
        b.append("% Forkscape ").append(Version.current()).append(", ").append(escape(runWords))
                .append("; needs \\usepackage{booktabs}\n");
        b.append("\\begin{table}[ht]\n\\centering\n\\small\n");
        b.append("\\caption{").append(escape(TableText.caption(table))).append("}\n");
        b.append("\\begin{tabular}{lrrrrrrrrr}\n\\toprule\n");
        b.append(" & & & \\multicolumn{2}{c}{Quartiles} & \\multicolumn{3}{c}{Share} & "
                + "\\multicolumn{2}{c}{Extreme bounds} \\\\\n");
        b.append("\\cmidrule(lr){4-5} \\cmidrule(lr){6-8} \\cmidrule(lr){9-10}\n");
        b.append("Comparable group & Specifications & Median & Lower & Upper & Positive & Sig.\\ positive & "
                + "Sig.\\ negative & Lowest & Highest \\\\\n\\midrule\n");
        for (List<String> row : TableText.rows(table)) {
            line(b, row);
        }
        b.append("\\bottomrule\n\\end{tabular}\n");
        if (!table.jointTests().isEmpty()) {
            b.append("\n\\medskip\n").append(escape(TableText.testsCaption(table))).append("\n\n");
            b.append("\\begin{tabular}{lrrrl}\n\\toprule\n");
            line(b, TableText.TEST_HEADER);
            b.append("\\midrule\n");
            for (List<String> row : TableText.tests(table)) {
                line(b, row);
            }
            b.append("\\bottomrule\n\\end{tabular}\n");
        }
        b.append("\\end{table}\n");
        return b.toString();
    }

    private static void line(StringBuilder b, List<String> cells) {
        for (int i = 0; i < cells.size(); i++) {
            b.append(i == 0 ? "" : " & ").append(escape(cells.get(i)));
        }
        b.append(" \\\\\n");
    }

    /** Text as LaTeX: its special characters escaped, the explorer's number signs in math mode. */
    static String escape(String text) {
        StringBuilder b = new StringBuilder();
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            switch (c) {
                case '\\' -> b.append("\\textbackslash{}");
                case '&', '%', '$', '#', '_', '{', '}' -> b.append('\\').append(c);
                case '~' -> b.append("\\textasciitilde{}");
                case '^' -> b.append("\\textasciicircum{}");
                case '<' -> b.append("$<$");
                case '>' -> b.append("$>$");
                case '\u2212', '\u2013' -> b.append("--");
                case '\u00d7' -> b.append("$\\times$");
                default -> {
                    int exponent = superscriptDigit(c);
                    if (c == '\u207b' || exponent >= 0) {
                        // a power of ten as HumanNumbers writes it (10⁻⁵): one math-mode superscript
                        int j = i;
                        StringBuilder e = new StringBuilder();
                        while (j < text.length() && (text.charAt(j) == '\u207b' || superscriptDigit(text.charAt(j)) >= 0)) {
                            e.append(text.charAt(j) == '\u207b' ? "-" : String.valueOf(superscriptDigit(text.charAt(j))));
                            j++;
                        }
                        b.append("$^{").append(e).append("}$");
                        i = j - 1;
                    } else {
                        b.append(c);
                    }
                }
            }
        }
        return b.toString();
    }

    private static int superscriptDigit(char c) {
        return switch (c) {
            case '\u2070' -> 0;
            case '\u00b9' -> 1;
            case '\u00b2' -> 2;
            case '\u00b3' -> 3;
            case '\u2074' -> 4;
            case '\u2075' -> 5;
            case '\u2076' -> 6;
            case '\u2077' -> 7;
            case '\u2078' -> 8;
            case '\u2079' -> 9;
            default -> -1;
        };
    }
}
