"""A report of one scenario: one self-contained HTML file, and optionally a PDF.

The report formats what `predictor` computes; it computes nothing itself. Sections: inputs
echoed with units, summary, flow curve, loading sweep with the packing range, the design map
of the first two solids (when there are two or more), process windows, process checks (pipe,
mixer, film at reference conditions), uncertainty, storage,
the relations used with their sources, and the cautions.

Charts are Altair charts rendered offline by vl-convert and embedded as inline SVG, so the
HTML opens without a network. The PDF is one long vector page: the same text, tables and
charts laid out in one SVG document, converted by vl-convert's `svg_to_pdf` (no browser or
PDF library needed; our choice for a simple, dependency-free PDF).
"""

from __future__ import annotations

import datetime
import html
import math
import pathlib
import re
import warnings
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from . import charts, design, labels
from . import formulation as fm
from .cautions import CAUTIONS
from .errors import LoadlineError
from .registry import get_model, models
from .units import from_si


@dataclass
class Section:
    title: str
    paragraphs: list[str] = field(default_factory=list)
    tables: list[tuple[str, pd.DataFrame]] = field(default_factory=list)
    charts: list = field(default_factory=list)   # Altair charts


@dataclass
class Report:
    title: str
    subtitle: str
    sections: list[Section]
    notes: list[str]


def _g(value, digits: int = 4, quantity: str = "") -> str:
    """A number to 4 significant digits; words where there is no number (see labels)."""
    if value is None:
        return ""
    if isinstance(value, float | np.floating):
        if math.isnan(value):
            return ""
        if math.isinf(value):
            return labels.value_words(value, quantity)
        return f"{value:.{digits}g}"
    return str(value)


def inputs_table(formulation: fm.Formulation) -> pd.DataFrame:
    """The dispersed ingredients with their units, and the volume fraction each takes."""
    mix = fm.mixture(formulation)
    rows = []
    for k, ing in enumerate(formulation.ingredients):
        dist = ing.distribution()
        rows.append({
            "ingredient": ing.name, "kind": ing.kind,
            "loading": f"{100 * ing.loading:.4g} {'wt%' if ing.basis == 'mass' else 'vol%'}",
            "density [kg/m3]": ing.density_kg_per_m3,
            "D50 [um]": dist.d50_m * 1e6, "D90 [um]": dist.d90_m * 1e6,
            "Sauter [um]": dist.sauter_diameter_m * 1e6,
            "aspect ratio [-]": ing.aspect_ratio,
            "layer [nm]": ing.layer_thickness_m * 1e9,
            "phi_max given [-]": np.nan if ing.phi_max is None else ing.phi_max,
            "phi [-]": float(mix.phi[k]),
        })
    return pd.DataFrame(rows)


def liquid_table(formulation: fm.Formulation, viscosity_unit: str) -> pd.DataFrame:
    liq = formulation.liquid
    mix = fm.mixture(formulation)
    rows = [("name", liq.name, ""), ("kind", liq.preset or liq.law, ""),
            ("temperature", f"{liq.temperature_K - 273.15:.4g}", "degC"),
            ("density", _g(liq.density_kg_per_m3), "kg/m3"),
            ("Newtonian-view viscosity" if liq.preset or liq.law == "newtonian"
             else "apparent viscosity at 1 1/s",
             _g(from_si(mix.liquid_viscosity_Pa_s, viscosity_unit, "viscosity")), viscosity_unit)]
    if liq.preset == "glycerol-water":
        rows.append(("glycerol", _g(100 * liq.glycerol_mass_fraction), "wt%"))
    for name, value in liq.params.items():
        words, unit = labels.name_label(name, ("liquid",))
        rows.append((words, _g(float(value)), unit))
    return pd.DataFrame(rows, columns=["quantity", "value", "unit"])


def _process_table(form, viscosity_unit: str) -> pd.DataFrame:
    """Viscosity at the ends of each process step's shear-rate window."""
    return _si_columns(fm.process_viscosities(form), viscosity_unit)


