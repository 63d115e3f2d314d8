#!/usr/bin/env bash
# Regenerates the committed inputs and R reference values of org.forkscape.infer.InfluenceAgainstRTest:
# the simulated data (R's generator), Forkscape's specifications.csv for the plan, and R's aov on it.
# Needs R (Debian's r-base-core) and a built target/forkscape.jar. Run from the project root.
set -euo pipefail
here=src/test/resources/org/forkscape/infer/influence
Rscript src/test/r/influence-data.R "$here/data.csv"
out=$(mktemp -d)
java -jar target/forkscape.jar run "$here/plan.json" --out "$out" >/dev/null
cp "$out/specifications.csv" "$here/specifications.csv"
rm -r "$out"
Rscript src/test/r/influence-aov.R "$here/specifications.csv" "$here/aov-reference.csv"
