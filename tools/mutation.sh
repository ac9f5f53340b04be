#!/usr/bin/env bash
# Mutation testing of the decision and formula modules with cosmic-ray. Slow: run by hand, never in CI.
#
# Usage:
#   bash tools/mutation.sh                         every module below, every constant and comparison
#   bash tools/mutation.sh blood_gas course        some modules
#   MUTATION_SUBSET=1 bash tools/mutation.sh ...   only the names listed in SUBSET below (docs/testing.md)
#   MUTATION_PATHS="a.py b.py" bash tools/mutation.sh blood_gas
#                                                  only those files of one module, with its tests (to run
#                                                  a big module as parallel parts, each its own MUTATION_DIR)
#
# The mutants are the audit's kind: one number changed (cosmic-ray's NumberReplacer, +1 / -1) or one
# comparison replaced (ReplaceComparisonOperator_*), one at a time. Each module runs its own fast test
# selection (TESTS below), with hypothesis seeded. The committed tree (git archive HEAD) is copied to
# $MUTATION_DIR, so a stopped run never leaves a mutant in the checkout. Everything runs under nice -n 19.
# Per module: $MUTATION_DIR/<module>.sqlite, then cr-report (each mutant and its outcome) and cr-rate
# (the share that survived) are printed and written to $MUTATION_DIR/<module>.report.
set -euo pipefail
cd "$(dirname "$0")/.."
py=${PYTHON:-python3}
out=${MUTATION_DIR:-/tmp/tidewell-mutation}
"$py" -m pip install -q "cosmic-ray==8.7.0" # the pin of pyproject.toml's `mutation` extra

