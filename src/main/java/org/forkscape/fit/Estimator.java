package org.forkscape.fit;

/**
 * Fits the key coefficient of one specification, with its standard error of the specification's type,
 * from a source of data. The run and the null draws call it alike. Implementations keep workspaces and
 * are not thread safe: one per worker thread.
 */
public interface Estimator {
    /**
     * @param spec what to fit: outcome, controls, key predictor, variables, error type
     * @param data the statistics and rows of the specification's data variant (observed or resampled)
     * @return the fit; a specification that cannot be fitted is a result with its status, never an exception
     */
    KeyFit fit(SpecificationModel spec, FitData data);

    /**
     * The same fit with every coefficient, for the reader who opens one specification.
     *
     * @param confidence the coverage of the intervals
     * @param keyTerm    how the key predictor is named among the coefficients
     */
    FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm);
}
