#!/usr/bin/env bash
# Mutation testing of the heat paths with mutmut 3 (the `test` extra installs it).
#
# Which code: solver/correlations.py (all of it), the outer air film and the inside Nusselt
# switch in solver/films.py, the per-segment resistances in solver/line.py (build_line's outside
# path, _resolve_segments, _cylinder_resistance) and the heat pass of the march
# (solver/march.py _heat_pass and its _linear_recurrence). Which tests: the fast non-GUI
# selection below (about 5 s for a clean run); mutmut 3 runs, for each mutant, only the tests
# that called the mutated function, stopping at the first failure.
#
# It never runs in the working tree: the tree is copied (without .git, .venv, caches) into a
# fresh directory, mutmut's setup.cfg is written there, and mutmut works in <copy>/mutants.
#
#   scripts/mutation.sh [WORKDIR] [MUTANT-PATTERN ...]
#
# WORKDIR defaults to a new /tmp/calorun-mutation.XXXX; MUTANT-PATTERNs (fnmatch, e.g.
# 'solver.correlations.x_radiation*') narrow the run, by default the three phases below.
# MUTATION_REUSE=1 keeps WORKDIR's copy of the code and its results, refreshes only tests/, and
# runs the patterns again: how a new test is shown to kill an old survivor.
# Environment: PYTHON_BIN_DIR (default <repo>/.venv/bin), MUTATION_JOBS (default 2),
# MUTATION_FILES (the files to mutate, space separated; default the heat-path files above),
# MUTATION_EXTRA_TESTS (more test files, space separated), MUTATION_DESELECT (pytest node ids
# to leave out, e.g. a test that is red for an unrelated half-done change).
# Results: WORKDIR/mutation_survivors.txt (every selected mutant that was not killed, with its
# status), WORKDIR/mutation_counts.txt, and mutmut's own state in WORKDIR/mutants/
# (`mutmut show NAME`, run in WORKDIR, prints a mutant's diff).
set -euo pipefail

REPO="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
BIN="${PYTHON_BIN_DIR:-$REPO/.venv/bin}"
JOBS="${MUTATION_JOBS:-2}"
WORK="${1:-}"
if [[ -z "$WORK" ]]; then
    WORK="$(mktemp -d /tmp/calorun-mutation.XXXX)"
else
    shift
fi
WORK_ABS="$(cd "$WORK" 2>/dev/null && pwd || echo "$WORK")"
if [[ "$WORK_ABS" == "$REPO" || "$WORK_ABS" == "$REPO/"* ]]; then
    echo "mutation.sh: refusing to work inside the repository ($WORK)" >&2
    exit 2
fi
[[ -x "$BIN/mutmut" ]] || { echo "mutation.sh: $BIN/mutmut not found (pip install -e '.[test]')" >&2; exit 2; }

TESTS=(
    tests/test_correlations.py
    tests/test_heat_paths_published.py
    tests/test_solver_closed_form.py
    tests/test_solver_heat_accounting.py
    tests/test_solver_segments.py
    tests/test_solver_behaviour.py
    # the other solver-level files that check the heat paths against published values
    tests/test_inside_published.py
    tests/test_vertical_convection.py
    tests/test_steam.py
    tests/test_solver_steam_and_entry.py
    tests/test_resistances.py
    tests/test_surface_balance.py
)
# shellcheck disable=SC2206
TESTS+=(${MUTATION_EXTRA_TESTS:-})
# slow tests of Checks and messages (boiling, phase change, import isolation) that no heat-path
# mutant needs: left out so that a mutant costs seconds, not tens of seconds
DESELECT=(
    --deselect tests/test_solver_behaviour.py::test_boiling_wall_warning_for_water
    --deselect tests/test_solver_behaviour.py::test_boiling_water_is_reported_as_boiling
    --deselect tests/test_solver_behaviour.py::test_phase_change_is_located
    --deselect tests/test_solver_segments.py::test_a_check_is_reported_only_where_it_happens
    --deselect tests/test_correlations.py::test_module_imports_no_reference_library_or_qt
)
for node in ${MUTATION_DESELECT:-}; do DESELECT+=(--deselect "$node"); done

