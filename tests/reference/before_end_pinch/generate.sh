#!/usr/bin/env bash
# Regenerates the JSON results in this folder with cryochain as it was before a
# pinch at an exchanger's end was found from the end's outlet flash and before the
# flash from a nearby state became a joint Newton in temperature and density
# (commit fcdb4bb), for tests/unchanged_results.rs: the multistream flowsheets,
# which the older reference sets predate. Every case is solved with the tear
# tolerance tightened to 1e-13, so that what is compared is the solution and not
# where the solver stopped within its tolerance.
# Usage (from the repository root): bash tests/reference/before_end_pinch/generate.sh
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
work="$(mktemp -d)"
git worktree add --detach "$work/old" fcdb4bb
trap 'git worktree remove --force "$work/old"' EXIT
(cd "$work/old" && CARGO_TARGET_DIR="$work/target" cargo build --release --bin cryochain)
for file in flowsheets/helium-collins.yaml \
    tests/flowsheets/three-stream-exchanger.yaml \
    tests/flowsheets/three-stream-exchanger-approach.yaml \
    tests/flowsheets/hydrogen-ln2-boil-off-recovered.yaml \
    tests/flowsheets/hydrogen-ln2-precooled-multistream-pair.yaml; do
    name="$(basename "$file" .yaml)"
    (cd "$work/old" && "$work/target/release/cryochain" solve "$file" --json \
        --set settings.tolerance=1e-13) > "$here/$name.json" || true   # a finding exits non-zero; the JSON is whole
done
