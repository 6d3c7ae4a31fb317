#!/usr/bin/env bash
# Make sure the outside reference libraries the tests compare against are present: numpy, scipy
# and segyio (the outside SEG-Y writer) for Debian's /usr/bin/python3 (python3-numpy,
# python3-scipy, python3-segyio). Installs them with apt-get
# when running as root on a machine that has it; otherwise says exactly what to install.
set -euo pipefail
have() { /usr/bin/python3 -c 'import numpy, scipy, segyio' >/dev/null 2>&1; }
if [ -x /usr/bin/python3 ] && have; then exit 0; fi
if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
  echo "slopebreak tests: installing the reference libraries python3-numpy, python3-scipy and python3-segyio (Debian)..." >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends python3 python3-numpy python3-scipy python3-segyio >/dev/null
  have && exit 0
fi
if python3 -c 'import numpy, scipy, segyio' >/dev/null 2>&1; then exit 0; fi
echo "slopebreak tests need numpy, scipy and segyio as reference libraries: install Debian's python3-numpy, python3-scipy and python3-segyio and run again" >&2
exit 1
