#!/usr/bin/env bash
# Real-scheduler test of `xylemap batch` sharding: start a single-node Slurm (munged + slurmctld +
# slurmd on localhost, 2 CPUs), submit the emitted 4-task array over the demo trees, wait, merge the
# shard folders and compare the tables with a local single-machine batch. They must be identical.
#
# Usage (from the repository root, as root, after `npm ci` or `npm run build`):
#   bash ci/slurm/run-array-test.sh
# Exit: 0 = tables identical (or Slurm could not start and XYLEMAP_SLURM_REQUIRED is not 1:
# the reason is printed); 1 = the scheduler ran but the results differ or a task failed.
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$(pwd)
MANIFEST=${XYLEMAP_SLURM_MANIFEST:-$ROOT/sample-clouds/manifest.csv}
WORK=$(mktemp -d "${TMPDIR:-/tmp}/xylemap-slurm-test.XXXXXX")
export XYLEMAP_SLURM_STATE="$WORK/slurm"
XY=${XYLEMAP_CMD:-"node $ROOT/dist/cli/main.js"}
T0=$(date +%s)

say() { echo "slurm-test: $*"; }

cleanup() {
  # Stop only the daemons start-slurm.sh started for this test (by pid, newest first), never by name.
  if [ -s "$XYLEMAP_SLURM_STATE/started.pids" ]; then
    tac "$XYLEMAP_SLURM_STATE/started.pids" | while read -r pid; do kill "$pid" 2>/dev/null || true; done
    # Give them up to 10 s to write their state and exit.
    for i in $(seq 1 50); do
      alive=0
      while read -r pid; do kill -0 "$pid" 2>/dev/null && [ "$(ps -o stat= -p "$pid" | cut -c1)" != Z ] && alive=1; done < "$XYLEMAP_SLURM_STATE/started.pids"
      [ "$alive" = 0 ] && break
      sleep 0.2
    done
    : > "$XYLEMAP_SLURM_STATE/started.pids"
  fi
}
trap cleanup EXIT

if [ -z "${XYLEMAP_CMD:-}" ] && [ ! -f "$ROOT/dist/cli/main.js" ]; then say "dist/ missing: run npm run build first"; exit 1; fi
if [ ! -f "$MANIFEST" ]; then
  say "manifest $MANIFEST missing (the demo trees are not there)"
  if [ "${XYLEMAP_SLURM_REQUIRED:-0}" = 1 ]; then exit 1; fi
  say "SKIPPED"
  exit 0
fi

if ! out=$(bash "$ROOT/ci/slurm/start-slurm.sh" 2>&1); then
  say "Slurm could not start here:"
  echo "$out" | sed 's/^/  | /'
  if [ "${XYLEMAP_SLURM_REQUIRED:-0}" = 1 ]; then exit 1; fi
  say "SKIPPED (set XYLEMAP_SLURM_REQUIRED=1 to make this an error)"
  exit 0
fi
echo "$out" | sed 's/^/  | /'

# A small inventory (one row per stem; an unscanned species too) so the upscaling is compared as well.
INVENTORY="$WORK/plots.csv"
printf 'plot_id,plot_area_m2,species,dbh_m\nA,400,oak,0.32\nA,400,oak,0.12\nA,400,birch,0.25\nB,250,spruce,0.41\nB,250,oak,0.55\n' > "$INVENTORY"

say "local batch (2 workers)"
$XY batch "$MANIFEST" --out "$WORK/local" --workers 2 --inventory "$INVENTORY" >/dev/null

say "emit and submit a 4-task array"
$XY batch "$MANIFEST" --out "$WORK/array" --emit-slurm --shard-count 4 --workers 1 --job-mem 2G --job-time 00:20:00 >/dev/null
# Bounded wait: a job that never starts (node down or drained) must not hang CI.
jobid=$(sbatch --parsable "$WORK/array/xylemap-batch.sbatch")
deadline=$(( $(date +%s) + ${XYLEMAP_SLURM_TIMEOUT_S:-900} ))
while squeue -h -j "$jobid" 2>/dev/null | grep -q .; do
  if [ "$(date +%s)" -gt "$deadline" ]; then
    say "array job $jobid not finished after ${XYLEMAP_SLURM_TIMEOUT_S:-900} s:"
    squeue -j "$jobid" || true
    sinfo -N -l || true
    scancel "$jobid" || true
    exit 1
  fi
  sleep 2
done
if ! states=$(scontrol show job "$jobid" 2>/dev/null | grep -o 'JobState=[A-Z_]*' | sort -u | tr '\n' ' '); then states=''; fi
if [ -n "$states" ] && [ "$states" != "JobState=COMPLETED " ]; then
  say "array job $jobid ended with $states; task logs:"
  tail -n 20 "$WORK"/array/logs/* 2>/dev/null || true
  exit 1
fi
say "array job $jobid finished ${states:-(job record already purged)}"
for i in 0 1 2 3; do
  [ -f "$WORK/array/shard-$i/batch.json" ] || { say "shard $i wrote no batch.json; task logs:"; tail -n 20 "$WORK"/array/logs/* 2>/dev/null || true; exit 1; }
done

say "merge the shard folders"
$XY merge "$WORK"/array/shard-* --out "$WORK/array/merged" --inventory "$INVENTORY" >/dev/null

status=0
same=0
differ=0
files="stand.csv species.csv species-pairs.csv species.json stand.json failures.csv"
[ -f "$WORK/local/plots.csv" ] && files="$files plots.csv stems.csv"
for f in $files; do
  if cmp -s "$WORK/local/$f" "$WORK/array/merged/$f"; then
    say "identical: $f"
    same=$((same + 1))
  else
    say "DIFFERENT: $f"
    diff "$WORK/local/$f" "$WORK/array/merged/$f" | head -20 || true
    status=1
    differ=$((differ + 1))
  fi
done
trees=$(($(wc -l < "$WORK/local/stand.csv") - 1))
say "$trees trees, $(ls -d "$WORK"/array/shard-* | wc -l) shard folders, $(( $(date +%s) - T0 )) s in all"
cleanup
trap - EXIT
if [ "$status" = 0 ]; then rm -rf "$WORK" 2>/dev/null || true; else say "FAIL (kept $WORK)"; fi
echo "slurm-test: $same passed, $differ failed"
exit $status
