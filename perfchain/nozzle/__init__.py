"""The thrust chamber and nozzle: from an equilibrium chamber to exit states.

Owns: the adiabatic chamber (:mod:`.chamber`, infinite area; :mod:`.contraction`, finite
contraction ratio), the isentropic expansion with shifting, frozen or frozen-throat composition
(:mod:`.expansion`: sonic throat, exit by area ratio or pressure), the station records
(:mod:`.stations`), the thrust-chamber geometry from L* and contraction ratio
(:mod:`.geometry`) and its wall contour, conical or bell (:mod:`.contour`), and calorically-perfect closed forms used for checks and first guesses
(:mod:`.isentropic`, :mod:`.rayleigh`, their input checks in :mod:`.inputs`).

May import: :mod:`perfchain.thermo`, :mod:`perfchain.propellants` and the shared base modules.
"""
