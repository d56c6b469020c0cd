"""Performance of an operating point: the chain, delivered losses, separation, sizing.

Owns: the chain for one point and for many (:mod:`.chain`: c*, Cf, vacuum and ambient Isp,
stations), named efficiency factors (:mod:`.losses`), the delivered, separation and sizing
blocks (:mod:`.delivered`, :mod:`.separation`, :mod:`.sizing`).

May import: :mod:`perfchain.nozzle`, :mod:`perfchain.thermo`, :mod:`perfchain.propellants` and
the shared base modules (errors, units, constants, atmosphere).
"""
