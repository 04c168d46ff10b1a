"""The computations of the validation suite, shared by its tests and its README table.

Each data set in `data/` (copied unchanged from the digitised published measurements; each
file's header lines name the paper, the figure and who digitised it) is run through
Loadline as a user would: `labdata.read_flow_curves` on the file as it is, a
Herschel-Bulkley fit of every series (`labdata.fit_flow_curves`), the yield stress against
phi fitted with the jammed-emulsion relations (`labdata.fit_yield_stress_trend`), and for
water `predictor.water_viscosity` against the tables and the `iapws` package. Every number
the README section "How close is it" shows is computed here.
"""

from __future__ import annotations

import functools
import pathlib
import warnings
from dataclasses import dataclass

import numpy as np

from predictor import emulsion, labdata, liquids, shear
from predictor.errors import FitError, ValidityWarning

DATA = pathlib.Path(__file__).resolve().parent / "data"

#: Fitted critical fraction against the value each paper reports: tolerance in phi. Our
#: choice: digitised points (a few % each), a yield stress extrapolated by the
#: Herschel-Bulkley fit, and jamming fractions reported between about 0.62 and 0.66 across
#: the literature (from memory).
PHI_C_TOLERANCE = 0.05


@dataclass(frozen=True)
class Emulsion:
    key: str
    file: str
    paper: str
    reported_phi_c: float
    reported_source: str


EMULSIONS = (
    Emulsion("Mason1996", "emulsion_flowcurves_Mason1996_fig5.csv",
             "Mason, Bibette & Weitz, J. Colloid Interface Sci. 179, 439 (1996), Fig. 5",
             0.635, "phi_c about 0.635: Mason, Bibette & Weitz, Phys. Rev. Lett. 75, 2051 "
             "(1995), abstract (seen), the same group's monodisperse emulsions"),
    Emulsion("Paredes2013", "emulsion_flowcurves_Paredes2013_fig1.csv",
             "Paredes, Michels & Bonn, Phys. Rev. Lett. 111, 015701 (2013), Fig. 1",
             0.64, "jamming point phi_c = 0.64 stated in the paper (from memory, not checked)"),
    Emulsion("Dinkgreve2015", "emulsion_flowcurves_Dinkgreve2015_fig2.csv",
             "Dinkgreve, Paredes, Michels & Bonn, Phys. Rev. E 92, 012305 (2015), Fig. 2(a)",
             0.64, "jamming point phi_c = 0.64 stated in the paper (from memory, not checked)"),
    Emulsion("Dekker2018", "emulsion_flowcurves_Dekker2018_fig2.csv",
             "Dekker et al., J. Non-Newtonian Fluid Mech. 261, 33 (2018), Fig. 2",
             0.64, "jamming point phi_J about 0.64 used in the paper (from memory, not "
             "checked); the data start at phi = 0.68, so phi_c is an extrapolation"),
    Emulsion("Cao2021a", "emulsion_flowcurves_Cao2021_fig2a.csv",
             "Cao, Liao, Breedveld & Weeks, arXiv:2011.11806 (Soft Matter 2021), Fig. 2(a)",
             0.64, "jamming point about 0.64 (from memory, not checked; the paper reports "
             "distinct glass and jamming transitions, which differ with the droplet size)"),
    Emulsion("Cao2021b", "emulsion_flowcurves_Cao2021_fig2b.csv",
             "Cao, Liao, Breedveld & Weeks, arXiv:2011.11806 (Soft Matter 2021), Fig. 2(b)",
             0.64, "jamming point about 0.64 (from memory, not checked; the paper reports "
             "distinct glass and jamming transitions, which differ with the droplet size)"),
)

#: Prediction with Loadline's jammed-emulsion flow curve (`emulsion.flow_stress_jammed`,
#: Mason et al.'s yield stress with the fitted Laplace pressure and phi_c): the continuous
#: phases are aqueous (file headers: oil-in-water), taken as 1 mPa*s (assumption); viscosity
#: ratio 1 (the function's default; it only sets the liquid-like floor). Compared on the
#: series more than 0.02 above the fitted phi_c; tolerance: the median of measured /
#: predicted stress within a factor 3 (a screening estimate; our choice).
CONTINUOUS_VISCOSITY_Pa_s = 1e-3
PREDICTION_FACTOR = 3.0
LOW_RATE_1_per_s = 0.1

