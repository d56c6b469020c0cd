"""Small helpers shared by the study runner, plots and report: file names and list caps.

The lowest module of the study floor's writing side: it imports nothing from perfchain.
"""

from __future__ import annotations

import re

__all__ = ["slug", "shrink"]


def slug(name: str) -> str:
    """A file-name-safe form of a name.

    >>> slug("Corvid-2 upper stage (LOX/LCH4)")
    'corvid-2-upper-stage-lox-lch4'
    """
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-") or "item"


def shrink(values: list, cap: int | None) -> list:
    """At most ``cap`` evenly spaced values of a list, first and last kept.

    >>> shrink([1, 2, 3, 4, 5, 6, 7], 3)
    [1, 4, 7]
    """
    if cap is None or len(values) <= cap:
        return list(values)
    if cap <= 1:
        return [values[0]]
    idx = sorted({round(i * (len(values) - 1) / (cap - 1)) for i in range(cap)})
    return [values[i] for i in idx]

