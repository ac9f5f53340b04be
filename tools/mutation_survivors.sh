#!/usr/bin/env bash
# Re-run only the surviving mutants of an earlier tools/mutation.sh run against the committed tree. Slow
# modules need hours for a full run; tests are only ever added between the two runs, so a mutant killed
# before stays killed and only the survivors need running again (docs/testing.md says which scores were
# measured this way).
#
# Usage:
#   bash tools/mutation_survivors.sh <module> <earlier MUTATION_DIR>
#
# Copies <earlier>/<module>.sqlite to $MUTATION_DIR (default /tmp/tidewell-mutation-survivors), marks its
# survivors pending, and lets cosmic-ray run them with the module's test selection from tools/mutation.sh
# on a copy of the committed tree (git archive HEAD), under nice -n 19. Prints the survivors left and the
# score (killed / mutants run; cr-rate also counts the mutants its operator filter skipped).
# An earlier run stopped part way: the mutants it never ran are left out of the copy (counted "not run").
# MUTATION_RECHECK=<file>: a JSON list of job ids to run again as well (e.g. mutants killed by a larger
# test selection, or by cosmic-ray's timeout while the run was paused).
# MUTATION_FILES="a.py b.py": run again only the survivors in files of those names (the others stay
# survivors), e.g. the files whose tests were added since.
# MUTATION_UNRUN=1: run only the mutants the earlier run never reached, keeping its other results (a run
# stopped part way, finished later against the committed tree; its module's code must be unchanged).
set -euo pipefail
cd "$(dirname "$0")/.."
m=${1:?module} earlier=${2:?earlier MUTATION_DIR}
py=${PYTHON:-python3}
out=${MUTATION_DIR:-/tmp/tidewell-mutation-survivors}
[ "$(realpath -m "$out")" != "$(realpath -m "$earlier")" ] || { echo "MUTATION_DIR must differ from $earlier" >&2; exit 2; }
source <(sed -n '/^declare -A TESTS=(/,/^)/p; /^declare -A NO_CHECK=/p' tools/mutation.sh)
tests=${TESTS[$m]:?unknown module $m}
tests=$(echo $tests) # one line
mkdir -p "$out"
rm -rf "$out/tree-$m" && mkdir -p "$out/tree-$m"
git archive HEAD | tar -x -C "$out/tree-$m"
cp "$earlier/$m.sqlite" "$out/$m.sqlite"
sed "s|^test-command = .*|test-command = \"env PYTHONPATH=core TIDEWELL_NO_RESPONSE_CHECK=${NO_CHECK[$m]:-0} $py -m pytest -x -q -p no:cacheprovider --hypothesis-seed=0 $tests\"|" \
    "$earlier/$m.toml" >"$out/$m.toml"
"$py" - "$out/$m.sqlite" "${MUTATION_RECHECK:-}" "${MUTATION_UNRUN:-}" "${MUTATION_FILES:-}" <<'EOF'
import json, sqlite3, sys
db = sqlite3.connect(sys.argv[1])
never = "SELECT job_id FROM work_items WHERE job_id NOT IN (SELECT job_id FROM work_results)"
if sys.argv[3]:
    n = db.execute(f"SELECT count(*) FROM ({never})").fetchone()[0]
    print(f"never run before, to run now: {n}; earlier results kept")
    sys.exit()
dropped = db.execute(f"DELETE FROM mutation_specs WHERE job_id IN ({never})").rowcount
db.execute(f"DELETE FROM work_items WHERE job_id IN ({never})")
survived = "SELECT job_id FROM work_results WHERE test_outcome = 'SURVIVED'"
if sys.argv[4]:
    files = sys.argv[4].split()
    jobs = [j for j, path in db.execute(f"SELECT job_id, module_path FROM mutation_specs WHERE job_id IN ({survived})")
            if path.rsplit("/", 1)[-1] in files]
    n = sum(db.execute("DELETE FROM work_results WHERE job_id = ?", (j,)).rowcount for j in jobs)
else:
    n = db.execute(f"DELETE FROM work_results WHERE job_id IN ({survived})").rowcount
again = json.load(open(sys.argv[2])) if sys.argv[2] else []
k = sum(db.execute("DELETE FROM work_results WHERE job_id = ?", (j,)).rowcount for j in again)
db.commit()
print(f"survivors to run again: {n}; named to run again: {k}; never run before, left out: {dropped}")
EOF
cd "$out/tree-$m"
nice -n 19 cosmic-ray exec "$out/$m.toml" "$out/$m.sqlite"
"$py" - "$out/$m.sqlite" <<'EOF' | tee "$out/$m.survivors"
import sqlite3, sys
db = sqlite3.connect(sys.argv[1])
rows = db.execute(
    "SELECT s.start_pos_row, s.operator_name, r.diff FROM mutation_specs s JOIN work_results r"
    " ON s.job_id = r.job_id WHERE r.test_outcome = 'SURVIVED' ORDER BY s.start_pos_row"
).fetchall()
for row, op, diff in rows:
    change = [x.strip() for x in diff.splitlines() if x[:1] in "+-" and not x.startswith(("+++", "---"))]
    print(f"line {row} {op.split('/')[-1]}: " + " -> ".join(change))
killed = db.execute("SELECT count(*) FROM work_results WHERE test_outcome = 'KILLED'").fetchone()[0]
print(f"killed {killed} of {killed + len(rows)} ({100 * killed / (killed + len(rows)):.1f} %)")
EOF
