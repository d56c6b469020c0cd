"""Names in studies: unique case-insensitively, file names that never collide or overflow, drawn as text.

Regression tests for the name faults of issue 12: ingredients ``Hex`` and ``hex`` silently
used the second record for the first; engines ``E-1`` / ``E 1`` (or any two non-Latin names)
wrote one table over the other; a 300-character engine name failed with "File name too long"
after all the computing; a name with ``$...$`` stopped the plots in matplotlib's maths parser.
"""

from __future__ import annotations

import hashlib

import pandas as pd
import pytest
from click.testing import CliRunner

from perfchain.cli.main import main
from perfchain.errors import InputError
from perfchain.study.names import MAX_STEM, file_stems, name_key, slug
from perfchain.study.optimum import compare_pairs
from perfchain.study.schema import parse_study


def engine(name, ox="N2O4", fu="MMH"):
    return (f'[[engine]]\nname = "{name}"\noxidizer = "{ox}"\nfuel = "{fu}"\nmixture_ratio = [1.6, 2.2]\n'
            'chamber_pressure = "10 bar"\narea_ratio = 40\nambient_pressure = "0 Pa"\n')


HEAD = '[study]\ntitle = "names"\n'
HEX = ('[[ingredient]]\nname = "{0}"\nformula = {{ C = 6, H = 14 }}\nenthalpy = "-198.7 kJ/mol"\n'
       '[[ingredient]]\nname = "{1}"\nformula = {{ C = 6, H = 12 }}\nenthalpy = "-100 kJ/mol"\n')


def refused(text, field, *words):
    with pytest.raises(InputError) as exc:
        parse_study(text)
    assert exc.value.field == field, str(exc.value)
    assert "\n" not in str(exc.value) and all(w in str(exc.value) for w in words), str(exc.value)


def test_ingredient_names_unique_case_insensitively():
    refused(HEAD + HEX.format("Hex", "hex") + engine("E", "LOX", "Hex"), "ingredient[2].name", "'Hex'", "'hex'")
    # a blend may not take an ingredient's name either
    refused(HEAD + HEX.format("Hex", "Hept") + '[[blend]]\nname = "HEX"\nparts = { Hex = 0.5, Hept = 0.5 }\n'
            + engine("E", "LOX", "Hex"), "blend[1].name", "ingredient[1].name is 'Hex'")


@pytest.mark.parametrize("section,a,b", [("engine", "E1", "e1"), ("engine", "Straße", "STRASSE")])
def test_engine_names_unique_case_insensitively(section, a, b):
    refused(HEAD + engine(a) + engine(b), f"{section}[2].name", repr(a), repr(b))


def test_vehicle_and_comparison_names_unique_case_insensitively():
    stage = '[[vehicle.stage]]\nisp = "300 s"\ndry = "1 t"\npropellant = "9 t"\n'
    refused(HEAD + '[[vehicle]]\nname = "V"\npayload = "1 t"\n' + stage + '[[vehicle]]\nname = "v"\npayload = "1 t"\n'
            + stage, "vehicle[2].name")
    cmp = '[[comparison]]\nname = "{}"\npairs = ["LOX/RP-1"]\nchamber_pressure = "70 bar"\narea_ratio = 40\n'
    refused(HEAD + cmp.format("C") + cmp.format("c"), "comparison[2].name")


def test_duplicate_pairs_refused_by_study_and_by_compare():
    cmp = '[[comparison]]\nname = "c"\npairs = [{}]\nchamber_pressure = "70 bar"\narea_ratio = 40\n'
    refused(HEAD + cmp.format('"LOX/RP-1", "lox / rp-1"'), "comparison[1].pairs[2]", "pairs[1]")
    with pytest.raises(InputError, match="distinct pairs"):
        compare_pairs(["LOX/RP-1", "lox/kerosene"], "70 bar", area_ratio=40)   # kerosene: an alias of RP-1


def test_file_stems_distinct_bounded_and_stable():
    names = ["Wisp", "E-1", "E 1", "Двигатель", "引擎", "L" * 300, "$x^2$"]
    stems = file_stems(names)
    assert len(set(stems.values())) == len(names)
    assert stems["Wisp"] == "wisp" and stems["$x^2$"] == "x-2"   # plain slugs kept where nothing collides
    assert all(len(s) <= MAX_STEM and s == slug(s) for s in stems.values())
    # the suffix is the name's SHA-256 (FIPS 180-4), so the stem does not depend on the other names
    assert stems["E-1"] == "e-1-" + hashlib.sha256("E-1".encode()).hexdigest()[:8]
    assert file_stems(["E-1", "E 1", "X"])["E-1"] == stems["E-1"]
    assert name_key("Ｅ１") == name_key("e1")   # full-width forms fold too (NFKC)


def test_colliding_long_and_maths_names_run_end_to_end(tmp_path):
    names = ["E-1", "E 1", "N" * 300, "$\\bad{$ and $x^$", "Двигатель"]
    fuels = ["MMH", "UDMH", "MMH", "UDMH", "MMH"]
    study = tmp_path / "s.toml"
    study.write_text(HEAD + "".join(engine(n.replace("\\", "\\\\"), "N2O4", f) for n, f in zip(names, fuels))
                     + '[output]\nformats = ["csv"]\nplot_formats = ["png"]\n')
    r = CliRunner().invoke(main, ["run", str(study), "--out", str(tmp_path / "out")])
    assert r.exit_code == 0, r.output
    tables = sorted((tmp_path / "out" / "tables").glob("engine-*-grid.csv"))
    assert len(tables) == len(names)                       # none written over another
    fuels_seen = sorted(pd.read_csv(t)["fuel"].iloc[0] for t in tables)
    assert fuels_seen == sorted(fuels)
    assert all(len(p.name) < 255 for p in (tmp_path / "out").rglob("*"))
    assert len(list((tmp_path / "out" / "plots").glob("*-isp.png"))) == len(names)
    html = (tmp_path / "out" / "report.html").read_text()
    assert "$\\bad{$ and $x^$" in html and "Двигатель" in html
