package org.forkscape.bench;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * The panel benchmark's invented data, built in memory: units observed over periods (a balanced panel),
 * an outcome y, a key predictor x correlated with the unit's level and with the period (so that both
 * fixed effects matter), ten controls, an analytic weight, and shocks shared by each unit and by each
 * period (so that one-way and two-way clustered errors differ). The same seed gives the same panel.
 */
final class PanelBenchData {
    static final int CONTROLS = 10;

    private PanelBenchData() {
    }

    static Table panel(int units, int periods, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        int n = units * periods;
        double[] unitEffect = new double[units];
        double[] unitShock = new double[units];
        for (int u = 0; u < units; u++) {
            unitEffect[u] = r.nextGaussian();
            unitShock[u] = 0.3 * r.nextGaussian();
        }
        double[] periodEffect = new double[periods];
        for (int t = 0; t < periods; t++) {
            periodEffect[t] = 0.5 * r.nextGaussian() + 0.05 * t;
        }
        double[] y = new double[n];
        double[] x = new double[n];
        double[] w = new double[n];
        double[][] c = new double[CONTROLS][n];
        int[] unit = new int[n];
        int[] period = new int[n];
        for (int u = 0; u < units; u++) {
            for (int t = 0; t < periods; t++) {
                int i = u * periods + t;
                unit[i] = u;
                period[i] = t;
                double signal = 0;
                for (int j = 0; j < CONTROLS; j++) {
                    c[j][i] = r.nextGaussian() + 0.2 * unitEffect[u];
                    signal += (j % 3 - 1) * 0.1 * c[j][i];
                }
                x[i] = 0.6 * unitEffect[u] + periodEffect[t] + 0.3 * c[0][i] + r.nextGaussian();
                w[i] = 1 + r.nextInt(6);
                y[i] = 0.25 * x[i] + signal + unitEffect[u] + periodEffect[t] + unitShock[u]
                        + r.nextGaussian() / Math.sqrt(w[i]);
            }
        }
        List<Column> columns = new ArrayList<>();
        columns.add(new NumericColumn("y", y));
        columns.add(new NumericColumn("x", x));
        for (int j = 0; j < CONTROLS; j++) {
            columns.add(new NumericColumn("c" + (j + 1), c[j]));
        }
        columns.add(new NumericColumn("w", w));
        columns.add(new CategoricalColumn("unit", unit, names("u", units)));
        columns.add(new CategoricalColumn("period", period, names("p", periods)));
        return new Table("panel", columns);
    }

    /** Level names that sort as the codes do, as CategoricalColumn's levels must. */
    private static List<String> names(String prefix, int count) {
        int digits = Integer.toString(count - 1).length();
        List<String> out = new ArrayList<>(count);
        for (int k = 0; k < count; k++) {
            out.add(prefix + String.format(Locale.ROOT, "%0" + digits + "d", k));
        }
        return out;
    }

    /** The first {@code rows} rows of the panel as CSV, for R: y, x, the controls, w, unit, period. */
    static void writeSlice(Table panel, int rows, Path file) {
        try (BufferedWriter out = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            List<Column> columns = panel.columns();
            List<String> header = new ArrayList<>();
            for (Column col : columns) {
                header.add(col.name());
            }
            out.write(String.join(",", header));
            out.write('\n');
            for (int i = 0; i < rows; i++) {
                StringBuilder line = new StringBuilder();
                for (int k = 0; k < columns.size(); k++) {
                    if (k > 0) {
                        line.append(',');
                    }
                    Column col = columns.get(k);
                    if (col instanceof NumericColumn num) {
                        line.append(Double.toString(num.values()[i]));
                    } else {
                        CategoricalColumn cat = (CategoricalColumn) col;
                        line.append(cat.levels().get(cat.codes()[i]));
                    }
                }
                out.write(line.append('\n').toString());
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Every subset of the ten controls, unit and period effects absorbed, weighted, four error types. */
    static String plan(String data) {
        StringBuilder optional = new StringBuilder();
        for (int j = 0; j < CONTROLS; j++) {
            optional.append(j == 0 ? "" : ", ").append("\"c").append(j + 1).append('"');
        }
        return """
                {"data": "%s", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
                  {"name": "controls", "kind": "controls", "optional": [%s]},
                  {"name": "fixed effects", "kind": "absorb",
                   "alternatives": [{"label": "unit and period", "columns": ["unit", "period"]}]},
                  {"name": "weights", "kind": "weights", "alternatives": [{"label": "w", "column": "w"}]},
                  {"name": "errors", "kind": "errors",
                   "alternatives": ["classical", "HC1", "cluster:unit", "cluster:unit+period"]}]}
                """.formatted(data, optional);
    }
}
