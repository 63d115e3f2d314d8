package org.forkscape.run;

import org.forkscape.data.Table;
import org.forkscape.fit.VariantSource;
import org.forkscape.plan.Plan;

/**
 * Where the batch command's run takes its data from: the table the plan is checked against, and where its
 * data variants are built. {@link #IN_MEMORY} reads the plan's data (CSV or Parquet) into memory and codes every variant
 * from its rows; a runner that keeps the rows elsewhere (on a cluster) gives a table of the columns with no
 * rows, refuses the plan features it cannot compute, and builds the variants from statistics summed where
 * the rows are.
 */
public interface RunData {
    /** The plan's data (a CSV file, a Parquet file or a folder of Parquet parts) read into memory, its variants coded from the rows. */
    RunData IN_MEMORY = new RunData() {
        @Override
        public Table table(Plan plan) {
            return org.forkscape.data.DataFiles.read(plan.dataFile());
        }

        @Override
        public VariantSource variants(Plan plan, Table table) {
            return null;
        }
    };

    /** The table the plan is checked against; with {@link #variants} not null its rows may be absent. */
    Table table(Plan plan);

    /**
     * Where the variants come from, or null to code them from the table's rows; a plan that cannot run on
     * this data is refused here ({@link org.forkscape.InputException} at its JSON path).
     */
    VariantSource variants(Plan plan, Table table);

    /**
     * The file whose SHA-256 summary.json's provenance records as {@code data_sha256}, or null when the data
     * are not read through this machine (then it is null).
     */
    default java.nio.file.Path hashedFile(Plan plan) {
        return plan.dataFile();
    }
}
