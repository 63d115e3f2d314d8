package org.forkscape.cli;

import java.io.PrintStream;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.check.RuleResult;

/**
 * {@code check RUN_DIR --policy POLICY.json}: the release check of a run folder. Prints each rule with its
 * measured value and verdict, writes RUN_DIR/check.json, exit 0 when every rule passes (or does not apply),
 * 3 when one fails; a bad policy or run folder is an input error (exit 2) and writes nothing.
 */
final class CheckCommand {
    static final String USAGE = "usage: check RUN_DIR --policy POLICY.json";

    private CheckCommand() {
    }

    static int execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, Set.of("policy"));
        if (a.positional().size() != 1 || !a.has("policy")) {
            throw new UsageException((a.positional().size() != 1 ? "check takes one run folder, found "
                    + a.positional().size() : "check needs --policy POLICY.json") + "; " + USAGE);
        }
        Path folder = VerifyCommand.folder(a.positional().get(0));
        Path policy;
        try {
            policy = Path.of(a.text("policy"));
        } catch (InvalidPathException e) {
            throw new UsageException("policy \"" + a.text("policy") + "\" is not a usable path");
        }
        ReleaseCheck check = ReleaseCheck.of(folder, policy);
        check.results().stream().map(RuleResult::line).forEach(out::println);
        check.write(folder, policy.toString());
        out.println((check.passed() ? "release check passed" : "release check failed: " + check.failures() + " of "
                + check.results().size() + " rules") + "; written to " + folder.resolve(ReleaseCheck.FILE));
        return check.passed() ? 0 : 3;
    }
}
