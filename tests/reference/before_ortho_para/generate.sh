#!/usr/bin/env bash
# Regenerates the JSON results in this folder with cryochain as it was before
# ortho-para hydrogen was modelled (commit 34a069b), for tests/unchanged_results.rs.
# The hydrogen and cascade demos of that commit are kept, unchanged but for a
# header comment and the title, as tests/flowsheets/*-frozen-normal.yaml.
# Every case is solved with the tear tolerance tightened to 1e-13, so that what is
# compared is the solution and not where the solver stopped within its tolerance.
# Usage (from the repository root): bash tests/reference/before_ortho_para/generate.sh
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
work="$(mktemp -d)"
git worktree add --detach "$work/old" 34a069b
trap 'git worktree remove --force "$work/old"' EXIT
(cd "$work/old" && CARGO_TARGET_DIR="$work/target" cargo build --release --bin cryochain)
for name in nitrogen-linde-hampson helium-lh2-precooled nitrogen-claude \
    hydrogen-ln2-precooled cascade-nitrogen-hydrogen; do
    (cd "$work/old" && "$work/target/release/cryochain" solve "flowsheets/$name.yaml" --json \
        --set settings.tolerance=1e-13) \
        > "$here/$name.json" || true   # a design finding exits non-zero; the JSON is whole
done
