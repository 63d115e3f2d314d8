#!/usr/bin/env bash
# Finds or installs what the test suite needs beyond Java and Maven: Debian's Chromium and its
# ChromeDriver for the browser tests. Nothing is downloaded from anywhere but Debian's packages.
set -euo pipefail
if [ -x /usr/bin/chromium ] && [ -x /usr/bin/chromedriver ]; then
  exit 0
fi
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq chromium chromium-driver >/dev/null
