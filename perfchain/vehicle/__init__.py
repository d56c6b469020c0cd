"""Vehicles: rocket equation, stages, staging and ascent losses.

Owns: the rocket equation and its variants (:mod:`.equation`), stages in three mass forms and
stage and vehicle delta-v (:mod:`.stages`), inverse problems (:mod:`.inverse`), the optimum
staging (:mod:`.staging`), their shared input checks (:mod:`.inputs`) and planar ascent losses
(:mod:`.ascent`); :mod:`.rocket` re-exports the first four as one import path.

May import only the shared base modules (errors, units, constants, atmosphere): it never
imports Cantera, thermo, nozzle, performance, propellants, study or cli; exhaust velocities
reach it as plain numbers.
"""
