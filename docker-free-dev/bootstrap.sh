#!/usr/bin/env bash
# Installs what a fresh Debian machine lacks: PostgreSQL from Debian's packages and the npm packages.
set -euo pipefail
cd "$(dirname "$0")/.."

have_pg_ctl() {
  command -v pg_ctl >/dev/null 2>&1 || compgen -G '/usr/lib/postgresql/*/bin/pg_ctl' >/dev/null
}

if ! have_pg_ctl; then
  if [ "$(id -u)" -ne 0 ]; then
    echo "PostgreSQL is not installed (pg_ctl not found). Install it as root with: apt-get install -y postgresql" >&2
    exit 1
  fi
  echo "Installing PostgreSQL from Debian's packages…"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  # Our scripts run their own cluster on 127.0.0.1; Debian's default cluster would also listen on ::1.
  apt-get install -y -qq postgresql-common >/dev/null
  conf=/etc/postgresql-common/createcluster.conf
  sed -i '/^\s*#\?\s*create_main_cluster/d' "$conf"
  echo "create_main_cluster = false" >> "$conf"
  apt-get install -y -qq postgresql >/dev/null
fi

# Installed packages are stamped with the lock file they came from, so a checkout that only touched the
# lock's date (a branch switch, a rebase) does not reinstall, and one whose lock changed always does.
lock_sum=$(sha256sum package-lock.json | cut -d' ' -f1)
stamp=node_modules/.installed-from-lock
if [ -L node_modules ]; then
  : # A linked node_modules belongs to another checkout, which installs it.
elif [ ! -d node_modules ] || [ "$(cat "$stamp" 2>/dev/null)" != "$lock_sum" ]; then
  echo "Installing npm packages (npm ci)…"
  npm ci --no-audit --no-fund
  echo "$lock_sum" > "$stamp"
fi
