#!/usr/bin/env bash
# Sourced by scripts/backup.sh and scripts/restore.sh (after lib.sh): reaches the database named by
# DATABASE_URL (or the private instance's) with Debian's mariadb client tools, never with the
# password on a command line (decision 068).

ensure_mariadb_client() {
  # mariadb-dump and the mariadb client come with mariadb-client (mariadb-server pulls it in).
  apt_install mariadb-dump mariadb-client
  command -v mariadb >/dev/null || fail "the mariadb client is missing after installing mariadb-client"
}

# Resolves DATABASE_URL, starting the private MariaDB when none is set (as `npm start` does).
# Sets STARTED_DB=1 when this call started it; call finish_db_client on the way out.
start_db_client() {
  ensure_mariadb_client
  if [ -z "${DATABASE_URL:-}" ]; then
    ensure_mariadb_binaries
    ensure_private_db >&2
  fi
  # A private directory (mode 700) holds the client option file (mode 600) with the password:
  # an argument would show in `ps`, MYSQL_PWD in /proc/<pid>/environ and in every child's environment.
  DB_CLIENT_DIR="$(mktemp -d "${TMPDIR:-/tmp}/plumbline-db.XXXXXX")"
  chmod 700 "$DB_CLIENT_DIR"
  DB_CLIENT_CNF="$DB_CLIENT_DIR/client.cnf"
  DB_URL_NAME="$(DB_CLIENT_CNF="$DB_CLIENT_CNF" node -e '
    const fs = require("fs");
    const u = new URL(process.env.DATABASE_URL);
    if (u.protocol !== "mysql:") throw new Error("DATABASE_URL must be a mysql:// URL");
    // Option-file values in double quotes; the client undoes \\ and \" (and \n, \t) escapes.
    const q = (s) => "\"" + s.replace(/\\/g, "\\\\").replace(/"/g, "\\\"").replace(/\n/g, "\\n").replace(/\t/g, "\\t") + "\"";
    const lines = ["[client]", "protocol=TCP", `host=${q(u.hostname)}`, `port=${u.port || 3306}`,
      `user=${q(decodeURIComponent(u.username))}`, `password=${q(decodeURIComponent(u.password))}`,
      "default-character-set=utf8mb4"];
    fs.writeFileSync(process.env.DB_CLIENT_CNF, lines.join("\n") + "\n", { mode: 0o600, flag: "wx" });
    process.stdout.write(decodeURIComponent(u.pathname.replace(/^\//, "")));
  ')" || fail "could not read DATABASE_URL"
  trap finish_db_client EXIT
}

finish_db_client() {
  [ -n "${DB_CLIENT_DIR:-}" ] && rm -rf "$DB_CLIENT_DIR"
  DB_CLIENT_DIR=""
  if [ "${STARTED_DB:-0}" = "1" ]; then stop_private_db >&2; STARTED_DB=0; fi
}

# --defaults-file must come first: the client then reads that file only, never /etc/mysql/ or ~/.my.cnf.
db_sql() { mariadb --defaults-file="$DB_CLIENT_CNF" "$@"; }
db_dump() { mariadb-dump --defaults-file="$DB_CLIENT_CNF" "$@"; }

# A database name Plumbline will put between backquotes (letters, digits, _ $ -; at most 64).
check_db_name() {
  [[ "$1" =~ ^[A-Za-z0-9_\$-]{1,64}$ ]] || fail "not a database name Plumbline uses: '$1'"
}

# A path the caller gave, relative to where they ran the command: `npm run db:…` runs in the
# repository and names the caller's directory INIT_CWD; bash scripts/… keeps it as the working directory.
caller_path() {
  local base="$CALLER_PWD"
  case "${npm_lifecycle_event:-}" in db:backup|db:restore) base="${INIT_CWD:-$CALLER_PWD}" ;; esac
  case "$1" in /*) printf '%s' "$1" ;; *) printf '%s/%s' "$base" "$1" ;; esac
}