declare -A TESTS=(
    [acidbase]="tests/core/test_acidbase.py tests/core/test_acidbase_ranges.py tests/core/test_thresholds.py"
    [blood_gas]="tests/core/test_thresholds.py tests/core/test_retainer_rules.py tests/core/test_finding_codes.py
        tests/core/test_messages.py tests/core/test_pressure_wording.py tests/core/test_blood_gas_boundaries.py
        tests/core/test_blood_gas_mutants_a.py tests/core/test_blood_gas_mutants_b.py
        tests/core/test_blood_gas_mutants_c.py tests/core/test_decisive_digits.py
        tests/core/test_blood_gas.py
        $(printf -- '--deselect tests/core/test_blood_gas.py::%s ' test_classification_same_in_kpa_and_mmhg \
            test_any_numbers_never_raise_or_give_nan test_more_hco3_never_means_more_acute \
            test_oxygenation_monotonic test_consciousness_flag_is_monotonic_in_pco2)"
    [oxygenation]="tests/core/test_oxygenation.py tests/core/test_thresholds.py"
    [ventilation]="tests/core/test_ventilation.py"
    [altitude]="tests/core/test_altitude.py"
    [transport]="tests/core/test_transport.py"
    [temperature]="tests/core/test_temperature.py"
    [course]="tests/core/test_course.py tests/core/test_course_boundaries.py tests/core/test_thresholds.py"
)
# blood_gas leaves out test_blood_gas.py's five slow properties (6 of the selection's 11 s, each mutant
# that survives pays them): the thresholds, rules and finding codes are tested by the tables.
# MUTATION_SUBSET=1: module-level constants (a name on a multiple assignment takes the whole line;
# CONSTANTS = every UPPER_CASE assignment, tables included), functions and methods (Class.method) by
# name: the named decision thresholds and the course's NIV and oxygen rules
declare -A SUBSET=(
    [acidbase]="ACUTE_AT_LEAST CHRONIC_AT_MOST chronicity_from_fraction _chronicity"
    [blood_gas]="PH_LOW PCO2_LOW HCO3_LOW SEVERE_ACIDAEMIA_PH NIV_PH NIV_PCO2_MMHG NIV_INVASIVE_PH
        NARCOSIS_NORMAL_MMHG HYPOXAEMIA_MMHG PF_IMPAIRED AG_ALWAYS_ACIDOSIS LACTATE_ACIDOSIS LACTATE_RAISED
        HCO3_MARGIN_MIN SBE_TOLERANCE STEWART_EFFECT FLOOR_PH"
    [oxygenation]="RICE_SPO2_MAX_PERCENT"
    [course]="PH_CHANGE PH_LOW NIV_FIRST_CHECK_MIN _Course.niv _Course.oxygen_finding _Course.falling_fast_finding"
)
# modules whose runs skip the schema check of every bridge response (tests/conftest.py): half of each
# mutant's time in blood_gas's selection, where the tables and finding codes decide
declare -A NO_CHECK=([blood_gas]=1)
# where each module is (blood_gas is a package: every module of it; its SUBSET names are in one file)
declare -A PATHS=(
    [acidbase]="core/tidewell/formulas/acidbase.py"
    [blood_gas]="core/tidewell/calculations/blood_gas"
    [oxygenation]="core/tidewell/formulas/oxygenation.py"
    [ventilation]="core/tidewell/formulas/ventilation.py"
    [altitude]="core/tidewell/formulas/altitude.py"
    [transport]="core/tidewell/formulas/transport.py"
    [temperature]="core/tidewell/formulas/temperature.py"
    [course]="core/tidewell/calculations/course.py"
)
declare -A SUBSET_PATHS=(
    [blood_gas]="core/tidewell/calculations/blood_gas/thresholds.py"
)
modules=("$@")
[ ${#modules[@]} -gt 0 ] || modules=(acidbase blood_gas oxygenation ventilation altitude transport temperature course)

rm -rf "$out/tree" && mkdir -p "$out/tree"
git archive HEAD | tar -x -C "$out/tree"
cd "$out/tree"

for m in "${modules[@]}"; do
    tests=${TESTS[$m]:?unknown module $m}
    path=${PATHS[$m]}
    [ -z "${MUTATION_SUBSET:-}" ] || path=${SUBSET_PATHS[$m]:-$path}
    [ -z "${MUTATION_PATHS:-}" ] || path=$MUTATION_PATHS
    tests=$(echo $tests) # one line
    module_path=$(printf '"%s", ' $path)
    cfg="$out/$m.toml"
    db="$out/$m.sqlite"
    {
        echo "[cosmic-ray]"
        echo "module-path = [${module_path%, }]"
        echo "timeout = 300.0"
        echo "excluded-modules = []"
        echo "test-command = \"env PYTHONPATH=core TIDEWELL_NO_RESPONSE_CHECK=${NO_CHECK[$m]:-0} $py -m pytest -x -q -p no:cacheprovider --hypothesis-seed=0 $tests\""
        echo
        echo "[cosmic-ray.distributor]"
        echo "name = \"local\""
        echo
        echo "[cosmic-ray.filters.operators-filter]"
        echo "exclude-operators = ['core/(?!NumberReplacer|ReplaceComparisonOperator_).*']"
    } >"$cfg"
    if [ -n "${MUTATION_SUBSET:-}" ]; then
        ranges=$("$py" - "$path" ${SUBSET[$m]:?no subset for $m} <<'EOF'
import ast, sys
path, names = sys.argv[1], set(sys.argv[2:])
tree = ast.parse(open(path, encoding="utf-8").read())
spans = []
for node in tree.body:
    if isinstance(node, (ast.Assign, ast.AnnAssign)):
        targets = node.targets if isinstance(node, ast.Assign) else [node.target]
        ids = [e.id for t in targets for e in ast.walk(t) if isinstance(e, ast.Name)]
        if any(i in names or ("CONSTANTS" in names and i.isupper()) for i in ids):
            spans.append((node.lineno, node.end_lineno))
    elif isinstance(node, (ast.FunctionDef, ast.ClassDef)):
        if node.name in names:
            spans.append((node.lineno, node.end_lineno))
        for sub in getattr(node, "body", []):
            if isinstance(sub, ast.FunctionDef) and f"{node.name}.{sub.name}" in names:
                spans.append((sub.lineno, sub.end_lineno))
print(", ".join(f'"{a}-{b}"' for a, b in spans))
EOF
)
        {
            echo
            echo "[cosmic-ray.filters.line-filter]"
            echo "lines = { \"$path\" = [$ranges] }"
        } >>"$cfg"
    fi
    echo "== $m: $tests"
    rm -f "$db"
    nice -n 19 cosmic-ray init "$cfg" "$db"
    nice -n 19 cr-filter-operators "$db" "$cfg"
    [ -z "${MUTATION_SUBSET:-}" ] || nice -n 19 cr-filter-lines --config "$cfg" "$db"
    nice -n 19 cosmic-ray baseline "$cfg"
    nice -n 19 cosmic-ray exec "$cfg" "$db"
    {
        cr-report "$db" --show-pending
        cr-rate "$db" || true # cr-rate exits non-zero when survivors remain
    } | tee "$out/$m.report"
done