def _si_columns(frame: pd.DataFrame, viscosity_unit: str) -> pd.DataFrame:
    out = {}
    for col in frame.columns:
        name = str(col)
        if name.endswith("_Pa_s") and pd.api.types.is_numeric_dtype(frame[col]):
            out[name[:-5].replace("_", " ") + f" [{viscosity_unit}]"] = from_si(
                frame[col].to_numpy(dtype=float), viscosity_unit, "viscosity")
        elif name.endswith("_1_per_s"):
            out[name[:-8].replace("_", " ") + " [1/s]"] = frame[col].to_numpy()
        else:
            out[name.replace("_", " ")] = frame[col].to_numpy()
    return pd.DataFrame(out)


def build_report(form: fm.Formulation, viscosity_unit: str = "Pa*s",
                 source: str = "") -> Report:
    """Collect every section of the report of `form` (tables as DataFrames, Altair charts)."""
    notes: list[str] = []
    vu = viscosity_unit
    mix = fm.mixture(form)
    has_solids = bool(mix.is_solid.any())
    sections = []

    sec = Section("Inputs")
    sec.paragraphs.append(f"Scenario file: {source}" if source else "Scenario built in memory.")
    sec.tables.append(("Liquid", liquid_table(form, vu)))
    sec.tables.append(("Dispersed ingredients", inputs_table(form)))
    rel = [("solids relation", form.model)]
    if mix.phi_droplets > 0:
        rel.append(("droplets relation", form.droplet_model))
    for name, value in form.model_params.items():
        words, unit = labels.name_label(name, ("suspension", "emulsion"), form.model)
        rel.append((f"parameter: {words}" + ("" if unit == "–" else f" [{unit}]"),
                    _g(float(value))))
    sec.tables.append(("Relations chosen", pd.DataFrame(rel, columns=["item", "value"])))
    sections.append(sec)

    curve = fm.predict(form)
    sec = Section("Summary")
    summary = [("solids volume fraction phi (with adsorbed layers)",
                _g(mix.phi_solids_effective), "-"),
               ("droplet volume fraction", _g(mix.phi_droplets), "-")]
    if has_solids:
        summary += [("packing limit phi_max used", _g(mix.phi_max), "-"),
                    ("jamming headroom phi/phi_max", _g(mix.headroom, 3), "-")]
    summary += [("mixture density", _g(mix.density_kg_per_m3), "kg/m3"),
                ("viscosity at 1 1/s", _g(from_si(float(fm.predict(form, 1.0)[
                    "viscosity_Pa_s"].iloc[0]), vu, "viscosity")), vu)]
    sec.tables.append(("", pd.DataFrame(summary, columns=["quantity", "value", "unit"])))
    sections.append(sec)

    sec = Section("Flow curve")
    chart = _flow_curve_chart(curve, vu)
    if chart is None:
        sec.paragraphs.append("No flow at any shear rate of the curve: the solids are at or "
                              "above the packing limit, so there is no flow curve to draw.")
    else:
        sec.charts.append(chart)
    rates = np.array([1e-3, 1e-1, 1e1, 1e3, 1e5])
    few = fm.predict(form, rates)
    shown = pd.DataFrame({"shear rate [1/s]": rates,
                          f"viscosity [{vu}]": from_si(few["viscosity_Pa_s"].to_numpy(), vu,
                                                       "viscosity"),
                          "shear stress [Pa]": few["shear_stress_Pa"].to_numpy(),
                          "relative viscosity [-]": few["relative_viscosity"].to_numpy()})
    sec.tables.append(("At selected shear rates", shown))
    markers = {k: v for k, v in (curve.attrs.get("markers") or {}).items()
               if isinstance(v, int | float) and math.isfinite(v)}
    if markers:
        sec.tables.append(("Flow-curve markers (onsets, plateaus)", pd.DataFrame(
            [_marker_row(k, v, vu) for k, v in markers.items()],
            columns=["marker", "value", "unit"])))
    for message in curve.attrs.get("warnings", ()):
        sec.paragraphs.append(f"Note: {message}")
    extra = [c for c in curve.columns if c not in (
        "shear_rate_1_per_s", "viscosity_Pa_s", "shear_stress_Pa", "relative_viscosity",
        "liquid_viscosity_Pa_s")]
    if not extra:
        sec.paragraphs.append("This flow curve is the Newtonian view of the formulation (the "
                              "liquid at its temperature times the relative viscosity); "
                              "shear thinning and thickening of the suspension are not in "
                              "this version's flow curve.")
    sections.append(sec)

    sec = Section("Loading sweep and packing range")
    packing_range = None
    if has_solids:
        try:
            spread = design.packing_estimator_spread(form)
            est = spread["estimates"]
            if est:
                physical = [v for v in est.values() if 0 < v <= 1]
                if len(physical) < len(est):
                    notes.append("an estimator gave phi_max above 1 (outside the physical "
                                 "range); it is listed but left out of the shaded range.")
                if physical:
                    packing_range = (min(physical), max(physical))
                sec.tables.append(("Packing limit by estimator", pd.DataFrame(
                    {"method": list(est), "phi_max [-]": list(est.values())})))
                if packing_range:
                    sec.paragraphs.append(
                        f"The estimators give phi_max from {packing_range[0]:.3g} to "
                        f"{packing_range[1]:.3g}; the relation uses {mix.phi_max:.3g}.")
        except (LoadlineError, ValueError, AttributeError) as err:
            notes.append(f"packing range not shown: {err}")
        sweep = _sweep_with_band(form, notes)
        sec.paragraphs.append("Viscosity in the sweep: the Newtonian view (the relation at "
                              "phi_max times the liquid's Newtonian viscosity), with the band "
                              "from the spread of the packing estimators.")
        plot = pd.DataFrame({"phi": sweep["phi"].to_numpy(),
                             "viscosity": from_si(sweep["viscosity_Pa_s"].to_numpy(), vu,
                                                  "viscosity"), "relation": form.model})
        band = None
        if "viscosity_low_Pa_s" in sweep:
            band = pd.DataFrame({
                "phi": plot["phi"],
                "low": from_si(sweep["viscosity_low_Pa_s"].to_numpy(), vu, "viscosity"),
                "high": from_si(sweep["viscosity_high_Pa_s"].to_numpy(), vu, "viscosity")})
            band = band[np.isfinite(band["low"]) & np.isfinite(band["high"])]
        finite = np.isfinite(plot["viscosity"])
        # the sweep's own Newtonian view at the current loading (as the app's summary)
        current = from_si(float(fm.relative_viscosity_at(form, mix.phi_solids_effective, mix))
                          * mix.liquid_viscosity_Pa_s, vu, "viscosity")
        sec.charts.append(charts.loading_sweep(
            plot[finite], y_title=f"Viscosity [{vu}]", phi_max=mix.phi_max,
            phi_max_range=packing_range, band=band,
            current={"phi": mix.phi_solids_effective, "viscosity": current,
                     "label": "current loading"} if math.isfinite(current) else None))
        plot = plot.rename(columns={"viscosity": f"viscosity [{vu}]"})
        pick = np.linspace(0, len(sweep) - 1, 8).round().astype(int)
        sec.tables.append(("Selected loadings", pd.DataFrame({
            "phi solids [-]": sweep["phi"].to_numpy()[pick],
            "solids [wt%]": 100 * sweep["mass_fraction"].to_numpy()[pick],
            f"viscosity [{vu}]": plot[f"viscosity [{vu}]"].to_numpy()[pick]})))
    else:
        sec.paragraphs.append("No solids: there is no solids loading to sweep.")
    sections.append(sec)

    solids = [k for k, i in enumerate(form.ingredients) if i.kind == fm.SOLID]
    if len(solids) >= 2:
        sections.append(_design_map_section(form, solids[:2], vu, notes))

    sec = Section("Process windows")
    sec.tables.append(("Viscosity in each process step", _process_table(form, vu)))
    sec.paragraphs.append("Shear rates: typical windows of each step (common practice, no "
                          "checked source), `shear.PROCESS_SHEAR_RATES`.")
    sections.append(sec)

    sections.append(_process_checks_section(form, notes))

    sec = Section("Uncertainty")
    if has_solids:
        try:
            band = design.loading_sweep_with_band(form, phi=[mix.phi_solids_effective],
                                                  packing_spread=True, n_samples=2000)
            lo = from_si(float(band["viscosity_low_Pa_s"].iloc[0]), vu, "viscosity")
            hi = from_si(float(band["viscosity_high_Pa_s"].iloc[0]), vu, "viscosity")
            mid = from_si(float(band["viscosity_Pa_s"].iloc[0]), vu, "viscosity")
            sources = ", ".join(band.attrs.get("sources", ())) or "none"
            sec.paragraphs.append(
                f"At the current loading the viscosity is {mid:.4g} {vu}, with a "
                f"{100 * band.attrs.get('level', 0.95):.0f} % band from {lo:.4g} to {hi:.4g} "
                f"{vu} (sources of uncertainty: {sources}; "
                f"{band.attrs.get('n_samples', '')} Monte Carlo samples).")
        except (LoadlineError, ValueError, AttributeError) as err:
            sec.paragraphs.append(f"No band could be computed: {err}")
    sec.paragraphs.append("Without lab data the band reflects only the spread of the packing "
                          "estimators; calibrate with measured viscosities (loadline fit) to "
                          "carry the fitted uncertainty.")
    sections.append(sec)

    sec = Section("Storage (settling and creaming)")
    try:
        store = design.storage_check(form)
        sec.tables.append(("", pd.DataFrame({
            "ingredient": store["ingredient"], "D90 [um]": store["diameter_m"] * 1e6,
            "stable": store["stable"].map({True: "yes", False: "no"}),
            "verdict": store["message"]})))
    except (LoadlineError, ValueError, AttributeError) as err:
        sec.paragraphs.append(f"No storage verdict: {err}")
    sections.append(sec)

    rows = fm.interaction_rows(form)
    if rows:
        sections.append(_interaction_section(form, rows))

    sec = Section("Relations used and their sources")
    sec.tables.append(("", _models_used(form, mix)))
    sections.append(sec)

    sec = Section("Cautions")
    sec.paragraphs.append(CAUTIONS)
    sections.append(sec)
    stamp = datetime.datetime.now(datetime.UTC).strftime("%Y-%m-%d %H:%M UTC")
    subtitle = f"{form.description}  Generated by Loadline on {stamp}."
    return Report(form.name or "Loadline report", subtitle.strip(), sections, notes)


