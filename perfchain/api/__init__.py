"""The Python API: what ``import perfchain as pc`` offers at the top level.

Owns the documented entry points of the job, each taking the inputs of its CLI command
(checked by :mod:`perfchain.inputs`) and handing back records or pandas tables in SI
units: one point and its optimum (:mod:`.point`), tables, comparisons and studies
(:mod:`.tables`), vehicles (:mod:`.vehicle`), ingredients (:mod:`.ingredients`), a thrust
chamber and its wall heat flux (:mod:`.chamber`), and
how a point reads on screen (:mod:`.display`).

May import every floor below the command line (study, vehicle, performance, nozzle, thermo,
propellants, inputs and the base modules), always inside functions or in the module that
needs them, so ``import perfchain`` stays fast. :mod:`perfchain.cli` may import it; it never
imports :mod:`perfchain.cli`.
"""