# The heat path first (outside films and resistances, the heat pass, the outside correlations),
# then the inside film and friction correlations, then the rest of correlations.py (validity
# masks, dew point, input checks). Each phase is its own `mutmut run` in the same WORKDIR, so a
# run cut short still has whole phases; MUTATION_PHASES="1 2" runs only those.
PHASE_1=(
    'solver.films.x_air_film*'
    'solver.films.xǁAirAtOneAtmosphereǁat__mutmut_*'
    'solver.line.x__resolve_segments__mutmut_*'
    'solver.line.x__cylinder_resistance__mutmut_*'
    'solver.line.x_build_line__mutmut_*'
    'solver.march.x__heat_pass__mutmut_*'
    'solver.march.x__linear_recurrence__mutmut_*'
    'solver.correlations.x_nusselt_churchill_chu_cylinder__mutmut_*'
    'solver.correlations.x_nusselt_churchill_chu_vertical__mutmut_*'
    'solver.correlations.x_nusselt_churchill_bernstein__mutmut_*'
    'solver.correlations.x_nusselt_mixed__mutmut_*'
    'solver.correlations.x_radiation_coefficient__mutmut_*'
    'solver.correlations.x_cylinder_wall_resistance__mutmut_*'
    'solver.correlations.x_buried_cylinder_resistance__mutmut_*'
    'solver.correlations.x_condensation_horizontal_tube__mutmut_*'
)
PHASE_2=(
    'solver.films.x_inside_nusselt__mutmut_*'
    'solver.correlations.x_nusselt_inside*'
    'solver.correlations.x__in_regimes__mutmut_*'
    'solver.correlations.x__laminar*'
    'solver.correlations.x_nusselt_laminar__mutmut_*'
    'solver.correlations.x__gnielinski*'
    'solver.correlations.x_nusselt_gnielinski__mutmut_*'
    'solver.correlations.x__local_entrance__mutmut_*'
    'solver.correlations.x__mean_entrance__mutmut_*'
    'solver.correlations.x__cube_roots__mutmut_*'
    'solver.correlations.x_wall_property_factor__mutmut_*'
    'solver.correlations.x__ratio_log__mutmut_*'
    'solver.correlations.x_friction_factor__mutmut_*'
    'solver.correlations.x__friction_transition__mutmut_*'
    'solver.correlations.x__churchill_1977__mutmut_*'
    'solver.correlations.x_colebrook__mutmut_*'
    'solver.correlations.x__colebrook__mutmut_*'
)
PHASE_3=()  # filled in after phase 1 has generated the mutants: every other function of correlations.py
if [[ $# -gt 0 ]]; then
    PHASES=("custom")
    PHASE_custom=("$@")
else
    read -r -a PHASES <<< "${MUTATION_PHASES:-1 2 3}"
fi

# a fresh copy of the tree
mkdir -p "$WORK"
if [[ "${MUTATION_REUSE:-0}" == 1 && -d "$WORK/mutants" ]]; then
    echo "== reusing $WORK (MUTATION_REUSE=1): its copy of the tree is not refreshed"
    cp "$REPO"/tests/*.py "$WORK/tests/"  # but the tests are: new tests may kill old survivors
else
rm -rf "$WORK/mutants"
(cd "$REPO" && tar --exclude=./.git --exclude=./.venv --exclude=./mutants --exclude='*/__pycache__' \
    --exclude=./.pytest_cache -cf - .) | (cd "$WORK" && tar xf -)
fi
cd "$WORK"

{
    echo "[mutmut]"
    echo "source_paths = solver"
    echo "only_mutate ="
    for f in ${MUTATION_FILES:-solver/correlations.py solver/films.py solver/line.py solver/march.py}; do echo "    $f"; done
    echo "also_copy ="
    echo "    sample_projects"
    echo "    app/demo_project.json"  # the demo the finder and batch tests search
    echo "    scripts/fuzz_solver.py"  # the generator tests/test_batch_fuzz.py shares with the fuzz
    echo "pytest_add_cli_args_test_selection ="
    for t in "${TESTS[@]}" "${DESELECT[@]}"; do echo "    $t"; done
    echo "pytest_add_cli_args ="
    echo "    -p"
    echo "    no:cacheprovider"
    echo "    -W"
    echo "    ignore::RuntimeWarning"
    echo "use_git_change_detection = false"
    # workers fork from a server that has only collected the tests: forked straight from the
    # process that ran the clean suite they would inherit its caches (the solved cases kept in
    # test_solver_behaviour, solver.line's remembered soil resistances) and never call a mutant
    echo "process_isolation = forkserver"
} > setup.cfg

export QT_QPA_PLATFORM=offscreen
echo "== clean run of the selection in $WORK"
"$BIN/python" -m pytest -q -p no:cacheprovider "${TESTS[@]}" "${DESELECT[@]}" | tail -3

ALL_PATTERNS=()
for phase in "${PHASES[@]}"; do
    if [[ "$phase" == 3 ]]; then
        "$BIN/mutmut" results --all true > mutation_all.txt
        mapfile -t PHASE_3 < <("$BIN/python" - "${PHASE_1[@]}" "${PHASE_2[@]}" <<'EOF'
import fnmatch, re, sys
done_patterns = sys.argv[1:]
functions = set()
for line in open("mutation_all.txt", encoding="utf-8"):
    m = re.match(r"\s*(solver\.correlations\.\S+?__mutmut_)\d+: ", line)
    if m and not any(fnmatch.fnmatch(m.group(1) + "1", p) for p in done_patterns):
        functions.add(m.group(1) + "*")
print("\n".join(sorted(functions)))
EOF
)
        [[ ${#PHASE_3[@]} -gt 0 ]] || continue
    fi
    declare -n PATTERNS="PHASE_$phase"
    ALL_PATTERNS+=("${PATTERNS[@]}")
    echo "== phase $phase: mutmut run (${#PATTERNS[@]} pattern(s), $JOBS jobs) started $(date -u +%H:%M:%S) UTC"
    start=$(date +%s)
    "$BIN/mutmut" run --max-children "$JOBS" "${PATTERNS[@]}" > "mutmut_run_$phase.log" 2>&1 || {
        echo "mutmut run failed; see $WORK/mutmut_run_$phase.log" >&2
        tail -30 "mutmut_run_$phase.log" >&2
        exit 1
    }
    echo "   took $(( $(date +%s) - start )) s"
    unset -n PATTERNS
done

"$BIN/mutmut" results --all true > mutation_all.txt
# counts by status over the mutants selected, and the list of those that were not killed
"$BIN/python" - "${ALL_PATTERNS[@]}" <<'EOF' | tee mutation_counts.txt
import collections, fnmatch, re, sys
patterns = sys.argv[1:]
counts = collections.Counter()
alive = []
for line in open("mutation_all.txt", encoding="utf-8"):
    m = re.match(r"\s*(\S+): (.+)$", line)
    if m and any(fnmatch.fnmatch(m.group(1), p) for p in patterns):
        status = m.group(2).strip()
        counts[status] += 1
        if status != "killed":
            alive.append(f"{m.group(1)}: {status}")
with open("mutation_survivors.txt", "w", encoding="utf-8") as out:
    out.write("\n".join(alive) + "\n")
print(f"mutants selected: {sum(counts.values())}")
for status, n in counts.most_common():
    print(f"  {status}: {n}")
EOF
echo "== not killed: $WORK/mutation_survivors.txt (in $WORK, '$BIN/mutmut show NAME' prints a diff)"
