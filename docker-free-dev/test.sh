#!/usr/bin/env bash
set -euo pipefail
cd "$(dirname "$0")/.."
bash docker-free-dev/bootstrap.sh
exec node_modules/.bin/tsx docker-free-dev/test.ts "$@"
