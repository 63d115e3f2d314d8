package org.forkscape.web.system;

/** The request names an analysis, run or file that does not exist (or an identifier that cannot exist). */
public class NotFoundException extends RuntimeException {
    public NotFoundException(String message) {
        super(message);
    }
}
