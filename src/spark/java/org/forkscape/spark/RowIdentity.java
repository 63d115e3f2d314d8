package org.forkscape.spark;

import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.forkscape.InputException;
import org.forkscape.fit.PoissonCounts;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.infer.NullMethod;
import org.forkscape.plan.Plan;

import static org.apache.spark.sql.functions.col;

/**
 * A row's identity for the Poisson bootstrap, the same however Spark reads or repartitions the data: the name
 * of the Parquet file the row is in and its 0-based index within that file, Spark's hidden file metadata
 * columns {@code _metadata.file_name} and {@code _metadata.row_index} (both given for Parquet by Spark 4.1.1,
 * the latter the row's position in its file; {@code SparkNullDrawsTest} recomputes every identity from the files
 * and checks the draws against them), read before any repartitioning. The file's name rather than its path, so that the same files give the same
 * draws wherever they are stored; a folder's part files have distinct names, and data whose files share a
 * name are refused ({@link #requireDistinctNames}).
 */
final class RowIdentity {
    static final String FILE = "__forkscape_file_name";
    static final String ROW = "__forkscape_row_index";

    private RowIdentity() {
    }

    /** Whether the plan's null draws resample rows by their identities: bootstrap draws. */
    static boolean needed(Plan plan) {
        return plan.nullDraws() > 0 && NullDrawSettings.of(plan).method() == NullMethod.BOOTSTRAP;
    }

    /** The two columns to read beside the plan's, in this order. */
    static List<Column> columns() {
        return List.of(col("_metadata.file_name").as(FILE), col("_metadata.row_index").as(ROW));
    }

    /**
     * Refuses data whose files share a name (as part files in different folders of a partitioned data set
     * can): their rows would share identities, and so their counts in every draw.
     *
     * @param files the data's files as Spark lists them ({@code Dataset.inputFiles})
     */
    static void requireDistinctNames(String[] files, String source) {
        Map<String, String> byName = new java.util.HashMap<>();
        for (String file : files) {
            String name = file.substring(file.lastIndexOf('/') + 1);
            String other = byName.put(name, file);
            if (other != null) {
                throw new InputException("data", "the null draws tell rows apart by their file's name and row "
                        + "index, and two files of " + source + " are named \"" + name + "\" (" + other + " and "
                        + file + "); give the Parquet files distinct names, or ask for no null draws");
            }
        }
    }

    /** {@link PoissonCounts#rowKey} of the row, each file's name hashed once per partition ({@code fileHash}). */
    static long key(Map<String, Long> fileHash, String fileName, long rowIndex) {
        long file = fileHash.computeIfAbsent(fileName, PoissonCounts::textHash);
        return PoissonCounts.rowKey(file, rowIndex);
    }
}
