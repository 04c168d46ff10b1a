"""A corpus of malformed input files (tests/corpus/), run through every file reader.

Each case either reads (and the values are checked against numbers worked out by hand) or
raises a `LoadlineError` subclass whose message names the file or the line/column and says
what is wrong. All data in the corpus is invented for these tests; none of it is measured.
"""

from __future__ import annotations

import math
import pathlib
import shutil
import warnings

import numpy as np
import pytest

from predictor import batch, labdata, scenario
from predictor.errors import InputRangeError, LoadlineError, ScenarioError, UnitError

CORPUS = pathlib.Path(__file__).resolve().parent / "corpus"

# -- readers, each returning a small dict of values to check ----------------------------------


def _lab(path):
    table = labdata.read_lab_csv(path).table
    return {"phi": list(table["phi"]), "rate": list(table["shear_rate_1_per_s"]),
            "eta": list(table["viscosity_Pa_s"])}


def _size(path):
    dist = batch.read_size_table(path)
    return {"d": list(dist.diameters_m), "f": list(dist.fractions)}


def _candidates(path):
    summary, frame = batch.screen_file(path, keep=-1)
    return {"rows": summary.rows, "errors": summary.errors, "names": list(frame["candidate"]),
            "phi": list(frame["phi solids [-]"]), "error": list(frame["error"])}


def _scenario(path):
    form = scenario.read_scenario(path)
    ing = form.ingredients[0]
    return {"T": form.liquid.temperature_K, "rho": ing.density_kg_per_m3,
            "d": ing.diameter_m, "loading": ing.loading}


READERS = {"lab": _lab, "size": _size, "candidates": _candidates, "scenario": _scenario}

# -- expected values, by hand ------------------------------------------------------------------

# phi 0.10 and 0.25 at 10 1/s; 1.2 and 2.5 mPa*s = 0.0012 and 0.0025 Pa*s.
LAB = {"phi": [0.10, 0.25], "rate": [10.0, 10.0], "eta": [0.0012, 0.0025]}
# Passing 0 / 50 / 100 % at 1, 2, 4 um: two classes of 50 % each, at the geometric class
# centres sqrt(1*2) = 1.41421 um and sqrt(2*4) = 2.82843 um.
SIZE = {"d": [math.sqrt(2) * 1e-6, math.sqrt(8) * 1e-6], "f": [0.5, 0.5]}
# 30 wt% solids of 2500 kg/m3 in water of 997 kg/m3 (the batch default):
# phi = (0.30/2500) / (0.30/2500 + 0.70/997) = 0.00012 / 0.000822106 = 0.145966.
PHI_30WT = 0.00012 / (0.00012 + 0.70 / 997.0)
CANDIDATES = {"rows": 1, "errors": 0, "names": ["A"], "phi": [PHI_30WT], "error": [""]}
# 25 degC = 298.15 K; 2.5 g/cm**3 = 2500 kg/m3; 5 um; 30 wt% written as a fraction 0.3.
SCENARIO = {"T": 298.15, "rho": 2500.0, "d": 5e-6, "loading": 0.3}

