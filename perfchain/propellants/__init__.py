"""Propellants at their storage state: ingredient records and mixtures.

Owns: the bundled ingredient records (``mechanisms/ingredients.toml``, shipped in the wheel as
``perfchain.mechanisms``), blends and user-defined ingredients (:mod:`.ingredients`), and
propellant mixtures by O/F, equivalence ratio or % fuel with their element totals and enthalpy
(:mod:`.mixture`).

May import: :mod:`perfchain.errors`, :mod:`perfchain.units`, :mod:`perfchain.constants`.
Never imports Cantera or any higher floor.
"""
