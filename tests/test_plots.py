"""The study plots of every bundled example: each expected figure is drawn, and its text is readable.

Readable means, checked on matplotlib's own renderer (``get_window_extent`` of each text): no two
annotations or tick labels of one axes overlap, no legend lies on the plotting area or on a
label, no number is in scientific notation, and each engine figure's title names its
propellant, its ambient (vacuum, ambient pressure or altitude) and its flow model.
"""

import re
from pathlib import Path

import matplotlib
import pytest

from perfchain.study.plot_text import overlaps, place_labels, pyplot, thin_ticks
from perfchain.study.plots import make_plots

matplotlib.use("Agg")
EXAMPLES = Path(__file__).resolve().parent.parent / "examples"

#: figures each example must give (file stems); more may come
EXPECTED = {
    "upper_stage_trade": {"moth-m-isp", "moth-m-tc-cstar", "moth-m-isp-area-ratio", "delivered-vs-ideal",
                          "comparison-upper-stage-pairs-at-50-bar-area-ratio-80", "delta-v"},
    "student_test_stand": {"pebble-3-isp", "pebble-3-flow-models", "pebble-3-isp-area-ratio", "pebble-3-isp-altitude",
                           "pebble-3x-isp-altitude", "delivered-vs-ideal"},
    "kick_stage_storables": {"burdock-n-isp", "burdock-p-tc-cstar", "comparison-storables-at-10-bar-area-ratio-60",
                             "delta-v", "fixed-tank-delta-v"},
    "solid_kick_motor": {"petrel-k-isp-area-ratio", "comparison-kick-options", "delta-v"},
    "university_hybrid": {"gorse-p-isp", "gorse-p-isp-altitude", "comparison-fuel-grains", "delta-v"},
    "regen_chamber_heat_flux": {"wren-25-isp", "wren-25-tc-cstar", "wren-25c-isp", "delivered-vs-ideal"},
}
SCIENTIFIC = re.compile(r"\d[eE][+-]?\d")


def _texts(fig) -> list[str]:
    from matplotlib.text import Text

    return [t.get_text() for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip()]


@pytest.mark.parametrize("example", sorted(EXPECTED))
def test_every_plot_of_the_example_is_drawn_and_readable(example, tmp_path):
    assert {p.stem for p in EXAMPLES.glob("*.toml")} == set(EXPECTED)   # every bundled example is covered
    from conftest import example_result

    res = example_result(example)
    seen = {}

    def inspect(key, fig):
        seen[key] = (overlaps(fig), [t for t in _texts(fig) if SCIENTIFIC.search(t)],
                     fig.get_suptitle() or " ".join(ax.get_title() for ax in fig.axes))

    figs = make_plots(res, tmp_path, "si", formats=("png",), inspect=inspect)
    assert EXPECTED[example] <= {f.key for f in figs} == set(seen)
    assert all((tmp_path / f"{f.key}.png").stat().st_size > 10_000 for f in figs)
    for key, (crossing, scientific, title) in seen.items():
        assert crossing == [], (key, crossing)
        assert scientific == [], (key, scientific)
    for name, es in res.engines.items():
        for key, (_, _, title) in seen.items():
            if key.startswith(name.lower()) and not key.endswith("isp-altitude"):
                assert es.label in title, (key, title)
                assert re.search(r"vacuum|ambient|altitude", title) or key.endswith("tc-cstar"), (key, title)
                assert re.search(r"shifting|frozen", title) or key.endswith("flow-models"), (key, title)


def test_close_optimum_labels_are_moved_apart():
    # the case: optima at O/F 3.51 and 3.54 whose labels were drawn over each other
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(5.2, 3.8))
    ax.plot([2.6, 3.2, 3.8], [365.5, 378.7, 378.6])
    ax.plot([3.51, 3.54], [380.40, 380.55], marker="*", linestyle="none")   # the two optima
    naive = [ax.annotate(t, xy, textcoords="offset points", xytext=(4, 6), fontsize=7)
             for xy, t in (((3.51, 380.40), "O/F 3.51"), ((3.54, 380.55), "O/F 3.54"))]
    assert overlaps(fig)              # the check sees the overlap the fixed offset gives
    for a in naive:
        a.remove()
    place_labels(ax, [(3.51, 380.40, "O/F 3.51"), (3.54, 380.55, "O/F 3.54")])
    assert overlaps(fig) == []
    plt.close(fig)


def test_crowded_log_ticks_are_thinned():
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(4.0, 3.0))
    ax.set_xscale("log")
    ratios = [3, 3.5, 4, 4.5, 5, 6, 7, 8, 10, 12, 15, 20, 40, 60, 80, 120]
    ax.plot(ratios, range(len(ratios)))
    ax.set_xticks(ratios, [str(r) for r in ratios])
    assert overlaps(fig)
    thin_ticks(ax, ratios)
    shown = [t.get_text() for t in ax.get_xticklabels() if t.get_text()]
    assert overlaps(fig) == [] and shown[0] == "3" and shown[-1] == "120" and len(shown) >= 5
    plt.close(fig)
