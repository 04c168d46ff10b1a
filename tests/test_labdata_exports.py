"""Rheometer exports: several curves per file, units in headers, branches, slip, trends."""

import io
import pathlib

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import predictor  # noqa: F401
from predictor import emulsion, labdata
from predictor.errors import FitError, InputRangeError, LoadlineError, ScenarioError, UnitError

BLOCKS = """\
# invented export: two samples, up and down sweeps, ';' and decimal commas
Sample: cream A
Shear rate [1/s];Viscosity [mPa*s];Temperature [degC]
0,1;52000;25
1;6100;25
10;820;25
100;130;25
10;700;25
1;5000;25
0,1;41000;25

Sample: cream B
Shear rate [1/s];Viscosity [mPa*s];Temperature [degC]
0,1;26000;25
1;3050;25
10;410;25
100;65;25
"""


def test_blocks_with_titles_become_series_with_branches_kept_apart():
    curves = labdata.read_flow_curves_text(BLOCKS, "export.csv")
    assert curves.series() == ["cream A", "cream B"]
    a = curves.table[curves.table["series"] == "cream A"]
    assert a["branch"].tolist() == ["up"] * 4 + ["down"] * 3
    assert curves.curve("cream B")["branch"].eq("up").all()
    # Conversions by the SI definitions: 52000 mPa*s = 52 Pa*s; stress = viscosity * rate.
    up = curves.curve("cream A")
    assert up["viscosity_Pa_s"].tolist() == pytest.approx([52.0, 6.1, 0.82, 0.13])
    assert up["shear_stress_Pa"].tolist() == pytest.approx([5.2, 6.1, 8.2, 13.0])
    assert up["line"].tolist() == [4, 5, 6, 7]
    assert curves.controlled == "shear_rate"


def test_stress_controlled_series_column_and_units_after_underscores():
    text = ("sample_id,stress_Pa,viscosity_Pa_s\n"
            "phi_0.7,10,100\nphi_0.7,20,2\nphi_0.7,40,0.4\n"
            "phi_0.8,30,300\nphi_0.8,60,6\nphi_0.8,90,0.9\n")
    curves = labdata.read_flow_curves_text(text)
    assert curves.controlled == "shear_stress"
    assert curves.series() == ["phi_0.7", "phi_0.8"]
    assert curves.curve("phi_0.8")["phi"].tolist() == pytest.approx([0.8] * 3)
    assert curves.curve("phi_0.7")["shear_rate_1_per_s"].tolist() == pytest.approx(
        [0.1, 10.0, 100.0])


def test_loading_column_separates_interleaved_series():
    text = "phi,shear_rate_1/s,stress_Pa\n" + "".join(
        f"{p},{r},{s}\n" for r in (0.1, 1, 10) for p, s in ((0.7, 5 + r), (0.8, 20 + r)))
    curves = labdata.read_flow_curves_text(text)
    assert len(curves.series()) == 2
    assert curves.curve("phi 0.7")["shear_stress_Pa"].tolist() == pytest.approx([5.1, 6, 15])


@pytest.mark.parametrize("text, pieces", [
    (BLOCKS.replace("100;65;25", "100;abc;25"),
     ["export.csv, line 17", "column 'Viscosity [mPa*s]'", "'abc' is not a number"]),
    (BLOCKS.replace("10;410;25", "10;;25"), ["line 16", "Viscosity", "empty cell"]),
    (BLOCKS.replace("1;3050;25", "1;-3050;25"), ["line 15", "Viscosity", "must be positive"]),
    (BLOCKS.replace("1;6100;25", "1;6100"), ["line 5", "2 cells", "has 3"]),
    ("0.1,5\n1,6\n", ["export.csv, line 1", "no header line came before it"]),
    ("shear rate [1/s],temperature [degC]\n1,20\n2,20\n",
     ["line 1", "a flow curve needs two of them"]),
])
def test_bad_files_name_file_line_column_and_reason(text, pieces):
    with pytest.raises(ScenarioError) as err:
        labdata.read_flow_curves_text(text, "export.csv")
    for piece in pieces:
        assert piece in str(err.value)


