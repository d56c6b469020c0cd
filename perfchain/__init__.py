"""perfchain: rocket propellant performance from ingredients to vehicle delta-v.

SI units inside (Pa, K, kg, m, s, J/kg, kg/kmol); quantities with units only at
the edges (see :mod:`perfchain.units`).
"""

__version__ = "0.1.0"

G0 = 9.80665  #: standard gravity [m/s^2], exact by definition (3rd CGPM, 1901)