def _interaction_section(form: fm.Formulation, rows: list[dict]) -> Section:
    """Each solid's verdict (pair energy or stated) and the network yield stress."""
    sec = Section("Particle forces (dispersed or flocculated)")
    sec.tables.append(("", pd.DataFrame({
        "ingredient": [r["ingredient"] for r in rows],
        "verdict": [r["verdict"] for r in rows],
        "from": [r["basis"] for r in rows],
        "barrier [kT]": [r["barrier_kT"] for r in rows],
        "deepest reachable well [kT]": [r["reachable_well_kT"] for r in rows],
        "Debye length [nm]": [1e9 * r["debye_length_m"] for r in rows]})))
    tau = fm.flocculation_yield_stress(form)
    sec.paragraphs.append(
        f"Criterion: {rows[0]['criterion'] if rows[0]['basis'] != 'stated' else 'stated'}. "
        "Pair energies of equal spheres in the Derjaguin approximation (van der Waals, "
        "double layer at constant potential after Hogg, Healy & Fuerstenau 1966, steric "
        "after Alexander and de Gennes).")
    shown = f"{tau:.4g} Pa" if math.isfinite(tau) else "no flow (jammed)"
    sec.paragraphs.append(
        f"Network yield stress at this loading: {shown} (YODEL, Flatt & Bowen, J. Am. "
        "Ceram. Soc. 89, 1244, 2006), added to the flow curve. A yield stress changes pump "
        "start-up, line restart and mixing: confirm by measurement.")
    for row in rows:
        if row["notes"]:
            sec.paragraphs.append(f"Note ({row['ingredient']}): {row['notes']}")
    return sec


