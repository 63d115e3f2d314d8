package org.forkscape;

import org.forkscape.cli.CommandLine;
import org.springframework.boot.SpringApplication;
import org.springframework.boot.autoconfigure.SpringBootApplication;

/** Starts the explorer when given nothing but its settings ({@code --name=value}); else runs a batch command. */
@SpringBootApplication
public class ForkscapeApplication {
    public static void main(String[] args) {
        if (CommandLine.handles(args)) {
            System.exit(CommandLine.execute(args, System.out, System.err));
        }
        SpringApplication.run(ForkscapeApplication.class, args);
    }
}
