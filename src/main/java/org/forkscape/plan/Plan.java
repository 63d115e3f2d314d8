package org.forkscape.plan;

import java.nio.file.Path;
import java.util.List;

/**
 * A declared analysis: the data, the confidence level, how missing cells are handled, and the ordered
 * decisions whose combinations are the specifications.
 *
 * @param dataFile           the data (a CSV file, a Parquet file or a folder of Parquet part files), resolved against the plan's folder
 * @param confidence         interval coverage; the significance level is {@code 1 - confidence}
 * @param missing            per-specification or common rows
 * @param decisions          in declared order; exactly one outcome and one predictor decision
 * @param sampleSize         when positive, fit a seeded random sample of this many specifications
 * @param seed               the seed for every random stream of a run
 * @param maxSpecifications  the cap above which the plan is refused unless a sample is asked for
 * @param nullDraws          number of null draws for joint inference (0 for none)
 * @param nullMethod         {@code bootstrap} or {@code permute}
 * @param nullCluster        as the plan or the command line names it: a column whose clusters the bootstrap
 *                           resamples whole, {@link #NULL_CLUSTER_ROWS} for single rows, or {@code null} when
 *                           neither names one (then the null draws choose, see {@code infer.NullDrawSettings})
 * @param reported           the specification the authors report, {@code null} when the plan names none
 */
public record Plan(
        Path dataFile,
        double confidence,
        MissingRows missing,
        List<Decision> decisions,
        long sampleSize,
        long seed,
        long maxSpecifications,
        int nullDraws,
        String nullMethod,
        String nullCluster,
        ReportedSpecification reported) {

    public static final long DEFAULT_MAX_SPECIFICATIONS = 1_000_000L;

    /**
     * The {@code nullCluster} word for resampling single rows. It always means rows, even when the data
     * have a column of that name: such a column is still resampled whole when it is the one column the
     * standard errors cluster on and nothing else is named.
     */
    public static final String NULL_CLUSTER_ROWS = "rows";

    public Plan {
        decisions = List.copyOf(decisions);
    }

    public Decision.Outcome outcome() {
        return only(Decision.Outcome.class);
    }

    public Decision.Predictor predictor() {
        return only(Decision.Predictor.class);
    }

    public <T extends Decision> List<T> all(Class<T> kind) {
        return decisions.stream().filter(kind::isInstance).map(kind::cast).toList();
    }

    private <T extends Decision> T only(Class<T> kind) {
        return all(kind).get(0);
    }

    /** The columns the errors decision's cluster-robust alternatives cluster on, distinct, in plan order. */
    public List<String> errorClusterColumns() {
        return all(Decision.Errors.class).stream().flatMap(e -> e.alternatives().stream())
                .flatMap(t -> t.clusterColumns().stream()).distinct().toList();
    }

    /**
     * Where the first error type that clusters on several columns is, as {@code decisions[i].alternatives[j]}
     * followed by its spelling, or {@code null} when none does.
     */
    public String multiwayClusterPath() {
        for (int i = 0; i < decisions.size(); i++) {
            if (decisions.get(i) instanceof Decision.Errors e) {
                for (int j = 0; j < e.alternatives().size(); j++) {
                    if (e.alternatives().get(j).multiway()) {
                        return "decisions[" + i + "].alternatives[" + j + "], " + e.alternatives().get(j).label();
                    }
                }
            }
        }
        return null;
    }

    /**
     * The JSON path and label of the first absorb alternative that absorbs several columns, or null when every
     * alternative absorbs one column or none.
     */
    public String severalAbsorbedPath() {
        for (int i = 0; i < decisions.size(); i++) {
            if (decisions.get(i) instanceof Decision.Absorb a) {
                for (int j = 0; j < a.alternatives().size(); j++) {
                    if (a.alternatives().get(j).columns().size() > 1) {
                        return "decisions[" + i + "].alternatives[" + j + "], " + a.alternatives().get(j).label();
                    }
                }
            }
        }
        return null;
    }

    /** The models the specifications fit: the model decision's alternatives, or least squares alone. */
    public List<ModelFamily> modelFamilies() {
        List<Decision.Model> models = all(Decision.Model.class);
        return models.isEmpty() ? List.of(ModelFamily.OLS) : models.get(0).alternatives();
    }

    /** Whether any specification fits a generalized linear model. */
    public boolean generalized() {
        return modelFamilies().stream().anyMatch(f -> !f.leastSquares());
    }

    public double alpha() {
        return 1 - confidence;
    }

    public Plan withSample(long size, long newSeed) {
        return new Plan(dataFile, confidence, missing, decisions, size, newSeed, maxSpecifications, nullDraws,
                nullMethod, nullCluster, reported);
    }

    public Plan withNull(int draws, String method, String cluster, long newSeed) {
        return new Plan(dataFile, confidence, missing, decisions, sampleSize, newSeed, maxSpecifications, draws,
                method, cluster, reported);
    }

    public Plan withMaxSpecifications(long cap) {
        return new Plan(dataFile, confidence, missing, decisions, sampleSize, seed, cap, nullDraws, nullMethod,
                nullCluster, reported);
    }
}