#: The report's design map: shear rate (pumping and mixing, common practice, no source) and
#: grid points per side.
MAP_SHEAR_RATE_1_PER_S = 100.0
MAP_POINTS = 15


def _map_range(now: float) -> tuple[float, float]:
    """From no loading to twice the present one (at least 20 points more, at most 90 %)."""
    return 0.0, float(min(0.9, max(2.0 * now, now + 0.2)))


def _design_map_section(form, pair: list[int], vu: str, notes: list[str]) -> Section:
    """The map of the first two solids' loadings (mass basis) at the pumping shear rate."""
    sec = Section("Design map of the first two solids")
    mix = fm.mixture(form)
    x, y = pair
    try:
        grid = design.loading_map(form, x, y, _map_range(mix.mass_fraction[x]),
                                  _map_range(mix.mass_fraction[y]), MAP_SHEAR_RATE_1_PER_S,
                                  n=MAP_POINTS, basis="mass")
    except (LoadlineError, ValueError) as err:
        notes.append(f"design map not shown: {err}")
        sec.paragraphs.append(f"No design map: {err}")
        return sec
    names = grid.attrs["x_ingredient"], grid.attrs["y_ingredient"]
    sec.charts.append(charts.design_map(grid, vu))     # drawn CHART_WIDTH wide
    jammed = int((grid["regime"] == "jammed").sum())
    sec.paragraphs.append(
        f"Viscosity at {MAP_SHEAR_RATE_1_PER_S:g} 1/s over the loadings of {names[0]} and "
        f"{names[1]} (wt% of the formulation), every other ingredient at its scenario "
        f"loading; {MAP_POINTS} x {MAP_POINTS} recipes, {jammed} of them at or beyond the "
        "packing limit (grey: no flow). The diamond is the scenario's own recipe. Try "
        "'loadline map' with --window limits for the region that passes pumping and sag.")
    for message in grid.attrs.get("warnings", ())[:3]:
        sec.paragraphs.append(f"Note: {message}")
    return sec


