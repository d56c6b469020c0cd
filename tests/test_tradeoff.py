"""Chemistry-to-delta-v layer: a stage from an operating point, the fixed-tank O/F trade.

Checks are against closed forms (the rocket equation, the bulk-density formula,
the thrust equation, the sign of d(delta_v)/d(O/F) at the Isp peak) and against
common practice for where the LOX/LH2 Isp peak lies. Small grids, pc 5 MPa,
area ratio 40, to stay fast.
"""

import math

import pytest
from scipy.optimize import minimize_scalar

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.propellants.mixture import make_propellant
from perfchain.performance.chain import performance, performance_of
from perfchain.study.tradeoff import (SWEEP_COLUMNS, best_fixed_tank_mixture_ratio, fixed_tank_sweep,
                                stage_from_point)
from perfchain.vehicle.rocket import Vehicle

PC = 5e6
EPS = 40.0
# An invented small upper stage ("Kestrel Works KU-2"): SI floats.
STAGE = dict(tank_volume=2.5, payload_mass=300.0, fixed_dry_mass=200.0, tank_mass_per_volume=20.0)
# Densities [kg/m^3], all from memory (not re-read): LOX saturated liquid at 90.2 K and LH2
# saturated normal hydrogen at 20.3 K (NIST Chemistry WebBook, thermophysical properties of
# fluid systems); N2O4 at 21 C and MMH at 20 C (handbook values; no source was recorded).
DENSITY = {"LOX": 1141.0, "LH2": 70.85, "N2O4": 1442.0, "MMH": 875.0}


def sweep(pairs, ratios, **kw):
    args = dict(chamber_pressure=PC, area_ratio=EPS, **STAGE)
    args.update(kw)
    return fixed_tank_sweep(pairs, ratios, **args)


def best(ox, fu, **kw):
    args = dict(chamber_pressure=PC, area_ratio=EPS, **STAGE)
    args.update(kw)
    return best_fixed_tank_mixture_ratio(ox, fu, **args)


@pytest.fixture(scope="module")
def table():
    return sweep([("LOX", "LH2"), ("N2O4", "MMH")], [[4.0, 5.0, 6.0], [1.6, 2.2]])


def test_sweep_columns_and_status(table):
    assert list(table.columns) == list(SWEEP_COLUMNS)
    assert list(table.status) == ["ok"] * 5
    assert list(table.oxidizer) == ["LOX"] * 3 + ["N2O4"] * 2
    assert list(table.mixture_ratio) == [4.0, 5.0, 6.0, 1.6, 2.2]


def test_sweep_delta_v_is_rocket_equation_by_hand(table):
    # Rocket equation, closed form: dv = c ln(m0 / mf), with the tanks full:
    # mf = payload + fixed dry + k V, m0 = mf + propellant, propellant = rho_bulk V.
    mf = STAGE["payload_mass"] + STAGE["fixed_dry_mass"] + STAGE["tank_mass_per_volume"] * STAGE[
        "tank_volume"]
    for row in table.itertuples():
        assert row.propellant_mass == pytest.approx(row.bulk_density * STAGE["tank_volume"],
                                                    rel=1e-12)
        m0 = mf + row.propellant_mass
        assert row.delta_v == pytest.approx(row.exhaust_velocity * math.log(m0 / mf), rel=1e-12)
        # vacuum stage: c = Isp_vac g0 (definition of Isp, g0 exact by CGPM 1901)
        assert row.exhaust_velocity == pytest.approx(row.isp_vacuum * G0, rel=1e-12)


def test_sweep_bulk_density_formula(table):
    # rho_bulk = (1 + r) / (r / rho_o + 1 / rho_f): volumes of the two tanks add
    # (Sutton & Biblarz, Rocket Propulsion Elements, ch. 7; from memory), with the
    # densities above (from memory, hence 0.5 %).
    for row in table.itertuples():
        r, ro, rf = row.mixture_ratio, DENSITY[row.oxidizer], DENSITY[row.fuel]
        assert row.bulk_density == pytest.approx((1 + r) / (r / ro + 1 / rf), rel=5e-3)


def test_mixture_ratio_forms_agree(table):
    by_map = sweep([("LOX", "LH2"), ("N2O4", "MMH")],
                   {("LOX", "LH2"): [4.0, 5.0, 6.0], "N2O4/MMH": [1.6, 2.2]})
    assert list(by_map.delta_v) == pytest.approx(list(table.delta_v), rel=1e-12)
    shared = sweep([("LOX", "LH2")], [5.0, 6.0])
    assert list(shared.delta_v) == pytest.approx(list(table.delta_v[1:3]), rel=1e-12)


def test_units_at_the_edge_match_si(table):
    text = sweep([("LOX", "LH2")], [5.0], chamber_pressure="50 bar", tank_volume="2500 L",
                 payload_mass="0.3 t", fixed_dry_mass="200 kg",
                 tank_mass_per_volume="0.02 g/cm**3")
    assert text.delta_v[0] == pytest.approx(table.delta_v[1], rel=1e-9)


