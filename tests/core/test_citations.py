"""The repository explains itself: no citation of a file it lacks (how to cite: DEVELOPERS.md).

A clone is all a maintainer has. So every tracked text file is scanned, and a test fails, naming file:line, on

- a citation of the outside pages the project was started from: the formulas page, the contract page or the
  style page by their file names (with or without ``.md``, followed by a section number or a backticked
  name), or any path into the outside folder they sat in;
- a path-looking citation of a ``.md`` or ``.json`` file that is not in the repository (resolved relative to
  the citing file and to the repository root; a ``#anchor`` after a ``.md`` path must name a heading of
  that page).

And docs/methods.md, the project's account of its methods, must cite only sources that ``references.py``
has, with the provenance mark ``references.py`` records, worked cases that the repository's copy has, and
test files that exist.

What is not a citation: a quoted bare file name in code (``tmp_path / "log.json"``: a file made at run
time), a call such as ``response.json()``, a file a command writes (``--json out/startup.json``) and the two
files the build writes into dist/ (``BUILT``). The patterns below are assembled from pieces so that this
file does not match itself.
"""

from __future__ import annotations

import io
import itertools
import re
import subprocess
import tokenize
from functools import cache
from pathlib import Path

from casebook import load_cases
from tidewell.references import REFERENCES

ROOT = Path(__file__).resolve().parents[2]
METHODS = ROOT / "docs" / "methods.md"

#: files that are not text, or that only list pinned versions
SKIP_SUFFIXES = {".png", ".ico", ".jpg", ".jpeg", ".webp", ".gif", ".woff", ".woff2", ".zip", ".whl", ".wasm"}
SKIP_NAMES = {"package-lock.json", "uv.lock", "poetry.lock"}

#: written by build.py into dist/ (and shipped inside the npm package): named in docs and code, never tracked
BUILT = {"build-manifest.json", "pyodide-lock.json"}

# -- the outside pages -------------------------------------------------------------------------------------
_PAGES = "|".join(["REFER" + "ENCE", "CONT" + "RACT", "STY" + "LE"])
_MD = r"\." + "md"
#: the page's file name with its extension, anywhere (upper case: the repository's own pages are lower case)
OUTSIDE_FILE = re.compile(rf"\b(?:{_PAGES}){_MD}\b")
#: the page's bare name (upper case, as the pages spell themselves) followed by a section or a backticked name
OUTSIDE_SECTION = re.compile(rf"\b(?:{_PAGES})\s+(?:section\s+|\u00a7\s*)?(?:\d+[a-z]?(?:\.\d+)*\b|`[^`]+`)")
#: a path into the outside folder, or that folder joined as a path component in code
_FOLDER = "sha" + "red"
OUTSIDE_FOLDER = re.compile(rf"(?<![\w-]){_FOLDER}/|[\"']{_FOLDER}[\"']\s*[,/)]|/\s*[\"']{_FOLDER}[\"']")

# -- path-looking citations -------------------------------------------------------------------------------
PATH = re.compile(r"(?<![\w./-])((?:\.{1,2}/)?[A-Za-z0-9_][\w./-]*?\.(?:md|json))(#[\w-]+)?(?![\w(])")
URL = re.compile(r"https?://\S+")
COMMAND_OUTPUT = re.compile(r"(?:--[\w-]*json|-o|>)\s+$")

STATUSES = ("verified", "from memory", "common practice")


def tracked_files() -> list[Path]:
    """Every tracked file (``git ls-files``); without git, every file under the root but build products."""
    try:
        out = subprocess.run(
            ["git", "ls-files", "-z"], cwd=ROOT, capture_output=True, check=True, timeout=60
        ).stdout
        names = [n for n in out.decode("utf-8").split("\0") if n]
    except (OSError, subprocess.SubprocessError):
        ignore = {".git", "dist", "node_modules", "__pycache__", ".pytest_cache", ".ruff_cache", "out"}
        names = [
            str(p.relative_to(ROOT))
            for p in ROOT.rglob("*")
            if p.is_file() and not ignore & set(p.relative_to(ROOT).parts)
        ]
    return [ROOT / n for n in sorted(names)]


def text_of(path: Path) -> str | None:
    if path.suffix.lower() in SKIP_SUFFIXES or path.name in SKIP_NAMES or path.suffix == ".lock":
        return None
    try:
        data = path.read_bytes()
    except OSError:
        return None
    if b"\0" in data:
        return None
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        return None


