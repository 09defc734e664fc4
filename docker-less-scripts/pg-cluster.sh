#!/usr/bin/env bash
# A throw-away PostgreSQL cluster for tests that stop and start their database (the outage API test,
# `npm run chaos`), with the steps of lib.sh (runs as root through the postgres user, as on CI):
#   pg-cluster.sh up DIR PORT      create DIR (cluster, password in DIR.pw) when new, start it on 127.0.0.1:PORT,
#                                  create the database `brink`, print its URL
#   pg-cluster.sh start DIR PORT   start it again;   pg-cluster.sh stop DIR   stop it (fast: cuts connections)
#   pg-cluster.sh destroy DIR      stop it and delete DIR and DIR.pw
source "$(dirname "$0")/lib.sh"
ensure_postgres
cmd="${1:?up|start|stop|destroy}" dir="${2:?cluster folder}"
case "$cmd" in
  up)
    port="${3:?port}"
    mkdir -p "$(dirname "$dir")"
    init_cluster "$dir" "$dir.pw"
    PG_FSYNC=off start_cluster "$dir" "$port"
    ensure_database "$port" "$(cat "$dir.pw")" brink
    echo "postgres://brink:$(cat "$dir.pw")@127.0.0.1:$port/brink"
    ;;
  start) PG_FSYNC=off start_cluster "$dir" "${3:?port}" ;;
  stop) stop_cluster "$dir" ;;
  destroy) stop_cluster "$dir"; rm -rf "$dir" "$dir.pw" ;;
  *) echo "unknown command $cmd" >&2; exit 2 ;;
esac
