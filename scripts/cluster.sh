#!/usr/bin/env bash
# A three-node MariaDB Galera cluster on loopback, for the cluster test (npm run test:cluster).
#   bash scripts/cluster.sh start | stop | status
# Nodes run as the mysql user (rsync state transfer fails as root), each with its own port,
# socket, pid file and data directory under .data/cluster/. Node 1 bootstraps the cluster.
. "$(dirname "$0")/lib.sh"
export PATH="$PATH:/usr/sbin"
BASE="$ROOT/.data/cluster"
NODES=(1 2 3)
SQL_PORT() { echo $((3330 + $1)); }
GCOMM_PORT() { echo $((4560 + $1)); }
IST_PORT() { echo $((4570 + $1)); }
SST_PORT() { echo $((4580 + $1)); }
ADDRESS="gcomm://127.0.0.1:$(GCOMM_PORT 1),127.0.0.1:$(GCOMM_PORT 2),127.0.0.1:$(GCOMM_PORT 3)"

sock() { echo "$BASE/node$1.sock"; }
ping_node() { mariadb-admin --no-defaults --socket="$(sock "$1")" -uroot ping >/dev/null 2>&1; }

install_if_missing() {
  if [ ! -f /usr/lib/galera/libgalera_smm.so ] || ! command -v rsync >/dev/null 2>&1; then apt_install galera-4 rsync mariadb-server mariadb-client; fi
}

start_node() {
  local n=$1; shift
  local dir="$BASE/node$n"
  if ping_node "$n"; then say "node $n already running"; return 0; fi
  if [ ! -d "$dir/mysql" ]; then
    mkdir -p "$dir"; chown mysql:mysql "$dir"
    mariadb-install-db --no-defaults --datadir="$dir" --user=mysql --auth-root-authentication-method=socket --skip-test-db >/dev/null
    chown -R mysql:mysql "$dir"
  fi
  rm -f "$BASE/node$n.pid"
  nohup mariadbd --no-defaults --user=mysql --datadir="$dir" --socket="$(sock "$n")" --pid-file="$BASE/node$n.pid" \
    --port="$(SQL_PORT "$n")" --bind-address=127.0.0.1 --log-error="$BASE/node$n.log" --skip-name-resolve \
    --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --binlog-format=ROW --default-storage-engine=InnoDB --innodb-autoinc-lock-mode=2 \
    --wsrep-on=ON --wsrep-provider=/usr/lib/galera/libgalera_smm.so \
    --wsrep-cluster-address="$ADDRESS" --wsrep-cluster-name=plateau_test_cluster \
    --wsrep-node-address="127.0.0.1:$(GCOMM_PORT "$n")" --wsrep-node-name="node$n" \
    --wsrep-provider-options="gmcast.listen_addr=tcp://127.0.0.1:$(GCOMM_PORT "$n");ist.recv_addr=127.0.0.1:$(IST_PORT "$n")" \
    --wsrep-sst-receive-address="127.0.0.1:$(SST_PORT "$n")" --wsrep-sst-method=rsync "$@" >/dev/null 2>&1 &
  for _ in $(seq 1 300); do ping_node "$n" && break; kill -0 $! 2>/dev/null || break; sleep 0.2; done
  ping_node "$n" || { say "node $n did not start; see $BASE/node$n.log"; tail -30 "$BASE/node$n.log"; exit 1; }
  # Wait until the node is synced with the cluster.
  for _ in $(seq 1 300); do
    state=$(mariadb --no-defaults --socket="$(sock "$n")" -uroot -N -e "SHOW STATUS LIKE 'wsrep_local_state_comment'" 2>/dev/null | awk '{print $2}')
    [ "$state" = "Synced" ] && break; sleep 0.2
  done
  say "node $n up on 127.0.0.1:$(SQL_PORT "$n") ($state)"
}

start() {
  install_if_missing
  mkdir -p "$BASE"; chmod 755 "$ROOT/.data"; chown mysql:mysql "$BASE"
  if ping_node 1 || ping_node 2 || ping_node 3; then
    for n in "${NODES[@]}"; do start_node "$n"; done
  else
    start_node 1 --wsrep-new-cluster
    start_node 2
    start_node 3
  fi
  mariadb --no-defaults --socket="$(sock 1)" -uroot -e "
    CREATE USER IF NOT EXISTS '$DB_APP_USER'@'127.0.0.1' IDENTIFIED BY '$DB_APP_PASSWORD';
    GRANT ALL PRIVILEGES ON \`plateau%\`.* TO '$DB_APP_USER'@'127.0.0.1';"
  size=$(mariadb --no-defaults --socket="$(sock 1)" -uroot -N -e "SHOW STATUS LIKE 'wsrep_cluster_size'" | awk '{print $2}')
  say "Galera cluster size: $size"
}

stop_node() {
  local n=$1
  if ping_node "$n"; then mariadb-admin --no-defaults --socket="$(sock "$n")" -uroot shutdown; fi
}

stop() { for n in 3 2 1; do stop_node "$n"; done; say "cluster stopped"; }

case "${1:-status}" in
  start) start ;;
  stop) stop ;;
  start-node) start_node "$2" ;;
  stop-node) stop_node "$2" ;;
  status) for n in "${NODES[@]}"; do if ping_node "$n"; then echo "node $n up"; else echo "node $n down"; fi; done ;;
  *) echo "usage: cluster.sh start|stop|status|start-node N|stop-node N"; exit 2 ;;
esac