#: Reference conditions of the report's process checks (our own round numbers, to be
#: replaced by the real line, mixer and film: app page "Process checks", `loadline pipe`).
PROCESS_REFERENCE = {"flows_L_per_min": (1.0, 10.0, 100.0), "diameter_m": 0.025,
                     "length_m": 10.0, "impeller": "disc turbine", "speed_rpm": 120.0,
                     "impeller_diameter_m": 0.1, "tank_diameter_m": 0.3,
                     "film_thickness_m": 100e-6, "wavelength_m": 1e-3,
                     "surface_tension_N_per_m": 0.035}


def pipe_table(flow, flow_unit: str = "L/min", pressure_unit: str = "bar") -> pd.DataFrame:
    """The rows of a `process.PipeFlow` in the units people read (table, CSV, JSON, report).

    The friction factor is Fanning's (a quarter of Darcy's)."""
    rows = pd.DataFrame(flow.rows())
    return pd.DataFrame({
        f"flow [{flow_unit}]": from_si(rows["flow_rate_m3_per_s"].to_numpy(), flow_unit,
                                       "flow_rate"),
        "velocity [m/s]": rows["mean_velocity_m_per_s"],
        f"pressure drop [{pressure_unit}]": from_si(rows["pressure_drop_Pa"].to_numpy(),
                                                    pressure_unit, "pressure"),
        "regime": rows["regime"],
        "Reynolds [-]": rows["reynolds"],
        "critical Reynolds [-]": rows["critical_reynolds"],
        "n' [-]": rows["flow_index"],
        "friction factor [-]": rows["friction_factor"],
        "wall stress [Pa]": rows["wall_shear_stress_Pa"],
        "wall shear rate [1/s]": rows["wall_shear_rate_1_per_s"],
        "plug radius [mm]": 1e3 * rows["plug_radius_m"],
        "correlation": rows["correlation"],
    })


