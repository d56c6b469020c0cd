"""Packaging and layout (issue 11): the wheel ships the data, imports follow the chain, and a
missing dependency or data file is one line on stderr with exit code 2, never a traceback.

The import rules themselves live in pyproject.toml ([tool.importlinter]); DEVELOPERS.md explains them.
"""

from __future__ import annotations

import ast
import importlib.util
import os
import re
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import click
import pytest
from click.testing import CliRunner

from perfchain.cli.main import _install_hint, main
from perfchain.propellants import records as ingredients   # the module that reads the data file

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "perfchain"
POINT = ["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6",
         "--chamber-pressure", "70 bar", "--area-ratio", "40"]


def _env():
    """The environment of a child Python that imports perfchain from this checkout."""
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join([str(ROOT)] + [p for p in [env.get("PYTHONPATH")] if p])
    return env


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _private(name: str) -> bool:
    return name.startswith("_") and not (name.startswith("__") and name.endswith("__"))


def _private_imports() -> list[tuple[str, str]]:
    """(where, dotted name) of every private name one perfchain module takes from another.

    Counts ``from perfchain.x import _y``, ``import perfchain._x`` and ``module._y`` where
    ``module`` is a perfchain module bound by an import; a module's own names do not count.
    """
    found = []
    for path in sorted(PACKAGE.rglob("*.py")):
        mod = _module_name(path)
        package = mod if path.name == "__init__.py" else mod.rpartition(".")[0]
        tree = ast.parse(path.read_text(encoding="utf-8"))
        bound = {}
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom):
                src = node.module or ""
                if node.level:
                    base = package.split(".")[: len(package.split(".")) - node.level + 1]
                    src = ".".join(base + ([node.module] if node.module else []))
                if src.split(".")[0] != "perfchain":
                    continue
                for alias in node.names:
                    full = f"{src}.{alias.name}"
                    if src != mod and any(_private(p) for p in full.split(".")):
                        found.append((f"{path.relative_to(ROOT)}:{node.lineno}", full))
                    bound[alias.asname or alias.name] = full
            elif isinstance(node, ast.Import):
                for alias in node.names:
                    if alias.name.split(".")[0] != "perfchain":
                        continue
                    if any(_private(p) for p in alias.name.split(".")):
                        found.append((f"{path.relative_to(ROOT)}:{node.lineno}", alias.name))
                    bound[alias.asname or "perfchain"] = alias.name if alias.asname else "perfchain"
        for node in ast.walk(tree):
            if (isinstance(node, ast.Attribute) and _private(node.attr)
                    and isinstance(node.value, ast.Name) and node.value.id in bound):
                found.append((f"{path.relative_to(ROOT)}:{node.lineno}", f"{bound[node.value.id]}.{node.attr}"))
    return found


def _cycles() -> list[list[str]]:
    """Strongly connected groups of perfchain modules (Tarjan), from grimp's import graph."""
    grimp = pytest.importorskip("grimp", reason="grimp comes with import-linter (the test extra)")
    sys.path.insert(0, str(ROOT))
    try:
        graph = grimp.build_graph("perfchain", cache_dir=None)
    finally:
        sys.path.remove(str(ROOT))
    edges = {m: sorted(graph.find_modules_directly_imported_by(m)) for m in sorted(graph.modules)}
    index, low, stack, on_stack, groups = {}, {}, [], set(), []

    def visit(v):  # recursion depth is bounded by the module count (~60)
        index[v] = low[v] = len(index)
        stack.append(v)
        on_stack.add(v)
        for w in edges[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            group = []
            while not group or group[-1] != v:
                group.append(stack.pop())
                on_stack.discard(group[-1])
            if len(group) > 1 or v in edges[v]:
                groups.append(sorted(group))

    for m in edges:
        if m not in index:
            visit(m)
    return sorted(groups)


# --- layout ---------------------------------------------------------------------------------

def test_import_contracts_hold():
    """The layers, the vehicle's independence and the no-cycles contract of pyproject.toml."""
    pytest.importorskip("importlinter", reason="import-linter is in the test extra")
    code = ("import sys; from importlinter.cli import lint_imports; "
            "sys.exit(lint_imports(config_filename='pyproject.toml', no_cache=True, no_logo=True))")
    r = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=_env(), capture_output=True,
                       text=True, timeout=300)
    assert r.returncode == 0, r.stdout + r.stderr
    assert "0 broken" in r.stdout


