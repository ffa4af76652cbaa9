#!/usr/bin/env bash
# Headless Chromium for the report's browser test (ReportBrowserIT): Debian's `chromium`, installed only
# when `command -v` does not find it. Nothing to start or stop: the test runs the browser itself.
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then
    echo "chromium: $(command -v chromium) present" >&2
    exit 0
fi
if [ "$(id -u)" -ne 0 ]; then
    echo "chromium: missing and not root; install Debian's chromium package" >&2
    exit 1
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends chromium fonts-dejavu-core
command -v chromium >/dev/null
echo "chromium: installed $(chromium --version 2>/dev/null || true)" >&2
