#!/usr/bin/env bash
# The shards of a Slurm job array, for real: start a single-node Slurm (Debian's munge, slurmctld, slurmd)
# with a private configuration, submit a job array in which task i of n runs
#   valleyscope analyze <demo runs> --jsonl --shard i/n      and      valleyscope check <demo runs> --jsonl --shard i/n
# wait for it, merge the shards with `compare` and `check`, and compare with one machine's run of the same.
# Every daemon this script starts is stopped at the end (by its pid); a munged that was already running is
# left alone. Needs root, the Debian packages slurmctld slurmd slurm-client munge, and dist/ built.
# Ends with one line "N passed, N failed" (1 check). When the scheduler cannot start, it says why and counts
# the check as failed (the shard tests of the unit suite do not need a scheduler and still run).
# Usage: bash scripts/slurm-shard-check.sh [number of shards, default 3]
set -uo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd)
SHARDS=${1:-3}
NODE=$(command -v node || true)
D=$(mktemp -d /tmp/valleyscope-slurm.XXXXXX)
STARTED_MUNGED=0

say() { echo "slurm shard check: $*"; }
fail() {
  say "FAILED: $*"
  echo "0 passed, 1 failed"
  exit 1
}

cleanup() {
  local pids=()
  for f in "$D/slurmd.pid" "$D/slurmctld.pid"; do
    [ -s "$f" ] && pids+=("$(cat "$f")")
  done
  if [ "$STARTED_MUNGED" = 1 ] && [ -s /run/munge/munged.pid ]; then pids+=("$(cat /run/munge/munged.pid)"); fi
  for p in "${pids[@]}"; do kill "$p" 2>/dev/null; done
  for _ in $(seq 1 50); do
    local alive=0
    for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && alive=1; done
    [ "$alive" = 0 ] && break
    sleep 0.2
  done
  for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && kill -9 "$p" 2>/dev/null; done
  rm -rf "$D"
}
trap cleanup EXIT

log_tail() { for f in "$@"; do [ -s "$f" ] && { echo "--- last lines of $f"; tail -n 8 "$f"; }; done; }

# 1. What the check needs.
[ "$(id -u)" = 0 ] || fail "the scheduler cannot start: this script must run as root (it starts munged, slurmctld and slurmd)"
missing=()
for b in munged slurmctld slurmd sbatch sinfo scontrol; do command -v "$b" >/dev/null 2>&1 || missing+=("$b"); done
[ ${#missing[@]} -eq 0 ] || fail "the scheduler cannot start: missing programs: ${missing[*]} (apt-get install slurmctld slurmd slurm-client munge)"
[ -n "$NODE" ] || fail "node is not on PATH"
[ -f dist/cli.js ] && [ -f dist/batchWorker.js ] || fail "dist/cli.js or dist/batchWorker.js missing: run node esbuild.mjs first"
[ -d fixtures/demo ] || fail "fixtures/demo is missing"

# 2. munge (authentication between the Slurm daemons and commands).
if munge -n 2>/dev/null | unmunge >/dev/null 2>&1; then
  say "munged already running; using it"
else
  mkdir -p /run/munge && chown munge:munge /run/munge && chmod 755 /run/munge
  chown -R munge:munge /var/log/munge /var/lib/munge /etc/munge 2>/dev/null
  [ -s /etc/munge/munge.key ] || fail "the scheduler cannot start: /etc/munge/munge.key is missing (reinstall munge)"
  runuser -u munge -- munged --force || fail "the scheduler cannot start: munged did not start (see /var/log/munge/munged.log)"
  STARTED_MUNGED=1
  for _ in $(seq 1 25); do munge -n 2>/dev/null | unmunge >/dev/null 2>&1 && break; sleep 0.2; done
  munge -n 2>/dev/null | unmunge >/dev/null 2>&1 || { log_tail /var/log/munge/munged.log; fail "the scheduler cannot start: munged is not answering on /run/munge"; }
fi

# 3. A private single-node Slurm configuration (SLURM_CONF: /etc/slurm is not touched).
HN=$(hostname -s)
CPUS=$(nproc)
mkdir -p "$D/slurmd" "$D/state" "$D/out"
cat > "$D/slurm.conf" <<CONF
ClusterName=valleyscope-check
SlurmctldHost=$HN
SlurmctldPort=${VALLEYSCOPE_SLURMCTLD_PORT:-6817}
SlurmdPort=${VALLEYSCOPE_SLURMD_PORT:-6818}
AuthType=auth/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SlurmUser=root
ReturnToService=2
MpiDefault=none
SlurmctldPidFile=$D/slurmctld.pid
SlurmdPidFile=$D/slurmd.pid
SlurmdSpoolDir=$D/slurmd
StateSaveLocation=$D/state
SlurmctldLogFile=$D/slurmctld.log
SlurmdLogFile=$D/slurmd.log
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
NodeName=$HN CPUs=$CPUS State=UNKNOWN
PartitionName=main Nodes=$HN Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF="$D/slurm.conf"
slurmctld || { log_tail "$D/slurmctld.log"; fail "the scheduler cannot start: slurmctld did not start"; }
slurmd || { log_tail "$D/slurmd.log"; fail "the scheduler cannot start: slurmd did not start"; }
state=""
for i in $(seq 1 60); do
  state=$(sinfo -h -n "$HN" -o %t 2>/dev/null | head -1)
  case "$state" in
    idle | mix | alloc) break ;;
    down* | drain* | unk*) [ "$i" -gt 10 ] && scontrol update nodename="$HN" state=resume >/dev/null 2>&1 ;;
  esac
  sleep 0.5
