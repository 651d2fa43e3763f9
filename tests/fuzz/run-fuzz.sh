#!/bin/sh
# Builds the fuzz targets with clang (libFuzzer, AddressSanitizer,
# UndefinedBehaviorSanitizer) through meson, in a build of their own with
# -Dfuzzing=true (so they link exactly what the core links: GLib, GSL,
# libxml2, the image libraries, GDCM), and runs them.
#
#   sh tests/fuzz/run-fuzz.sh [--seconds N] [--target NAME|all]
#                             [--workdir DIR] [--parallel]
#
# --seconds   run time of each target (default 30: the CI short run of
#             about 60 s for both)
# --target    one target (tests/fuzz/hl-fuzz-NAME.c) or all of them
# --parallel  run the targets at the same time instead of one after the
#             other (each still for --seconds of wall-clock time)
# --workdir   where the fuzz build (WORKDIR/build), the growing corpus and
#             crash files go (default /tmp/hiplever-fuzz); reused between
#             runs, so a long run keeps its corpus
#
# Seeds: data/examples/*.hlplan and tests/fuzz/regressions/load for the
# loader; tests/fuzz/corpus/core and tests/fuzz/regressions/core for the
# core.  The seed folders are only read.  A crashing input is left in
# WORKDIR/artifacts-TARGET/; copy it into tests/fuzz/regressions/TARGET/ so
# that the replay test (suite core) keeps it.
#
# Needs clang and its runtime (Debian 12: clang libclang-rt-14-dev).  When
# they are missing the script exits 77, which meson reports as a skip.
set -eu

here=$(cd "$(dirname "$0")/../.." && pwd)
seconds=30
target=all
workdir=/tmp/hiplever-fuzz
parallel=0

while [ $# -gt 0 ]; do
  case "$1" in
  --seconds) seconds=$2; shift 2 ;;
  --target) target=$2; shift 2 ;;
  --workdir) workdir=$2; shift 2 ;;
  --parallel) parallel=1; shift ;;
  *) echo "run-fuzz: unknown argument $1" >&2; exit 2 ;;
  esac
done
# Every tests/fuzz/hl-fuzz-NAME.c but the replay driver is a target.
all_targets=$(for f in "$here"/tests/fuzz/hl-fuzz-*.c; do
  n=$(basename "$f" .c); n=${n#hl-fuzz-}
  [ "$n" = replay ] || printf '%s ' "$n"
done)
case "$target" in
all) targets=$all_targets ;;
*)
  case " $all_targets " in
  *" $target "*) targets=$target ;;
  *) echo "run-fuzz: --target must be one of: $all_targets all" >&2; exit 2 ;;
  esac ;;
esac
case "$seconds" in
''|*[!0-9]*) echo "run-fuzz: --seconds must be a whole number" >&2; exit 2 ;;
esac

cc=${FUZZ_CC:-clang}
mkdir -p "$workdir"
cd "$workdir"

if ! command -v "$cc" >/dev/null 2>&1; then
  echo "run-fuzz: $cc not found: apt-get install clang libclang-rt-14-dev" >&2
  exit 77
fi
printf 'int LLVMFuzzerTestOneInput(const char *d, unsigned long n)\n{ return d && n; }\n' > probe.c
if ! "$cc" -fsanitize=fuzzer,address,undefined probe.c -o probe 2>probe.log; then
  echo "run-fuzz: $cc cannot build a libFuzzer target: apt-get install libclang-rt-14-dev" >&2
  cat probe.log >&2
  exit 77
fi


# An XML dictionary from the schema's names, so that the loader target
# builds well-formed plans quickly.
{
  for tok in '<?xml version="1.0" encoding="UTF-8"?>' '<!DOCTYPE' '<!ENTITY' \
             'SYSTEM' '<![CDATA[' ']]>' '&amp;' '&#x0;' 'xmlns=' 'urn:hiplever:plan' \
             'encoding="UTF-16"' '="' '">' '</' '/>' 'nan' 'inf' '-0' '1e308' \
             '0x1p-1074' 'true' 'false' 'right' 'left'; do
    printf '"%s"\n' "$(printf '%s' "$tok" | sed 's/\\/\\\\/g; s/"/\\"/g')"
  done
  grep -o 'name="[^"]*"' "$here/data/hiplever-plan.xsd" | sed 's/name="\([^"]*\)"/\1/' \
    | sort -u | while read -r n; do
      printf '"<%s"\n"%s=\\""\n' "$n" "$n"
    done
} > plan.dict

