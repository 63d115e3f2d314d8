package org.forkscape.spark;

import org.forkscape.data.Table;

/**
 * One partition's rows as held on its executor: the plan's columns, and, when bootstrap draws are asked for,
 * each row's identity ({@link RowIdentity}).
 *
 * @param rowKeys one per row of {@code table}, or null
 */
record SparkPart(Table table, long[] rowKeys) {
}
