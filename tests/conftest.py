"""Shared test helpers: the bundled example studies, computed once per test session.

Several test modules read the same example results (budgets, the report, the plots); each
example is computed once, with every list capped at two values (``max_list=2``), and reused.
"""

from functools import lru_cache
from pathlib import Path

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


@lru_cache(maxsize=None)
def example_result(name: str):
    """The StudyResult of ``examples/<name>.toml`` with lists capped at two values (computed once)."""
    from perfchain.study.runner import compute_study
    from perfchain.study.schema import load_study

    return compute_study(load_study(EXAMPLES / f"{name}.toml"), max_list=2)
