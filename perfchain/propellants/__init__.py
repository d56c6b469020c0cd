"""Propellants at their storage state: ingredient records, formulations and mixtures.

Owns: the bundled ingredient records (``mechanisms/ingredients.toml``, shipped in the wheel as
``perfchain.mechanisms``), blends and user-defined ingredients (:mod:`.ingredients`),
bipropellant mixtures by O/F, equivalence ratio or % fuel and the :class:`~.mixture.Propellant`
record the chain burns (:mod:`.mixture`), formulations by mass fraction for solid grains and
monopropellants (:mod:`.formulation`), liquids conditioned to another storage temperature with
a real-fluid equation of state (:mod:`.conditioned`, CoolProp), and the ammonia-dissociation
input of catalytic hydrazine thrusters (:mod:`.decomposition`).

May import: :mod:`perfchain.errors`, :mod:`perfchain.units`, :mod:`perfchain.constants`, CoolProp.
Never imports Cantera (beyond atomic weights) or any higher floor.
"""
