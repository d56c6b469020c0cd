"""Stage and vehicle delta-v: the rocket equation, staging and its inverses.

One import path for the vehicle side, re-exported from where each piece lives: the rocket
equation and its variants (:mod:`.equation`), stages and vehicles (:mod:`.stages`), inverse
problems (:mod:`.inverse`) and staging (:mod:`.staging`). Pure numpy/scipy; never imports
Cantera. SI inside: masses [kg], speeds [m/s], thrust [N], times [s]. The rocket equation is
``delta_v = c * ln(m0 / mf)`` with ``c`` the effective exhaust velocity
(``c = Isp * g0``, ``g0 = 9.80665 m/s^2`` exact).

Mass vocabulary (one stage): *dry mass* = everything but propellant (tanks,
engines, structure); *stage mass* = dry + propellant; *propellant fraction*
= propellant / stage mass; *structural ratio* ``eps`` = dry / stage mass.
The payload of stage ``i`` is everything stacked above it.
"""

from __future__ import annotations

from perfchain.vehicle.equation import (
    discrete_burn_delta_v, exhaust_velocity_from_isp, fixed_tank_delta_v, rocket_delta_v,
)
from perfchain.vehicle.inverse import SingleStageSizing, max_payload, propellant_for_delta_v
from perfchain.vehicle.stages import Stage, StageResult, Vehicle, VehicleResult, make_stage
from perfchain.vehicle.staging import StagingResult, optimal_staging, stack_for_delta_v_split

__all__ = [
    "rocket_delta_v", "exhaust_velocity_from_isp", "Stage", "make_stage", "Vehicle",
    "StageResult", "VehicleResult", "SingleStageSizing", "propellant_for_delta_v",
    "max_payload", "StagingResult", "stack_for_delta_v_split", "optimal_staging",
    "discrete_burn_delta_v", "fixed_tank_delta_v",
]
