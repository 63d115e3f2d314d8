package org.forkscape.compare;

import java.util.Map;

/**
 * One row of a run's specifications.csv: its number, the label chosen for each decision (by decision
 * name, as the file's columns are named) and every other cell as written, so that two runs' numbers are
 * compared as the text that reads back to the same double.
 */
record SpecificationRow(String spec, Map<String, String> labels, Map<String, String> cells) {
}
