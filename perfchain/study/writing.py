"""Writing a study's folder: tables in the output units, the study copy and provenance.

Every file goes through :func:`perfchain.study.files.write_atomic`, so a file that exists
is whole. The HTML report is written last, by :func:`perfchain.study.runner.run_study`.
"""

from __future__ import annotations

import datetime
import hashlib
import json
from pathlib import Path

from perfchain.study.files import write_atomic

__all__ = ["provenance", "write_tables", "study_copy", "write_bytes"]


def provenance(study_text: str, source: str, units: str, cap) -> dict:
    """Versions, data files, date and the study's hash.

    Parameters
    ----------
    study_text : str
        The study file's text, hashed (SHA-256, FIPS 180-4).
    source : str
        Where the study came from.
    units : str
        Output unit system (``si`` or ``us``).
    cap : int or None
        The cap on every engine list, if any.

    Returns
    -------
    dict

    Examples
    --------
    The SHA-256 of the empty text (FIPS 180-2, appendix; widely published):

    >>> provenance("", "study.toml", "si", None)["study_sha256"][:16]
    'e3b0c44298fc1c14'
    """
    import platform

    import cantera

    from perfchain import __version__
    from perfchain.propellants.ingredients import DATA_FILE
    from perfchain.thermo.products import CONDENSED_DATA, GAS_DATA

    return {
        "perfchain": __version__, "cantera": cantera.__version__, "python": platform.python_version(),
        "thermo_data": {"gas": GAS_DATA, "condensed": CONDENSED_DATA,
                        "source": f"NASA Glenn polynomials as shipped with Cantera {cantera.__version__}"},
        "ingredient_data": {"file": "mechanisms/ingredients.toml",
                            "sha256": hashlib.sha256(Path(DATA_FILE).read_bytes()).hexdigest()},
        "date": datetime.datetime.now(datetime.timezone.utc).replace(microsecond=0).isoformat(),
        "study_file": source, "study_sha256": hashlib.sha256(study_text.encode()).hexdigest(),
        "units": units, "grid_cap": cap,
    }


def write_bytes(path: Path, data: bytes):
    """Write ``data`` to ``path`` atomically (:func:`perfchain.study.files.write_atomic`).

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as d:
    ...     write_bytes(Path(d) / "x.txt", b"1 atm = 101325 Pa")
    ...     (Path(d) / "x.txt").read_bytes()
    b'1 atm = 101325 Pa'
    """
    write_atomic(path, lambda fh: fh.write(data))


def write_tables(tables: dict, out: Path, units: str, formats, meta: dict) -> list[Path]:
    """Each table in the output units, as Parquet (units in its metadata) and/or CSV (+ .meta.json).

    A Parquet table read back with :func:`pandas.read_parquet` carries ``attrs["units"]``
    (column -> unit of its values) and ``attrs["perfchain"]`` (the provenance).

    Parameters
    ----------
    tables : dict
        File stem -> DataFrame (SI units).
    out : Path
        The study's folder; tables go to ``out/tables``.
    units : str
        ``si`` or ``us``.
    formats : sequence of str
        ``parquet`` and/or ``csv``.
    meta : dict
        Provenance, stored beside the units.

    Returns
    -------
    list of Path

    Examples
    --------
    1 bar = 1e5 Pa (SI Brochure, 9th ed., Table 8):

    >>> import tempfile, pandas as pd
    >>> with tempfile.TemporaryDirectory() as d:
    ...     paths = write_tables({"t": pd.DataFrame({"chamber_pressure": [7e6]})}, Path(d), "si", ["csv"], {})
    ...     paths[0].read_text()
    'chamber_pressure\\n70.0\\n'
    """
    import pyarrow as pa
    import pyarrow.parquet as pq

    from perfchain.study.columns import convert_frame
    from perfchain.study.tables import pandas_attrs

    folder = out / "tables"
    folder.mkdir(exist_ok=True)
    written = []
    for stem, df in tables.items():
        table, col_units = convert_frame(df, units)
        info = json.dumps({"units": col_units, "provenance": meta}, default=str)
        if "parquet" in formats:
            path = folder / f"{stem}.parquet"
            arrow = pa.Table.from_pandas(table, preserve_index=False)
            arrow = arrow.replace_schema_metadata({**(arrow.schema.metadata or {}), b"perfchain": info.encode(),
                                                   b"PANDAS_ATTRS": pandas_attrs(col_units, meta)})
            write_atomic(path, lambda fh, t=arrow: pq.write_table(t, fh))
            written.append(path)
        if "csv" in formats:
            path = folder / f"{stem}.csv"
            write_bytes(path, table.to_csv(index=False).encode())
            write_bytes(folder / f"{stem}.csv.meta.json", (json.dumps(json.loads(info), indent=1) + "\n").encode())
            written.append(path)
    return written


def study_copy(study_text: str, meta: dict) -> str:
    """The study text as given, under a comment block of provenance (still valid TOML).

    Parameters
    ----------
    study_text : str
    meta : dict
        As from :func:`provenance`.

    Returns
    -------
    str

    Examples
    --------
    >>> import tomllib
    >>> text = study_copy('[study]\\ntitle = "t"\\n', provenance('[study]\\ntitle = "t"\\n', "s.toml", "si", None))
    >>> tomllib.loads(text)
    {'study': {'title': 't'}}
    """
    head = ["# Copy of the study as run by perfchain (data only; nothing in it is executed).",
            f"# perfchain {meta['perfchain']}, Cantera {meta['cantera']}, Python {meta['python']}",
            f"# thermodynamic data: {meta['thermo_data']['gas']}, {meta['thermo_data']['condensed']} "
            f"({meta['thermo_data']['source']})",
            f"# ingredient data: {meta['ingredient_data']['file']} sha256 {meta['ingredient_data']['sha256']}",
            f"# run on {meta['date']} from {meta['study_file']} (sha256 {meta['study_sha256']})",
            f"# output units: {meta['units']}" + (f"; lists capped at {meta['grid_cap']} values"
                                                  if meta["grid_cap"] else ""), ""]
    return "\n".join(head) + study_text

