"""Flow models of the nozzle expansion: where the composition shifts and where it freezes.

>>> FLOW_MODELS["frozen-throat"]
(True, False)
"""

from __future__ import annotations

from perfchain.errors import InputError

__all__ = ["FLOW_MODELS", "check_flow"]

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
