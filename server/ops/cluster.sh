# PostgreSQL cluster helpers for bootstrap.sh (sourced, not run).
# PostgreSQL refuses to run as root, so as root the cluster runs as the unprivileged system user
# `postgres`; as any other user it runs as that user.

PGBIN=${PGBIN:-/usr/lib/postgresql/15/bin}

as_pg() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

ensure_pg_user() {
  [ "$(id -u)" = 0 ] || return 0
  id postgres >/dev/null 2>&1 || useradd --system --home-dir /var/lib/postgresql --shell /usr/sbin/nologin postgres
}

# A free TCP port on 127.0.0.1.
free_port() {
  node -e "const s=require('net').createServer();s.listen(0,'127.0.0.1',()=>{console.log(s.address().port);s.close()})"
}

port_free() {
  node -e "const s=require('net').createServer();s.once('error',()=>process.exit(1));s.listen($1,'127.0.0.1',()=>s.close(()=>process.exit(0)))"
}

# Can the cluster's user reach (traverse) this folder?
pg_can_enter() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- test -x "$1" 2>/dev/null; else test -x "$1"; fi
}

# cluster_init DIR PASSWORD: a new cluster in DIR whose superuser `tendara` has PASSWORD.
cluster_init() {
  local dir=$1 password=$2 pwfile
  mkdir -p "$dir"
  [ "$(id -u)" = 0 ] && chown postgres: "$dir"
  chmod 700 "$dir"
  pwfile=$(mktemp)
  printf '%s\n' "$password" >"$pwfile"
  [ "$(id -u)" = 0 ] && chown postgres: "$pwfile"
  as_pg "$PGBIN/initdb" -D "$dir" -U tendara --pwfile="$pwfile" --auth=scram-sha-256 \
    --encoding=UTF8 --locale=C.UTF-8 >/dev/null
  rm -f "$pwfile"
}

# cluster_start DIR PORT LOGFILE
cluster_start() {
  local dir=$1 port=$2 log=$3
  touch "$log"; [ "$(id -u)" = 0 ] && chown postgres: "$log"
  as_pg "$PGBIN/pg_ctl" -D "$dir" -l "$log" -w -t 60 \
    -o "-c listen_addresses=127.0.0.1 -p $port -c unix_socket_directories='' -c fsync=${PG_FSYNC:-on}" start >/dev/null
}

cluster_stop() {
  local dir=$1
  [ -f "$dir/postmaster.pid" ] || return 0
  as_pg "$PGBIN/pg_ctl" -D "$dir" -m fast -w stop >/dev/null 2>&1 || true
}

# create_db URL_OF_POSTGRES_DB NAME: creates NAME unless it exists.
create_db() {
  local admin=$1 name=$2
  if [ -z "$(psql "$admin" -tAc "select 1 from pg_database where datname='$name'")" ]; then
    psql "$admin" -q -c "create database \"$name\"" >/dev/null
  fi
}