#: Yield stresses the curators of Dekker et al.'s data list for phi 0.68-0.80 (three-component
#: model fits, demos/emulsion_demo.py of the repository named in the file header). [Pa]
DEKKER_CURATED_YIELD_Pa = (4.7, 7.5, 10.0, 13.1, 18.4, 24.9, 30.4)
DEKKER_TOLERANCE = 0.10       # a different flow-curve law (ours: Herschel-Bulkley): 10 %

GLASS_FILE = "pmma_hardsphere_glass_flowcurves_Petekidis2004_fig5.csv"
#: Temperature of the glass measurements, taken as 20 degC (assumption).
GLASS_TEMPERATURE_K = 293.15
#: Stress factor the curators used to turn the normalised stress axis into Pa (file header).
GLASS_STRESS_FACTOR_Pa = 0.0825
#: Hard-sphere glass transition (Pusey & van Megen, Nature 320, 340, 1986; from memory).
PHI_GLASS = 0.58

WATER_TOLERANCE = 0.01   # IAPWS R12-08's uncertainty for the liquid near 0.1 MPa taken as
#                          1 % (from memory, not checked); the tables print 4 digits.


def glass_radius_m() -> float:
    """Particle radius read from the curators' stress factor as k_B T/a^3 at 20 degC.

    The paper's stress axis was normalised (file header); reading the factor 0.0825 Pa as the
    Brownian scale k_B T/a^3 gives a = 0.37 um. An inference, not a value read in the paper.
    """
    return float((shear.BOLTZMANN_J_PER_K * GLASS_TEMPERATURE_K / GLASS_STRESS_FACTOR_Pa)
                 ** (1.0 / 3.0))


