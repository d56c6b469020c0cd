"""Thermochemistry: product species, chemical equilibrium and its derivatives.

Owns: candidate product species from the NASA data Cantera ships (:mod:`.products`), the
general equilibrium path on Cantera with condensed phases (:mod:`.equilibrium`), the analytic
equilibrium derivatives (:mod:`.derivatives`), the flow-model registry (:mod:`.flow_models`),
species pruning with a proof (:mod:`.pruning`), and the batch solver for many points at once
(:mod:`.batch` with its compiled inner loops in :mod:`.kernel`).

May import: :mod:`perfchain.propellants` and the shared base modules (errors, units,
constants). Never imports nozzle, performance, study, vehicle or cli.
"""
