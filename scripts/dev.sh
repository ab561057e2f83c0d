#!/usr/bin/env bash
# npm run dev: the local database (demo data when empty), the fake mail server and the Vite dev
# server (hot reload) on http://localhost:${PORT:-3000}.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh
ensure_node_modules
trap 'bash scripts/mariadb.sh stop' EXIT
trap 'exit 130' INT TERM
bash scripts/mariadb.sh start
node_modules/.bin/tsx scripts/migrate.ts
[ -z "${SMTP_URL:-}" ] && node_modules/.bin/tsx scripts/seed.ts --if-empty
NODE_ENV=development node_modules/.bin/tsx server/index.ts
