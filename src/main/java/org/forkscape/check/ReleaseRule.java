package org.forkscape.check;

/** One condition a run must meet before release, as a policy file states it. */
interface ReleaseRule {
    /** The rule's key in the policy file and in check.json. */
    String name();

    RuleResult evaluate(RunEvidence run);
}