def prose_of_python(text: str) -> list[tuple[int, str]]:
    """(line, text) of the comments and strings of a Python file: code (``response.json()``) is not prose.

    A string that is nothing but a file name is a file the code makes or reads at run time, not a citation.
    """
    parts: list[tuple[int, str]] = []
    try:
        tokens = list(tokenize.generate_tokens(io.StringIO(text).readline))
    except (tokenize.TokenError, SyntaxError):
        return list(enumerate(text.splitlines(), 1))
    for tok in tokens:
        if tok.type == tokenize.COMMENT:
            parts.append((tok.start[0], tok.string))
        elif tok.type == tokenize.STRING:
            body = tok.string.strip("rbfuRBFU").strip("\"'")
            if re.fullmatch(r"[\w./-]+\.(?:md|json)", body):
                continue
            for i, line in enumerate(tok.string.splitlines()):
                parts.append((tok.start[0] + i, line))
    return parts


@cache
def anchors_of(page: Path) -> frozenset[str]:
    """The anchors of a Markdown page's headings (GitHub's rule: lower case, no punctuation, spaces to -)."""
    seen: dict[str, int] = {}
    out = set()
    in_fence = False
    for line in page.read_text(encoding="utf-8").splitlines():
        if line.startswith("```"):
            in_fence = not in_fence
        if in_fence:
            continue
        m = re.match(r"#{1,6}\s+(.*?)\s*#*\s*$", line)
        if not m:
            continue
        slug = re.sub(r"[^\w\- ]", "", m.group(1).strip().lower()).replace(" ", "-")
        n = seen.get(slug, 0)
        seen[slug] = n + 1
        out.add(slug if n == 0 else f"{slug}-{n}")
    return frozenset(out)


def resolve(citing: Path, name: str) -> Path | None:
    for base in (citing.parent, ROOT):
        candidate = (base / name).resolve()
        if candidate.exists():
            return candidate
    return None


def path_problems(citing: Path, line: str) -> list[str]:
    problems = []
    masked = URL.sub(lambda m: " " * len(m.group()), line)
    for m in PATH.finditer(masked):
        name, anchor = m.group(1), m.group(2)
        before, after = masked[: m.start()], masked[m.end() :]
        if before[-1:] in "\"'" and after[:1] in "\"'":
            continue  # a quoted bare file name in code: made or read at run time
        if Path(name).name in BUILT or COMMAND_OUTPUT.search(before) or OUTSIDE_FILE.search(name):
            continue  # built or written by a command; or an outside page, reported as such
        target = resolve(citing, name)
        if target is None:
            problems.append(f"{name}: no such file in the repository")
        elif anchor and target.suffix == ".md" and anchor[1:] not in anchors_of(target):
            problems.append(f"{name}{anchor}: no such heading in {target.relative_to(ROOT)}")
    return problems


def citation_problems(path: Path, text: str) -> list[str]:
    rel = path.relative_to(ROOT)
    found = []
    for number, line in enumerate(text.splitlines(), 1):
        for pattern in (OUTSIDE_FILE, OUTSIDE_SECTION, OUTSIDE_FOLDER):
            for m in pattern.finditer(line):
                found.append(f"{rel}:{number}: cites an outside page or folder: {m.group().strip()!r}")
    prose = prose_of_python(text) if path.suffix == ".py" else list(enumerate(text.splitlines(), 1))
    for number, line in prose:
        for problem in path_problems(path, line):
            found.append(f"{rel}:{number}: {problem}")
    return found


def test_no_citation_of_a_file_the_repository_lacks():
    found = []
    files = tracked_files()
    assert len(files) > 50, files  # the scan saw the repository
    for path in files:
        text = text_of(path)
        if text is not None:
            found.extend(citation_problems(path, text))
    assert not found, f"{len(found)} citations of files the repository lacks:\n" + "\n".join(found)


