#!/usr/bin/env bash
# `npm run chaos`: kills Brink and stops its database under load, then checks that nothing was lost
# (server/src/cli/chaos.ts; options after `--`, e.g. `npm run chaos -- --short`). Everything runs on
# 127.0.0.1 in a throw-away cluster under /tmp and is removed afterwards.
source "$(dirname "$0")/lib.sh"
ensure_node_modules
ensure_postgres
exec npx tsx server/src/cli/chaos.ts "$@"
