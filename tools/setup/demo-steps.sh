#!/usr/bin/env bash
# The demo proper, given the built program. Kept apart from run-demo so it can be re-run
# without the set-up steps: tools/setup/demo-steps.sh build/release/tools/liveprob
set -euo pipefail
LIVEPROB=${1:?usage: demo-steps.sh PATH-TO-liveprob}

echo "liveprob demo: $("$LIVEPROB" --version)"
"$LIVEPROB" --help
