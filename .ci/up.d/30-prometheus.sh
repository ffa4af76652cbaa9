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
# keep the package from starting its own service: the test starts prometheus itself, on loopback
policy=/usr/sbin/policy-rc.d
own_policy=0
if [ ! -e "$policy" ]; then
    printf '#!/bin/sh\nexit 101\n' > "$policy"; chmod 755 "$policy"; own_policy=1
fi
apt-get install -y -qq --no-install-recommends prometheus
if [ "$own_policy" -eq 1 ]; then rm -f "$policy"; fi
