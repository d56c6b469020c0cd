"""Studies: grids of operating points, optima, comparisons, trade-offs, tables, plots, reports.

Owns, lowest first:

- sweeps: :mod:`.grid` (validated lists), :mod:`.rows` (a result as one row),
  :mod:`.provenance` (versions, inputs, code fingerprint), :mod:`.files` (output paths,
  atomic writes), :mod:`.tables` (column types and writers), :mod:`.chunks` (work units on
  the batch solver), :mod:`.execution` (local pool or Dask cluster, checkpoints, resume) and
  the front :mod:`.sweep`;
- optimum O/F and pair comparison (:mod:`.optimum`), chemistry-to-vehicle trades
  (:mod:`.tradeoff`);
- study files: :mod:`.fields` (field types), :mod:`.keys` (one-line errors),
  :mod:`.toml_text` (writing TOML), :mod:`.schema` (the sections, load and save);
- running a study: :mod:`.names`, :mod:`.engines`, :mod:`.sections`, :mod:`.writing` and
  :mod:`.runner`; output columns and their units (:mod:`.columns`), plots (:mod:`.plots`) and
  the HTML report (:mod:`.report`), which never import the runner; an engine's thermal block
  (:mod:`.thermal`) and the files of a chamber design (:mod:`.chamber_files`).

May import every lower floor: performance, nozzle, thermo, propellants, vehicle and the shared
base modules. Never imports :mod:`perfchain.cli`.
"""
