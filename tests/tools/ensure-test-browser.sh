#!/usr/bin/env bash
# Make sure the browser the browser tests drive is present: Debian's Chromium (/usr/bin/chromium,
# or the one named by SLOPEBREAK_CHROMIUM), which playwright-core starts headless. Installs it with
# apt-get when running as root on a machine that has it; otherwise says exactly what to install.
# (Playwright's own browser download does not work without internet, so it is not used.)
set -euo pipefail
browser="${SLOPEBREAK_CHROMIUM:-/usr/bin/chromium}"
if [ -x "$browser" ]; then exit 0; fi
if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
  echo "slopebreak tests: installing Chromium for the browser tests (Debian package chromium)..." >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends chromium fonts-dejavu-core >/dev/null
  [ -x "$browser" ] && exit 0
fi
echo "slopebreak's browser tests need Chromium at $browser: install Debian's chromium package (apt-get install -y chromium) or set SLOPEBREAK_CHROMIUM to a Chromium binary, and run again" >&2
exit 1