# The cycles left after the package was split are gone (issue 11): the propellant name
# resolver sits above the records, the batch solver has one kernel source.
def test_no_import_cycles():
    assert _cycles() == []


# Private names still taken across modules, keyed by the name alone so that moving a module
# does not trip the guard below (none left: the last ones went with thermo.batch_numpy).
KNOWN_PRIVATE_IMPORTS: set = set()


def test_no_private_names_imported_across_modules():
    assert _private_imports() == []


def test_no_new_private_names_imported_across_modules():
    new = [(where, name) for where, name in _private_imports()
           if name.rpartition(".")[2] not in KNOWN_PRIVATE_IMPORTS]
    assert new == [], "import a public name instead (or make it public where it is defined)"


def test_private_import_scanner_sees_all_three_forms(tmp_path, monkeypatch):
    """The scanner itself: each form of private import is found, a module's own names are not."""
    pkg = tmp_path / "perfchain"
    (pkg / "a").mkdir(parents=True)
    (pkg / "__init__.py").write_text("")
    (pkg / "a" / "__init__.py").write_text("")
    (pkg / "a" / "x.py").write_text("_own = 1\nfrom perfchain.a.x import _own\n")
    (pkg / "a" / "y.py").write_text("from .x import _own, public\nimport perfchain._hidden\n"
                                    "from perfchain.a import x\nz = x._own\n")
    monkeypatch.setattr(sys.modules[__name__], "ROOT", tmp_path)
    monkeypatch.setattr(sys.modules[__name__], "PACKAGE", pkg)
    assert [name for _, name in _private_imports()] == [
        "perfchain.a.x._own", "perfchain._hidden", "perfchain.a.x._own"]


# --- the wheel ------------------------------------------------------------------------------

def _can_build_offline() -> str:
    """Why the wheel cannot be built here without network, or "" when it can."""
    if importlib.util.find_spec("setuptools") is None or importlib.util.find_spec("wheel") is None:
        return "setuptools and wheel (the test extra) are needed to build without isolation"
    import setuptools

    if int(setuptools.__version__.split(".")[0]) < 77:
        return f"setuptools {setuptools.__version__} < 77 (the build backend pyproject.toml asks for)"
    return ""


@pytest.mark.skipif(bool(_can_build_offline()), reason=_can_build_offline() or "-")
def test_wheel_ships_the_data_and_every_subpackage(tmp_path):
    """Build the wheel offline from a copy of the sources (the checkout stays clean)."""
    src = tmp_path / "src"
    src.mkdir()
    for name in ("pyproject.toml", "README.md"):
        shutil.copy2(ROOT / name, src / name)
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc")
    for name in ("perfchain", "mechanisms"):
        shutil.copytree(ROOT / name, src / name, ignore=ignore)
    r = subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "--no-index",
         "-q", "-w", str(tmp_path / "dist"), str(src)],
        capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stdout + r.stderr
    (wheel,) = (tmp_path / "dist").glob("perfchain-*.whl")
    names = set(zipfile.ZipFile(wheel).namelist())
    assert "perfchain/mechanisms/ingredients.toml" in names
    sources = {p.relative_to(ROOT).as_posix() for p in PACKAGE.rglob("*.py")}
    inits = {s for s in sources if s.endswith("/__init__.py")}
    assert len(inits) >= 8  # perfchain and its seven subpackages
    assert sorted(inits - names) == []
    assert sorted(sources - names) == []  # every module, not just the packages
    entry_points = next(n for n in names if n.endswith(".dist-info/entry_points.txt"))
    assert "perfchain = perfchain.cli:main" in zipfile.ZipFile(wheel).read(entry_points).decode()


def test_data_file_is_found_through_the_package():
    """The ingredient records are read where importlib.resources (or the checkout) puts them."""
    assert Path(ingredients.DATA_FILE).is_file()
    assert Path(ingredients.DATA_FILE).name == "ingredients.toml"


# --- missing data or dependency: one line, exit 2 ---------------------------------------------

def _one_error_line(text: str):
    lines = [line for line in text.splitlines() if line.strip()]
    assert len(lines) == 1, text
    assert lines[0].startswith("error: ")
    assert "Traceback" not in text
    return lines[0]


