package org.forkscape.web.system;

import java.nio.file.Path;
import org.springframework.boot.context.properties.ConfigurationProperties;
import org.springframework.core.io.Resource;

/**
 * The server's settings under {@code forkscape.*} (defaults in application.properties; any can be set on
 * the command line, as in {@code --forkscape.workspace=/srv/forkscape}).
 *
 * @param workspace the folder of analyses and runs
 * @param demo      the bundled demo
 * @param data      limits on uploaded data
 * @param runs      how many runs compute at once, how many may wait, threads per run
 * @param explore   finished runs kept in memory
 */
@ConfigurationProperties(prefix = "forkscape")
public record ForkscapeSettings(Path workspace, Demo demo, Data data, Runs runs, Explore explore) {

    /** @param data the demo's CSV file; @param plan its plan */
    public record Demo(boolean enabled, Resource data, Resource plan) {
    }

    public record Data(int maxColumns, long maxCells) {
    }

    /** @param threads fitting threads per run, 0 for one per processor */
    public record Runs(int concurrent, int queue, int threads) {
        public int fittingThreads() {
            return threads > 0 ? threads : Runtime.getRuntime().availableProcessors();
        }
    }

    public record Explore(int cachedRuns) {
    }
}