done
case "$state" in
  idle | mix | alloc) say "single-node Slurm up ($HN, $CPUS CPUs, node $state)" ;;
  *) log_tail "$D/slurmctld.log" "$D/slurmd.log"; fail "the scheduler cannot start: node $HN is \"${state:-not known}\" after 30 s" ;;
esac

# 4. The demo runs in a scratch copy, annotated once (check needs annotations files).
cp -r fixtures/demo "$D/demo"
find "$D/demo" -name '*.valleys.json' -delete
"$NODE" dist/cli.js annotate "$D/demo" --jobs 1 >"$D/annotate.log" 2>&1 || { cat "$D/annotate.log"; fail "annotate of the demo runs failed"; }
# One run's data file then changes its bytes (the comment line), not its numbers: check must call it stale,
# on one machine and in the merged shards alike.
sed -i '5s/$/ (edited)/' "$D/demo/si-bulk/EIGENVAL"

# 5. The job array: task i of n writes its shard of analyze and of check.
cat > "$D/job.sh" <<JOB
#!/usr/bin/env bash
set -u
i=\$SLURM_ARRAY_TASK_ID
n=\$SLURM_ARRAY_TASK_COUNT
"$NODE" "$ROOT/dist/cli.js" analyze "$D/demo" --jsonl --jobs 1 --shard "\$i/\$n" > "$D/out/analyze-\$i.jsonl"
a=\$?
"$NODE" "$ROOT/dist/cli.js" check "$D/demo" --jsonl --jobs 1 --shard "\$i/\$n" > "$D/out/check-\$i.jsonl"
c=\$?
echo "task \$i/\$n on \$(hostname -s): analyze exit \$a, check exit \$c"
# analyze and check exit 1 when a run fails or an annotation is stale; the lines say so, the merge compares them.
[ \$a -le 1 ] && [ \$c -le 1 ]
JOB
chmod +x "$D/job.sh"
say "submitting a job array of $SHARDS tasks"
if ! timeout 300 sbatch --wait --array=1-"$SHARDS" --cpus-per-task=1 --chdir="$ROOT" --output="$D/out/log-%a.txt" "$D/job.sh" >"$D/sbatch.txt" 2>&1; then
  cat "$D/sbatch.txt"
  log_tail "$D"/out/log-*.txt "$D/slurmctld.log" "$D/slurmd.log"
  fail "the job array did not finish successfully"
fi
cat "$D/sbatch.txt"
cat "$D"/out/log-*.txt

# 6. Merge the shards and compare with one machine.
"$NODE" dist/cli.js analyze "$D/demo" --jsonl --jobs 1 >"$D/one-analyze.jsonl"
"$NODE" dist/cli.js check "$D/demo" --jobs 1 >"$D/one-check.txt"
one_check_code=$?
problems=()
one_paths=$("$NODE" -e 'for (const l of require("fs").readFileSync(process.argv[1],"utf8").split("\n")) if (l) console.log(JSON.parse(l).path)' "$D/one-analyze.jsonl" | sort)
shard_paths=$(cat "$D"/out/analyze-*.jsonl | "$NODE" -e 'let s="";process.stdin.on("data",d=>s+=d).on("end",()=>{for (const l of s.split("\n")) if (l) console.log(JSON.parse(l).path)})' | sort)
[ -n "$one_paths" ] || problems+=("one machine found no runs")
[ "$one_paths" = "$shard_paths" ] || problems+=("the shards do not hold every run exactly once")
"$NODE" dist/cli.js compare "$D"/out/analyze-*.jsonl --format json >"$D/merged-compare.json" 2>"$D/merged-compare.err" || problems+=("compare of the merged shards failed: $(tail -1 "$D/merged-compare.err")")
"$NODE" dist/cli.js compare "$D/one-analyze.jsonl" --format json >"$D/one-compare.json" 2>/dev/null || problems+=("compare of one machine's JSON Lines failed")
cmp -s "$D/merged-compare.json" "$D/one-compare.json" || problems+=("compare of the merged shards differs from one machine's")
"$NODE" dist/cli.js check "$D"/out/check-*.jsonl >"$D/merged-check.txt"
merged_check_code=$?
cmp -s "$D/merged-check.txt" "$D/one-check.txt" || problems+=("check of the merged shards differs from one machine's check")
[ "$merged_check_code" = "$one_check_code" ] || problems+=("check exit codes differ: merged $merged_check_code, one machine $one_check_code")
grep -q '^STALE .*si-bulk' "$D/one-check.txt" || problems+=("one machine's check did not find the edited run stale")
n_runs=$(echo "$one_paths" | wc -l)
counts=$(for f in "$D"/out/analyze-*.jsonl; do grep -c . "$f"; done | paste -sd+)
if [ ${#problems[@]} -gt 0 ]; then
  for p in "${problems[@]}"; do say "$p"; done
  diff "$D/merged-check.txt" "$D/one-check.txt" | head -20
  fail "merged shards differ from one machine"
fi
say "PASSED: $n_runs demo runs in $SHARDS shards ($counts runs) on Slurm; compare and check of the merged shards equal one machine's ($(tail -1 "$D/one-check.txt"))"
echo "1 passed, 0 failed"
