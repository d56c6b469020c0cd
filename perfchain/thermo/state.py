"""One thermodynamic state of the products (:class:`MixState`) and the test of a solved target.

Per kilogram of propellant, SI units. Produced by
:class:`~perfchain.thermo.equilibrium.EquilibriumSystem`; read by the nozzle and performance
layers.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["MixState", "TARGET_TOL", "residual_ok"]

TARGET_TOL = 1e-9    #: relative h or s residual allowed (scaled by cp T for h, by cp for s) [-]


@dataclass(frozen=True)
class MixState:
    """One thermodynamic state of the products, per kg of propellant.

    Attributes
    ----------
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    n_gas : float
        Gas amount [kmol/kg].
    X : numpy.ndarray
        Gas mole fractions, in the system's species order.
    condensed : tuple of (int, float)
        (condensed candidate index, amount [kmol/kg]) of each present phase.
    h, s : float
        Enthalpy [J/kg] and entropy [J/(kg K)] of the whole mixture.
    cp_frozen, cv_frozen : float
        Frozen heat capacities of the mixture [J/(kg K)].
    density : float
        Mixture density, condensed volume neglected [kg/m^3].

    Examples
    --------
    Argon (M = 39.948 kg/kmol) at 1000 K: molar mass 1/n and frozen cp/cv = 5/3 (closed form):

    >>> import numpy as np
    >>> st = MixState(1000.0, 1e5, 1 / 39.948, np.array([1.0]), (), 0.0, 0.0, 520.33, 312.20, 0.48)
    >>> round(st.molar_mass, 3), round(st.gamma_frozen, 3)
    (39.948, 1.667)
    """

    T: float
    p: float
    n_gas: float
    X: np.ndarray
    condensed: tuple
    h: float
    s: float
    cp_frozen: float
    cv_frozen: float
    density: float

    @property
    def molar_mass(self) -> float:
        """Mixture mass per kmol of gas [kg/kmol] (= gas molar mass without condensed)."""
        return 1.0 / self.n_gas

    @property
    def gamma_frozen(self) -> float:
        """Frozen cp/cv of the mixture [-]."""
        return self.cp_frozen / self.cv_frozen


def residual_ok(kind: str, st: MixState, target: float) -> bool:
    """Does ``st`` meet an enthalpy (``kind="h"``, [J/kg]) or entropy (``"s"``, [J/(kg K)]) target?

    The residual is allowed :data:`TARGET_TOL` of cp T (enthalpy) or of cp (entropy), i.e.
    the change a relative temperature step of 1e-9 would make.

    Parameters
    ----------
    kind : str
        ``"h"`` or ``"s"``.
    st : MixState
    target : float
        [J/kg] or [J/(kg K)].

    Returns
    -------
    bool

    Examples
    --------
    cp T = 1000 J/(kg K) x 2000 K = 2e6 J/kg, so 1e-3 J/kg off passes and 0.01 J/kg does not
    (closed form):

    >>> import numpy as np
    >>> st = MixState(2000.0, 1e5, 0.04, np.array([1.0]), (), 5e5, 9000.0, 1000.0, 700.0, 0.3)
    >>> residual_ok("h", st, 5e5 + 1e-3), residual_ok("h", st, 5e5 + 1e-2)
    (True, False)
    """
    value = st.h if kind == "h" else st.s
    scale = st.cp_frozen * st.T if kind == "h" else st.cp_frozen
    return abs(value - target) <= TARGET_TOL * scale
