#!/usr/bin/env bash
# Prometheus for the live view's scrape test (PrometheusScrapeIT): Debian's `prometheus`, installed only
# when `command -v` does not find it. Nothing to start or stop: the test runs its own server on 127.0.0.1
# with a temporary configuration and storage directory.
set -euo pipefail
if command -v prometheus >/dev/null 2>&1; then
    echo "prometheus: $(command -v prometheus) present" >&2
    exit 0
fi
if [ "$(id -u)" -ne 0 ]; then
    echo "prometheus: missing and not root; install Debian's prometheus package" >&2
    exit 1
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends prometheus
