package org.forkscape.web.system;

import java.nio.file.Path;
import org.springframework.boot.context.properties.ConfigurationProperties;
import org.springframework.core.io.Resource;
import org.springframework.util.unit.DataSize;

/**
 * The server's settings under {@code forkscape.*} (defaults in application.properties; any can be set on
 * the command line, as in {@code --forkscape.workspace=/srv/forkscape}).
 *
 * @param workspace the folder of analyses and runs
 * @param demo      the bundled demo
 * @param data      limits on uploaded data
 * @param runs      how many runs compute at once, how many may wait, threads per run, and what one run may ask
 * @param explore   finished runs kept in memory
 */
@ConfigurationProperties(prefix = "forkscape")
public record ForkscapeSettings(Path workspace, Demo demo, Data data, Runs runs, Explore explore) {

    /**
     * @param data      the demo's CSV file; @param plan its plan
     * @param panelData the panel demo's CSV file; @param panelPlan its plan
     */
    public record Demo(boolean enabled, Resource data, Resource plan, Resource panelData, Resource panelPlan) {
    }

    /**
     * Limits on uploaded tables. (The largest upload, {@code forkscape.data.max-upload}, sets Spring's
     * multipart limits in application.properties, which enforce it while the upload streams.)
     *
     * @param maxColumns columns in the header
     * @param maxCells   rows times columns
     */
    public record Data(int maxColumns, long maxCells) {
    }

    /**
     * @param threads           fitting threads per run, 0 for one per processor but one (at least one), so that
     *                          a core stays free to answer the explorer while a run computes
     * @param maxSpecifications specifications one run may fit, whatever its plan's own cap
     * @param maxNullDraws      null draws one run may ask for
     * @param maxMemory         the memory one run's estimate may reach; 0 for a share of the Java heap
     *                          divided among the runs that compute at once
     */
    public record Runs(int concurrent, int queue, int threads, long maxSpecifications, int maxNullDraws,
            DataSize maxMemory) {
        public int fittingThreads() {
            return threads > 0 ? threads : Math.max(1, Runtime.getRuntime().availableProcessors() - 1);
        }
    }

    public record Explore(int cachedRuns) {
    }
}
