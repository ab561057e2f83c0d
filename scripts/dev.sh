#!/usr/bin/env bash
# npm run dev: the local database and the Vite dev server (hot reload) on http://localhost:${PORT:-3000}.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh
ensure_node_modules
trap 'bash scripts/mariadb.sh stop' EXIT
trap 'exit 130' INT TERM
bash scripts/mariadb.sh start
node_modules/.bin/tsx scripts/migrate.ts
NODE_ENV=development node_modules/.bin/tsx server/index.ts
