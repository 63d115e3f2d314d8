package org.forkscape.data;

/** One column of a {@link Table}: numeric (NaN for missing) or categorical (code -1 for missing). */
public sealed interface Column permits NumericColumn, CategoricalColumn {
    String name();

    int size();

    boolean isMissing(int row);

    default int missingCount() {
        int m = 0;
        for (int i = 0; i < size(); i++) {
            if (isMissing(i)) {
                m++;
            }
        }
        return m;
    }
}
