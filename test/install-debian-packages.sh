#!/usr/bin/env bash
# Debian packages the tests use (see DEVELOPERS.md "Tools the tests use"):
#   ngspice        reference circuit simulator for the theory checks
#   socat          pseudo-terminal pairs for real serial-port tests
#   chromium       end-to-end tests of the window through playwright-core
#   poppler-utils  pdftoppm/pdftotext to open exported PDF records
#   xvfb           a display for the Electron shell test where the binary exists
#   fonts-dejavu-core  a Unicode font embedded in PDF records (standard PDF fonts otherwise)
#   postgresql     the server programs (initdb, pg_ctl, postgres) for a throw-away cluster the store tests start themselves
#   rpcbind        the portmapper VXI-11 clients find the simulated bench's LAN instruments through
#   python3-pyvisa-py  an independent VISA client of the simulated bench (VXI-11 and raw socket)
#   lxi-tools      a second independent VXI-11 client (optional: installed when the distribution has it)
#   util-linux, iproute2  unshare and ip: a network namespace of its own, where no portmapper answers
#   git            the list of tracked files the repository-layout test reads
set -euo pipefail
PACKAGES=(ngspice socat chromium poppler-utils xvfb fonts-dejavu-core postgresql rpcbind python3-pyvisa-py util-linux iproute2 git)
# Not in every release; the tests skip their checks when the distribution lacks it (test/helpers/required-tool.ts, optional).
OPTIONAL_PACKAGES=(lxi-tools)
missing=()
for package in "${PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" || missing+=("$package")
done
missing_optional=()
for package in "${OPTIONAL_PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" || missing_optional+=("$package")
done
if [ ${#missing[@]} -eq 0 ] && [ ${#missing_optional[@]} -eq 0 ]; then
  echo "test packages present: ${PACKAGES[*]} ${OPTIONAL_PACKAGES[*]}"
  exit 0
fi
SUDO=""
[ "$(id -u)" -ne 0 ] && SUDO="sudo"
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
for package in "${missing_optional[@]}"; do
  # Read the whole answer first: with pipefail, grep -q quitting at its match can leave apt-cache
  # killed by SIGPIPE, and the pipeline would then say "not there" for a package that is.
  policy=$(apt-cache policy "$package")
  if grep -Eq '^\s*Candidate: [^(]' <<<"$policy"; then
    missing+=("$package")
  else
    echo "optional test package $package is not in this distribution; the tests that use it will skip"
  fi
done
[ ${#missing[@]} -eq 0 ] || $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
