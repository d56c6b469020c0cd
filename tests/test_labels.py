"""One human label per output column (perfchain.study.labels), its unit from the column's declared kind.

The label table must cover every column the registry of perfchain.study.columns declares (a
new field of a result record without a label fails here), never show a raw key, and keep
distinct quantities apart. Units follow NIST SP 811 (2008) through perfchain.study.columns.
"""

import re
from collections import defaultdict

import pytest

from perfchain.performance.loss_model import LOSS_FACTORS
from perfchain.study import columns as C
from perfchain.study import labels as L

ALL = sorted(C._registry())

# Two columns that hold one quantity under two keys: the flattened separation block repeats the
# result's pe/pa, and the study tables copy the loss block's total. They may share a label.
SAME_QUANTITY = [{"exit_ambient_pressure_ratio", "separation_pressure_ratio"},
                 {"total_isp_vacuum_loss", "losses_total_isp_vacuum_loss"}]


def test_every_declared_column_has_its_own_label():
    assert len(ALL) > 150   # the registry was read
    missing = [c for c in ALL if not L.has_label(c)]
    assert missing == []


def test_every_loss_factor_has_a_name():
    assert set(L.LOSS_LABELS) == set(LOSS_FACTORS)


@pytest.mark.parametrize("units", ["si", "us"])
def test_no_label_is_a_raw_key(units):
    for c in ALL:
        text = L.label(c, units)
        assert "_" not in text and text[:1].isupper() or text[:2] == "c*", (c, text)
        assert text != c


def test_distinct_quantities_have_distinct_labels():
    by_label = defaultdict(set)
    for c in ALL:
        by_label[L.name(c)].add(c)
    shared = [cols for cols in by_label.values() if len(cols) > 1]
    assert all(cols in SAME_QUANTITY for cols in shared), shared


@pytest.mark.parametrize("units", ["si", "us"])
def test_the_unit_in_a_label_is_the_column_unit(units):
    for c in ALL:
        want = C.unit_label(C.column_kind(c), units)
        text = L.label(c, units)
        if want:
            assert text.endswith(f" ({want})"), (c, text)
        else:
            assert not re.search(r"\((bar|psia|K|degR|m/s|ft/s|s|kg|lbm|mm|in)\)$", text), (c, text)


def test_us_labels():
    # US customary units as perfchain.study.columns states them (NIST SP 811 names)
    assert L.label("chamber_pressure", "us") == "Chamber pressure (psia)"
    assert L.label("delivered_exhaust_velocity_vacuum", "us") == "Delivered vacuum exhaust velocity (ft/s)"
    assert L.label("sizing_throat_diameter", "us") == "Throat diameter (in)"
    assert L.label("density_isp", "us") == "Density-Isp, vacuum (lbm s/ft^3)"


def test_station_labels_cover_every_station_field():
    assert set(L.STATION_LABELS) == set(C.STATION_KINDS)
    assert L.station_label("sound_speed", "us") == "Sound speed (ft/s)"
    assert L.label("throat_velocity") == "Throat velocity (m/s)"


def test_unknown_columns_read_as_words_and_objective_values_take_their_objective():
    assert L.label("brand_new_thing") == "Brand new thing"
    assert L.label("objective_value", "us", objective="density_isp") == "Density-Isp, vacuum (lbm s/ft^3)"
    assert L.label("objective_value") == "Objective value"
    assert L.value_label("isp_ambient") == "Ambient Isp" and L.value_label("no such") == "no such"


def test_point_screen_names_each_loss_in_words():
    # the loss breakdown a person reads names each factor by its label, never the raw key
    # (the project's labelling rule: study/labels.py), in seconds in both unit systems
    from click.testing import CliRunner

    from perfchain.cli.main import main

    args = ["point", "--oxidizer", "LOX", "--fuel", "RP-1", "--mixture-ratio", "2.6", "--chamber-pressure",
            "70 bar", "--area-ratio", "20", "--cstar-efficiency", "0.97", "--cf-efficiency", "0.98"]
    for units in ("si", "us"):
        res = CliRunner().invoke(main, args + ["--units", units])
        assert res.exit_code == 0, res.output
        line = next(x for x in res.output.splitlines() if "lost to" in x)
        assert "c* efficiency" in line and "Cf efficiency" in line and " s," in line
        assert not re.search(r"\b[a-z]+_[a-z_]+\b", line), line
