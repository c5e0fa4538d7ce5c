#!/usr/bin/env bash
# npm run db:restore -- FILE.sql.gz [--database NAME] [--force]
# Restores a dump made by scripts/backup.sh into NAME (default: the database DATABASE_URL names).
# The checksum beside the dump is verified first; a database that has tables is refused unless
# --force, which drops it and creates it again. Media files are restored separately (decision 068).
CALLER_PWD="$PWD"
source "$(dirname "$0")/lib.sh"
source "$(dirname "$0")/db-client.sh"

file="" target="" force=0
while [ $# -gt 0 ]; do
  case "$1" in
    --database) [ $# -ge 2 ] || fail "--database needs a name"; target="$2"; shift 2 ;;
    --database=*) target="${1#--database=}"; shift ;;
    --force) force=1; shift ;;
    -h|--help) sed -n '2,5p' "$0" | sed 's/^# \{0,1\}//'; exit 0 ;;
    -*) fail "unknown option: $1" ;;
    *) [ -z "$file" ] || fail "one dump at a time (also given: $1)"; file="$(caller_path "$1")"; shift ;;
  esac
done
[ -n "$file" ] || fail "usage: scripts/restore.sh FILE.sql.gz [--database NAME] [--force]"
[ -f "$file" ] || fail "no such dump: $file"

# Everything about the file is checked before the database is touched.
sum_file="$file.sha256"
[ -f "$sum_file" ] || fail "no checksum file beside the dump ($sum_file): nothing was restored"
expected="$(cut -d' ' -f1 <"$sum_file")"
actual="$(sha256sum "$file" | cut -d' ' -f1)"
[ "$expected" = "$actual" ] || fail "checksum mismatch: $file is damaged or incomplete (sha256 $actual, $sum_file says $expected); nothing was restored"
gzip -t "$file" 2>/dev/null || fail "$file is not a whole gzip file; nothing was restored"
step "Checksum verified ($expected)"

start_db_client
target="${target:-$DB_URL_NAME}"
[ -n "$target" ] || fail "name the database to restore into: --database NAME"
check_db_name "$target"

tables="$(db_sql -N -B -e "SELECT COUNT(*) FROM information_schema.TABLES WHERE TABLE_SCHEMA = '$target'")"
if [ "$tables" != "0" ]; then
  [ "$force" = "1" ] || fail "database $target already has $tables tables: nothing was restored (add --force to drop it and restore over it)"
  step "Dropping $target (--force: it had $tables tables)"
  db_sql -e "DROP DATABASE \`$target\`"
fi
db_sql -e "CREATE DATABASE IF NOT EXISTS \`$target\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci"

step "Restoring $(basename "$file") into $target"
gzip -dc "$file" | db_sql --database="$target"
restored="$(db_sql -N -B -e "SELECT COUNT(*) FROM information_schema.TABLES WHERE TABLE_SCHEMA = '$target'")"
step "Restored $restored tables into $target"
