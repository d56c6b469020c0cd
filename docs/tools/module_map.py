"""Print the module map of the perfchain package: a tree, one line per module.

Each line is the module's file name and the first sentence of its docstring, read with
:mod:`ast` (nothing is imported, so it runs in a second). DEVELOPERS.md shows its output; run
it again after moving or adding modules and paste the result there::

    python3 docs/tools/module_map.py
"""

from __future__ import annotations

import ast
import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
#: the chain's order, then the base modules; anything else follows alphabetically
ORDER = ["propellants", "thermo", "nozzle", "performance", "vehicle", "study", "cli", "api",
         "inputs", "uncertainty"]
WIDTH = 110


def summary(path: Path) -> str:
    """Summary line of the module docstring, without reST markup ('' when there is none)."""
    doc = ast.get_docstring(ast.parse(path.read_text(encoding="utf-8"))) or ""
    first = doc.strip().split("\n")[0]
    first = re.sub(r":\w+:`~?([^`]+)`", r"\1", first).replace("``", "")
    return first.rstrip(".")


def lines(folder: Path, prefix: str = "") -> list[str]:
    """Tree lines for one package folder: its modules, then its subpackages."""
    modules = sorted(p for p in folder.glob("*.py") if p.name != "__init__.py")
    packages = [p for p in folder.iterdir() if (p / "__init__.py").is_file()]
    packages.sort(key=lambda p: (ORDER.index(p.name) if p.name in ORDER else len(ORDER), p.name))
    entries = [(p.name, summary(p), None) for p in modules]
    entries += [(p.name + "/", summary(p / "__init__.py"), p) for p in packages]
    out = []
    for i, (name, text, sub) in enumerate(entries):
        last = i == len(entries) - 1
        branch = "└── " if last else "├── "
        head = f"{prefix}{branch}{name}"
        line = f"{head:<30} {text}" if text else head
        out.append(line if len(line) <= WIDTH else line[: WIDTH - 3] + "...")
        if sub is not None:
            out += lines(sub, prefix + ("    " if last else "│   "))
    return out


def main() -> int:
    pkg = ROOT / "perfchain"
    print(f"{'perfchain/':<30} {summary(pkg / '__init__.py')}")
    print("\n".join(lines(pkg)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
