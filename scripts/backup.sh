#!/usr/bin/env bash
# npm run db:backup [-- --out DIR]
# Dumps the database named by DATABASE_URL (or the private instance's) to
# DIR/plumbline-<database>-<UTC time>.sql.gz beside a .sha256 file (default DIR: DATA_DIR/backups).
# Media files are not in the dump: they live in the media store and need their own copy (decision 068).
CALLER_PWD="$PWD"
source "$(dirname "$0")/lib.sh"
source "$(dirname "$0")/db-client.sh"

out=""
while [ $# -gt 0 ]; do
  case "$1" in
    --out) [ $# -ge 2 ] || fail "--out needs a directory"; out="$(caller_path "$2")"; shift 2 ;;
    --out=*) out="$(caller_path "${1#--out=}")"; shift ;;
    -h|--help) sed -n '2,5p' "$0" | sed 's/^# \{0,1\}//'; exit 0 ;;
    *) fail "unknown argument: $1 (usage: scripts/backup.sh [--out DIR])" ;;
  esac
done
out="${out:-$DATA_DIR/backups}"

start_db_client
db="$DB_URL_NAME"
[ -n "$db" ] || fail "DATABASE_URL names no database"
check_db_name "$db"
mkdir -p "$out"
name="plumbline-$db-$(date -u +%Y%m%dT%H%M%SZ).sql.gz"
partial="$out/.$name.partial"
trap 'rm -f "$partial"; finish_db_client' EXIT

step "Dumping $db (one consistent InnoDB snapshot; no table locks) to $out/$name"
# --single-transaction: a REPEATABLE READ snapshot, so writes go on during the dump (and on a Galera
# node no global read lock stalls the cluster). --hex-blob keeps binary columns byte-exact.
# Named database without --databases: the dump has no CREATE DATABASE/USE, so it restores into any name.
(umask 077; db_dump --single-transaction --routines --triggers --events --hex-blob \
  --default-character-set=utf8mb4 "$db" | gzip -6 >"$partial")
mv "$partial" "$out/$name"
(cd "$out" && sha256sum "$name" >"$name.sha256")
size="$(du -h "$out/$name" | cut -f1)"
step "Backup written: $out/$name ($size) and $name.sha256"
printf '%s\n' "$out/$name"
