"""Output paths and files: early checks of where results go, atomic writes, checkpoint chunks.

Every result file is written to a hidden temporary file in its own folder and renamed into
place (:func:`write_atomic`), so a file that exists is whole. Checkpoint chunks are JSON
lists of rows (:func:`load_chunk`).
"""

from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path

from perfchain.errors import InputError

__all__ = ["FORMATS", "check_out", "check_out_dir", "write_atomic", "load_chunk"]

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
    if path.is_dir() and any(path.iterdir()) and not overwrite:
        raise InputError("--out", str(out), "a new or empty folder, or --overwrite to replace its results")
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError("--out", str(out), f"a folder that can be made ({exc.strerror})") from None
    if not os.access(path, os.W_OK | os.X_OK):
        raise InputError("--out", str(out), "a writable folder")
    return path


def write_atomic(path, write):
    """Write a file through a hidden temporary file in the same folder and a rename.

    Parameters
    ----------
    path : str or Path
        The file to write.
    write : callable
        Called with the binary file handle; whatever it raises removes the temporary file
        and leaves ``path`` as it was.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     write_atomic(Path(d) / "a.txt", lambda fh: fh.write(b"c* = 1800 m/s"))
    ...     (Path(d) / "a.txt").read_text(), sorted(p.name for p in Path(d).iterdir())
    ('c* = 1800 m/s', ['a.txt'])
    """
    path = Path(path)
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def load_chunk(item) -> list:
    """The rows of a chunk: read from its checkpoint file, or the list itself.

    Parameters
    ----------
    item : Path or list of dict
        A checkpoint file (JSON list of rows) or rows held in memory.

    Returns
    -------
    list of dict

    Examples
    --------
    >>> load_chunk([{"cstar": 1800.0}])
    [{'cstar': 1800.0}]
    """
    if isinstance(item, Path):
        return json.loads(item.read_text())
    return item
