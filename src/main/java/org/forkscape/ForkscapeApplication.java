package org.forkscape;

import org.forkscape.cli.CommandLine;
import org.springframework.boot.SpringApplication;
import org.springframework.boot.autoconfigure.SpringBootApplication;

/** Starts the explorer when given nothing but its settings ({@code --name=value}); else runs a batch command. */
@SpringBootApplication
public class ForkscapeApplication {
    private static final String LOGBACK_CONFIGURATION = "logback.configurationFile";

    public static void main(String[] args) {
        if (CommandLine.handles(args)) {
            // before any library makes a logger: the batch commands' quiet configuration, unless one was given
            if (System.getProperty(LOGBACK_CONFIGURATION) == null) {
                System.setProperty(LOGBACK_CONFIGURATION, "org/forkscape/cli/logback-batch.xml");
            }
            System.exit(CommandLine.execute(args, System.out, System.err));
        }
        SpringApplication.run(ForkscapeApplication.class, args);
    }
}