def _process_checks_section(form, notes: list[str]) -> Section:
    """Pipe, mixer and coating numbers at `PROCESS_REFERENCE` (the `loadline pipe` table)."""
    from . import process

    ref = PROCESS_REFERENCE
    sec = Section("Process checks")
    sec.paragraphs.append(
        f"At reference conditions: a smooth pipe or hose of {1e3 * ref['diameter_m']:g} mm "
        f"bore and {ref['length_m']:g} m; a {ref['impeller']} of "
        f"{1e3 * ref['impeller_diameter_m']:g} mm at {ref['speed_rpm']:g} rpm in a "
        f"{1e3 * ref['tank_diameter_m']:g} mm tank; a {1e6 * ref['film_thickness_m']:g} um "
        "wet film on a vertical wall. Use the app's Process checks page or loadline pipe "
        "for your own line, mixer and film.")
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            flows = np.array(ref["flows_L_per_min"]) / 60e3
            flow = process.pipe_flow_of(form, flows, ref["diameter_m"], ref["length_m"])
            tank = process.stirred_tank_of(form, ref["speed_rpm"] / 60,
                                           ref["impeller_diameter_m"], ref["tank_diameter_m"],
                                           ref["impeller"])
            film = process.coating_of(form, ref["film_thickness_m"], ref["wavelength_m"],
                                      surface_tension_N_per_m=ref["surface_tension_N_per_m"])
    except LoadlineError as err:
        sec.paragraphs.append(f"No process checks: {err}")
        return sec
    sec.tables.append(("Pipe or hose", pipe_table(flow)))
    level = ("never (a yield stress holds the ripple)" if not math.isfinite(
        film.levelling_time_s) else _g(film.levelling_time_s))
    sec.tables.append(("Restart, mixer and film", pd.DataFrame([
        ("apparent yield stress", _g(flow.yield_stress_Pa), "Pa"),
        ("restart pressure of the standing line, 4 tau_y L/D",
         _g(flow.startup_pressure_Pa / 1e5), "bar"),
        ("mixer: Metzner-Otto shear rate", _g(tank.effective_shear_rate_1_per_s), "1/s"),
        ("mixer: viscosity at that rate", _g(tank.viscosity_Pa_s), "Pa*s"),
        ("mixer: impeller Reynolds number", _g(tank.reynolds), f"- ({tank.regime})"),
        ("mixer: power", _g(tank.power_W), "W"),
        ("mixer: cavern (flow does not reach the wall)", "yes" if tank.cavern else "no", ""),
        ("film: wall stress rho g h", _g(film.wall_shear_stress_Pa), "Pa"),
        ("film: stands (no sag)", "yes" if film.stands else "no", ""),
        ("film: sag velocity of the surface", _g(1e3 * film.sag_velocity_m_per_s), "mm/s"),
        (f"film: levelling time (ripple down {process.LEVELLING_FACTOR:g}-fold)", level, "s"),
    ], columns=["quantity", "value", "unit"])))
    for message in dict.fromkeys(str(w.message) for w in caught):
        sec.paragraphs.append(f"Note: {message}")
    sec.paragraphs.append(f"Caution: {process.CAUTION}")
    return sec


def _flow_curve_chart(curve: pd.DataFrame, vu: str) -> dict | None:
    """The app's flow-curve panels (process windows, viscosity, stress) as one chart; None
    when no point flows (jammed)."""
    from . import shear

    frame = pd.DataFrame({"rate": curve["shear_rate_1_per_s"].to_numpy(),
                          "viscosity": from_si(curve["viscosity_Pa_s"].to_numpy(), vu,
                                               "viscosity"),
                          "stress": curve["shear_stress_Pa"].to_numpy()})
    if "regime" in curve:
        frame["regime"] = curve["regime"].astype(str).to_numpy()
    windows = pd.DataFrame([tuple(w) for w in getattr(shear, "PROCESS_SHEAR_RATES", ())],
                           columns=["name", "low", "high"])
    drawable = np.isfinite(frame["viscosity"]) & (frame["viscosity"] > 0)
    if not drawable.any():
        return None
    return charts.flow_curve(frame[drawable], windows=windows, x_title="Shear rate [1/s]",
                             y_title=f"Viscosity [{vu}]", stress_title="Shear stress [Pa]",
                             joined=True, width=CHART_WIDTH)


def _marker_row(key: str, value: float, viscosity_unit: str) -> tuple:
    """(name, value, unit) of a flow-curve marker named with an SI suffix."""
    for suffix, unit, dimension in (("_Pa_s", viscosity_unit, "viscosity"),
                                    ("_1_per_s", "1/s", "shear_rate"), ("_Pa", "Pa", "stress")):
        if key.endswith(suffix):
            return (key[: -len(suffix)].replace("_", " "),
                    _g(float(from_si(value, unit, dimension))), unit)
    return key.replace("_", " "), _g(float(value)), "-"