def test_the_scan_catches_what_it_should():
    """The patterns on lines that must (and must not) be flagged, so a broken pattern cannot pass quietly."""
    page = "REFER" + "ENCE"
    here = ROOT / "tests" / "core" / "test_citations.py"
    bad = [
        f"# {page}.md 4.4 caveat",
        f"# ({page} 12a)",
        "# the " + "CONT" + "RACT `blood_gas` outputs",
        "# " + "STY" + "LE" + ".md section 8",
        "path = ROOT / '..' / '" + "sha" + "red' / 'cases.json'",
        "see ../" + "sha" + "red/cases.json",
    ]
    for line in bad:
        assert citation_problems(here, line), line
    json, md = ".json", ".md"  # split, so that these lines do not flag this file
    assert path_problems(here, "# the worked cases (cases" + json + ")"), "no bare cases file here"
    assert path_problems(here, "# docs/no-such-page" + md)
    assert path_problems(ROOT / "README.md", "see docs/methods" + md + "#no-such-heading")
    good = [
        "# docs/methods.md and tests/cases/reference_cases.json",
        "# docs/clinical-rules.md#the-paco2-aim-pco2_target",
        'good = tmp_path / "cases.json"',
        "data = response.json()",
        "python3 bench/startup.py --json out/startup.json",
        "# the build writes build-manifest.json",
        "REFERENCE_TABLE = [",
        "# the glossary of names, docs/glossary/contract.md",
    ]
    for line in good:
        assert not citation_problems(here, line), line
    # resolved relative to the citing file: docs/glossary/cli.md may cite its neighbour, docs/cli.md may not
    assert not path_problems(ROOT / "docs" / "glossary" / "cli.md", "see acidbase" + md)
    assert path_problems(ROOT / "docs" / "cli.md", "see acidbase" + md)


# -- docs/methods.md --------------------------------------------------------------------------------------
KEY_WITH_MARK = re.compile(r"`([a-z0-9_]+)`\s*\((verified|from memory|common practice)\)")
CASE_ID = re.compile(r"\b[A-Z]{2}-\d{2}\b")


def methods_lines(label: str) -> list[tuple[int, str]]:
    """(line number, text) of each ``- **label`` item of docs/methods.md, with its indented continuation."""
    lines = METHODS.read_text(encoding="utf-8").splitlines()
    items = []
    for n, line in enumerate(lines, 1):
        if line.startswith(f"- **{label}"):
            more = itertools.takewhile(lambda x: x.startswith("  ") and x.strip(), lines[n:])
            items.append((n, " ".join([line, *(x.strip() for x in more)])))
    return items


def test_methods_cites_sources_references_py_has():
    """Every key on a **Sources** line (and every `key` (mark) anywhere) is in references.py, that mark."""
    text = METHODS.read_text(encoding="utf-8")
    lines = methods_lines("Source")
    assert len(lines) >= 30, "docs/methods.md: fewer Sources lines than methods"
    problems = []
    for number, line in lines:
        keys = re.findall(r"`([^`]+)`", line)
        assert keys, f"docs/methods.md:{number}: a Sources line without a key"
        for key in keys:
            if key not in REFERENCES:
                problems.append(f"docs/methods.md:{number}: {key!r} is not a references.py key")
            elif not re.search(rf"`{re.escape(key)}`\s*\({REFERENCES[key].status}\)", line):
                status = REFERENCES[key].status
                problems.append(f"docs/methods.md:{number}: {key!r} without its mark ({status})")
    for m in KEY_WITH_MARK.finditer(text):
        key, mark = m.groups()
        if key not in REFERENCES:
            problems.append(f"docs/methods.md: {key!r} is not a references.py key")
        elif REFERENCES[key].status != mark:
            status = REFERENCES[key].status
            problems.append(f"docs/methods.md: {key!r} marked {mark!r}, references.py says {status!r}")
    assert not problems, "\n".join(problems)


def test_methods_cites_worked_cases_and_tests_that_exist():
    cases = load_cases()
    problems = []
    for number, line in methods_lines("Cases"):
        for case_id in CASE_ID.findall(line):
            if case_id not in cases:
                problems.append(f"docs/methods.md:{number}: worked case {case_id} is not in the repository")
    tests = methods_lines("Tests")
    assert len(tests) >= 30, "docs/methods.md: fewer Tests lines than methods"
    for number, line in tests:
        paths = re.findall(r"`(tests/[^`:]+)", line)
        assert paths, f"docs/methods.md:{number}: a Tests line without a test file"
        problems += [
            f"docs/methods.md:{number}: {p} does not exist" for p in paths if not (ROOT / p).is_file()
        ]
    cited = {c for _, line in methods_lines("Cases") for c in CASE_ID.findall(line)}
    problems += [f"docs/methods.md: worked case {c} is not cited" for c in sorted(set(cases) - cited)]
    assert not problems, "\n".join(problems)
