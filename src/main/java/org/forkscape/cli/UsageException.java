package org.forkscape.cli;

import org.forkscape.InputException;

/** A command line that cannot be understood. */
final class UsageException extends InputException {
    UsageException(String message) {
        super("", message);
    }
}
