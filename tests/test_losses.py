"""Loss factors, their convention and the Isp breakdown."""

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from perfchain.constants import G0
from perfchain.nozzle import isentropic as isen
from perfchain.performance import losses as L
from perfchain.errors import InputError


@pytest.mark.parametrize("deg, lam", [(0.0, 1.0), (10.0, 0.9924), (15.0, 0.9830),
                                      (20.0, 0.9698), (30.0, 0.9330)])
def test_conical_divergence_table(deg, lam):
    # Sutton & Biblarz, Rocket Propulsion Elements, Table 3-3 (from memory), 4 digits
    assert L.conical_divergence_factor(math.radians(deg)) == pytest.approx(lam, abs=1e-4)


def test_bell_uses_exit_lip_angle():
    # common approximation: the conical formula on the exit-lip angle
    assert L.bell_divergence_factor(math.radians(10.0)) == pytest.approx(0.9924, abs=1e-4)
    m = L.LossModel(bell_exit_angle=math.radians(10.0))
    assert m.divergence == pytest.approx(0.5 * (1 + math.cos(math.radians(10.0))), rel=1e-15)


def _ideal_point(g=1.2, eps=20.0, pc=7.0e6, pa=1.0e5, Tc=3400.0, mol=21.0):
    """Ideal point from the closed forms (NACA Report 1135; Sutton & Biblarz ch. 3), plus the exit velocity
    from the energy equation ve = sqrt(2 cp T0 (1 - T/T0)), independent of Cf."""
    pe_pc = isen.exit_pressure_ratio_for_area_ratio(eps, g)
    cs = isen.cstar(Tc, mol, g)
    cf_vac = isen.thrust_coefficient(g, pe_pc, 0.0, eps)
    R = isen.R_UNIVERSAL / mol
    cp = g * R / (g - 1)
    ve = math.sqrt(2 * cp * Tc * (1 - pe_pc ** ((g - 1) / g)))
    return dict(cstar=cs, cf_vacuum=cf_vac, area_ratio=eps, exit_pressure=pe_pc * pc,
                chamber_pressure=pc, ambient_pressure=pa), ve


def test_no_loss_model_returns_ideal():
    point, _ = _ideal_point()
    d = L.apply_losses(**point, model=L.LossModel())
    assert d.cstar == point["cstar"] and d.cf_vacuum == pytest.approx(point["cf_vacuum"], rel=1e-15)
    assert d.isp_vacuum == pytest.approx(point["cstar"] * point["cf_vacuum"] / G0, rel=1e-15)
    assert all(v == pytest.approx(0.0, abs=1e-12) for v in d.breakdown.values())


def test_thrust_convention_divergence_on_momentum_only():
    # F = lambda mdot ve + (pe - pa) Ae (Sutton & Biblarz eq. 3-34, from memory),
    # built from the energy-equation ve and mdot = pc At / c*, At = 1 m^2.
    point, ve = _ideal_point()
    lam = L.conical_divergence_factor(math.radians(15.0))
    model = L.LossModel(conical_half_angle=math.radians(15.0), boundary_layer=0.99)
    d = L.apply_losses(**point, model=model)
    mdot = point["chamber_pressure"] / point["cstar"]
    thrust = (lam * 0.99 * mdot * ve
              + (point["exit_pressure"] - point["ambient_pressure"]) * point["area_ratio"])
    assert d.cf_ambient * point["chamber_pressure"] == pytest.approx(thrust, rel=1e-12)
    assert d.isp_ambient == pytest.approx(thrust / mdot / G0, rel=1e-12)
    assert d.exhaust_velocity_ambient == pytest.approx(thrust / mdot, rel=1e-12)


def test_ambient_is_vacuum_minus_pressure_term():
    point, _ = _ideal_point()
    d = L.apply_losses(**point, model=L.LossModel(cstar_efficiency=0.97, kinetic=0.99))
    eps, pc, pa = point["area_ratio"], point["chamber_pressure"], point["ambient_pressure"]
    assert d.cf_ambient == pytest.approx(d.cf_vacuum - pa / pc * eps, rel=1e-14)
    assert d.cstar == pytest.approx(0.97 * point["cstar"], rel=1e-15)
    assert d.exhaust_velocity_vacuum == pytest.approx(d.isp_vacuum * G0, rel=1e-15)


