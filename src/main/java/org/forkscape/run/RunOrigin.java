package org.forkscape.run;

import java.nio.file.Path;

/**
 * What only the door knows about a run, for its provenance: how it was asked for, the plan's bytes and
 * where the data file is.
 *
 * @param command   the command line as given, or a short description of the web action
 * @param planBytes the plan file's bytes as the door read them (not modified)
 * @param dataFile  the data file the table was read from, or null when it was read elsewhere (not hashed)
 * @param lock      the plan's lock, or null when the plan has none
 */
public record RunOrigin(String command, byte[] planBytes, Path dataFile, PlanLock lock) {
    /** The origin of a run of a plan without a lock. */
    public RunOrigin(String command, byte[] planBytes, Path dataFile) {
        this(command, planBytes, dataFile, null);
    }
}
