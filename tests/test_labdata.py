"""Lab CSV import: units in headers, wt% -> vol% with densities, errors naming line and column."""

import pathlib

import numpy as np
import pytest

import predictor  # noqa: F401
from predictor import labdata
from predictor.errors import FitError, ScenarioError, UnitError

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"


def read(text, **kw):
    return labdata.read_lab_text(text, **kw)


def test_units_in_headers_are_converted_to_si():
    # Conversions: 1 mPa*s = 1e-3 Pa*s, 25 degC = 298.15 K (SI definitions).
    d = read("phi [-],viscosity [mPa*s],temperature [degC],shear rate [1/min]\n"
             "0.1,2.5,25,60\n0.2,4.0,25,120\n")
    t = d.table
    assert t["viscosity_Pa_s"].tolist() == pytest.approx([2.5e-3, 4.0e-3])
    assert t["temperature_K"].tolist() == pytest.approx([298.15, 298.15])
    assert t["shear_rate_1_per_s"].tolist() == pytest.approx([1.0, 2.0])
    assert t["line"].tolist() == [2, 3]


def test_mass_loading_uses_the_densities():
    # Hand calculation (composition docstring): 40 wt% of a 3900 kg/m3 powder in water at
    # 1000 kg/m3 is (0.4/3900) / (0.4/3900 + 0.6/1000) = 0.145985 by volume.
    d = read("wt% solids,relative viscosity [-]\n40,1.6\n20,1.2\n",
             particle_density_kg_per_m3=3900.0, liquid_density_kg_per_m3=1000.0)
    assert d.table["phi"][0] == pytest.approx(0.145985, abs=5e-7)
    assert d.table["mass_fraction"][0] == 0.4
    assert any("wt% -> vol%" in n for n in d.notes)


def test_absolute_viscosity_becomes_relative_and_stress_becomes_viscosity():
    d = read("solids [vol%],shear rate [1/s],shear stress [Pa]\n10,10,0.013\n20,10,0.019\n",
             liquid_viscosity_Pa_s=1e-3)
    assert d.table["phi"].tolist() == pytest.approx([0.1, 0.2])
    assert d.table["viscosity_Pa_s"].tolist() == pytest.approx([1.3e-3, 1.9e-3])
    assert d.table["relative_viscosity"].tolist() == pytest.approx([1.3, 1.9])


def test_demo_loading_series_calibrates():
    # Invented demo file (data_demo/lab_loading_series.csv, made from Krieger-Dougherty
    # with phi_max 0.60 and [eta] 3.0 plus 4 % noise): the 95 % intervals hold the truth.
    d = labdata.read_lab_csv(DEMO / "lab_loading_series.csv",
                             particle_density_kg_per_m3=2700.0, liquid_density_kg_per_m3=997.0,
                             liquid_viscosity_Pa_s=0.89e-3)
    r = d.fit("krieger-dougherty")
    assert r.intervals["phi_max"][0] <= 0.60 <= r.intervals["phi_max"][1]
    assert r.intervals["intrinsic_viscosity"][0] <= 3.0 <= r.intervals["intrinsic_viscosity"][1]
    assert r.n_points == 10


def test_demo_flow_curve_calibrates():
    # Invented demo file made from Carreau-Yasuda (eta0 12 Pa*s, n 0.4) with 3 % noise.
    d = labdata.read_lab_csv(DEMO / "lab_flow_curve.csv")
    r = d.fit_flow_curve("carreau-yasuda")
    lo, hi = r.intervals["zero_shear_viscosity_Pa_s"]
    assert lo <= 12.0 <= hi
    lo, hi = r.intervals["flow_index"]
    assert lo <= 0.4 <= hi


@pytest.mark.parametrize("text, error, match", [
    ("phi [-],viscosity [mPa*s]\n0.1,abc\n", ScenarioError,
     r"line 2, column 'viscosity \[mPa\*s\]'.*not a number"),
    ("phi [-],viscosity [mPa*s]\n0.1,\n", ScenarioError, "line 2.*empty"),
    ("phi [-],viscosity [mPa*s]\n0.1,2.0\n0.2,0.004 Pa*s\n", UnitError, "line 3.*mixed units"),
    ("phi [-],viscosity [mPa*s],relative viscosity [-]\n0.1,2,2\n", UnitError, "mixed units"),
    ("solids [%],viscosity [mPa*s]\n10,2\n", UnitError, "ambiguous"),
    ("phi [-],viscosity\n0.1,2\n", UnitError, "no unit"),
    ("phi [-],viscosity [mPas]\n0.1,2\n", UnitError, "mPas"),
    ("phi [-],viscosity [mPa*s]\n0.1,2,3\n", ScenarioError, "line 2: 3 cells"),
    ("phi [-],viscosity [mPa*s]\n1.5,2\n", ScenarioError, "line 2.*loading"),
    ("wt% solids,viscosity [mPa*s]\n10,2\n", ScenarioError, "densities"),
    ("phi [-],wt% solids,viscosity [mPa*s]\n0.1,10,2\n", ScenarioError, "keep one"),
    ("phi [-],viscosity [mPa*s]\n0.1,-2\n", ScenarioError, "line 2.*positive"),
    ("# only a comment\n", ScenarioError, "header"),
    ('phi [-],viscosity [mPa*s]\n0.1,"2\n0.2,3\n', ScenarioError, "line 2: unbalanced quotes"),
])
def test_errors_name_line_and_column(text, error, match):
    with pytest.raises(error, match=match):
        read(text)


def test_fit_refuses_several_shear_rates_until_one_is_chosen():
    text = ("phi [-],shear rate [1/s],relative viscosity [-]\n"
            "0.1,1,1.3\n0.2,1,1.8\n0.3,1,2.9\n0.4,1,5.1\n0.1,100,1.28\n0.2,100,1.7\n")
    d = read(text)
    with pytest.raises(FitError, match="several shear rates"):
        d.fit("quemada")
    r = d.at_shear_rate(1.0).fit("quemada")
    assert r.n_points == 4
    with pytest.raises(FitError, match="no row at shear rate 5"):
        d.at_shear_rate(5.0)


def test_semicolon_files_and_comments():
    d = read("# invented\nphi [-];relative viscosity [-]\n# mid comment\n0.1;1.3\n0.2;1.8\n")
    assert d.table["relative_viscosity"].tolist() == [1.3, 1.8]
    assert d.table["line"].tolist() == [4, 5]
    assert np.all(d.table["phi"] == [0.1, 0.2])


def test_missing_file():
    with pytest.raises(ScenarioError, match="no such file"):
        labdata.read_lab_csv("/nonexistent/lab.csv")