@pytest.mark.parametrize("field, value", [
    ("tank_volume", "2.5"),              # bare number for a dimensioned input
    ("tank_volume", "2.5 kg"),           # wrong dimension
    ("payload_mass", "-3 kg"),
    ("fixed_dry_mass", "0 kg"),
    ("tank_mass_per_volume", "20 kg"),
    ("chamber_pressure", "50"),
    ("which", "sea level"),
    ("flow", "sideways"),
])
def test_bad_inputs_name_the_field(field, value):
    with pytest.raises(InputError) as err:
        sweep([("LOX", "LH2")], [5.0], **{field: value})
    assert str(err.value).startswith(field)


def test_bad_pairs_ratios_and_exit():
    with pytest.raises(InputError, match=r"^pairs\[0\] oxidizer"):
        sweep([("LOXX", "LH2")], [5.0])
    with pytest.raises(InputError, match=r"^mixture_ratios\[1\]"):
        sweep([("LOX", "LH2")], [5.0, 0.0])
    with pytest.raises(InputError, match=r"^mixture_ratios"):
        sweep([("LOX", "LH2"), ("N2O4", "MMH")], [[5.0]])
    with pytest.raises(InputError, match=r"^exit"):
        sweep([("LOX", "LH2")], [5.0], exit_pressure="0.1 bar")
    with pytest.raises(InputError, match=r"^bounds"):
        best("LOX", "LH2", bounds=(6.0, 4.0))


def test_failed_point_keeps_its_row():
    # An ambient pressure at the chamber pressure is infeasible (the one feasibility rule,
    # perfchain.performance.ambient.infeasibility), so the first-stage point fails. (At 5 bar
    # ambient this nozzle separates: its ambient thrust is the cut-nozzle estimate, positive.)
    perf = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure=PC, area_ratio=EPS,
                       ambient_pressure=5e5)
    assert not perf.flows_full and perf.exhaust_velocity_ambient > 0
    t = sweep([("LOX", "RP-1")], [2.6, 2.8], which="ambient", ambient_pressure="50 bar")
    assert list(t.status) == ["failed", "failed"]
    assert t.reason[0].startswith("ambient_pressure")
    assert t[["isp_vacuum", "delta_v", "propellant_mass"]].isna().all().all()
    assert list(t.mixture_ratio) == [2.6, 2.8]
    ok = sweep([("LOX", "RP-1")], [2.6], which="ambient", ambient_pressure="1 atm")
    assert list(ok.status) == ["ok"] and ok.reason[0] == ""


@pytest.fixture(scope="module")
def hydrolox():
    return best("LOX", "LH2")


def test_lox_lh2_delta_v_optimum_lies_above_isp_optimum(hydrolox):
    # Closed-form reasoning: dv(r) = c(r) ln(m0/mf), m0 = mf + rho_bulk(r) V, so
    #   d dv/dr = c' ln(m0/mf) + c V rho_bulk' / m0.
    # At the Isp peak c' = 0, and rho_bulk' > 0 because LOX (1141 kg/m^3) is 16 times
    # denser than LH2 (70.85): the slope is positive there, so the delta-v optimum
    # is at a HIGHER O/F than the Isp optimum. (Common practice agrees on the
    # direction: LOX/LH2 stages run at O/F 5.5-6, above the Isp peak, because of
    # hydrogen's low density; this ideal fixed-volume model, with no chamber
    # temperature or cooling limits, puts the optimum higher still.)
    b = hydrolox
    assert not b["at_bound"]
    # common practice: shifting-equilibrium LOX/LH2 vacuum Isp peaks near O/F 4-5
    assert 4.0 <= b["isp_mixture_ratio"] <= 5.2
    assert b["delta_v_mixture_ratio"] > b["isp_mixture_ratio"] + 1.0
    assert b["delta_v_gain"] > 0
    assert b["isp_at_delta_v_optimum"] < b["isp_max"]
    assert b["bulk_density_at_delta_v_optimum"] > (1 + 5) / (5 / 1141 + 1 / 70.85)


def test_optimum_beats_its_neighbours_in_the_table(hydrolox):
    # The bounded search must really be a maximum: the table at +/- 0.3 around each
    # optimum gives less (delta-v for the first, Isp for the second).
    r_dv, r_isp = hydrolox["delta_v_mixture_ratio"], hydrolox["isp_mixture_ratio"]
    t = sweep([("LOX", "LH2")], [r_dv - 0.3, r_dv + 0.3, r_isp - 0.3, r_isp + 0.3])
    assert (t.delta_v[:2] < hydrolox["delta_v_max"]).all()
    assert (t.isp_vacuum[2:] < hydrolox["isp_max"]).all()


