#!/usr/bin/env bash
# Regenerates the JSON results in this folder with cryochain as it was before
# exchangers sized by their minimum approach were solved by Newton steps on the duty
# (commit dfa86c8), for tests/unchanged_results.rs. The two test flowsheets sized by
# minimum approach did not exist at that commit; they are copied in unchanged.
# Every case is solved with the tear tolerance tightened to 1e-13, so that what is
# compared is the solution and not where the solver stopped within its tolerance.
# Usage (from the repository root): bash tests/reference/before_newton_sizing/generate.sh
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../../.." && pwd)"
work="$(mktemp -d)"
git worktree add --detach "$work/old" dfa86c8
trap 'git worktree remove --force "$work/old"' EXIT
cp "$root"/tests/flowsheets/hydrogen-ln2-precooled-minimum-approach.yaml \
   "$root"/tests/flowsheets/hydrogen-ln2-precooled-converting-minimum-approach.yaml \
   "$work/old/tests/flowsheets/"
(cd "$work/old" && CARGO_TARGET_DIR="$work/target" cargo build --release --bin cryochain)
for file in flowsheets/nitrogen-linde-hampson.yaml flowsheets/helium-lh2-precooled.yaml \
    flowsheets/nitrogen-claude.yaml flowsheets/hydrogen-ln2-precooled.yaml \
    flowsheets/cascade-nitrogen-hydrogen.yaml \
    tests/flowsheets/nitrogen-claude-warm-mixing.yaml \
    tests/flowsheets/hydrogen-ln2-precooled-minimum-approach.yaml \
    tests/flowsheets/hydrogen-ln2-precooled-converting-minimum-approach.yaml; do
    name="$(basename "$file" .yaml)"
    (cd "$work/old" && "$work/target/release/cryochain" solve "$file" --json \
        --set settings.tolerance=1e-13) > "$here/$name.json" || true   # a finding exits non-zero; the JSON is whole
done
