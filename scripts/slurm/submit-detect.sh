#!/usr/bin/env bash
# Runs `rectboost detect` over an image list as a Slurm job array: one shard of the
# list per array task, each writing OUT/shards/shard-K-of-N.jsonl (resumable), and
# optionally a join job that writes OUT/detections.jsonl in list order once every
# task has ended.
#
#   scripts/slurm/submit-detect.sh [options] LIST MODEL OUT [-- DETECT_OPTIONS...]
#
#   --tasks N         array tasks = shards (default 8)
#   --cpus C          CPUs per task, used as detect --workers (default 2)
#   --time T          time limit per task, as sbatch --time (default: partition's)
#   --partition P     sbatch --partition
#   --max-running M   at most M tasks at once (sbatch --array=0-(N-1)%M)
#   --then-join       also submit a join job that waits for the whole array
#   --write-only      write the job scripts but do not submit them
#
# LIST holds one image path per line (relative paths: relative to the folder you
# submit from). DETECT_OPTIONS are passed to every task (e.g. --merge mean
# --min-support 3). The paths of LIST, MODEL, OUT, node and rectboost must be the
# same on every node (a shared file system).
#
# A task that died (node lost, time limit, scancel) is re-run with
#   sbatch --array=K OUT/detect-array.sbatch
# and resumes after the last image it wrote. Then join (or let --then-join do it):
#   rectboost join OUT/shards --out OUT/detections.jsonl
set -euo pipefail

tasks=8 cpus=2 time_limit='' partition='' max_running='' then_join=0 write_only=0
while [[ $# -gt 0 ]]; do
  case "$1" in
    --tasks) tasks="$2"; shift 2 ;;
    --cpus) cpus="$2"; shift 2 ;;
    --time) time_limit="$2"; shift 2 ;;
    --partition) partition="$2"; shift 2 ;;
    --max-running) max_running="$2"; shift 2 ;;
    --then-join) then_join=1; shift ;;
    --write-only) write_only=1; shift ;;
    -h|--help) sed -n '2,26p' "$0" | sed 's/^# \{0,1\}//'; exit 0 ;;
    --) break ;;
    -*) echo "submit-detect: unknown option $1 (see --help)" >&2; exit 2 ;;
    *) break ;;
  esac
done
if [[ $# -lt 3 ]]; then
  echo "submit-detect: expected LIST MODEL OUT [-- DETECT_OPTIONS...]; received $# arguments (see --help)" >&2
  exit 2
fi
list="$(realpath "$1")" model="$(realpath "$2")" out="$(realpath -m "$3")"
shift 3
[[ "${1:-}" == "--" ]] && shift
for number in "$tasks" "$cpus"; do
  if ! [[ "$number" =~ ^[1-9][0-9]*$ ]]; then echo "submit-detect: --tasks and --cpus must be whole numbers ≥ 1; received \"$number\"" >&2; exit 2; fi
done
[[ -r "$list" ]] || { echo "submit-detect: image list $list cannot be read; check the path" >&2; exit 1; }
[[ -r "$model" ]] || { echo "submit-detect: model $model cannot be read; check the path" >&2; exit 1; }

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
rectboost="$(realpath "$here/../../bin/rectboost.js")"
node="$(command -v node)"
mkdir -p "$out/logs" "$out/shards"

array="0-$((tasks - 1))${max_running:+%$max_running}"
extra=''
for option in "$@"; do extra+=" $(printf '%q' "$option")"; done
{
  echo '#!/bin/bash'
  echo '#SBATCH --job-name=rectboost-detect'
  echo "#SBATCH --array=$array"
  echo "#SBATCH --cpus-per-task=$cpus"
  echo "#SBATCH --output=$out/logs/task-%a.log"
  echo '#SBATCH --open-mode=append'
  echo "#SBATCH --chdir=$PWD"
  [[ -n "$time_limit" ]] && echo "#SBATCH --time=$time_limit"
  [[ -n "$partition" ]] && echo "#SBATCH --partition=$partition"
  echo "# Written by scripts/slurm/submit-detect.sh; shard K of $tasks is array task K."
  echo "# Re-run task K (it resumes): sbatch --array=K $out/detect-array.sbatch"
  echo 'set -euo pipefail'
  echo "exec $(printf '%q' "$node") $(printf '%q' "$rectboost") detect $(printf '%q' "$model") --list $(printf '%q' "$list") \\"
  echo "  --shard \"\$SLURM_ARRAY_TASK_ID/$tasks\" --shard-dir $(printf '%q' "$out/shards") --no-timing \\"
  echo "  --workers \"\${SLURM_CPUS_PER_TASK:-$cpus}\"$extra"
} > "$out/detect-array.sbatch"
{
  echo '#!/bin/bash'
  echo '#SBATCH --job-name=rectboost-join'
  echo '#SBATCH --cpus-per-task=1'
  echo "#SBATCH --output=$out/logs/join.log"
  [[ -n "$partition" ]] && echo "#SBATCH --partition=$partition"
  echo 'set -euo pipefail'
  echo "exec $(printf '%q' "$node") $(printf '%q' "$rectboost") join $(printf '%q' "$out/shards") --out $(printf '%q' "$out/detections.jsonl")"
} > "$out/join.sbatch"

if [[ $write_only -eq 1 ]]; then
  echo "Wrote $out/detect-array.sbatch and $out/join.sbatch (not submitted)."
  exit 0
fi
job="$(sbatch --parsable "$out/detect-array.sbatch")"
job="${job%%;*}"
echo "Submitted job array $job: $tasks tasks over $list; logs in $out/logs/."
if [[ $then_join -eq 1 ]]; then
  # afterany: the join runs when every task has ended, and itself names shards that did not finish.
  join_job="$(sbatch --parsable --dependency="afterany:$job" "$out/join.sbatch")"
  echo "Submitted join job ${join_job%%;*}: writes $out/detections.jsonl after the array."
else
  echo "When all tasks are done: rectboost join $out/shards --out $out/detections.jsonl"
fi
