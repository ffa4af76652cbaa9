#!/usr/bin/env bash
cd "$(dirname "$0")/../.."
bash .ci/slurm-down.sh || true
