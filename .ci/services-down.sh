#!/usr/bin/env bash
# Stops what services-up.sh started.
cd "$(dirname "$0")/.."
for s in .ci/down.d/*.sh; do
  [ -f "$s" ] || continue
  bash "$s" || true
done
