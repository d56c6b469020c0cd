"""Thermochemistry: product species, chemical equilibrium and its derivatives.

Owns, in the order the code builds on itself:

* :mod:`.products` candidate product species from the NASA data Cantera ships;
  :mod:`.state` the :class:`~.state.MixState` record; :mod:`.flow_models` the flow-model registry.
* The compiled kernels, one source run compiled (numba) or as plain Python
  (``PERFCHAIN_NO_JIT=1``, :mod:`.jit`): :mod:`.kernel` (solver constants, NASA-7 fits, a small
  linear solver, mixture properties), :mod:`.newton_system`, :mod:`.phases` and :mod:`.newton`
  (the batch solver's Newton method; its rows pruned by :mod:`.pruning`), :mod:`.derivatives` (the equilibrium-derivative system, for both
  paths), :mod:`.perfect_gas` (the perfect-gas A/A* inversion).
* The general path on Cantera: :mod:`.equilibrium` (:class:`~.equilibrium.EquilibriumSystem`)
  with :mod:`.gas` (gas-only solves), :mod:`.condensed` (condensed amounts),
  :mod:`.temperature_loop` (HP/SP with condensed products), :mod:`.state_properties` (sound
  speeds, cp, checks); :mod:`.pruning` species pruning with a proof.
* The batch solver for many points at once: :mod:`.tables` (arrays of a product set),
  :mod:`.batch_state` (a batch of states and its solves), :mod:`.batch` (chamber, throat and
  exits; the entry point).

May import: :mod:`perfchain.propellants` and the shared base modules (errors, units,
constants). Never imports nozzle, performance, study, vehicle or cli.
"""
