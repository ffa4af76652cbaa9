#!/usr/bin/env bash
# A single-node SLURM for the job-control tests (installs Debian's packages only when missing).
set -euo pipefail
cd "$(dirname "$0")/../.."
bash .ci/slurm-up.sh