def test_missing_ingredient_data_is_one_line(tmp_path, monkeypatch):
    missing = tmp_path / "gone" / "ingredients.toml"
    monkeypatch.setattr(ingredients, "DATA_FILE", missing)
    r = CliRunner().invoke(main, POINT)
    assert r.exit_code == 2, r.output
    line = _one_error_line(r.output)
    assert line.startswith("error: ingredient data:") and str(missing) in line


def test_unreadable_ingredient_data_is_one_line(tmp_path, monkeypatch):
    """A folder where the file should be: an OSError other than 'not found'."""
    monkeypatch.setattr(ingredients, "DATA_FILE", tmp_path)
    r = CliRunner().invoke(main, ["ingredients"])
    assert r.exit_code == 2, r.output
    assert _one_error_line(r.output).startswith("error: ingredient data:")


def _invoke_raising(monkeypatch, exc):
    """Run ``perfchain boom`` where the command ``boom`` raises ``exc``."""
    @click.command("boom")
    def boom():
        raise exc

    monkeypatch.setitem(main.commands, "boom", boom)
    return CliRunner().invoke(main, ["boom"])


def test_os_error_is_one_line(monkeypatch):
    """Any other file a command cannot read or write: the path and the reason."""
    r = _invoke_raising(monkeypatch, PermissionError(13, "Permission denied", "/srv/data/x.toml"))
    assert r.exit_code == 2, r.output
    assert _one_error_line(r.output) == "error: /srv/data/x.toml: Permission denied"


@pytest.mark.parametrize("blocked, hint", [
    ("cantera", "pip install cantera"),
    ("numpy", "pip install numpy"),
])
def test_missing_dependency_is_one_line(blocked, hint):
    """A dependency that cannot be imported (blocked in a child process) names what to install."""
    code = (f"import sys; sys.modules[{blocked!r}] = None; "
            "from perfchain.cli.main import main; main()")
    r = subprocess.run([sys.executable, "-c", code, *POINT], capture_output=True, text=True,
                       env=_env(), cwd=ROOT, timeout=120)
    assert r.returncode == 2, r.stdout + r.stderr
    assert _one_error_line(r.stderr) == f"error: missing dependency '{blocked}': install it with {hint}"


def test_missing_optional_dependency_names_the_extra(monkeypatch):
    """dask/distributed come with the ``cluster`` extra; the line says so."""
    r = _invoke_raising(monkeypatch, ModuleNotFoundError("No module named 'distributed'", name="distributed"))
    assert r.exit_code == 2, r.output
    assert _one_error_line(r.output) == (
        "error: missing dependency 'distributed': install it with pip install \"perfchain[cluster]\"")
    assert _install_hint("dask.dataframe") == 'pip install "perfchain[cluster]"'


def test_dependency_that_fails_to_load_is_one_line(monkeypatch):
    """Installed but broken (an ImportError other than 'not found'): reinstall it."""
    r = _invoke_raising(monkeypatch, ImportError("cannot import name 'x' from 'pint'", name="pint"))
    assert r.exit_code == 2, r.output
    assert _one_error_line(r.output) == ("error: dependency 'pint' cannot be imported (cannot import "
                                         "name 'x' from 'pint'): reinstall it with pip install pint")


def test_broken_own_module_is_not_hidden(monkeypatch):
    """A perfchain module that cannot be imported is a bug, reported with its traceback."""
    r = _invoke_raising(monkeypatch, ModuleNotFoundError("No module named 'perfchain.nowhere'",
                                                         name="perfchain.nowhere"))
    assert isinstance(r.exception, ModuleNotFoundError)


def test_no_citation_of_a_file_outside_the_repository():
    """Sources are named inline; a ``*.md`` a test or module cites must ship with the repository."""
    missing = []
    for folder in ("perfchain", "tests", "benchmarks"):
        for path in sorted((ROOT / folder).rglob("*.py")):
            for n, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1):
                for cited in re.findall(r"[\w./-]*\w\.md\b", line):
                    if not ((ROOT / cited).exists() or (ROOT / Path(cited).name).exists()
                            or (ROOT / "docs" / Path(cited).name).exists()):
                        missing.append(f"{path.relative_to(ROOT)}:{n}: {cited}")
    assert missing == []
