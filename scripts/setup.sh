#!/usr/bin/env bash
# Installs what a fresh Debian 12 machine lacks for LaneBaseline: the native libraries OpenCV links
# (GTK 3), fonts for plot text, and headless Chromium for the report's browser test.
# Idempotent: packages already present are skipped, so repeated runs cost a second.
set -euo pipefail
# Set LANEBASELINE_NO_BROWSER=1 to skip Chromium (only the report's browser test needs it; containers skip it).
pkgs=(libgtk-3-0 fonts-dejavu-core)
[ "${LANEBASELINE_NO_BROWSER:-0}" = 1 ] || pkgs+=(chromium)
need=()
for pkg in "${pkgs[@]}"; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || need+=("$pkg")
done
if [ "${#need[@]}" -gt 0 ]; then
  SUDO=""
  [ "$(id -u)" = 0 ] || SUDO="sudo"
  echo "setup: installing ${need[*]}" >&2
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi
[ "${SKIP_DOTNET_CHECK:-0}" = 1 ] || command -v dotnet >/dev/null || { echo "setup: the .NET 10 SDK is required (dotnet not on PATH)" >&2; exit 1; }
