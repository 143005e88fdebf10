#!/usr/bin/env bash
# npm start: build the client, then start PostgreSQL, mail, API and worker with demo data.
set -euo pipefail
cd "$(dirname "$0")/.."
npx vite build --logLevel warn
exec node --import tsx scripts/stack.ts
