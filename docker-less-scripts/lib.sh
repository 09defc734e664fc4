#!/usr/bin/env bash
# Shared steps of start.sh, test.sh and dev.sh: install what is missing, run PostgreSQL on loopback.
# Sourced, not run. Everything here works as root (as on CI) and as an ordinary user.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

say() { printf '\033[1m[brink]\033[0m %s\n' "$*"; }

as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo "$@"; fi; }

apt_install() {
  say "installing Debian packages: $*"
  export DEBIAN_FRONTEND=noninteractive
  if [ -z "${BRINK_APT_UPDATED:-}" ]; then as_root apt-get update -qq; BRINK_APT_UPDATED=1; fi
  as_root apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

# npm packages: `npm ci` when node_modules is missing or was installed from another lock file
# (compared by content, so a checkout that only touches the file's time does not reinstall).
ensure_node_modules() {
  local want have
  want="$(sha256sum package-lock.json | cut -d' ' -f1)"
  have="$(cat node_modules/.brink-lock-sha256 2>/dev/null || true)"
  if [ ! -d node_modules ] || [ "$want" != "$have" ]; then
    if [ -d node_modules ] && [ -z "$have" ] && [ -f node_modules/.package-lock.json ] && [ ! package-lock.json -nt node_modules/.package-lock.json ]; then
      echo "$want" >node_modules/.brink-lock-sha256; return
    fi
    say "installing npm packages (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" >node_modules/.brink-lock-sha256
  fi
}

# Finds PostgreSQL's server programs (Debian keeps them off PATH), installing them when absent.
find_pg_bin() {
  local d
  if command -v initdb >/dev/null 2>&1 && command -v pg_ctl >/dev/null 2>&1; then
    dirname "$(readlink -f "$(command -v pg_ctl)")"; return
  fi
  for d in $(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V -r); do
    if [ -x "$d/initdb" ] && [ -x "$d/pg_ctl" ]; then echo "$d"; return; fi
  done
  return 1
}

ensure_postgres() {
  if ! PG_BIN="$(find_pg_bin)"; then
    apt_install postgresql
    PG_BIN="$(find_pg_bin)" || { echo "PostgreSQL could not be installed" >&2; exit 1; }
  fi
  export PG_BIN
}

ensure_chromium() {
  if [ ! -x /usr/bin/chromium ]; then apt_install chromium fonts-dejavu-core; fi
}

# Runs a PostgreSQL program as the owner of the cluster (PostgreSQL refuses to run as root).
pg_run() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

# load_env_file FILE: exports each KEY=value of the file unless KEY is already set, so that
# `PORT=4000 npm start` wins over the file.
load_env_file() {
  local line key
  while IFS= read -r line || [ -n "$line" ]; do
    [[ "$line" =~ ^[A-Z_][A-Z0-9_]*= ]] || continue
    key="${line%%=*}"
    if [ -z "${!key+x}" ]; then eval "export $line"; fi
  done <"$1"
}

free_port() {
  node -e 'const s=require("net").createServer();s.listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close()})'
}

port_is_free() {
  node -e 'const s=require("net").createServer();s.once("error",()=>process.exit(1));s.listen(Number(process.argv[1]),"127.0.0.1",()=>s.close(()=>process.exit(0)))' "$1"
}

# start_fake_push LOG: the local fake push service (server/src/push/fake-service.ts, web-push-testing)
# on a free 127.0.0.1 port, in the background; exports PUSH_FAKE_SERVICE_URL and sets FAKE_PUSH_PID.
# The caller stops it (kill "$FAKE_PUSH_PID").
start_fake_push() {
  local port; port="$(free_port)"
  node --import tsx server/src/push/fake-service.ts "$port" >"$1" 2>&1 &
  FAKE_PUSH_PID=$!
  export PUSH_FAKE_SERVICE_URL="http://127.0.0.1:$port"
  wait_for_local_service "$FAKE_PUSH_PID" "$1" "the fake push service" \
    'fetch(process.argv[1]+"/status",{method:"POST"}).then(r=>process.exit(r.ok?0:1),()=>process.exit(1))' "$PUSH_FAKE_SERVICE_URL"
}

# wait_for_local_service PID LOG WHAT JS ARG: until `node -e JS ARG` succeeds (up to 30 s); fails
# with the log when the process PID has died, or when it does not answer in time.
wait_for_local_service() {
  local pid="$1" log="$2" what="$3" js="$4" arg="$5"
  for _ in $(seq 1 60); do
    if node -e "$js" "$arg"; then return 0; fi
    if ! kill -0 "$pid" 2>/dev/null; then cat "$log" >&2; return 1; fi
    sleep 0.5
  done
  echo "$what did not start" >&2; return 1
}

# start_fake_s3 DIR LOG: the local S3-compatible object store (server/src/files/fake-s3.ts, s3rver)
# on a free 127.0.0.1 port, its objects under DIR, in the background, when STORAGE=s3 and no
# S3_ENDPOINT is set; exports S3_ENDPOINT and the fake's key pair and sets FAKE_S3_PID. The caller
# stops it (kill "$FAKE_S3_PID").
start_fake_s3() {
  FAKE_S3_PID=""
  if [ "${STORAGE:-disk}" != s3 ] || [ -n "${S3_ENDPOINT:-}" ]; then return 0; fi
  local port; port="$(free_port)"
  mkdir -p "$1"
  node --import tsx server/src/files/fake-s3.ts "$1" "$port" >"$2" 2>&1 &
  FAKE_S3_PID=$!
  export S3_ENDPOINT="http://127.0.0.1:$port" S3_ACCESS_KEY_ID=S3RVER S3_SECRET_ACCESS_KEY=S3RVER
  wait_for_local_service "$FAKE_S3_PID" "$2" "the fake S3 store" 'fetch(process.argv[1]).then(()=>process.exit(0),()=>process.exit(1))' "$S3_ENDPOINT"
}

# init_cluster DIR PWFILE: a new cluster owned by the user who will run it, with a random password for
# the `brink` role, kept in PWFILE (readable only by us; made when missing).
init_cluster() {
  local dir="$1" pwfile="$2"
  mkdir -p "$dir"
  if [ ! -f "$pwfile" ]; then
    node -e 'console.log(require("crypto").randomBytes(18).toString("hex"))' >"$pwfile"
    chmod 600 "$pwfile"
  fi
  if [ ! -f "$dir/PG_VERSION" ]; then
    say "creating a PostgreSQL cluster in $dir"
    local tmppw; tmppw="$(mktemp)"; cp "$pwfile" "$tmppw"
    if [ "$(id -u)" = 0 ]; then
      id postgres >/dev/null 2>&1 || useradd --system --home /var/lib/postgresql --shell /bin/bash postgres
      chown -R postgres:postgres "$dir" "$tmppw"
      # the cluster's owner must be able to reach the folder
      chmod o+x "$(dirname "$dir")"
    fi
    pg_run "$PG_BIN/initdb" -D "$dir" -U brink --pwfile="$tmppw" --auth-host=scram-sha-256 --auth-local=scram-sha-256 \
      -E UTF8 --no-locale >/dev/null
    rm -f "$tmppw"
  fi
}

# start_cluster DIR PORT: PostgreSQL on 127.0.0.1:PORT only, its socket kept inside DIR.
start_cluster() {
  local dir="$1" port="$2"
  pg_run "$PG_BIN/pg_ctl" -D "$dir" -l "$dir/server.log" -w -t 60 \
    -o "-p $port -c listen_addresses=127.0.0.1 -k $dir -c max_connections=100 -c fsync=${PG_FSYNC:-on}" start >/dev/null
}

stop_cluster() {
  local dir="$1"
  if [ -f "$dir/postmaster.pid" ]; then pg_run "$PG_BIN/pg_ctl" -D "$dir" -m fast -w stop >/dev/null 2>&1 || true; fi
}

# create_database URL_BASE NAME: creates the database when it does not exist.
ensure_database() {
  local port="$1" pw="$2" name="$3"
  PGPASSWORD="$pw" node -e '
    const pg=require("pg");
    const c=new pg.Client({host:"127.0.0.1",port:+process.argv[1],user:"brink",database:"postgres",password:process.env.PGPASSWORD});
    (async()=>{await c.connect();const r=await c.query("select 1 from pg_database where datname=$1",[process.argv[2]]);
    if(!r.rowCount){await c.query(`create database "${process.argv[2]}"`);}await c.end();})().catch(e=>{console.error(e.message);process.exit(1)})' "$port" "$name"
}

# supervise CMD...: runs the server and, whenever it dies other than by a clean stop (exit 0), logs
# it and starts it again after a back-off of 1, 2, 4 … s up to BRINK_RESTART_MAX_DELAY (30 s; back to
# 1 s once a run has lasted a minute). BRINK_PID_FILE, when set, gets the running server's pid.
# Ctrl-C or SIGTERM stops the server and returns.
supervise() {
  local pid="" code started ran delay=1 max="${BRINK_RESTART_MAX_DELAY:-30}" stopping="" nap=""
  trap 'stopping=1; [ -n "$pid" ] && kill -TERM "$pid" 2>/dev/null; [ -n "$nap" ] && kill "$nap" 2>/dev/null; true' INT TERM
  while :; do
    started=$SECONDS
    "$@" &
    pid=$!
    if [ -n "${BRINK_PID_FILE:-}" ]; then echo "$pid" >"$BRINK_PID_FILE"; fi
    code=0
    # `wait` returns early when a signal is trapped: wait until the server itself has gone.
    while kill -0 "$pid" 2>/dev/null; do wait "$pid" && code=0 || code=$?; done
    pid=""
    if [ -n "$stopping" ]; then break; fi
    if [ "$code" = 0 ]; then say "Brink stopped"; break; fi
    ran=$((SECONDS - started))
    if [ "$ran" -ge 60 ]; then delay=1; fi
    say "$(date -u +%Y-%m-%dT%H:%M:%SZ) Brink exited (code $code$([ "$code" -gt 128 ] && echo ", signal $((code - 128))")) after ${ran} s; restarting in ${delay} s" >&2
    sleep "$delay" &
    nap=$!
    wait "$nap" 2>/dev/null || true
    nap=""
    if [ -n "$stopping" ]; then break; fi
    delay=$((delay * 2 > max ? max : delay * 2))
  done
  trap - INT TERM
}

# throwaway_cluster NAME: a new PostgreSQL cluster in a fresh folder under /tmp ($WORK), on a free
# loopback port ($PGPORT, the `brink` role's password in $PW), stopped and removed with the folder
# when the script exits, also on failure or Ctrl-C. A script that starts more defines
# `before_cleanup` to stop it first.
throwaway_cluster() {
  WORK="$(mktemp -d "/tmp/brink-$1.XXXXXX")"
  chmod 755 "$WORK"
  trap _throwaway_cleanup EXIT INT TERM
  init_cluster "$WORK/pg" "$WORK/pg-password"
  PGPORT="$(free_port)"
  PG_FSYNC=off start_cluster "$WORK/pg" "$PGPORT"
  PW="$(cat "$WORK/pg-password")"
}

_throwaway_cleanup() {
  local code=$?
  set +e
  if declare -F before_cleanup >/dev/null; then before_cleanup; fi
  stop_cluster "$WORK/pg"
  rm -rf "$WORK"
  exit "$code"
}
