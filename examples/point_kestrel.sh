#!/usr/bin/env bash
# Invented scenario: Tidewater Rocketworks sizes the "Kestrel-2" upper-stage engine,
# LOX/RP-1 at 70 bar with an area ratio of 60, shifting equilibrium, vacuum Isp.
set -euo pipefail
perfchain point --oxidizer LOX --fuel RP-1 --mixture-ratio 2.4 \
  --chamber-pressure "70 bar" --area-ratio 60 --ambient-pressure "0 Pa" --flow shifting "$@"
