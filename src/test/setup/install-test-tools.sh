#!/usr/bin/env bash
# Finds or installs what the test suite needs beyond Java and Maven, from Debian's packages only: Chromium
# and its ChromeDriver for the browser tests, and pdflatex with booktabs (texlive-latex-recommended) for the
# test that compiles the LaTeX table of the report.
set -euo pipefail
missing=()
[ -x /usr/bin/chromium ] || missing+=(chromium)
[ -x /usr/bin/chromedriver ] || missing+=(chromium-driver)
command -v pdflatex >/dev/null 2>&1 && kpsewhich booktabs.sty >/dev/null 2>&1 || missing+=(texlive-latex-recommended)
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