def test_breakdown_order_and_shares():
    point, _ = _ideal_point()
    model = L.LossModel(cstar_efficiency=0.96, divergence_factor=0.985, boundary_layer=0.99,
                        kinetic=0.995, two_phase=0.97, cf_efficiency=0.99)
    d = L.apply_losses(**point, model=model)
    ideal = point["cstar"] * point["cf_vacuum"] / G0
    assert list(d.breakdown) == list(L.LOSS_FACTORS)
    # c* is applied first: its share is (1 - eta) of the ideal Isp
    assert d.breakdown["cstar_efficiency"] == pytest.approx(0.04 * ideal, rel=1e-12)
    assert sum(d.breakdown.values()) == pytest.approx(ideal - d.isp_vacuum, abs=1e-9)
    assert all(v > 0 for v in d.breakdown.values())


factor = st.floats(min_value=0.5, max_value=1.0)


@settings(max_examples=100, deadline=None)
@given(factor, factor, factor, factor, factor, st.floats(min_value=1.5, max_value=200.0))
def test_breakdown_sums_to_total_loss(c, dv, bl, kin, tp, eps):
    point, _ = _ideal_point(eps=eps)
    model = L.LossModel(cstar_efficiency=c, divergence_factor=dv, boundary_layer=bl,
                        kinetic=kin, two_phase=tp)
    d = L.apply_losses(**point, model=model)
    ideal = point["cstar"] * point["cf_vacuum"] / G0
    assert sum(d.breakdown.values()) == pytest.approx(ideal - d.isp_vacuum, abs=1e-9)
    assert d.isp_vacuum <= ideal * (1 + 1e-15)


def test_arrays_match_scalars():
    pts = [_ideal_point(eps=e, pa=pa)[0] for e, pa in ((5.0, 1e5), (40.0, 2e4), (150.0, 0.0))]
    cols = {k: np.array([p[k] for p in pts]) for k in pts[0]}
    model = L.LossModel(cstar_efficiency=0.97, conical_half_angle=math.radians(12.0))
    arr = L.delivered(**cols, model=model)
    for i, p in enumerate(pts):
        one = L.apply_losses(**p, model=model).to_dict()
        for k, v in arr.items():
            assert v[i] == pytest.approx(one[k], rel=1e-14)
    b = L.isp_loss_breakdown(cols["cstar"], cols["cf_vacuum"], cols["area_ratio"],
                             cols["exit_pressure"], cols["chamber_pressure"], model)
    assert b["divergence"].shape == (3,)


def test_to_dict_keys():
    point, _ = _ideal_point()
    out = L.apply_losses(**point).to_dict()
    assert set(out) == {"cstar", "cf_vacuum", "cf_ambient", "isp_vacuum", "isp_ambient",
                        "exhaust_velocity_vacuum", "exhaust_velocity_ambient", "breakdown"}
    assert set(out["breakdown"]) == set(L.list_loss_factors())


def test_registry_is_complete():
    reg = L.list_loss_factors()
    assert list(reg) == list(L.LossModel().factors())
    for entry in reg.values():
        assert entry["source"] and entry["typical"] and entry["acts_on"] in ("cstar", "cf_momentum", "cf")


@pytest.mark.parametrize("kwargs, field", [
    ({"cstar_efficiency": 0.0}, "cstar_efficiency"),
    ({"boundary_layer": 1.01}, "boundary_layer"),
    ({"two_phase": True}, "two_phase"),
    ({"kinetic": math.nan}, "kinetic"),
    ({"divergence_factor": -0.5}, "divergence_factor"),
    ({"conical_half_angle": 0.0}, "conical_half_angle"),
    ({"conical_half_angle": math.radians(45.0)}, "conical_half_angle"),
    ({"conical_half_angle": 15.0}, "conical_half_angle"),  # degrees given by mistake
    ({"bell_exit_angle": -0.1}, "bell_exit_angle"),
    ({"conical_half_angle": 0.2, "divergence_factor": 0.99}, "divergence"),
])
def test_model_validation(kwargs, field):
    with pytest.raises(InputError, match=f"^{field}: got"):
        L.LossModel(**kwargs)


def test_model_is_frozen():
    with pytest.raises(dataclasses.FrozenInstanceError):
        L.LossModel().kinetic = 0.9


@pytest.mark.parametrize("change, field", [
    ({"cstar": -1.0}, "cstar"),
    ({"area_ratio": 0.5}, "area_ratio"),
    ({"chamber_pressure": 0.0}, "chamber_pressure"),
    ({"exit_pressure": 8.0e6}, "exit_pressure"),
    ({"ambient_pressure": -1.0}, "ambient_pressure"),
    ({"cf_vacuum": 0.1}, "cf_vacuum"),
])
def test_input_validation(change, field):
    point, _ = _ideal_point()
    point.update(change)
    with pytest.raises(InputError, match=f"^{field}: got"):
        L.apply_losses(**point)
