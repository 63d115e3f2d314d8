package org.forkscape.cli;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Optional;

/** The usage of each batch command, and of all of them together, as {@code help} prints it. */
final class CommandHelp {
    private static final Map<String, String> COMMANDS = new LinkedHashMap<>();

    static {
        COMMANDS.put("run", String.join("\n",
                "  java -jar forkscape.jar run PLAN.json --out DIR [--sample N --seed S] [--threads T]",
                "                                               [--max-specifications N] [--max-memory SIZE]",
                "                                               [--null-draws R [--null-method bootstrap|permute]",
                "                                                [--null-cluster COLUMN|rows] [--max-null-draws N]]",
                "                                               fit every specification, write",
                "                                               DIR/specifications.csv, DIR/summary.json,",
                "                                               DIR/plan.json and DIR/overfitting.csv",
                "                                               (with null draws also DIR/null-draws.csv)"));
        COMMANDS.put("estimate", String.join("\n",
                "  java -jar forkscape.jar estimate PLAN.json [run's options but --out]",
                "                                               how long a run would take on this machine",
                "                                               (measured on a few specifications) and its",
                "                                               memory at the peak; fits nothing, writes nothing"));
        COMMANDS.put("lock", String.join("\n",
                "  java -jar forkscape.jar lock PLAN.json [--replace yes]",
                "                                               fix the plan before any result is seen: write",
                "                                               PLAN.lock.json beside it (the plan's and data's",
                "                                               SHA-256, the time, a fingerprint to deposit);",
                "                                               runs then record whether they match it"));
        COMMANDS.put("verify", String.join("\n",
                "  java -jar forkscape.jar verify RUN_DIR       re-run a run folder from its plan.json, data and",
                "                                               seed; exit 0 when specifications.csv and",
                "                                               summary.json come out identical, 3 at the first",
                "                                               difference, 2 when the data's SHA-256 changed"));
        COMMANDS.put("check", String.join("\n", "  java -jar forkscape.jar check RUN_DIR --policy POLICY.json", "                                               check a run folder against a release policy: each rule's", "                                               measured value and pass or fail, RUN_DIR/check.json;", "                                               exit 0 when all pass, 3 when one fails"));
        COMMANDS.put("report", String.join("\n",
                "  java -jar forkscape.jar report RUN_DIR --out DIR [--scale fitted|effect|standardized|partial|t]",
                "                                               [--group G] [--size column|page]",
                "                                               the figure of a run folder for print",
                "                                               (DIR/figure.svg, .pdf, .png), its headline",
                "                                               table (DIR/table.tex, DIR/table.md), a methods",
                "                                               paragraph (DIR/methods.md) and DIR/report.html"));
        COMMANDS.put("compare", CompareCommand.HELP);
        COMMANDS.put("demo-data", String.join("\n",
                "  java -jar forkscape.jar demo-data DIR [--replace yes]",
                "                                               write the demo's data and plans into DIR"));
        COMMANDS.put("bench", String.join("\n",
                "  java -jar forkscape.jar bench [--quick] [--out DIR]",
                "                                               time the engine against a per-specification",
                "                                               refit; figures to DIR (target/bench)"));
    }

    private CommandHelp() {
    }

    static boolean isCommand(String name) {
        return COMMANDS.containsKey(name);
    }

    /** One command's usage, or empty when there is no such command. */
    static Optional<String> of(String command) {
        return Optional.ofNullable(COMMANDS.get(command)).map(block -> "usage:\n" + block);
    }

    static String all() {
        return String.join("\n",
                "usage:",
                "  java -jar forkscape.jar [--name=value ...]   start the explorer at http://localhost:8080",
                "                                               (settings such as --server.port=8081)",
                String.join("\n", COMMANDS.values()),
                "  java -jar forkscape.jar help [COMMAND]       this text, or one command's (also COMMAND --help)",
                "  java -jar forkscape.jar --version            the version");
    }
}
