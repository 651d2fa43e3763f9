#!/bin/sh
# Runs every fuzz target for SECONDS of wall-clock time each, all at the
# same time, and keeps the growing corpus between runs.
#
#   sh tests/fuzz/run.sh SECONDS [TARGET]
#
# The work folder (objects, corpus-TARGET/, artifacts-TARGET/, the logs and
# one result-TARGET line per target with executions, seconds and new
# findings) is $HL_FUZZ_WORKDIR, by default ~/.cache/hiplever-fuzz; a later
# run starts from the corpus the earlier one left there.  A finding is left
# in artifacts-TARGET/: fix it and copy the input into
# tests/fuzz/regressions/TARGET/ so that the replay test keeps it.
#
# Exit status: 0 no finding, 1 a finding, 2 bad arguments, 77 no clang.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
if [ $# -lt 1 ] || [ $# -gt 2 ]; then
  echo "usage: sh tests/fuzz/run.sh SECONDS [TARGET]" >&2
  exit 2
fi
case "$1" in
''|*[!0-9]*|0) echo "run.sh: SECONDS must be a positive whole number" >&2; exit 2 ;;
esac
workdir=${HL_FUZZ_WORKDIR:-${XDG_CACHE_HOME:-$HOME/.cache}/hiplever-fuzz}
exec sh "$here/run-fuzz.sh" --seconds "$1" --target "${2:-all}" \
  --workdir "$workdir" --parallel
