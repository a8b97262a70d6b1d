#!/bin/sh
# Installs what `npm start` / `npm test` need and the machine lacks: npm dependencies and
# Debian's MariaDB (and, with --browser, Chromium). Safe to run again: it only fills gaps.
set -e
cd "$(dirname "$0")/../.."

if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[bootstrap] installing npm dependencies (npm ci)"
  npm ci --no-audit --no-fund
fi

need=""
command -v mariadbd >/dev/null 2>&1 || [ -x /usr/sbin/mariadbd ] || need="$need mariadb-server-core"
command -v mariadb >/dev/null 2>&1 || need="$need mariadb-client-core"
if [ "$1" = "--browser" ]; then
  command -v chromium >/dev/null 2>&1 || need="$need chromium"
  command -v pdftotext >/dev/null 2>&1 || need="$need poppler-utils"
fi

if [ -n "$need" ]; then
  echo "[bootstrap] installing Debian packages:$need"
  SUDO=""
  [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends $need
fi
