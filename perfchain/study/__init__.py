"""Studies: grids of operating points, optima, comparisons, trade-offs, tables, plots, reports.

Owns: sweeps over mixture ratio, chamber pressure, area ratio and ambient pressure with chunked
parallel execution and checkpoints (:mod:`.sweep`), optimum O/F and pair comparison
(:mod:`.optimum`), chemistry-to-vehicle trades (:mod:`.tradeoff`), the study file schema
(:mod:`.schema`) and runner (:mod:`.runner`), output columns and their units
(:mod:`.columns`), plots (:mod:`.plots`) and the HTML report (:mod:`.report`).

May import every lower floor: performance, nozzle, thermo, propellants, vehicle and the shared
base modules. Never imports :mod:`perfchain.cli`.
"""