def test_storable_delta_v_optimum_also_above_isp_optimum():
    # Same sign argument: N2O4 (1442 kg/m^3) is denser than MMH (875), so rho_bulk' > 0.
    # The density contrast is small, so the shift is small but must be positive.
    b = best("N2O4", "MMH")
    assert not b["at_bound"]
    assert b["delta_v_mixture_ratio"] > b["isp_mixture_ratio"] + 0.02
    assert b["delta_v_gain"] > 0


def test_optimum_moves_toward_isp_peak_as_mass_ratio_grows(hydrolox):
    # With x = rho V / mf, d ln(dv)/dr = c'/c + (rho'/rho) w(x), w(x) = x / ((1+x) ln(1+x)),
    # and w falls as x grows (closed form): a stage of higher mass ratio weighs density
    # less, so its delta-v optimum lies closer to the Isp peak (but still above it).
    light = best("LOX", "LH2", tank_volume=10.0, payload_mass=0.0, fixed_dry_mass=1.0,
                 tank_mass_per_volume=10.0)
    assert hydrolox["isp_mixture_ratio"] < light["delta_v_mixture_ratio"] \
        < hydrolox["delta_v_mixture_ratio"]


def test_heavy_burnout_limit_is_density_impulse_optimum():
    # When mf >> rho V, ln(1 + rho V / mf) -> rho V / mf, so dv -> c rho V / mf and the
    # optimum becomes the O/F of maximum c * rho_bulk (density impulse; common practice
    # figure of merit for volume-limited stages). Found here independently of tradeoff.py.
    b = best("LOX", "RP-1", tank_volume=1.0, payload_mass=0.0, fixed_dry_mass=1e7,
             tank_mass_per_volume=0.0, xatol=1e-3)

    def minus_density_impulse(r):
        p = performance_of(make_propellant("LOX", "RP-1", r), PC, area_ratio=EPS)
        return -p.exhaust_velocity_vacuum * p.bulk_density

    ref = minimize_scalar(minus_density_impulse, bounds=b["bounds"], method="bounded",
                          options={"xatol": 1e-3})
    assert b["delta_v_mixture_ratio"] == pytest.approx(ref.x, abs=0.01)
    assert b["delta_v_mixture_ratio"] > b["isp_mixture_ratio"]


def test_stage_from_point_vacuum_and_ambient():
    perf = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure=PC, area_ratio=EPS)
    up = stage_from_point(perf, dry_mass="1 t", propellant_mass="9 t", name="KU-2")
    first = stage_from_point(perf, which="ambient", total_mass=1e4, propellant_fraction=0.9)
    third = stage_from_point(perf, propellant_mass=9000.0, structural_ratio=0.1)
    assert up.exhaust_velocity == perf.exhaust_velocity_vacuum and up.name == "KU-2"
    assert first.exhaust_velocity == perf.exhaust_velocity_ambient
    assert third.dry_mass == pytest.approx(up.dry_mass, rel=1e-12)
    # this nozzle separates at sea level (p_e/p_a below 0.4): the cut-nozzle estimate,
    # c_amb = u_sep + (p_sep - p_a) A_sep / mdot with A_sep/mdot = eps_sep c* / p_c (closed form)
    assert not perf.flows_full
    assert first.exhaust_velocity == pytest.approx(
        perf.separation_velocity + (perf.separation_pressure - 101325.0) * perf.separation_area_ratio
        * perf.cstar / PC, rel=1e-12)
    # rocket equation (closed form), mass ratio 10 with no payload
    dv = Vehicle([up], 0.0).performance().total_delta_v
    assert dv == pytest.approx(perf.exhaust_velocity_vacuum * math.log(10.0), rel=1e-12)


def test_stage_from_point_bad_inputs():
    perf = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure=PC, area_ratio=EPS)
    with pytest.raises(InputError, match=r"^which"):
        stage_from_point(perf, which="sea", dry_mass=1.0, propellant_mass=9.0)
    with pytest.raises(InputError, match=r"^dry_mass"):
        stage_from_point(perf, dry_mass="1", propellant_mass=9.0)
    with pytest.raises(InputError, match=r"^masses"):
        stage_from_point(perf, dry_mass=1.0)
    with pytest.raises(InputError, match=r"^perf"):
        stage_from_point({"isp": 300}, dry_mass=1.0, propellant_mass=9.0)


def test_stage_takes_the_delivered_exhaust_velocity_when_given():
    # Delivered c = c*_del Cf_del (the loss convention of perfchain.performance.losses; relation check)
    from perfchain.performance.chain import performance
    from perfchain.study.tradeoff import stage_from_point

    p = performance("N2O4", "MMH", mixture_ratio=2.0, chamber_pressure="10 bar", area_ratio=30,
                    losses=dict(cstar_efficiency=0.95))
    s = stage_from_point(p, which="vacuum", dry_mass="1 t", propellant_mass="4 t")
    assert s.exhaust_velocity == p.delivered["exhaust_velocity_vacuum"]
    assert s.exhaust_velocity < p.exhaust_velocity_vacuum
