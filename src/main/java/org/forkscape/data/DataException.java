package org.forkscape.data;

import org.forkscape.InputException;

/** A data file that cannot be used, with the file and, where it applies, the line and column. */
public class DataException extends InputException {
    public DataException(String where, String message) {
        super(where, message);
    }
}