def _sweep_with_band(form, notes) -> pd.DataFrame:
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return design.loading_sweep_with_band(form, n=120, packing_spread=True,
                                                  n_samples=1000)
    except (LoadlineError, ValueError, AttributeError) as err:
        notes.append(f"loading sweep without band: {err}")
        return fm.loading_sweep(form, n=120)


def _models_used(form, mix) -> pd.DataFrame:
    names = [(form.model, "suspension")]
    if mix.phi_droplets > 0:
        names.append((form.droplet_model, "emulsion"))
    if form.liquid.law and not form.liquid.preset:
        names.append((form.liquid.law, "liquid"))
    if mix.is_solid.any():
        names += [(s.name, "packing") for s in models("packing") if s.name != "simulation"]
    rows = []
    for name, kind in names:
        try:
            spec = get_model(name, kind=kind)
        except LoadlineError:
            continue
        rows.append({"relation": spec.name, "kind": spec.kind, "source": spec.source,
                     "validity": spec.validity})
    if form.liquid.preset == "water":
        rows.append({"relation": "water viscosity (liquids.water_viscosity)", "kind": "liquid",
                     "source": "IAPWS R12-08 (Huber et al., 2009)", "validity": "0-100 degC"})
    elif form.liquid.preset == "glycerol-water":
        rows.append({"relation": "glycerol-water viscosity", "kind": "liquid",
                     "source": "Cheng, Ind. Eng. Chem. Res. 2008",
                     "validity": "0-100 wt%, 0-100 degC"})
    return pd.DataFrame(rows)


# -- HTML -------------------------------------------------------------------------------------

