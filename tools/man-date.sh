#!/bin/sh
# The date on the manual pages, reproducibly: SOURCE_DATE_EPOCH when set,
# else the day of the last commit, else the day meson.build was last
# changed (a release archive keeps it); always in UTC.
# usage: man-date.sh SOURCE_ROOT
cd "$1" || exit 1
if [ -n "${SOURCE_DATE_EPOCH:-}" ]; then
	date -u -d "@$SOURCE_DATE_EPOCH" +%Y-%m-%d && exit 0
	echo "man-date.sh: SOURCE_DATE_EPOCH='$SOURCE_DATE_EPOCH' is not a time" >&2
	exit 1
fi
day=$(TZ=UTC git log -1 --format=%cd --date=format-local:%Y-%m-%d 2>/dev/null)
[ -n "$day" ] || day=$(date -u -r meson.build +%Y-%m-%d)
echo "$day"
