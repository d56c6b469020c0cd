"""Small helpers shared by the study runner, plots and report: names, file names and list caps.

Names in a study are compared case-insensitively (:func:`name_key`), as ingredient names
are looked up. A name becomes a file stem through :func:`file_stems`: distinct names get
distinct stems (a short hash is added where two names would give one stem, where a name
has no Latin letters or digits, or where it is too long), and no stem is longer than
:data:`MAX_STEM` characters, so every file name stays within the 255 bytes of common
file systems.

The lowest module of the study floor's writing side: it imports nothing from perfchain.
"""

from __future__ import annotations

import hashlib
import re
import unicodedata

__all__ = ["slug", "shrink", "name_key", "first_duplicate", "file_stems", "MAX_STEM"]

MAX_STEM = 80   #: longest file stem made from a name [characters]
_HASH = 8       #: hex digits of the hash that keeps stems apart


def slug(name: str) -> str:
    """A file-name-safe form of a name (may be empty for a name without Latin letters or digits).

    >>> slug("Corvid-2 upper stage (LOX/LCH4)")
    'corvid-2-upper-stage-lox-lch4'
    """
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-")


def name_key(name: str) -> str:
    """The form under which two names count as the same: Unicode case-folded, NFKC, trimmed.

    >>> name_key(" Hex ") == name_key("hex"), name_key("E1") == name_key("e1")
    (True, True)
    """
    return unicodedata.normalize("NFKC", str(name)).casefold().strip()


def first_duplicate(keys) -> tuple[int, int] | None:
    """Positions (first, second) of the first key that repeats an earlier one, or None.

    >>> first_duplicate(["a", "b", "a"]), first_duplicate(["a", "b"])
    ((0, 2), None)
    """
    seen: dict = {}
    for j, k in enumerate(keys):
        if k in seen:
            return seen[k], j
        seen[k] = j
    return None


def _digest(name: str, digits: int) -> str:
    return hashlib.sha256(name.encode("utf-8", "surrogatepass")).hexdigest()[:digits]


def file_stems(names, max_length: int = MAX_STEM) -> dict:
    """Name -> file stem: distinct for distinct names, at most ``max_length`` characters.

    A name keeps its plain :func:`slug` unless that slug is shared with another name, is
    empty, or is longer than ``max_length``; then the stem ends in ``-`` and the first
    eight hex digits of the name's SHA-256 (FIPS 180-4).

    Parameters
    ----------
    names : iterable of str
        The names of one kind (engines, or comparisons) in a study.
    max_length : int
        Longest stem [characters], at least 20.

    Returns
    -------
    dict
        Name -> stem (lower-case ASCII letters, digits and ``-``).

    Examples
    --------
    >>> stems = file_stems(["Wisp", "E1", "e1", "E-1", "E 1"])
    >>> stems["Wisp"], len({stems[n] for n in ("E1", "e1", "E-1", "E 1")})
    ('wisp', 4)
    >>> stems["E-1"][:4], len(stems["E-1"])
    ('e-1-', 12)
    >>> max(len(s) for s in file_stems(["x" * 300]).values())
    80
    """
    names = list(dict.fromkeys(names))
    if max_length < 20:
        raise ValueError("max_length below 20")
    plain = {n: slug(n) for n in names}
    count: dict = {}
    for s in plain.values():
        count[s] = count.get(s, 0) + 1
    for digits in (_HASH, 2 * _HASH, 64):
        out = {}
        for n, s in plain.items():
            if s and count[s] == 1 and len(s) <= max_length:
                out[n] = s
            else:
                head = s[:max_length - digits - 1].rstrip("-")
                out[n] = f"{head}-{_digest(n, digits)}" if head else f"item-{_digest(n, digits)}"
        if len(set(out.values())) == len(out):
            return out
    raise ValueError("names whose stems cannot be kept apart")   # needs a SHA-256 collision


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
