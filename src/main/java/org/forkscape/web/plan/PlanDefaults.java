package org.forkscape.web.plan;

import org.forkscape.plan.MissingRows;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;

/**
 * What the plan reader takes for each top-level setting the plan leaves out, sent to the form so that its
 * empty fields show the values a run would use (from the reader's own constants, never typed twice).
 */
record PlanDefaults(double confidence, String missing, long sample, long seed, long maxSpecifications,
        int nullDraws, String nullMethod) {

    static final PlanDefaults READER = new PlanDefaults(PlanReader.DEFAULT_CONFIDENCE,
            MissingRows.PER_SPECIFICATION.spelling(), PlanReader.DEFAULT_SAMPLE, PlanReader.DEFAULT_SEED,
            Plan.DEFAULT_MAX_SPECIFICATIONS, PlanReader.DEFAULT_NULL_DRAWS, PlanReader.DEFAULT_NULL_METHOD);
}