def test_missing_and_mixed_units_are_refused():
    with pytest.raises(UnitError, match="no unit"):
        labdata.read_flow_curves_text("shear rate,shear stress [Pa]\n1,2\n2,3\n")
    with pytest.raises(UnitError, match="mixed units"):
        labdata.read_flow_curves_text("shear rate [1/s],shear stress [Pa]\n1,2 Pa\n2,3 kPa\n")


def _hb(rate, tau_y, k, n):
    return tau_y + k * rate**n


def test_every_series_fitted_with_intervals_holding_the_truth():
    # Synthetic Herschel-Bulkley curves with 2 % log-normal noise (seeded): the 95 %
    # intervals of each series hold the values used to make them.
    rng = np.random.default_rng(3)
    rate = np.logspace(-2, 2, 20)
    truth = {0.70: (5.0, 3.0, 0.5), 0.75: (12.0, 5.0, 0.45), 0.80: (25.0, 8.0, 0.4)}
    rows = [f"{phi},{r:.6g},{_hb(r, *p) * np.exp(rng.normal(0, 0.02)):.6g}\n"
            for phi, p in truth.items() for r in rate]
    curves = labdata.read_flow_curves_text("phi [-],shear rate [1/s],shear stress [Pa]\n"
                                           + "".join(rows))
    fits = labdata.fit_flow_curves(curves, "herschel-bulkley")
    assert not fits.failed
    for series, fit in fits.fits.items():
        expected = truth[fits.phi[series]]
        for name, value in zip(("yield_stress_Pa", "consistency_Pa_s", "flow_index"), expected,
                               strict=True):
            low, high = fit.intervals[name]
            assert low <= value <= high, (series, name, low, value, high)
    table = fits.table()
    assert {"series", "phi", "yield_stress_Pa", "yield_stress_Pa low"} <= set(table.columns)


def test_yield_stress_trend_recovers_the_critical_fraction():
    # Mason et al.'s relation (predictor.emulsion.yield_stress_mason) with phi_c = 0.64 and
    # Gamma/R = 2000 Pa, 3 % noise: the fitted phi_c interval holds 0.64.
    rng = np.random.default_rng(1)
    phi = np.array([0.60, 0.62, 0.66, 0.68, 0.70, 0.72, 0.74, 0.76, 0.78, 0.80])
    tau = emulsion.yield_stress_mason(phi, 2000.0, 2.0, 0.64) * np.exp(rng.normal(0, 0.03, 10))
    trend = labdata.fit_yield_stress_trend(phi, tau, "mason")
    low, high = trend.intervals["phi_c"]
    assert low <= 0.64 <= high and high - low < 0.02
    assert trend.params["laplace_pressure_Pa"] == pytest.approx(2000.0, rel=0.1)
    with pytest.raises(FitError, match="zero below phi = 0.801"):
        labdata.fit_yield_stress_trend(phi, tau, "princen-kiss")


# --- wall slip ---------------------------------------------------------------------------

TAU_Y, K, N = 20.0, 5.0, 0.5


def _true_rate(tau):
    return np.where(tau > TAU_Y, (np.clip(tau - TAU_Y, 0, None) / K) ** (1 / N), 0.0)


def _slip_velocity(tau):
    return 2e-5 * (tau / TAU_Y) ** 2          # an invented slip law, m/s


