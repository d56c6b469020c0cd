"""Checks of perfchain.vehicle.rocket against closed forms and textbook worked examples."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.vehicle.rocket import (
    Stage, Vehicle, discrete_burn_delta_v, exhaust_velocity_from_isp, fixed_tank_delta_v,
    make_stage, max_payload, optimal_staging, propellant_for_delta_v, rocket_delta_v,
    stack_for_delta_v_split,
)

# Curtis, "Orbital Mechanics for Engineering Students", rocket vehicle dynamics chapter
# (from memory) rounds g0 to 9.81 m/s^2 in its examples.
CURTIS_C = 350 * 9.81


def test_g0_is_exact():
    # 3rd CGPM (1901): standard gravity is 9.80665 m/s^2 exactly.
    assert G0 == 9.80665
    assert exhaust_velocity_from_isp(1.0) == 9.80665
    assert Stage.from_isp(350, 1.0, 1.0).isp == pytest.approx(350, rel=1e-15)


def test_rocket_equation_worked_example():
    # Common textbook worked example: mass ratio 10, c = 4500 m/s -> 4500 ln 10 = 10,361.6 m/s.
    assert rocket_delta_v(4500.0, 10.0, 1.0) == pytest.approx(10361.6, abs=0.05)
    # closed form: c ln(m0/mf), with the mass ratio stated as Isp in seconds and exact g0
    assert rocket_delta_v(exhaust_velocity_from_isp(300.0), 3.0, 1.0) == pytest.approx(
        300 * 9.80665 * math.log(3.0), rel=1e-15)


def test_curtis_single_stage():
    # Curtis (from memory): payload 10 t, payload ratio 0.05, structural ratio 0.15,
    # Isp 350 s -> burnout speed 5.657 km/s. The number reproduces when the payload ratio
    # is payload / lift-off mass (m0 = 200 t, stage 190 t = 28.5 t dry + 161.5 t propellant),
    # n = 200/38.5. Reading it as payload / (stage mass), n = (1+0.05)/(0.15+0.05) = 5.25,
    # would give 5.69 km/s, which does not match, so we use the first reading.
    stage = Stage.from_structural_ratio(CURTIS_C, 161500.0, 0.15)
    result = Vehicle([stage], 10000.0).performance()
    assert result.liftoff_mass == pytest.approx(200000.0, rel=1e-12)
    assert result.payload_fraction == pytest.approx(0.05, rel=1e-12)
    assert result.total_delta_v == pytest.approx(5657.0, abs=1.0)
    s = result.stages[0]
    assert (s.initial_mass, s.burnout_mass) == pytest.approx((200000.0, 38500.0))
    assert s.mass_ratio == pytest.approx(200 / 38.5, rel=1e-12)
    # with exact g0 the same stack gives 0.03 % less (closed form, 9.80665/9.81)
    exact = Vehicle([Stage.from_isp(350, 28500.0, 161500.0)], 10000.0).performance()
    assert exact.total_delta_v == pytest.approx(result.total_delta_v * G0 / 9.81, rel=1e-12)


def test_curtis_two_equal_stages():
    # Curtis (from memory): the same 200 t vehicle and payload as two "equal" stages
    # -> 7.407 km/s. Reproduces when each stage has the same step payload fraction
    # (mass above / mass of the step with it) pi = sqrt(0.05) and eps = 0.15, so each
    # stage mass ratio is 1 / (pi + eps (1 - pi)).
    pi_step = math.sqrt(0.05)
    m02 = 200000.0 * pi_step
    upper = Stage.from_propellant_fraction(CURTIS_C, m02 - 10000.0, 0.85)
    lower = Stage.from_propellant_fraction(CURTIS_C, 200000.0 - m02, 0.85)
    result = Vehicle([lower, upper], 10000.0).performance()
    assert result.liftoff_mass == pytest.approx(200000.0, rel=1e-12)
    assert result.total_delta_v == pytest.approx(7407.0, abs=1.0)
    assert result.stages[0].delta_v == pytest.approx(result.stages[1].delta_v, rel=1e-12)
    # For identical stages that split is also the optimum (Curtis, optimal staging; from memory)
    best = optimal_staging(result.total_delta_v, [CURTIS_C] * 2, [0.15] * 2, 10000.0)
    assert best.liftoff_mass == pytest.approx(200000.0, rel=1e-9)


def test_optimal_identical_stages_split_equally():
    # Analytic: for identical stages the Lagrange condition gives the same mass ratio to each.
    c, eps = 3000.0, 0.1
    best = optimal_staging(9000.0, [c] * 3, [eps] * 3, 1000.0)
    assert best.delta_v_split == pytest.approx([3000.0] * 3, rel=1e-9)
    # closed form lift-off mass for three equal steps of mass ratio n = e
    n = math.e
    step = n * (1 - eps) / (1 - n * eps)
    assert best.liftoff_mass == pytest.approx(1000.0 * step**3, rel=1e-9)


@pytest.mark.parametrize("cs, epss", [
    ([2900.0, 3300.0, 4400.0], [0.07, 0.10, 0.13]),
    ([3000.0, 3000.0], [0.1, 0.1]),
])
def test_optimal_staging_beats_perturbed_splits(cs, epss):
    # Optimality (the definition of the optimum): moving delta-v between any two stages
    # while keeping the total must not lower the lift-off mass.
    target, payload = 9000.0, 2000.0
    best = optimal_staging(target, cs, epss, payload)
    assert sum(best.delta_v_split) == pytest.approx(target, rel=1e-12)
    assert best.vehicle().performance().total_delta_v == pytest.approx(target, rel=1e-10)
    assert best.vehicle().liftoff_mass == pytest.approx(best.liftoff_mass, rel=1e-12)
    for i in range(len(cs)):
        for j in range(len(cs)):
            if i == j:
                continue
            for shift in (10.0, 100.0, 400.0):
                split = list(best.delta_v_split)
                split[i] += shift
                split[j] -= shift
                try:
                    other = stack_for_delta_v_split(split, cs, epss, payload)
                except InputError:
                    continue  # that split is not even reachable
                assert other.liftoff_mass >= best.liftoff_mass * (1 - 1e-12)


def test_optimal_staging_unreachable():
    # Closed form: with structural ratio eps the largest stage mass ratio is 1/eps.
    limit = 2 * 3000.0 * math.log(1 / 0.1)
    with pytest.raises(InputError, match=r"falls short of the target by 1\.0 m/s"):
        optimal_staging(limit + 1.0, [3000.0] * 2, [0.1] * 2, 1000.0)


def test_discrete_ejection_converges_like_one_over_n():
    # Common practice: N discrete ejections -> rocket equation as N grows.
    # With the chunk leaving at c relative to the vehicle after ejection, dv_k = c dm / m_k:
    # a left Riemann sum of c dm/m, whose error times N tends to (Euler-Maclaurin, closed
    # form) c mp / 2 (1/mf - 1/m0).
    c, m0, mp = 3000.0, 1000.0, 800.0
    exact = c * math.log(m0 / (m0 - mp))
    limit = c * mp / 2 * (1 / (m0 - mp) - 1 / m0)
    scaled = []
    for n in (10, 100, 1000, 10000):
        after = discrete_burn_delta_v(c, m0, mp, n)
        before = discrete_burn_delta_v(c, m0, mp, n, relative_to="before")
        assert after < exact < before  # the two conventions bracket the continuous result
        scaled.append((exact - after) * n)
        assert (before - exact) * n == pytest.approx(limit, rel=20.0 / n)
    assert scaled[-1] == pytest.approx(limit, rel=1e-3)
    assert max(scaled) / min(scaled) < 1.6  # error * N roughly constant
    assert discrete_burn_delta_v(c, m0, mp, 1) == pytest.approx(c * mp / m0)  # one chunk


def test_propellant_for_delta_v_round_trip_and_shortfall():
    sized = propellant_for_delta_v(6000.0, 3200.0, 0.12, 5000.0)
    stage = Stage.from_structural_ratio(3200.0, sized.propellant_mass, 0.12)
    assert stage.dry_mass == pytest.approx(sized.dry_mass, rel=1e-12)
    dv = Vehicle([stage], 5000.0).performance().total_delta_v
    assert dv == pytest.approx(6000.0, rel=1e-12)
    # Closed form limit c ln(1/eps) = 3200 ln(1/0.12) = 6784.9 m/s
    limit = 3200.0 * math.log(1 / 0.12)
    with pytest.raises(InputError, match=r"falls short of the target by 100\.0 m/s"):
        propellant_for_delta_v(limit + 100.0, 3200.0, 0.12, 5000.0)


@settings(max_examples=40, deadline=None)
@given(payload=st.floats(1.0, 1e5), dry=st.floats(100.0, 1e4), prop=st.floats(1e3, 1e5),
       c2=st.floats(2000.0, 4500.0))
def test_max_payload_inverts_performance(payload, dry, prop, c2):
    # Round trip (definition of the inverse): the largest payload for the delta-v a
    # stack gives to payload P is P.
    stages = [Stage(2800.0, 3 * dry, 5 * prop), Stage(c2, dry, prop)]
    dv = Vehicle(stages, payload).performance().total_delta_v
    assert max_payload(stages, dv) == pytest.approx(payload, rel=1e-7, abs=1e-6)


def test_max_payload_unreachable_says_by_how_much():
    stage = Stage(3000.0, 100.0, 900.0)
    best = 3000.0 * math.log(10.0)  # zero payload, closed form
    with pytest.raises(InputError, match=r"falls short of the target by 50\.0 m/s"):
        max_payload([stage], best + 50.0)


def test_stage_mass_statements_agree_and_burn_time():
    a = make_stage(exhaust_velocity=3000.0, dry_mass=1000.0, propellant_mass=9000.0, thrust=2e5)
    b = make_stage(exhaust_velocity=3000.0, total_mass=10000.0, propellant_fraction=0.9)
    c = make_stage(exhaust_velocity=3000.0, propellant_mass=9000.0, structural_ratio=0.1)
    for s in (b, c):
        assert (s.dry_mass, s.propellant_mass) == pytest.approx((1000.0, 9000.0), rel=1e-12)
    r = Vehicle([a], 0.0).performance().stages[0]
    # definition: burn time = propellant * c / thrust at constant thrust
    assert r.burn_time == pytest.approx(9000.0 * 3000.0 / 2e5, rel=1e-15)
    assert "burn_time" not in Vehicle([b], 0.0).performance().stages[0].to_dict()


@pytest.mark.parametrize("kwargs, field", [
    (dict(exhaust_velocity=3000.0, dry_mass=-1.0, propellant_mass=10.0), "dry_mass"),
    (dict(exhaust_velocity=3000.0, dry_mass=1.0, propellant_mass=0.0), "propellant_mass"),
    (dict(exhaust_velocity=0.0, dry_mass=1.0, propellant_mass=1.0), "exhaust_velocity"),
    (dict(isp=300, total_mass=10.0, propellant_fraction=1.0), "propellant_fraction"),
    (dict(isp=300, propellant_mass=10.0, structural_ratio=0.0), "structural_ratio"),
    (dict(isp=300, dry_mass=1.0, propellant_mass=1.0, thrust=-5.0), "thrust"),
    (dict(isp=300, dry_mass=1.0, total_mass=1.0), "masses"),
    (dict(dry_mass=1.0, propellant_mass=1.0), "isp/exhaust_velocity"),
])
def test_bad_stage_inputs_name_the_field(kwargs, field):
    with pytest.raises(InputError) as info:
        make_stage(**kwargs)
    assert info.value.field == field
    assert str(info.value).startswith(field + ":")


def test_vehicle_rejects_negative_payload_and_empty_stack():
    with pytest.raises(InputError, match="payload_mass"):
        Vehicle([Stage(3000.0, 1.0, 1.0)], -1.0)
    with pytest.raises(InputError, match="stages"):
        Vehicle([], 1.0)


def test_to_dict_keys_in_si():
    d = Vehicle([Stage(3000.0, 1.0, 9.0, thrust=100.0)], 0.0).performance().to_dict()
    assert {"stages", "total_delta_v", "payload_fraction", "liftoff_mass"} <= set(d)
    assert {"initial_mass", "burnout_mass", "mass_ratio", "delta_v", "burn_time"} <= set(d["stages"][0])
    assert d["total_delta_v"] == pytest.approx(3000.0 * math.log(10.0))  # closed form


def test_fixed_tank_matches_rocket_equation():
    # Closed form: propellant = V rho, burnout = payload + fixed + k V.
    v, rho, c = 2.0, 1200.0, 3100.0
    dv = fixed_tank_delta_v(v, rho, c, 300.0, 200.0, 40.0)
    burnout = 300.0 + 200.0 + 40.0 * v
    assert dv == pytest.approx(rocket_delta_v(c, burnout + v * rho, burnout), rel=1e-15)
    assert fixed_tank_delta_v(v, rho * 1.1, c, 300.0, 200.0, 40.0) > dv  # denser -> more
    with pytest.raises(InputError, match="bulk_density"):
        fixed_tank_delta_v(v, 0.0, c, 300.0, 200.0, 40.0)


def test_vehicle_side_imports_no_chemistry():
    # Design rule (perfchain.vehicle's docstring): the vehicle side never loads Cantera or the
    # chemistry subpackages, even after a full ascent with drag and back pressure.
    import subprocess
    import sys

    code = (
        "import sys\n"
        "import perfchain.vehicle.rocket, perfchain.vehicle.ascent as a\n"
        "a.simulate_ascent(1e4, 9e3, vacuum_thrust=2e5, vacuum_isp=300, exit_area=0.1,\n"
        "                  drag_coefficient=0.3, reference_area=1.0)\n"
        "bad = [m for m in sys.modules if m == 'cantera' or m.split('.')[:2] in\n"
        "       [['perfchain', p] for p in ('thermo', 'nozzle', 'performance', 'propellants',\n"
        "                                   'study', 'cli')]]\n"
        "print(bad)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
