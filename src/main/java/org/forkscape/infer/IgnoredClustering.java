package org.forkscape.infer;

import java.util.List;
import org.forkscape.data.Table;
import org.forkscape.fit.GroupingCodes;

/**
 * The warning a run's null draws carry when they split up clusters that its standard errors assume. Draws
 * that move single rows (or shuffle the key predictor between rows) under a clustered design treat
 * correlated rows as independent, so the null curves are too narrow and the joint tests over-reject
 * (Cameron &amp; Miller 2015, "A practitioner's guide to cluster-robust inference", Journal of Human
 * Resources 50(2); {@code NullDrawsClusteredCalibrationTest} measures it). A clustering of the errors is kept when each of its clusters lies within one resampled cluster,
 * as with the same column or a coarser one that contains it.
 */
final class IgnoredClustering {
    private IgnoredClustering() {
    }

    /**
     * One plain sentence naming what the draws resample and the error clusterings they split up, or
     * {@code null} when they keep every clustering the errors decision uses.
     *
     * @param errorClusters the columns the errors decision clusters on
     */
    static String warning(NullDrawSettings settings, List<String> errorClusters, Table table, ResampleDesign design) {
        return sentence(settings, errorClusters.stream()
                .filter(c -> !design.keepsWhole(GroupingCodes.of(table.column(c)))).toList());
    }

    /**
     * The same for draws made where the rows are held, which tell the clusterings they keep whole
     * ({@code fit.BootstrapByParts#keptWhole}).
     */
    static String warning(NullDrawSettings settings, List<String> errorClusters, List<String> keptWhole) {
        return sentence(settings, errorClusters.stream().filter(c -> !keptWhole.contains(c)).toList());
    }

    private static String sentence(NullDrawSettings settings, List<String> split) {
        if (split.isEmpty()) {
            return null;
        }
        String draws;
        if (settings.method() == NullMethod.PERMUTE) {
            draws = "The null draws shuffle the key predictor between single rows";
        } else if (settings.clusterColumn() != null) {
            draws = "The null draws resample whole clusters of " + quoted(settings.clusterColumn());
        } else if (settings.byDefault()) {
            draws = "The null draws resample single rows because the standard errors cluster on more than one "
                    + "column and none is named for the draws";
        } else {
            draws = "The null draws resample single rows, as asked";
        }
        String remedy = settings.method() == NullMethod.PERMUTE
                ? "the bootstrap can resample whole clusters instead"
                : "name a column whose clusters contain them in nullCluster (--null-cluster COLUMN)";
        return draws + ", so they split up the clusters of " + quoted(split) + " that the standard errors use and "
                + "the joint p-values may be too small; " + remedy + ".";
    }

    private static String quoted(String column) {
        return "\"" + column + "\"";
    }

    private static String quoted(List<String> columns) {
        StringBuilder b = new StringBuilder();
        for (int i = 0; i < columns.size(); i++) {
            if (i > 0) {
                b.append(i == columns.size() - 1 ? " and " : ", ");
            }
            b.append(quoted(columns.get(i)));
        }
        return b.toString();
    }
}