def test_slip_correction_recovers_the_flow_curve_to_one_percent():
    # Synthetic apparent curves made with the relation the method inverts (Yoshimura &
    # Prud'homme, J. Rheol. 32 (1988) 53: apparent = true + 2 v_s / h), each gap measured
    # on its own stress grid so that the interpolation is exercised; check: 1 % (issue 16).
    curves = {}
    for h, offset in ((0.5e-3, 0.0), (1e-3, 0.013), (2e-3, 0.029)):
        tau = np.logspace(np.log10(21.0) + offset, np.log10(300.0) + offset, 60)
        curves[h] = (_true_rate(tau) + 2 * _slip_velocity(tau) / h, tau)
    out = labdata.slip_correction(curves)
    assert list(out.columns[:3]) == ["shear_stress_Pa", "shear_rate_1_per_s",
                                     "slip_velocity_m_per_s"]
    assert len(out) > 50
    truth = _true_rate(out["shear_stress_Pa"].to_numpy())
    assert np.max(np.abs(out["shear_rate_1_per_s"] / truth - 1)) < 0.01
    # The slip velocity is a small difference where flow dominates; check it where slip
    # carries at least 10 % of the apparent rate at the smallest gap.
    v = _slip_velocity(out["shear_stress_Pa"].to_numpy())
    share = 2 * v / 0.5e-3 / (truth + 2 * v / 0.5e-3)
    assert np.sum(share > 0.1) >= 5
    assert np.max(np.abs(out["slip_velocity_m_per_s"] / v - 1)[share > 0.1]) < 0.03


def test_slip_correction_below_the_yield_stress_is_slip_only():
    tau = np.linspace(5.0, 15.0, 5)              # below TAU_Y: the sample slides as a plug
    curves = {h: (2 * _slip_velocity(tau) / h, tau) for h in (0.5e-3, 1e-3)}
    out = labdata.slip_correction(curves)
    assert out["slip_only"].all() and (out["shear_rate_1_per_s"] == 0).all()
    assert out["slip_velocity_m_per_s"].to_numpy() == pytest.approx(_slip_velocity(tau))


@pytest.mark.parametrize("curves", [
    {1e-3: ([1, 2], [1, 2])},
    {1e-3: ([1, 2], [1, 2]), -1e-3: ([1, 2], [1, 2])},
    {1e-3: ([1, 2], [1, 2]), 2e-3: ([1, 2], [5, 6])},
    {1e-3: ([1, -2], [1, 2]), 2e-3: ([1, 2], [1, 2])},
    {1e-3: ([1, 2, 3], [1, 2]), 2e-3: ([1, 2], [1, 2])},
])
def test_slip_correction_refuses_bad_curves(curves):
    with pytest.raises(InputRangeError):
        labdata.slip_correction(curves)


def test_slip_warning_on_the_usual_signature_only():
    rate_grid = np.logspace(-3, 2, 26)
    plain = TAU_Y + K * rate_grid**N
    assert labdata.slip_warning(rate_grid, plain) is None
    # One gap of 1 mm with the slip law above: below the yield stress the sample slides.
    tau = np.logspace(0, np.log10(200.0), 30)
    apparent = _true_rate(tau) + 2 * _slip_velocity(tau) / 1e-3
    message = labdata.slip_warning(apparent, tau)
    assert message and "wall slip" in message


def test_fit_flow_curves_attaches_the_slip_warning():
    tau = np.logspace(0, np.log10(200.0), 30)
    rate = _true_rate(tau) + 2 * _slip_velocity(tau) / 1e-3
    frame = pd.DataFrame({"shear rate [1/s]": rate, "shear stress [Pa]": tau})
    buffer = io.StringIO(frame.to_csv(index=False))
    curves = labdata.read_flow_curves(buffer, name="one gap")
    fits = labdata.fit_flow_curves(curves, "herschel-bulkley")
    assert "block 1" in fits.warnings


@given(st.lists(st.sampled_from(["shear rate [1/s]", "shear_rate_1/s", "stress_Pa",
                                 "viscosity [mPa*s]", "Sample: A", "sample", "phi", "0,5",
                                 "1", "-2", "abc", "", ";", ",", '"', "1e400", "nan",
                                 "time [s]", "gap [mm]", "\t"]), max_size=40))
@settings(max_examples=150, deadline=None, derandomize=True)
def test_fuzzed_exports_parse_or_fail_with_a_named_reason(pieces):
    # Random exports built from header, title and cell fragments: either read, with finite
    # positive values, or refused with a LoadlineError (never another exception).
    text = "".join(p + (", " if i % 3 else "\n") for i, p in enumerate(pieces))
    try:
        curves = labdata.read_flow_curves_text(text, "fuzz.csv")
    except LoadlineError as err:
        assert str(err).strip()
        return
    t = curves.table
    for column in ("shear_rate_1_per_s", "shear_stress_Pa", "viscosity_Pa_s"):
        assert np.all(np.isfinite(t[column])) and np.all(t[column] > 0)