# (reader, file, expectation): a dict of values means "reads"; otherwise
# (error class, words the message must hold).
CASES = [
    # lab-data CSV
    ("lab", "lab_semicolon.csv", LAB),
    ("lab", "lab_tab.csv", LAB),
    ("lab", "lab_bom.csv", LAB),
    ("lab", "lab_decimal_comma.csv", LAB),
    ("lab", "lab_no_header.csv", (ScenarioError, ["lab_no_header.csv", "line 2", "header"])),
    ("lab", "lab_mixed_units.csv",
     (UnitError, ["lab_mixed_units.csv", "line 4", "viscosity [mPa*s]", "mixed units"])),
    ("lab", "lab_latin1.csv", (ScenarioError, ["lab_latin1.csv", "line 2", "0xb0", "UTF-8"])),
    ("lab", "empty.csv", (ScenarioError, ["empty.csv", "empty"])),
    ("lab", "whitespace.csv", (ScenarioError, ["whitespace.csv", "empty"])),
    ("lab", "binary.png", (ScenarioError, ["binary.png", "binary"])),
    ("lab", "nul_bytes.csv", (ScenarioError, ["nul_bytes.csv", "binary"])),
    # size-table CSV
    ("size", "size_semicolon.csv", SIZE),
    ("size", "size_tab.csv", SIZE),
    ("size", "size_bom.csv", SIZE),
    ("size", "size_decimal_comma.csv", SIZE),
    ("size", "size_no_header.csv", (ScenarioError, ["size_no_header.csv", "line 1", "header"])),
    ("size", "size_mixed_units.csv",
     (InputRangeError, ["size_mixed_units.csv", "row 3", "size [um]", "'2 mm'", "mixed units"])),
    ("size", "size_latin1.csv", (ScenarioError, ["size_latin1.csv", "line 1", "0xb5", "UTF-8"])),
    ("size", "empty.csv", (ScenarioError, ["empty.csv", "empty"])),
    ("size", "whitespace.csv", (ScenarioError, ["whitespace.csv", "empty"])),
    ("size", "binary.png", (ScenarioError, ["binary.png", "binary"])),
    ("size", "nul_bytes.csv", (ScenarioError, ["nul_bytes.csv", "binary"])),
    # candidate table CSV
    ("candidates", "cand_semicolon.csv", CANDIDATES),
    ("candidates", "cand_tab.csv", CANDIDATES),
    ("candidates", "cand_bom.csv", CANDIDATES),
    ("candidates", "cand_decimal_comma.csv", CANDIDATES),
    ("candidates", "cand_no_header.csv",
     (ScenarioError, ["cand_no_header.csv", "line 1", "header"])),
    ("candidates", "cand_latin1.csv",
     (ScenarioError, ["cand_latin1.csv", "line 1", "0xb5", "UTF-8"])),
    ("candidates", "empty.csv", (ScenarioError, ["empty.csv", "empty"])),
    ("candidates", "whitespace.csv", (ScenarioError, ["whitespace.csv", "empty"])),
    ("candidates", "binary.png", (ScenarioError, ["binary.png", "binary"])),
    ("candidates", "nul_bytes.csv", (ScenarioError, ["nul_bytes.csv", "binary"])),
    # scenario JSON
    ("scenario", "scenario_bom.loadline.json", SCENARIO),
    ("scenario", "scenario_truncated.loadline.json",
     (ScenarioError, ["scenario_truncated.loadline.json", "not valid JSON", "line 4",
                      "ends early"])),
    ("scenario", "scenario_latin1.loadline.json",
     (ScenarioError, ["scenario_latin1.loadline.json", "line 4", "0xb0", "UTF-8"])),
    ("scenario", "empty.csv", (ScenarioError, ["empty.csv", "empty"])),
    ("scenario", "whitespace.csv", (ScenarioError, ["whitespace.csv", "empty"])),
    ("scenario", "binary.png", (ScenarioError, ["binary.png", "UTF-8"])),
    ("scenario", "nul_bytes.csv", (ScenarioError, ["nul_bytes.csv", "NUL"])),
    # issue 20 (hostile input). Each of these passed silently or with a traceback before:
    # a RecursionError; true read as 1.0; the last of two keys kept (the solid became a
    # droplet); 800 mm read as 0.8 Pa*s; furlongs read as vol%.
    ("scenario", "scenario_deep_nesting.loadline.json",
     (ScenarioError, ["scenario_deep_nesting.loadline.json", "100000 levels deep", "64"])),
    ("scenario", "scenario_bool_for_number.loadline.json",
     (ScenarioError, ["ingredients[0].aspect_ratio", "true", "not a number"])),
    ("scenario", "scenario_duplicate_keys.loadline.json",
     (ScenarioError, ["scenario_duplicate_keys.loadline.json", "'kind'", "twice"])),
    ("scenario", "scenario_law_unit_wrong.loadline.json",
     (UnitError, ["liquid.parameters.zero_shear_viscosity_Pa_s", "'mm'", "[length]",
                  "viscosity", "'Pa*s'"])),
    ("size", "size_amount_wrong_unit.csv",
     (UnitError, ["size_amount_wrong_unit.csv", "amount [furlongs]", "[furlongs]",
                  "percent or fraction"])),
    ("candidates", "cand_huge_shear_rate.csv",
     {"rows": 1, "errors": 1, "names": ["A"], "phi": [math.nan],
      "error": ["column 'window 1 shear rate [1/s]' = '1e308' is not allowed; expected a "
                "shear rate up to 1e+09 1/s."]}),
]


def _check_values(got: dict, expected: dict) -> None:
    assert got.keys() == expected.keys()
    for key, want in expected.items():
        if isinstance(want, list) and want and isinstance(want[0], float):
            np.testing.assert_allclose(np.asarray(got[key], dtype=float), want, rtol=1e-9,
                                       err_msg=key)
        elif isinstance(want, float):
            assert got[key] == pytest.approx(want, rel=1e-9), key
        else:
            assert got[key] == want, key


def _check_error(call, error: type, words: list[str]) -> str:
    with pytest.raises(LoadlineError) as info:
        call()
    assert isinstance(info.value, error), f"{type(info.value).__name__}: {info.value}"
    message = str(info.value)
    for word in words:
        assert word in message, f"{word!r} not in {message!r}"
    return message


@pytest.mark.parametrize(("reader", "name", "expected"), CASES,
                         ids=[f"{r}-{n}" for r, n, _ in CASES])
