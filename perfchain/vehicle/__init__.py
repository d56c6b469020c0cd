"""Vehicles: rocket equation, stages, staging and ascent losses.

Owns: stages in three mass forms, stage and vehicle delta-v, inverse problems and the optimum
staging (:mod:`.rocket`), planar ascent losses (:mod:`.ascent`).

May import only the shared base modules (errors, units, constants, atmosphere): it never
imports Cantera, thermo, nozzle or performance; exhaust velocities reach it as plain numbers.
"""
