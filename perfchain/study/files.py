"""Output paths and files: early checks, atomic writes, folder locks and checkpoint chunks.

Every result file is written to a hidden temporary file in its own folder and renamed into
place (:func:`write_atomic`), so a file that exists is whole; the temporary names follow one
pattern (``.<name>.perfchain-XXXXXXXX.tmp``) so a later run can remove those a killed run
left (:func:`remove_stale_temps`). A disk that fills up is one :class:`InputError` line naming
the file. A folder that a run writes into is locked for that run (:func:`folder_lock`), so the
same sweep or study started twice at once stops with one line instead of the two runs taking
each other's files away.

A checkpoint chunk (:func:`write_chunk`) is one header line — row count, byte count and
SHA-256 of the rows, and the fingerprint of the code that computed them — and the rows as a
JSON list. :func:`chunk_problem` says what is wrong with a chunk on disk (cut short, emptied,
edited, made by other code), so a resume computes such a chunk again instead of trusting it.
"""

from __future__ import annotations

import contextlib
import fcntl
import hashlib
import json
import os
import re
import tempfile
import threading
from pathlib import Path

from perfchain.errors import InputError

__all__ = ["FORMATS", "check_out", "check_out_dir", "write_atomic", "remove_stale_temps", "folder_lock",
           "write_chunk", "chunk_problem", "load_chunk", "STAGING_PREFIX"]

TEMP_MARK = "perfchain-"            #: in every temporary file name: ``.<name>.perfchain-XXXXXXXX.tmp``
STAGING_PREFIX = ".perfchain-run-"  #: a study run's staging folder inside its output folder
FORMATS = {".csv": "CSV", ".json": "JSON", ".parquet": "Parquet"}


def check_out(out) -> Path:
    """Refuse a table path early: unknown extension, missing or read-only folder.

    Parameters
    ----------
    out : str or Path
        A file ending in ``.csv``, ``.json`` or ``.parquet`` (Parquet needs pyarrow).

    Returns
    -------
    Path

    Examples
    --------
    >>> check_out("table.csv").name
    'table.csv'
    >>> try:
    ...     check_out("table.xlsx")
    ... except InputError as exc:
    ...     print(exc.field, exc.value)
    out table.xlsx
    """
    path = Path(out)
    if path.suffix.lower() not in FORMATS:
        raise InputError("out", str(out), "a file name ending in " + ", ".join(FORMATS))
    if path.suffix.lower() == ".parquet":
        try:
            import pyarrow  # noqa: F401
        except ImportError:
            raise InputError("out", str(out), "a .csv or .json file (Parquet needs pyarrow installed)") from None
    parent = path.parent if str(path.parent) else Path(".")
    if path.is_dir() or not parent.is_dir() or not os.access(parent, os.W_OK | os.X_OK):
        raise InputError("out", str(out), "a file path in an existing, writable folder")
    return path


def check_out_dir(out, overwrite: bool) -> Path:
    """Refuse an output folder that holds files unless ``overwrite``; make it if missing.

    Parameters
    ----------
    out : str or Path
        The study's output folder.
    overwrite : bool
        Allow a folder that already holds files.

    Returns
    -------
    Path

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     check_out_dir(Path(d) / "results", overwrite=False).is_dir()
    True
    """
    path = Path(out)
    if path.exists() and not path.is_dir():
        raise InputError("--out", str(out), "a folder (this is a file)")
    leftovers = (STAGING_PREFIX, ".")   # a killed run's staging folder or temporary files do not count
    if path.is_dir() and any(not (p.name.startswith(leftovers) and _is_ours(p)) for p in path.iterdir()) \
            and not overwrite:
        raise InputError("--out", str(out), "a new or empty folder, or --overwrite to replace its results")
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError("--out", str(out), f"a folder that can be made ({exc.strerror})") from None
    if not os.access(path, os.W_OK | os.X_OK):
        raise InputError("--out", str(out), "a writable folder")
    return path


def _is_ours(p: Path) -> bool:
    """A staging folder or temporary file a perfchain run left behind."""
    return p.name.startswith(STAGING_PREFIX) if p.is_dir() else _TEMP.match(p.name) is not None