_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;max-width:62rem;margin:2rem auto;
color:#1a1a1a;padding:0 1rem;line-height:1.45}
h1{font-weight:600;margin-bottom:.2rem}h2{margin-top:2rem;border-bottom:1px solid #ddd}
table{border-collapse:collapse;margin:.5rem 0 1rem;font-size:.9rem}
th,td{border:1px solid #ddd;padding:.25rem .5rem;text-align:left}td.n{text-align:right}
th{background:#f4f4f4;font-weight:600}.caution{background:#fff4e5;border-left:4px solid #D55E00;
padding:.6rem 1rem}.sub{color:#555}figure{margin:1rem 0}
@media print{h2{break-before:auto}figure,table{break-inside:avoid}}
"""


def _html_table(frame: pd.DataFrame) -> str:
    head = "".join(f"<th>{html.escape(str(c))}</th>" for c in frame.columns)
    body = []
    quantities = [labels.quantity_of(str(c)) for c in frame.columns]
    for row in frame.itertuples(index=False):
        cells = []
        for value, quantity in zip(row, quantities, strict=True):
            numeric = isinstance(value, int | float | np.number) and not isinstance(value, bool)
            text = _g(value, quantity=quantity) if numeric else str(value)
            cells.append(f"<td class='n'>{html.escape(text)}</td>" if numeric
                         else f"<td>{html.escape(text)}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def render_html(report: Report) -> str:
    """The report as one self-contained HTML document (inline CSS, charts as inline SVG)."""
    parts = ["<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>",
             f"<title>{html.escape(report.title)}</title><style>{_CSS}</style></head><body>",
             f"<h1>{html.escape(report.title)}</h1>",
             f"<p class='sub'>{html.escape(report.subtitle)}</p>",
             f"<p class='caution'><strong>Caution.</strong> {html.escape(CAUTIONS)}</p>"]
    for k, sec in enumerate(report.sections, 1):
        slug = re.sub(r"[^a-z]+", "-", sec.title.lower()).strip("-")
        parts.append(f"<section id='{slug}'><h2>{k}. {html.escape(sec.title)}</h2>")
        for chart in sec.charts:
            parts.append(f"<figure>{charts.to_svg(chart, CHART_WIDTH)}</figure>")
        for text in sec.paragraphs:
            parts.append(f"<p>{html.escape(text)}</p>")
        for caption, table in sec.tables:
            if caption:
                parts.append(f"<h3>{html.escape(caption)}</h3>")
            parts.append(_html_table(table))
        parts.append("</section>")
    if report.notes:
        parts.append("<h2>Notes</h2><ul>" + "".join(
            f"<li>{html.escape(n)}</li>" for n in report.notes) + "</ul>")
    parts.append("</body></html>")
    return "\n".join(parts)


# -- PDF --------------------------------------------------------------------------------------

_PAGE_W = 900
#: Plot width of the report's charts: with their axes they fit the page's 900 px.
CHART_WIDTH = 700
_LINE = 16


def render_pdf(report: Report) -> bytes:
    """The report as a one-page vector PDF: `render_svg` converted by vl-convert."""
    import vl_convert

    return vl_convert.svg_to_pdf(render_svg(report))


def render_svg(report: Report) -> str:
    """The report as one tall SVG page: text, tables (monospace) and the charts."""
    import textwrap

    items, y = [], 40

    def text(s, size=12, weight="normal", mono=False, color="#1a1a1a"):
        nonlocal y
        family = "monospace" if mono else "sans-serif"
        items.append(f"<text x='40' y='{y}' font-family='{family}' font-size='{size}' "
                     f"font-weight='{weight}' fill='{color}' xml:space='preserve'>"
                     f"{html.escape(s)}</text>")
        y += int(size * 1.45)

    text(report.title, 22, "bold")
    for line in textwrap.wrap(report.subtitle, 110):
        text(line, 11, color="#555555")
    y += 6
    for line in textwrap.wrap("Caution. " + CAUTIONS, 110):
        text(line, 11, "bold", color="#D55E00")
    for k, sec in enumerate(report.sections, 1):
        y += 12
        text(f"{k}. {sec.title}", 16, "bold")
        for chart in sec.charts:
            svg = charts.to_svg(chart, CHART_WIDTH)
            height = float(re.search(r'height="([\d.]+)"', svg).group(1))
            body = re.sub(r"^<svg", f"<svg x='40' y='{y}'", svg.strip(), count=1)
            items.append(body)
            y += int(height) + 10
        for paragraph in sec.paragraphs:
            for line in textwrap.wrap(paragraph, 115):
                text(line, 11)
        for caption, table in sec.tables:
            if caption:
                text(caption, 12, "bold")
            for line in _text_table(table).splitlines():
                text(line[:130], 9, mono=True)
    svg = (f"<svg xmlns='http://www.w3.org/2000/svg' width='{_PAGE_W}' height='{y + 40}' "
           f"viewBox='0 0 {_PAGE_W} {y + 40}'><rect width='100%' height='100%' fill='white'/>"
           + "".join(items) + "</svg>")
    return svg


def _text_table(frame: pd.DataFrame) -> str:
    quantities = [labels.quantity_of(str(c)) for c in frame.columns]
    cells = [[(_g(v, quantity=q) if isinstance(v, float | np.floating) else str(v))[:60]
              for v, q in zip(row, quantities, strict=True)]
             for row in frame.itertuples(index=False)]
    heads = [str(c) for c in frame.columns]
    widths = [max([len(h)] + [len(r[i]) for r in cells]) for i, h in enumerate(heads)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(heads, widths, strict=True))]
    lines += ["  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)) for r in cells]
    return "\n".join(lines)


def write_report(scenario_path, html_path, pdf_path=None,
                 viscosity_unit: str = "Pa*s") -> list[pathlib.Path]:
    """Read a scenario file and write its HTML report (and PDF); returns the paths written.

    Both outputs go through `files.atomic_write`: neither may be the scenario (or the other
    output), and each is replaced whole or not at all.
    """
    from .files import atomic_write, check_output
    from .scenario import read_scenario

    check_output(html_path, [scenario_path])
    if pdf_path:
        check_output(pdf_path, [scenario_path, html_path])
    form = read_scenario(scenario_path)
    report = build_report(form, viscosity_unit, source=str(scenario_path))
    html = render_html(report)
    pdf = render_pdf(report) if pdf_path else None
    written = [atomic_write(html_path, html, [scenario_path])]
    if pdf_path:
        written.append(atomic_write(pdf_path, pdf, [scenario_path, html_path]))
    return written


__all__ = ["CAUTIONS", "Report", "Section", "build_report", "inputs_table", "liquid_table",
           "render_html", "render_pdf", "render_svg", "write_report"]
