#!/usr/bin/env bash
# Brings up what the integration tests need on this machine: system packages are installed only when
# `command -v` finds them missing; services are started for this test run and stopped by services-down.sh.
set -euo pipefail
cd "$(dirname "$0")/.."
for s in .ci/up.d/*.sh; do
  [ -f "$s" ] || continue
  echo "services: $s" >&2
  bash "$s"
done