def test_corpus_file(reader, name, expected, tmp_path):
    # Copy first: the candidate reader resolves size tables beside the file, and a scenario
    # read may look for a .bak beside it; the copy keeps tests/corpus untouched.
    path = tmp_path / name
    shutil.copyfile(CORPUS / name, path)
    if isinstance(expected, dict):
        got = READERS[reader](path)
        _check_values(got, expected)
        assert got.keys() == expected.keys()
    else:
        assert _check_error(lambda: READERS[reader](path), *expected)


def test_candidate_row_in_other_unit_is_flagged_and_the_rest_is_read(tmp_path):
    path = tmp_path / "cand_mixed_units.csv"
    shutil.copyfile(CORPUS / path.name, path)
    got = _candidates(path)
    assert got["rows"] == 2 and got["errors"] == 1
    assert got["phi"][0] == pytest.approx(PHI_30WT, rel=1e-9)
    assert "ingredient 1 density [kg/m3]" in got["error"][1]
    assert "2.5 g/cm3" in got["error"][1]


def test_scenario_extra_keys_read_with_a_warning_naming_them(tmp_path):
    path = tmp_path / "scenario_extra_keys.loadline.json"
    shutil.copyfile(CORPUS / path.name, path)
    with pytest.warns(UserWarning) as record:
        got = _scenario(path)
    _check_values(got, SCENARIO)
    message = " ".join(str(w.message) for w in record)
    for key in ("colour", "liquid.viscosity_guess", "ingredients[0].supplier", path.name):
        assert key in message


def test_known_keys_give_no_warning(tmp_path):
    path = tmp_path / "scenario_bom.loadline.json"
    shutil.copyfile(CORPUS / path.name, path)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert _scenario(path)["rho"] == pytest.approx(2500.0)


def _huge(path: pathlib.Path, header: str, row: str, size: int) -> None:
    repeats = size // len(row) + 1
    path.write_text(header + row * repeats, encoding="utf-8")


@pytest.mark.parametrize(("reader", "header", "row", "limit"), [
    ("lab", "phi [-],viscosity [mPa*s]\n", "0.1,1.2\n", labdata.MAX_BYTES),
    ("size", "size [um],passing [vol%]\n", "1,50\n", batch.MAX_SIZE_TABLE_BYTES),
    ("scenario", "", " " * 63 + "\n", scenario.MAX_BYTES),
])
def test_huge_file_is_refused_naming_the_limit(reader, header, row, limit, tmp_path):
    path = tmp_path / "huge.csv"
    _huge(path, header, row, limit + 1)
    assert path.stat().st_size > limit
    _check_error(lambda: READERS[reader](path), ScenarioError, ["huge.csv", "5 MB"])


def test_huge_candidate_table_is_refused_naming_the_limit(tmp_path, monkeypatch):
    # The real limit is 500 MB (tables are streamed); a lower one keeps the test small.
    monkeypatch.setattr(batch, "MAX_TABLE_BYTES", 1_000_000)
    path = tmp_path / "huge.csv"
    _huge(path, "candidate,ingredient 1 loading [wt%],ingredient 1 density [kg/m3]\n",
          "A,30,2500\n", 1_000_001)
    assert _check_error(lambda: _candidates(path), ScenarioError, ["huge.csv", "1 MB"])


def test_lab_text_upload_with_bom_and_decimal_commas():
    # The app's upload path (text, not a file): same rules as the file reader.
    text = "\ufeffphi [-];shear rate [1/s];viscosity [mPa*s]\n0,10;10;1,2\n0,25;10;2,5\n"
    got = labdata.read_lab_text(text).table
    np.testing.assert_allclose(got["viscosity_Pa_s"], [0.0012, 0.0025], rtol=1e-12)
    np.testing.assert_allclose(got["phi"], [0.10, 0.25], rtol=1e-12)


# -- issue 20: hostile input ------------------------------------------------------------------


def test_unknown_relation_and_law_parameters_are_named_in_the_warning(tmp_path):
    # Before: relations.parameters.phi_maxx and an unknown law parameter were dropped
    # without a word, while unknown top-level keys were named.
    path = tmp_path / "scenario_unknown_parameter.loadline.json"
    shutil.copyfile(CORPUS / path.name, path)
    with pytest.warns(UserWarning) as record:
        form = scenario.read_scenario(path)
    message = " ".join(str(w.message) for w in record)
    assert "relations.parameters.phi_maxx" in message
    assert "liquid.parameters.viscosity_guess_Pa_s" in message
    assert form.model_params == {"phi_max": 0.6}
    assert form.liquid.params == {"viscosity_Pa_s": pytest.approx(1e-3)}


