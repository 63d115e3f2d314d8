package org.forkscape.compare;

import java.nio.file.Path;
import java.util.Map;

/**
 * Two run folders compared once, for both doors: the batch command writes its files, the browser's compare
 * page shows the same {@link #json()} and draws {@link #curves(int)}, so the two give the same numbers.
 */
public final class Comparison {
    private final RunComparison comparison;
    private final String sentence;

    private Comparison(RunComparison comparison) {
        this.comparison = comparison;
        this.sentence = ComparisonSentence.of(comparison);
    }

    /** Reads both runs' specifications.csv beside their parsed plan and summary, and matches them. */
    public static Comparison of(RunFiles a, RunFiles b) {
        return new Comparison(RunComparison.of(RunFolder.read(a), RunFolder.read(b)));
    }

    public String sentence() {
        return sentence;
    }

    /** compare.json's content. */
    public Map<String, Object> json() {
        return ComparisonFiles.json(comparison, sentence);
    }

    /** Both runs' curves per comparable group, each drawn from at most {@code maxPoints} ranks. */
    public ComparisonCurves curves(int maxPoints) {
        return ComparisonCurves.of(comparison, maxPoints);
    }

    /** Writes compare.csv, then compare.json, into {@code out}; returns the sentence. */
    public String write(Path out) {
        ComparisonFiles.write(comparison, sentence, out);
        return sentence;
    }
}
