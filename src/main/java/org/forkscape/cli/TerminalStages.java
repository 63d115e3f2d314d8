package org.forkscape.cli;

import java.io.PrintStream;
import org.forkscape.run.RunProgress;
import org.forkscape.run.StageListener;

/**
 * A run's stages on a terminal's stderr: one progress line per stage (specifications, then null draws,
 * then the rows of specifications.csv written), cleared when the stage ends. When stderr is not a terminal nothing is shown, so redirected output holds
 * only the result line and warnings.
 */
final class TerminalStages implements StageListener {
    private final PrintStream err;
    private TerminalProgress shown;

    TerminalStages(PrintStream err) {
        this.err = err;
    }

    @Override
    public RunProgress started(Stage stage) {
        if (System.console() == null) {
            shown = null;
            return RunProgress.SILENT;
        }
        shown = switch (stage) {
            case FITTING -> new TerminalProgress(err, "fitting", "specifications");
            case INFERENCE -> new TerminalProgress(err, "inference (null draws, then the summaries)", "null draws");
            case WRITING -> new TerminalProgress(err, "writing files", "rows of specifications.csv");
        };
        return shown;
    }

    @Override
    public void ended(Stage stage) {
        if (shown != null) {
            shown.finish();
        }
    }
}