def test_wide_first_row_is_echoed_unshifted_with_its_cell_count(tmp_path):
    # Before: pandas took the leading cells of a first row wider than the header as an
    # index, so the echo showed cells 35..40 and the message "row 2 has 11 cells".
    path = tmp_path / "cand_wide_first_row.csv"
    shutil.copyfile(CORPUS / path.name, path)
    summary, frame = batch.screen_file(path, keep=-1)
    assert summary.rows == 2 and summary.errors == 1
    first = frame.iloc[0]
    assert (first["candidate"], first["note"]) == ("B", "invented")
    assert first["ingredient 1 loading [wt%]"] == "1"      # the third cell of the row
    assert first["window 1 shear rate [1/s]"] == "4"
    assert "row 2 has 42 cells, the header has 6" in first["error"]
    # the next row is read as written: 30 wt% of 2500 kg/m3 in water
    assert frame.iloc[1]["candidate"] == "A" and frame.iloc[1]["status"] == "ok"
    assert frame.iloc[1]["phi solids [-]"] == pytest.approx(PHI_30WT, rel=1e-9)


def test_scenario_with_too_many_ingredients_is_refused_naming_the_limit(tmp_path):
    import json

    from predictor.formulation import MAX_INGREDIENTS

    doc = json.loads((CORPUS / "scenario_bom.loadline.json").read_text(encoding="utf-8-sig"))
    doc["ingredients"] = doc["ingredients"] * (MAX_INGREDIENTS + 1)
    path = tmp_path / "many.loadline.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    _check_error(lambda: scenario.read_scenario(path), ScenarioError,
                 [f"{MAX_INGREDIENTS + 1} given", f"at most {MAX_INGREDIENTS}"])
    doc["ingredients"] = doc["ingredients"][:MAX_INGREDIENTS]
    path.write_text(json.dumps(doc), encoding="utf-8")
    assert len(scenario.read_scenario(path).ingredients) == MAX_INGREDIENTS


def test_candidate_table_with_too_many_ingredients_is_refused(tmp_path):
    path = tmp_path / "many.csv"
    path.write_text("candidate,ingredient 51 loading [wt%],ingredient 51 density [kg/m3]\n"
                    "A,30,2500\n", encoding="utf-8")
    message = _check_error(lambda: _candidates(path), InputRangeError,
                           ["ingredient 51 loading", "1 to 50"])
    assert "ingredient 51" in message


def test_size_table_with_very_many_classes_is_rebinned_keeping_the_volume(tmp_path):
    # 100 000 equal retained masses on a log grid from 1 to 1000 um: the cumulative volume
    # is linear in log(d), so D50 is the geometric middle, sqrt(1 * 1000) = 31.62 um, and
    # D10 is 10**0.3 = 1.995 um (by hand). The rebinned table keeps both.
    path = tmp_path / "many.csv"
    exponents = np.arange(100_000) / 100_000 * 3
    path.write_text("size [um],retained [g]\n" + "".join(
        f"{10 ** e:.9g},1\n" for e in exponents), encoding="utf-8")
    with pytest.warns(UserWarning, match="100000 size classes were rebinned onto 200"):
        dist = batch.read_size_table(path)
    assert dist.diameters_m.size <= 200
    assert dist.d50_m == pytest.approx(math.sqrt(1000) * 1e-6, rel=2e-3)
    assert dist.d10_m == pytest.approx(10 ** 0.3 * 1e-6, rel=2e-3)
    assert dist.fractions.sum() == pytest.approx(1.0)


def test_size_table_retained_in_a_mass_unit_is_read(tmp_path):
    path = tmp_path / "kg.csv"
    path.write_text("size [um],retained [kg]\n1,5\n2,5\n", encoding="utf-8")
    np.testing.assert_allclose(batch.read_size_table(path).fractions, [0.5, 0.5])


def test_window_limit_below_the_liquid_is_explained_in_the_row(tmp_path):
    # The batch default liquid is water at 25 degC, about 0.89 mPa*s (its own output); a
    # 0.1 mPa*s ceiling cannot be met by any loading. Before: max solids 0 with no word.
    path = tmp_path / "low.csv"
    path.write_text("candidate,ingredient 1 loading [wt%],ingredient 1 density [kg/m3],"
                    "ingredient 1 d50 [um],window 1 shear rate [1/s],"
                    "window 1 max viscosity [mPa*s]\nA,30,2500,5,10,0.1\nB,30,2500,5,10,100\n",
                    encoding="utf-8")
    _, frame = batch.screen_file(path, keep=-1)
    assert frame["window 1 max solids [vol%]"].tolist()[0] == 0.0
    assert "even the liquid without solids" in frame["warnings"].iat[0]
    assert "even the liquid" not in frame["warnings"].iat[1]
