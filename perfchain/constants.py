"""Physical and model constants: one place each, SI units.

Taken from :mod:`scipy.constants` (CODATA 2018 and the SI definitions) where it has them.

>>> G0, ONE_ATM
(9.80665, 101325.0)
>>> round(R_UNIVERSAL, 6)
8314.462618
"""

from __future__ import annotations

from scipy import constants as _sc

__all__ = ["G0", "R_UNIVERSAL", "ONE_ATM", "MAX_ALTITUDE"]

#: standard acceleration of gravity [m/s^2], exact by definition (3rd CGPM, 1901)
G0: float = _sc.g
#: molar gas constant [J/(kmol K)], CODATA 2018 (exact since the 2019 SI)
R_UNIVERSAL: float = _sc.R * 1e3
#: standard atmosphere [Pa], exact by definition
ONE_ATM: float = _sc.atm
#: [m] top of the U.S. Standard Atmosphere 1976 lower-atmosphere tables (geometric altitude)
MAX_ALTITUDE: float = 86000.0
