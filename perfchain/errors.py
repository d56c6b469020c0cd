"""The one exception family of perfchain.

Every error a user can cause is a subclass of :class:`PerfchainError`, itself a
:class:`ValueError`, and its message is one line that names the field, the
value given and what is allowed. The CLI prints that line and exits with code 2.
"""

from __future__ import annotations

import difflib
from typing import Iterable

__all__ = ["PerfchainError", "InputError", "DataError", "SolverError", "suggest"]


class PerfchainError(ValueError):
    """Base class of every error perfchain raises on purpose."""


class InputError(PerfchainError):
    """A user input is wrong: names the field, the value and what is allowed.

    Examples
    --------
    >>> str(InputError("chamber_pressure", "-3 bar", "a pressure above 0 Pa"))
    "chamber_pressure: got '-3 bar'; allowed: a pressure above 0 Pa"
    """

    def __init__(self, field: str, value: object, allowed: str):
        self.field = field
        self.value = value
        self.allowed = allowed
        super().__init__(f"{field}: got {value!r}; allowed: {allowed}")


class DataError(InputError):
    """Bundled data or an optional dependency cannot be found or read.

    >>> str(DataError("ingredient data", "/x/ingredients.toml", "a readable file"))
    "ingredient data: got '/x/ingredients.toml'; allowed: a readable file"
    """


class SolverError(PerfchainError):
    """A physics solve failed; the message carries the operating point."""

    def __init__(self, what: str, point: str = ""):
        self.what = what
        self.point = point
        text = what if not point else f"{what} (at {point})"
        super().__init__(" ".join(text.split()))


def suggest(word: str, choices: Iterable[str], n: int = 3) -> str:
    """Return ``"did you mean 'a', 'b'?"`` for the closest choices, or ``""``.

    >>> suggest("LOXX", ["LOX", "LH2", "GOX"])
    "did you mean 'LOX', 'GOX'?"
    """
    choices = list(choices)
    lower = {c.lower(): c for c in choices}
    hits = difflib.get_close_matches(word.lower(), list(lower), n=n, cutoff=0.5)
    if not hits:
        return ""
    return "did you mean " + ", ".join(repr(lower[h]) for h in hits) + "?"