_TEMP = re.compile(r"^\.(?P<name>.+)\.(?:" + TEMP_MARK + r")?[a-z0-9_]{8}\.tmp$")


def write_atomic(path, write):
    """Write a file through a hidden temporary file in the same folder and a rename.

    Parameters
    ----------
    path : str or Path
        The file to write.
    write : callable
        Called with the binary file handle; whatever it raises removes the temporary file
        and leaves ``path`` as it was. An OSError (a full disk, a folder gone) becomes one
        :class:`InputError` line naming ``path``.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     write_atomic(Path(d) / "a.txt", lambda fh: fh.write(b"c* = 1800 m/s"))
    ...     (Path(d) / "a.txt").read_text(), sorted(p.name for p in Path(d).iterdir())
    ('c* = 1800 m/s', ['a.txt'])
    """
    path = Path(path)
    try:
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.{TEMP_MARK}", suffix=".tmp")
    except OSError as exc:
        raise InputError("out", str(path), f"a file that can be written ({exc.strerror})") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException as exc:
        if os.path.exists(tmp):
            os.unlink(tmp)
        if isinstance(exc, OSError):
            raise InputError("out", str(path), f"a file that can be written ({exc.strerror or exc})") from None
        raise


def remove_stale_temps(folder, name: str | None = None) -> int:
    """Remove the temporary files a killed run left in ``folder`` (of the file ``name``, or all).

    Call it only while holding the folder's lock (:func:`folder_lock`): a temporary file of
    a run that is still writing would go too. Both patterns count: ``.<name>.perfchain-XXXXXXXX.tmp``
    and the older ``.<name>.XXXXXXXX.tmp``.

    Parameters
    ----------
    folder : str or Path
    name : str, optional
        The final file's name; only its temporary files are removed.

    Returns
    -------
    int
        Files removed.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     for n in (".x.parquet.ab12cd34.tmp", ".x.parquet.perfchain-zz_9yy8x.tmp", "x.parquet", ".y.tmp"):
    ...         _ = (Path(d) / n).write_bytes(b"")
    ...     remove_stale_temps(d, "x.parquet"), sorted(p.name for p in Path(d).iterdir())
    (2, ['.y.tmp', 'x.parquet'])
    """
    gone = 0
    folder = Path(folder)
    if not folder.is_dir():
        return 0
    for p in folder.iterdir():
        m = _TEMP.match(p.name)
        if m and (name is None or m.group("name") == name) and p.is_file():
            p.unlink(missing_ok=True)
            gone += 1
    return gone


_HELD: dict = {}          # (folder, thread) -> depth: a thread may take its own lock again
_HELD_GUARD = threading.Lock()


@contextlib.contextmanager
def folder_lock(folder, field: str):
    """Hold an exclusive lock on a folder for one run; a second run gets one line at once.

    An advisory ``flock`` on the folder itself (no lock file to clean up); the system drops
    it when the run's process ends, however it ends. Taken again by the same thread it
    just nests.

    Parameters
    ----------
    folder : str or Path
        An existing folder (a sweep's checkpoint folder, a study's output folder).
    field : str
        Named in the error (``out``, ``--out``, ``checkpoint``).

    Examples
    --------
    >>> import tempfile, threading
    >>> with tempfile.TemporaryDirectory() as d, folder_lock(d, "out"):
    ...     box = {}
    ...     def other():
    ...         try:
    ...             with folder_lock(d, "out"):
    ...                 pass
    ...         except InputError as exc:
    ...             box["error"] = exc.allowed
    ...     t = threading.Thread(target=other); t.start(); t.join()
    ...     print(box["error"][:40])
    a folder no other perfchain run is using
    """
    folder = Path(folder)
    key = (str(folder.resolve()), threading.get_ident())
    with _HELD_GUARD:
        depth = _HELD.get(key, 0)
        _HELD[key] = depth + 1
    fd = None
    try:
        if depth == 0:
            fd = _lock(folder, field)
        yield folder
    finally:
        if fd is not None:
            os.close(fd)    # drops the lock
        with _HELD_GUARD:
            _HELD[key] -= 1
            if not _HELD[key]:
                del _HELD[key]


