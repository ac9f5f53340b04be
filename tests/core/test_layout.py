"""The package's layers and the import rules between them (DEVELOPERS.md, "Layout" and "Import rules").

Every module of core/tidewell/ is parsed (``ast``, nothing is imported) and its imports of tidewell's own
modules form a graph: a module -> the modules it imports, at any depth of the file (an import inside a
function still makes a cycle when it runs), except where a rule says "at module level". The rules:

- the layers: at the top only the plumbing (bridge, fields, report, errors, units, references, arrays) and
  ``__init__``/``__main__``; the published formulas in ``formulas/``, the contract's calculations in
  ``calculations/``, the command line and the batch audit in ``frontends/``;
- the leaf modules errors, units and arrays import only the standard library and each other, and arrays
  imports numpy only inside functions;
- ``formulas/*`` import only the standard library, other formulas and the three leaf modules, and never
  numpy at module level (never bridge, fields, report, references, calculations or frontends);
- ``calculations/*`` never import ``frontends`` or ``bridge``;
- nothing but ``frontends/`` and ``__main__`` imports ``frontends``;
- every calculation the bridge offers lives in ``calculations/``;
- no import cycle between modules (a depth-first search for a back edge, which names the cycle).

On failure the whole graph is printed. ``python3 tests/core/test_layout.py`` prints it too.
"""

from __future__ import annotations

import ast
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
PACKAGE = ROOT / "core" / "tidewell"
STDLIB = frozenset(sys.stdlib_module_names) | {"__future__"}

PLUMBING = {"bridge", "fields", "report", "errors", "units", "references", "arrays"}
LEAVES = {"tidewell.errors", "tidewell.units", "tidewell.arrays"}
LAYERS = {"formulas", "calculations", "frontends"}
FORMULAS = {"acidbase", "oxygenation", "ventilation", "temperature", "altitude", "transport"}


def module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def modules() -> dict[str, Path]:
    """Module name -> file, for every module of the package."""
    return {module_name(path): path for path in sorted(PACKAGE.rglob("*.py"))}


class Import:
    """One import statement's target: a module name, whether it is at module level, its line."""

    def __init__(self, name: str, top: bool, line: int):
        self.name, self.top, self.line = name, top, line