def test_slip_velocity_intervals_hold_the_truth_with_noise():
    # Three gaps, 1 % noise on the apparent rates (seeded): the 95 % interval of the slip
    # velocity holds the invented slip law at most stresses (at least 80 % of them).
    rng = np.random.default_rng(7)
    curves = {}
    tau = np.logspace(np.log10(21.0), np.log10(60.0), 25)
    for h in (0.5e-3, 1e-3, 2e-3):
        apparent = _true_rate(tau) + 2 * _slip_velocity(tau) / h
        curves[h] = (apparent * np.exp(rng.normal(0, 0.01, tau.size)), tau)
    out = labdata.slip_correction(curves)
    v = _slip_velocity(out["shear_stress_Pa"].to_numpy())
    inside = (out["slip_velocity_low_m_per_s"] <= v) & (v <= out["slip_velocity_high_m_per_s"])
    assert inside.mean() >= 0.8


def test_step_tests_and_loops_are_told_apart_by_the_pre_shear_column():
    head = "test,pre-shear rate [1/s],time [s],shear rate [1/s],shear stress [Pa]\n"
    steps_and_loop = head + ("step,300,0,1,2\nstep,300,10,1,3\nstep,300,20,1,3.5\n"
                             "loop,,0,1,10\nloop,,10,50,40\nloop,,20,1,4\n")
    curves = labdata.read_flow_curves_text(steps_and_loop)
    steps, loops = curves.thixotropy_tests()
    assert [s[3] for s in steps] == [300.0] and [lp[3] for lp in loops] == [1.0]
    assert loops[0][1].tolist() == [1.0, 50.0, 1.0]
    with pytest.raises(ScenarioError, match="without a pre-shear rate"):
        curves.step_tests()
    partial = head + "step,300,0,1,2\nstep,,10,1,3\n"
    with pytest.raises(ScenarioError, match="line 3: series 'step' has a pre-shear rate on "
                                            "some rows only"):
        labdata.read_flow_curves_text(partial).thixotropy_tests()


CORPUS = sorted((pathlib.Path(__file__).parent / "corpus").glob("*"))


@pytest.mark.parametrize("path", CORPUS, ids=[p.name for p in CORPUS])
def test_malformed_file_corpus_is_read_or_refused_by_name(path):
    # The project's corpus of spoiled files (BOM, delimiters, decimal commas, empty, binary,
    # Latin-1, truncated, mixed units): read as flow curves, each is either a clean table or a
    # LoadlineError naming the file; never another exception.
    try:
        curves = labdata.read_flow_curves(path)
    except LoadlineError as err:
        assert path.name in str(err)
        return
    t = curves.table
    assert len(t) and np.all(t["shear_rate_1_per_s"] > 0) and np.all(t["shear_stress_Pa"] > 0)


def test_instrument_notes_before_the_header_and_a_units_row_are_understood():
    # A layout many instruments write: metadata lines, a header of names, a row of units.
    text = ("Project;demo (invented)\nTemperature;25\nSample: gel A\n"
            "Meas. Pts.;Shear Rate;Shear Stress;Viscosity\n;[1/s];[Pa];[mPa*s]\n"
            "1;0,1;5;50000\n2;1;6;6000\n3;10;9;900\n")
    curves = labdata.read_flow_curves_text(text, "instrument.csv")
    assert curves.series() == ["gel A"]
    assert curves.table["shear_stress_Pa"].tolist() == pytest.approx([5.0, 6.0, 9.0])
    assert curves.table["viscosity_Pa_s"].tolist() == pytest.approx([50.0, 6.0, 0.9])
    assert any("line 2" in n and "skipped" in n for n in curves.notes)