def _fit(path: pathlib.Path):
    curves = labdata.read_flow_curves(path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        fits = labdata.fit_flow_curves(curves, "herschel-bulkley")
    return curves, fits


@functools.cache
def emulsion_result(key: str) -> dict:
    """Import, fit and trend of one emulsion data set (cached)."""
    spec = next(e for e in EMULSIONS if e.key == key)
    curves, fits = _fit(DATA / spec.file)
    phi, tau_y, _ = fits.parameter("yield_stress_Pa")
    _, n, _ = fits.parameter("flow_index")
    trends, failed = {}, {}
    for relation in labdata.YIELD_TRENDS:
        try:
            trends[relation] = labdata.fit_yield_stress_trend(phi, tau_y, relation)
        except FitError as err:
            failed[relation] = str(err)
    residuals = np.concatenate([f.residuals for f in fits.fits.values()])
    mason = trends["mason"]
    # The other law that applies to every series: a power law (no yield stress). Delta AIC
    # = AIC(power law) - AIC(Herschel-Bulkley); above 2 the yield stress is supported.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        power = labdata.fit_flow_curves(curves, "power-law")
    delta_aic = {s: power.fits[s].aic - f.aic for s, f in fits.fits.items() if s in power.fits}
    table = curves.table[(curves.table["branch"] == "up")
                         & (curves.table["phi"] > mason.params["phi_c"] + 0.02)]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        predicted = np.asarray(emulsion.flow_stress_jammed(
            table["phi"].to_numpy(), table["shear_rate_1_per_s"].to_numpy(),
            CONTINUOUS_VISCOSITY_Pa_s, mason.params["laplace_pressure_Pa"], 2.0, 1.0,
            mason.params["phi_c"], "mason"))
    ratio = table["shear_stress_Pa"].to_numpy() / predicted
    low = table["shear_rate_1_per_s"].to_numpy() < LOW_RATE_1_per_s
    prediction = {"points": int(ratio.size), "rms_ln": float(np.sqrt(np.mean(np.log(ratio) ** 2))),
                  "median": float(np.median(ratio)),
                  "median_low": float(np.median(ratio[low])) if low.any() else float("nan"),
                  "median_high": float(np.median(ratio[~low])) if (~low).any() else float("nan")}
    return {"spec": spec, "curves": curves, "fits": fits, "phi": phi, "yield_stress_Pa": tau_y,
            "prediction": prediction,
            "flow_index": n, "trends": trends, "trend_failed": failed,
            "points": int(len(curves.table)), "series": len(curves.series()),
            "rms_ln": float(np.sqrt(np.mean(residuals**2))),
            "max_abs_ln": float(np.max(np.abs(residuals))),
            "phi_c": mason.params["phi_c"], "phi_c_interval": mason.intervals["phi_c"],
            "phi_c_difference": mason.params["phi_c"] - spec.reported_phi_c,
            "delta_aic": delta_aic, "power_failed": dict(power.failed)}


@functools.cache
def glass_result() -> dict:
    curves, fits = _fit(DATA / GLASS_FILE)
    phi, tau_y, _ = fits.parameter("yield_stress_Pa")
    radius = glass_radius_m()
    scale = float(shear.BOLTZMANN_J_PER_K * GLASS_TEMPERATURE_K / radius**3)
    residuals = np.concatenate([f.residuals for f in fits.fits.values()])
    reduced = np.asarray(shear.reduced_stress(tau_y, radius, GLASS_TEMPERATURE_K))
    return {"curves": curves, "fits": fits, "phi": phi, "yield_stress_Pa": tau_y,
            "radius_m": radius, "scale_Pa": scale, "reduced": reduced,
            "points": int(len(curves.table)), "series": len(curves.series()),
            "rms_ln": float(np.sqrt(np.mean(residuals**2)))}


def _iapws(t_k: np.ndarray) -> np.ndarray:
    """IAPWS-95 density and IAPWS 2008 viscosity of the liquid (the `iapws` package).

    At 0.101325 MPa water boils at 99.97 degC; at 100 degC the liquid is taken at 0.2 MPa
    (the viscosity of the liquid changes by about 0.01 % per 0.1 MPa: negligible here).
    """
    import iapws

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return np.array([iapws.IAPWS95(T=float(t), P=0.101325 if t < 373.1 else 0.2).mu
                         for t in t_k])


def printed_tolerance(text: str) -> float:
    """Half a unit in the last printed place, relative ("0.31" -> 0.016)."""
    decimals = len(text.split(".")[1]) if "." in text else 0
    return 0.5 * 10.0 ** (-decimals) / abs(float(text))


@functools.cache
def water_result(key: str) -> dict:
    """Loadline's water viscosity and the iapws package against one table."""
    import pandas as pd

    file = {"ICT1928": "water_viscosity_ICT1928_table.csv",
            "LSBU": "water_viscosity_LSBU_table.csv"}[key]
    table = pd.read_csv(DATA / file, comment="#", dtype=str)
    column = "viscosity_cP" if "viscosity_cP" in table else "viscosity_mPa_s"
    t_k = table["T_C"].to_numpy(float) + 273.15
    measured = table[column].to_numpy(float) * 1e-3          # cP = mPa*s = 1e-3 Pa*s
    # Each point's tolerance: 1 % or the table's printed precision, whichever is larger.
    tolerance = np.maximum(WATER_TOLERANCE, [printed_tolerance(v) for v in table[column]])
    ours = np.asarray(liquids.water_viscosity(t_k))
    reference = _iapws(t_k)
    dev = measured / ours - 1
    return {"file": file, "points": int(t_k.size), "t_range_C": (float(t_k.min() - 273.15),
                                                                float(t_k.max() - 273.15)),
            "deviation": dev, "tolerance": tolerance,
            "within": int(np.sum(np.abs(dev) <= tolerance)),
            "max_abs_dev": float(np.max(np.abs(dev))),
            "rms_dev": float(np.sqrt(np.mean(dev**2))),
            "worst_T_C": float(t_k[np.argmax(np.abs(dev))] - 273.15),
            "ours_vs_iapws": float(np.max(np.abs(ours / reference - 1)))}


# --- the README section ----------------------------------------------------------------------


def check_emulsion(key: str, series: int, rms_max: float) -> dict:
    """The checks every emulsion module makes; returns the result for its own extra checks.

    Run as a user would: the digitised file as it is, a Herschel-Bulkley fit of every series,
    then Mason et al.'s yield stress against phi with phi_c free. Tolerances (our choice,
    stated): rms error of the fits at most `rms_max` in ln(stress) (digitising error of a few
    % plus the misfit of the law); fitted phi_c within `PHI_C_TOLERANCE` of the value the
    paper reports (`EMULSIONS`); shear thinning (n < 1) in every series more than 0.02 above
    the fitted phi_c (common practice, no source). Herschel-Bulkley beats a power law (no
    yield stress) by more than 2 in AIC in every series above phi_c (Burnham & Anderson's
    rule of thumb, from memory). Predicted (not fitted) with Loadline's jammed-emulsion flow
    curve from the fitted Laplace pressure and phi_c (continuous phase 1 mPa*s assumed): the
    median of measured / predicted stress above phi_c within a factor `PREDICTION_FACTOR`
    (screening estimate; our choice).
    """
    r = emulsion_result(key)
    assert r["series"] == series and not r["fits"].failed, r["fits"].failed
    assert r["rms_ln"] <= rms_max, r["rms_ln"]
    assert abs(r["phi_c_difference"]) <= PHI_C_TOLERANCE, (r["phi_c"], r["spec"].reported_phi_c)
    lo, hi = r["phi_c_interval"]
    assert lo < r["phi_c"] < hi
    jammed = r["phi"] > r["phi_c"] + 0.02
    assert jammed.any() and np.all(r["flow_index"][jammed] < 1.0), r["flow_index"]
    # Above phi_c the yield stress is real: Herschel-Bulkley beats a power law by more than
    # 2 in AIC in every such series (Burnham & Anderson's rule of thumb, from memory).
    fits = r["fits"]
    above = [s for s in fits.fits if fits.phi[s] > r["phi_c"] + 0.02]
    assert not r["power_failed"] and all(r["delta_aic"][s] > 2 for s in above), r["delta_aic"]
    # Predicted with Loadline's jammed-emulsion flow curve: median within a factor 3.
    median = r["prediction"]["median"]
    assert 1 / PREDICTION_FACTOR <= median <= PREDICTION_FACTOR, r["prediction"]
    return r


def _preferred(r) -> int:
    return sum(d > 2 for d in r["delta_aic"].values())


def _verdict_fits(fits) -> str:
    return "every series fits" if not fits.failed else f"{len(fits.failed)} series not fitted"


def _verdict_phi_c(r) -> str:
    return "agrees" if abs(r["phi_c_difference"]) <= PHI_C_TOLERANCE else "differs"


def readme_section() -> str:
    """The markdown of the README section "How close is it" (between its markers)."""
    out = ["Every number below is computed by the validation suite (`tests/validation/`, "
           "regenerate with `.venv/bin/python -m tests.validation --readme`; a test fails "
           "when this text is stale). The data are digitised published measurements (a few % "
           "digitising error), copied unchanged into `tests/validation/data/` with their "
           "header lines naming the paper.", "",
           "| data set | compared | points | error figures | verdict |",
           "| --- | --- | --- | --- | --- |"]
    for spec in EMULSIONS:
        r = emulsion_result(spec.key)
        lo, hi = r["phi_c_interval"]
        out.append(
            f"| {spec.paper} | Herschel-Bulkley fit of each of {r['series']} series; Mason "
            f"et al.'s yield stress against phi | {r['points']} | rms {r['rms_ln']:.3f} "
            f"(max {r['max_abs_ln']:.3f}) in ln(stress); fitted phi_c {r['phi_c']:.3f} "
            f"({lo:.3f}-{hi:.3f}) vs {spec.reported_phi_c:g} reported: "
            f"{r['phi_c_difference']:+.3f}; Herschel-Bulkley preferred to a power law "
            f"(AIC lower by more than 2) in {_preferred(r)} of {len(r['delta_aic'])} series "
            f"| {_verdict_fits(r['fits'])}; phi_c "
            f"{_verdict_phi_c(r)} "
            f"within {PHI_C_TOLERANCE:g} |")
    g = glass_result()
    out.append(
        f"| Petekidis, Vlassopoulos & Pusey, J. Phys.: Condens. Matter 16, S3955 (2004), "
        f"Fig. 5 | apparent (Herschel-Bulkley) yield stress against k_B T/a^3 | "
        f"{g['points']} | rms {g['rms_ln']:.3f} in ln(stress); yield stress "
        f"{g['reduced'].min():.3g}-{g['reduced'].max():.3g} k_B T/a^3 | "
        + (f"{_verdict_fits(g['fits'])}; above the scale at every phi, by up to "
           f"{np.log10(g['reduced'].max()):.1f} decades: Loadline's \"of order k_B T/a^3\" "
           "reads as a lower bound, not a prediction" if np.all(g["reduced"] > 1) else
           f"{_verdict_fits(g['fits'])}; below the scale at some phi") + " |")
    for key, name in (("ICT1928", "International Critical Tables (1928), as tabulated in "
                                  "an encyclopedia appendix"),
                      ("LSBU", "Water data page of M. Chaplin (LSBU), 0.1 MPa")):
        w = water_result(key)
        out.append(
            f"| {name} | `predictor.water_viscosity`, {w['t_range_C'][0]:g}-"
            f"{w['t_range_C'][1]:g} degC | {w['points']} | max {100 * w['max_abs_dev']:.2f} % "
            f"(at {w['worst_T_C']:g} degC), rms {100 * w['rms_dev']:.2f} % | "
            f"{w['within']} of {w['points']} within 1 % or the printed precision; ours vs "
            f"the iapws package: max "
            f"{100 * w['ours_vs_iapws']:.3f} % |")
    pk = {spec.key: emulsion_result(spec.key)["trend_failed"].get("princen-kiss")
          for spec in EMULSIONS}
    if all(pk.values()):
        out += ["", "Princen & Kiss's yield-stress relation, the other jammed-emulsion relation "
                "Loadline has, is zero below phi = 0.801 (its Y(phi) changes sign there) and "
                "every emulsion data set ends at or below phi = 0.80, so it is not fitted "
                "(`fit_yield_stress_trend` refuses it with that reason)."]
    out += ["", "Critical fractions reported by the papers (the right-hand value above): "
            + "; ".join(f"{e.key}: {e.reported_source}" for e in EMULSIONS) + ".", ""]
    out += ["Predicted, not fitted: Loadline's jammed-emulsion flow curve "
            "(`emulsion.flow_stress_jammed`: Mason et al.'s yield stress with the Laplace "
            "pressure and phi_c fitted above, plus its viscous term, continuous phase "
            f"{1e3 * CONTINUOUS_VISCOSITY_Pa_s:g} mPa*s assumed) against every measured "
            "point of the series more than 0.02 above phi_c (measured / predicted stress; "
            f"check: median within a factor {PREDICTION_FACTOR:g}):", "",
            "| data set | points | rms ln | median | median below 0.1 1/s | median above | "
            "verdict |", "| --- | --- | --- | --- | --- | --- | --- |"]
    for spec in EMULSIONS:
        p = emulsion_result(spec.key)["prediction"]
        verdict = ("within" if 1 / PREDICTION_FACTOR <= p["median"] <= PREDICTION_FACTOR
                   else "outside") + f" a factor {PREDICTION_FACTOR:g}"
        if p["median_high"] > 1.5:
            verdict += f"; predicted {p['median_high']:.1f}x too low above 0.1 1/s"
        out.append(f"| {spec.key} | {p['points']} | {p['rms_ln']:.2f} | {p['median']:.2f} | "
                   f"{p['median_low']:.2f} | {p['median_high']:.2f} | {verdict} |")
    out += ["", "Fitted Herschel-Bulkley yield stress and flow index of every series (95 % "
            "intervals):", "",
            "| data set | phi | yield stress [Pa] | flow index n | rms ln |",
            "| --- | --- | --- | --- | --- |"]
    for spec in EMULSIONS:
        fits = emulsion_result(spec.key)["fits"]
        for series, fit in sorted(fits.fits.items(), key=lambda kv: fits.phi[kv[0]]):
            ylo, yhi = fit.intervals["yield_stress_Pa"]
            nlo, nhi = fit.intervals["flow_index"]
            out.append(f"| {spec.key} | {fits.phi[series]:.3f} | "
                       f"{fit.params['yield_stress_Pa']:.3g} ({ylo:.3g}-{yhi:.3g}) | "
                       f"{fit.params['flow_index']:.3f} ({nlo:.3f}-{nhi:.3f}) | "
                       f"{fit.rmse:.3f} |")
    g = glass_result()
    out += ["", f"Hard-sphere glass: particle radius a = {g['radius_m'] * 1e9:.0f} nm, read "
            f"from the curators' stress factor {GLASS_STRESS_FACTOR_Pa:g} Pa as k_B T/a^3 at "
            f"20 degC (an inference: the paper's stress axis was normalised; the radius was "
            f"not read in the paper), so k_B T/a^3 = {g['scale_Pa']:.3g} Pa."]
    return "\n".join(out) + "\n"


README = pathlib.Path(__file__).resolve().parents[2] / "README.md"
START, END = "<!-- validation:start -->", "<!-- validation:end -->"


def readme_text() -> str:
    """The section as it stands in the README."""
    text = README.read_text()
    return text[text.index(START) + len(START) + 1:text.index(END)]


def write_readme() -> None:
    text = README.read_text()
    head, rest = text.split(START, 1)
    _, tail = rest.split(END, 1)
    README.write_text(head + START + "\n" + readme_section() + END + tail)