def _imports(path: Path, name: str, known: set[str]) -> list[Import]:
    """Every module ``path`` imports (absolute names; ``from . import x`` resolves to the submodule x)."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    out: list[Import] = []

    def visit(node, top: bool) -> None:
        for child in ast.iter_child_nodes(node):
            inner = top and not isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
            if isinstance(child, ast.Import):
                out.extend(Import(alias.name, top, child.lineno) for alias in child.names)
            elif isinstance(child, ast.ImportFrom):
                if child.level:
                    base = package.split(".")
                    base = base[: len(base) - (child.level - 1)]
                    target = ".".join(base + ([child.module] if child.module else []))
                else:
                    target = child.module or ""
                for alias in child.names:
                    sub = f"{target}.{alias.name}"
                    out.append(Import(sub if sub in known else target, top, child.lineno))
            visit(child, inner)

    visit(tree, True)
    return out


def import_table() -> dict[str, list[Import]]:
    found = modules()
    known = set(found)
    return {name: _imports(path, name, known) for name, path in found.items()}


def graph(table: dict[str, list[Import]] | None = None) -> dict[str, list[str]]:
    """Module -> the tidewell modules it imports (sorted, at any depth of the file)."""
    table = import_table() if table is None else table
    return {
        name: sorted({i.name for i in imports if i.name.split(".")[0] == "tidewell" and i.name != name})
        for name, imports in table.items()
    }


def show(edges: dict[str, list[str]]) -> str:
    def short(name: str) -> str:
        return name.removeprefix("tidewell.") or "tidewell"

    return "\n".join(
        f"{short(m)} -> {', '.join(short(t) for t in ts) or '-'}" for m, ts in sorted(edges.items())
    )


def find_cycle(edges: dict[str, list[str]]) -> list[str] | None:
    """A cycle of the graph as a list of modules (first == last), or None: iterative depth-first search,
    colouring nodes white (unseen), grey (on the current path) and black (done); a grey successor closes
    a cycle."""
    colour = dict.fromkeys(edges, 0)
    for start in sorted(edges):
        if colour[start]:
            continue
        path, stack = [start], [iter(edges[start])]
        colour[start] = 1
        while stack:
            nxt = next(stack[-1], None)
            if nxt is None:
                colour[path.pop()] = 2
                stack.pop()
            elif colour.get(nxt, 2) == 1:
                return [*path[path.index(nxt) :], nxt]
            elif colour.get(nxt) == 0:
                colour[nxt] = 1
                path.append(nxt)
                stack.append(iter(edges[nxt]))
    return None


def in_layer(name: str, layer: str) -> bool:
    return name.startswith(f"tidewell.{layer}.") or name == f"tidewell.{layer}"


def problems(table: dict[str, list[Import]]) -> list[str]:
    """Every broken import rule, one line each (empty when the layout keeps them all)."""
    out = []
    for name, imports in sorted(table.items()):
        for imp in imports:
            target, top = imp.name, imp.top
            root = target.split(".")[0]
            own = root == "tidewell"
            where = f"{name}:{imp.line} imports {target}" + ("" if top else " (inside a function)")
            if name in LEAVES:
                if own and target not in LEAVES:
                    out.append(
                        f"{where}: a leaf module imports only the standard library and the other leaves"
                    )
                elif not own and root not in STDLIB and not (name == "tidewell.arrays" and root == "numpy"):
                    out.append(f"{where}: a leaf module imports only the standard library")
                elif root == "numpy" and top:
                    out.append(f"{where}: arrays imports numpy only inside functions")
            if in_layer(name, "formulas"):
                if own and not (in_layer(target, "formulas") or target in LEAVES):
                    out.append(f"{where}: a formula imports only other formulas and errors, units, arrays")
                elif root == "numpy" and top:
                    out.append(f"{where}: a formula never imports numpy at module level")
                elif not own and root not in STDLIB and root != "numpy":
                    out.append(f"{where}: a formula imports only the standard library")
            if in_layer(name, "calculations") and (
                in_layer(target, "frontends") or target == "tidewell.bridge"
            ):
                out.append(f"{where}: a calculation never imports the front ends or the bridge")
            if in_layer(target, "frontends") and not (
                in_layer(name, "frontends") or name == "tidewell.__main__"
            ):
                out.append(f"{where}: only frontends/ and __main__ import the front ends")
    return out


def layer_problems(names: set[str]) -> list[str]:
    out = []
    top = {n.removeprefix("tidewell.") for n in names if n.count(".") == 1}
    expected = PLUMBING | LAYERS | {"__main__"}
    for extra in sorted(top - expected):
        out.append(f"tidewell.{extra}: at the top only the plumbing and the layers {sorted(LAYERS)}")
    for missing in sorted(expected - top):
        out.append(f"tidewell.{missing} is missing")
    for formula in sorted(FORMULAS):
        if f"tidewell.formulas.{formula}" not in names:
            out.append(f"tidewell.formulas.{formula} is missing")
    return out


@pytest.fixture(scope="module")
def table():
    return import_table()


def _fail(message: str, table) -> None:
    pytest.fail(
        f"{message}\n\nthe import graph (module -> tidewell modules it imports):\n{show(graph(table))}"
    )


def test_layers(table):
    found = layer_problems(set(table))
    if found:
        _fail("\n".join(found), table)


def test_import_rules(table):
    found = problems(table)
    if found:
        _fail("\n".join(found), table)


def test_no_import_cycle(table):
    cycle = find_cycle(graph(table))
    if cycle:
        _fail("import cycle: " + " -> ".join(cycle), table)


def test_calculations_live_in_calculations():
    from tidewell.bridge import CALCULATIONS

    outside = {calc: target for calc, target in CALCULATIONS.items() if not in_layer(target, "calculations")}
    assert not outside, f"calculations outside tidewell.calculations: {outside}"
    names = set(modules())
    missing = {calc: t for calc, t in CALCULATIONS.items() if t.partition(":")[0] not in names}
    assert not missing, f"the bridge names modules that do not exist: {missing}"


# -- the checker itself: it must catch what it is there to catch -------------------------------------------


def test_cycle_search_finds_a_cycle_and_passes_a_dag():
    assert find_cycle({"a": ["b"], "b": ["c"], "c": ["a"], "d": []}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": ["b", "c"], "b": ["c"], "c": [], "d": ["a"]}) is None
    assert find_cycle({"a": ["a"]}) == ["a", "a"]


def test_rules_catch_each_kind_of_breach():
    def imp(name, top=True):
        return Import(name, top, 1)

    breaches = {
        "tidewell.formulas.acidbase": [
            imp("tidewell.report"),
            imp("numpy"),
            imp("tidewell.calculations.course"),
        ],
        "tidewell.errors": [imp("tidewell.fields")],
        "tidewell.arrays": [imp("numpy")],
        "tidewell.calculations.course": [imp("tidewell.bridge", top=False), imp("tidewell.frontends.cli")],
        "tidewell.report": [imp("tidewell.frontends.batch", top=False)],
    }
    assert len(problems(breaches)) == 9, problems(breaches)
    allowed = {
        "tidewell.formulas.altitude": [
            imp("math"),
            imp("tidewell.formulas.oxygenation"),
            imp("tidewell.units"),
        ],
        "tidewell.formulas.oxygenation": [imp("numpy", top=False), imp("tidewell.arrays")],
        "tidewell.arrays": [imp("numpy", top=False), imp("tidewell.errors")],
        "tidewell.frontends.cli": [imp("tidewell.frontends.batch"), imp("tidewell.bridge")],
        "tidewell.__main__": [imp("tidewell.frontends.cli")],
    }
    assert problems(allowed) == []


def test_relative_imports_resolve(tmp_path):
    path = tmp_path / "x.py"
    path.write_text("from . import units\nfrom ..errors import InputError\ndef f():\n    import numpy\n")
    known = {"tidewell.formulas.units", "tidewell.errors"}
    got = [(i.name, i.top) for i in _imports(path, "tidewell.formulas.x", known)]
    assert got == [("tidewell.formulas.units", True), ("tidewell.errors", True), ("numpy", False)]


if __name__ == "__main__":
    print(show(graph()))
    print("cycle:", find_cycle(graph()))