cxx=${FUZZ_CXX:-clang++}
# A work folder reused for another source tree gets a new build.
if [ -f build/source-tree ] && [ "$(cat build/source-tree)" != "$here" ]; then
  rm -rf build
fi
if [ ! -f build/build.ninja ]; then
  CC=$cc CXX=$cxx nice -n 10 meson setup build "$here" -Dfuzzing=true \
    -Db_sanitize=address,undefined -Db_lundef=false -Dtest_hooks=false \
    -Dc_args=-fno-sanitize-recover=undefined >meson-setup.log 2>&1 || {
    cat meson-setup.log >&2
    echo "run-fuzz: the fuzz build could not be configured" >&2
    exit 1
  }
  printf '%s\n' "$here" > build/source-tree
fi
ninja_targets=""
for t in $targets; do
  ninja_targets="$ninja_targets tests/fuzz-$t"
done
# shellcheck disable=SC2086
nice -n 10 ninja -C build $ninja_targets >ninja.log 2>&1 || {
  tail -n 40 ninja.log >&2
  echo "run-fuzz: the fuzz targets did not build" >&2
  exit 1
}
for t in $targets; do
  ln -sf "build/tests/fuzz-$t" "fuzz-$t"
done

# run_target T: runs target T, writes its figures to result-T and
# returns nonzero on a finding.
run_target () {
  t=$1
  mkdir -p "corpus-$t" "artifacts-$t"
  seeds=""
  for d in "$here/tests/fuzz/corpus/$t" "$here/tests/fuzz/regressions/$t"; do
    [ -d "$d" ] && seeds="$seeds $d"
  done
  asan_extra=""
  timeout=10
  case $t in
  load)
    [ -d "$here/data/examples" ] && seeds="$seeds $here/data/examples"
    extra="-dict=plan.dict -max_len=65536"
    ;;
  core) extra="-max_len=2048" ;;
  # The image target's DICOM files are read by GDCM in a child process
  # (core/hl-dicom.cpp), which may ask for more than -rss_limit_mb before
  # it dies; libFuzzer's malloc limit would count that as the parent's.
  # Under AddressSanitizer the child has no address-space limit (the
  # shadow memory needs it): the allocator's own cap stands in for it,
  # just above the 1 GiB decoded-size cap.  Every input forks a reader, so
  # an input gets 30 s before it counts as a hang (the reader's own limit
  # is 60 s): a busy machine slows a fork and a large allocation a lot.
  image) extra="-max_len=1048576 -malloc_limit_mb=8192"
         timeout=30
         asan_extra=":max_allocation_size_mb=1100:allocator_may_return_null=1" ;;
  *) extra="-max_len=1048576" ;;
  esac
  echo "run-fuzz: $t for $seconds s"
  before=$(ls "artifacts-$t" | wc -l)
  start=$(date +%s)
  # -rss_limit_mb and -timeout make a memory blow-up or a hang a finding.
  # shellcheck disable=SC2086
  if LC_ALL=C TZ=UTC ASAN_OPTIONS="detect_leaks=1${asan_extra:-}" \
     UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
     nice -n "${FUZZ_NICE:-10}" "./fuzz-$t" -max_total_time="$seconds" -timeout="$timeout" \
       -rss_limit_mb=512 -print_final_stats=1 -artifact_prefix="artifacts-$t/" \
       $extra "corpus-$t" $seeds > "fuzz-$t.log" 2>&1; then
    result="no crash, hang or leak"
    rc=0
  else
    result="FAILED: see $workdir/fuzz-$t.log and $workdir/artifacts-$t/"
    rc=1
    tail -n 60 "fuzz-$t.log" >&2
  fi
  end=$(date +%s)
  execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "fuzz-$t.log" | tail -n 1)
  findings=$(( $(ls "artifacts-$t" | wc -l) - before ))
  line="run-fuzz: $t: ${execs:-?} executions in $((end - start)) s, corpus $(ls "corpus-$t" | wc -l) files, $findings new findings: $result"
  echo "$line" | tee "result-$t"
  return $rc
}

status=0
if [ "$parallel" = 1 ]; then
  pids=""
  for t in $targets; do
    run_target "$t" &
    pids="$pids $!"
  done
  for p in $pids; do
    wait "$p" || status=1
  done
else
  for t in $targets; do
    run_target "$t" || status=1
  done
fi
exit $status