def _lock(folder: Path, field: str) -> int:
    for _ in range(3):
        try:
            fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY | os.O_CLOEXEC)
        except OSError as exc:
            raise InputError(field, str(folder), f"a folder that can be opened ({exc.strerror})") from None
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(fd)
            raise InputError(field, str(folder), "a folder no other perfchain run is using right now (another "
                             "run holds it: wait for it to finish, or write elsewhere)") from None
        if os.fstat(fd).st_nlink > 0:
            return fd
        os.close(fd)        # the other run removed the folder as we locked it: make it again
        folder.mkdir(parents=True, exist_ok=True)
    raise InputError(field, str(folder), "a folder that stays in place while this run uses it")


# --------------------------------------------------------------------------- checkpoint chunks
def write_chunk(path, rows: list, code: str):
    """Write a checkpoint chunk: a header line (counts, SHA-256, code fingerprint), then the rows.

    Parameters
    ----------
    path : str or Path
    rows : list of dict
        The chunk's rows (plain JSON values).
    code : str
        The :func:`~perfchain.study.provenance.code_fingerprint` of the code that computed them.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     write_chunk(Path(d) / "c.json", [{"cstar": 1800.0}], "0123456789abcdef")
    ...     chunk_problem(Path(d) / "c.json", 1, "0123456789abcdef"), load_chunk(Path(d) / "c.json")
    (None, [{'cstar': 1800.0}])
    """
    body = json.dumps(rows).encode()
    head = json.dumps({"perfchain_chunk": 1, "rows": len(rows), "bytes": len(body),
                       "sha256": hashlib.sha256(body).hexdigest(), "code": code}).encode()
    write_atomic(path, lambda fh: fh.write(head + b"\n" + body))


def _read_chunk(path: Path):
    """(header, body) of a chunk file, or (None, reason)."""
    try:
        data = path.read_bytes()
    except OSError as exc:
        return None, f"unreadable ({exc.strerror})"
    line, sep, body = data.partition(b"\n")
    try:
        head = json.loads(line) if sep else None
    except ValueError:
        head = None
    if not isinstance(head, dict) or head.get("perfchain_chunk") != 1:
        return None, "not a whole perfchain chunk (no header)"
    if len(body) != head.get("bytes"):
        return None, f"cut short or grown ({len(body)} of {head.get('bytes')} bytes)"
    if hashlib.sha256(body).hexdigest() != head.get("sha256"):
        return None, "changed since it was written (SHA-256 differs)"
    return head, body


def chunk_problem(path, rows: int, code: str) -> str | None:
    """What is wrong with a chunk on disk for a resume, or None if it can be used as it is.

    Parameters
    ----------
    path : str or Path
    rows : int
        Rows the chunk must hold.
    code : str
        The fingerprint of the code now running; a chunk made by other code is not used.

    Returns
    -------
    str or None
        A short reason (``"cut short (100 of 5000 bytes)"``, ``"0 rows, 256 expected"``...).

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     _ = (Path(d) / "c.json").write_text("[]")
    ...     chunk_problem(Path(d) / "c.json", 256, "0123456789abcdef")
    'not a whole perfchain chunk (no header)'
    """
    head, body = _read_chunk(Path(path))
    if head is None:
        return body
    if head.get("code") != code:
        return f"made by other perfchain code ({head.get('code')})"
    if head.get("rows") != rows:
        return f"{head.get('rows')} rows, {rows} expected"
    return None


def load_chunk(item) -> list:
    """The rows of a chunk: read from its checkpoint file (checked whole), or the list itself.

    Parameters
    ----------
    item : Path or list of dict
        A checkpoint file (:func:`write_chunk`) or rows held in memory.

    Returns
    -------
    list of dict

    Raises
    ------
    InputError
        Naming the file, when it is not a whole chunk.

    Examples
    --------
    >>> load_chunk([{"cstar": 1800.0}])
    [{'cstar': 1800.0}]
    """
    if not isinstance(item, Path):
        return item
    head, body = _read_chunk(item)
    rows = json.loads(body) if head is not None else None
    if head is None or not isinstance(rows, list) or len(rows) != head["rows"]:
        raise InputError("checkpoint", str(item), "a whole checkpoint chunk (this one is "
                         f"{body if head is None else 'inconsistent'}); delete it and run again")
    return rows
