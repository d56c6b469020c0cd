"""Flow models of the nozzle expansion: where the composition shifts and where it freezes.

>>> FLOW_MODELS["frozen-throat"]
(True, False)
"""

from __future__ import annotations

import numpy as np

from perfchain.errors import InputError

__all__ = ["FLOW_MODELS", "check_flow", "NEAR_TRANSITION", "near_transition"]

#: flow model name -> (shifting before the throat, shifting after the throat)
FLOW_MODELS = {
    "shifting": (True, True),
    "frozen": (False, False),
    "frozen-throat": (True, False),
}


def check_flow(flow: str) -> str:
    """Return the flow model name or raise an InputError naming the choices.

    >>> check_flow("Shifting")
    'shifting'
    """
    key = str(flow).strip().lower()
    if key not in FLOW_MODELS:
        raise InputError("flow", flow, "one of " + ", ".join(FLOW_MODELS))
    return key


#: a phase change of a condensed product above this fraction of the throat temperature may put
#: a second sonic point on its melting plateau (where the sound speed is lower)
NEAR_TRANSITION = 0.85


def near_transition(tmin, tmax, throat_T, chamber_T):
    """Where a condensed product's transition temperature lies between NEAR_TRANSITION times the
    throat temperature and the chamber temperature [K] (bool, the shape of ``throat_T``).

    ``tmin``, ``tmax`` are the data ranges of the condensed candidates [K]; a temperature where
    one's data end and another's begin is a transition (2327 K for alumina). There rho u along
    the isentrope can have two humps, one on the melting plateau (T held, the sound speed
    lower) and one off it; each has a sonic point, and the throat is the higher hump.

    Examples
    --------
    Alumina (solid to 2327 K, liquid from 2327 K): a throat at 2500 K below a 2700 K chamber is
    near it (2327 >= 0.85 x 2500 = 2125), one at 3200 K below 3450 K is not:

    >>> near_transition([300.0, 2327.0], [2327.0, 6000.0], np.array([2500.0, 3200.0]),
    ...                 np.array([2700.0, 3450.0])).tolist()
    [True, False]
    """
    limits = np.intersect1d(np.asarray(tmin, float), np.asarray(tmax, float))
    throat_T, chamber_T = np.asarray(throat_T, float), np.asarray(chamber_T, float)
    out = np.zeros(throat_T.shape, bool)
    for t in limits:
        out |= (NEAR_TRANSITION * throat_T <= t) & (t <= chamber_T)
    return out
