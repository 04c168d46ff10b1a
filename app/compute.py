"""Cached wrappers around predictor: plain hashable arguments in, plain data out.

Every function takes the scenario as its canonical JSON text (`predictor.scenario.dumps`),
so a cache hit costs one dictionary look-up. Warnings from the core (ValidityWarning and
friends) are captured and returned with the result, so the page can show them inline even
on a cache hit. Errors (LoadlineError) are not cached: they propagate to the page, which
shows them with st.error.
"""

from __future__ import annotations

import contextlib
import csv
import dataclasses
import functools
import json
import re
import warnings
import zipfile
from collections.abc import Callable, Iterator

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from predictor import formulation as fm
from predictor import scenario as sc

CACHE = {"show_spinner": False, "max_entries": 512}


def _captured(func: Callable, *args, **kwargs):
    """(result, messages) of `func(*args, **kwargs)` with every warning recorded."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = func(*args, **kwargs)
    messages = []
    for w in caught:
        if issubclass(w.category, UserWarning):   # ValidityWarning is one
            text = str(w.message)
            if text not in messages:
                messages.append(text)
    return result, messages


#: What a parser may raise on a malformed file besides LoadlineError (the core names most
#: problems itself; these are the ones it does not catch yet).
PARSE_ERRORS = (ValueError, TypeError, KeyError, IndexError, csv.Error, UnicodeError,
                zipfile.BadZipFile, EOFError)


@contextlib.contextmanager
def reading(source: str) -> Iterator[None]:
    """Parse a user's file: a parser failure is re-raised as a ScenarioError naming the file."""
    try:
        yield
    except predictor.LoadlineError:
        raise
    except PARSE_ERRORS as err:
        raise predictor.ScenarioError(
            f"{source} could not be read as a table ({type(err).__name__}: {err}). Check the "
            "quotes, separators and header line.") from None


def safe_file_name(name: str, default: str = "upload") -> str:
    """An uploaded file's own name for use inside a temporary folder: no folder parts, no
    leading dots, only letters, digits, spaces and ``._-`` (others become ``_``)."""
    base = re.split(r"[\\/]", str(name))[-1]
    base = re.sub(r"[^\w. -]+", "_", base).strip(" .")
    return base or default


@st.cache_data(**CACHE)
def scenario_json(document_text: str) -> str:
    """Canonical scenario JSON of a scenario document; LoadlineError if it is not valid."""
    from predictor.files import load_json

    return sc.dumps(sc.scenario_from_dict(load_json(document_text)))


def formulation(scenario: str) -> fm.Formulation:
    """The Formulation of a scenario text, parsed once per text (a run asks several times).

    The parser's warnings are raised again on every call, so each cached wrapper that
    captures them still shows them; a parse error is not cached.
    """
    form, caught = _parsed(scenario)
    for category, text in caught:
        warnings.warn(text, category, stacklevel=2)
    return form


@functools.lru_cache(maxsize=64)
def _parsed(scenario: str) -> tuple[fm.Formulation, tuple[tuple[type, str], ...]]:
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        form = sc.loads(scenario)
    return form, tuple((w.category, str(w.message)) for w in caught)


@st.cache_data(**CACHE)
def summary(scenario: str) -> dict:
    """Volume fractions, packing limit, headroom and the current viscosity (Newtonian view)."""
    def run():
        form = formulation(scenario)
        mix = fm.mixture(form)
        eta_r = float(fm.relative_viscosity_at(form, mix.phi_solids_effective, mix))
        return {
            "phi": mix.phi.tolist(), "mass_fraction": mix.mass_fraction.tolist(),
            "phi_solids": mix.phi_solids, "phi_solids_effective": mix.phi_solids_effective,
            "phi_droplets": mix.phi_droplets, "phi_max": mix.phi_max,
            "intrinsic_viscosity": mix.intrinsic_viscosity, "headroom": mix.headroom,
            "liquid_viscosity_Pa_s": mix.liquid_viscosity_Pa_s,
            "relative_viscosity": eta_r,
            "viscosity_Pa_s": eta_r * mix.liquid_viscosity_Pa_s,
            "density_kg_per_m3": mix.density_kg_per_m3,
            "solids_mass_fraction": float(mix.mass_fraction[mix.is_solid].sum()),
            "has_solids": bool(mix.is_solid.any()),
            "has_droplets": bool((~mix.is_solid).any()),
        }
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


BAND_SAMPLES = 500


@st.cache_data(**CACHE)
def fit_result(calibration: str):
    """The FitResult of a calibration record (JSON: model, phi, relative viscosity, options)."""
    from predictor import fitting

    cal = json.loads(calibration)
    return fitting.fit(np.asarray(cal["phi"], float), np.asarray(cal["relative_viscosity"], float),
                       model=cal["model"], fixed=cal.get("fixed") or None)


def _fit_or_none(calibration: str):
    return fit_result(calibration) if calibration else None


@st.cache_data(**CACHE)
def loading_sweep(scenario: str, relations: tuple[str, ...], band: bool = True,
                  calibration: str = "", n: int = 160) -> dict:
    """Viscosity against solids volume fraction for the scenario's relation and others.

    Returns {"value": {"curves", "band", "phi_max", "phi_max_range", "band_sources",
    "wt_ticks"}, "warnings": [...]}. Every relation is evaluated on the same phi grid (up to
    just below phi_max); the band comes from the calibration when there is one, else from
    the spread of the packing estimators.
    """
    from predictor import design

    def run():
        form = formulation(scenario)
        phi_max = fm.mixture(form).phi_max
        grid = np.linspace(0.0, 0.995 * phi_max, n)
        frames = []
        for name in (form.model, *[r for r in relations if r != form.model]):
            variant = dataclasses.replace(form, model=name)
            frame = fm.loading_sweep(variant, phi=grid)
            frame["relation"] = name
            frames.append(frame)
        curves = pd.concat(frames, ignore_index=True)
        ticks = np.round(np.arange(0.0, phi_max, 0.1), 10)
        wt = fm.solid_mass_fraction(form, ticks) if len(ticks) else np.zeros(0)
        out = {"curves": curves, "phi_max": phi_max, "band": None, "band_sources": (),
               "phi_max_range": None,
               "wt_ticks": [(float(p), float(100 * w)) for p, w in zip(ticks, wt, strict=True)]}
        spread = None
        if band:
            fit = _fit_or_none(calibration)
            frame = design.loading_sweep_with_band(form, phi=grid, fit=fit,
                                                   packing_spread=fit is None,
                                                   n_samples=BAND_SAMPLES)
            out["band"] = frame[["phi", "viscosity_low_Pa_s", "viscosity_high_Pa_s"]]
            out["band_sources"] = tuple(frame.attrs.get("sources", ()))
            out["band_level"] = frame.attrs.get("level", 0.95)
            spread = frame.attrs.get("packing_estimates")     # the band's own estimates
        if spread is None:
            spread = design.packing_estimator_spread(form)["estimates"]
        if spread:
            out["phi_max_range"] = (min(spread.values()), max(spread.values()))
            out["phi_max_estimates"] = spread
        return out
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def max_loading(scenario: str, viscosity_limit_Pa_s: float, shear_rate_1_per_s: float,
                band: bool = True, calibration: str = "") -> dict:
    """Highest solids loading under a viscosity limit at a shear rate, with its band."""
    from predictor import design

    def run():
        form = formulation(scenario)
        fit = _fit_or_none(calibration)
        answer = design.max_loading_with_band(
            form, viscosity_limit_Pa_s, shear_rate_1_per_s, fit=fit,
            packing_spread=band and fit is None, n_samples=BAND_SAMPLES)
        return {name: getattr(answer, name) for name in (
            "phi", "phi_low", "phi_high", "mass_fraction", "mass_fraction_low",
            "mass_fraction_high", "phi_effective", "limited_by", "sources")} | {
            "text_mass": answer.text("mass"), "text_volume": answer.text("volume")}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def compare_sweeps(scenarios: tuple[str, ...], n: int = 160) -> dict:
    """One loading sweep per saved scenario (its own relation), labelled by scenario name."""
    def run():
        frames = []
        for k, text in enumerate(scenarios):
            form = formulation(text)
            frame = fm.loading_sweep(form, phi=np.linspace(0.0, 0.995 * fm.mixture(form).phi_max,
                                                            n))
            frame["scenario"] = f"{k + 1}. {form.name or 'unnamed'}"
            frames.append(frame)
        return pd.concat(frames, ignore_index=True) if frames else pd.DataFrame()
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


def estimate_of(scenario: str, name: str) -> float | None:
    """The mixture's own estimate of an auto parameter (phi_max or intrinsic viscosity)."""
    try:
        value = summary(scenario)["value"]
    except predictor.LoadlineError:
        return None
    return value.get(name)


def spec(name: str, kind: str) -> predictor.ModelSpec | None:
    try:
        return predictor.get_model(name, kind=kind)
    except predictor.LoadlineError:
        return None


def relation_names(kind: str) -> list[str]:
    return [s.name for s in predictor.models(kind=kind)]


@st.cache_data(**CACHE)
def flow_curve(scenario: str, low_1_per_s: float, high_1_per_s: float,
               point_1_per_s: float, n: int = 121) -> dict:
    """Flow curve over [low, high] (log grid), its markers (onsets...), messages, and the
    curve at the process rate `point_1_per_s` (one row as a dict).

    A process rate inside the range is solved with the curve, in one call: each rate's
    stress is solved on its own and the markers depend only on the range, so the point
    equals a prediction at that rate alone (tests/app/test_flow_curve.py checks it).

    Returns {"value": {"curve": DataFrame, "point": {...}, "markers": {...},
    "messages": [...]}, "warnings": [...]}.
    """
    def run():
        form = formulation(scenario)
        rates = np.logspace(np.log10(low_1_per_s), np.log10(high_1_per_s), n)
        inside = low_1_per_s <= point_1_per_s <= high_1_per_s
        both = fm.predict(form, np.append(rates, point_1_per_s) if inside else rates)
        curve = both.iloc[:n]
        point = both.iloc[n] if inside else fm.predict(form, [point_1_per_s]).iloc[0]
        markers = {k: v for k, v in {**curve.attrs, **curve.attrs.get("markers", {})}.items()
                   if isinstance(v, int | float | np.floating) and not isinstance(v, bool)}
        return {"curve": curve, "point": point.to_dict(), "markers": markers,
                "messages": list(curve.attrs.get("warnings", ()))}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


def process_windows() -> list[tuple[str, float, float]]:
    """Typical process shear-rate windows (name, low, high) in 1/s, from predictor.shear."""
    from predictor import shear

    return [tuple(w) for w in getattr(shear, "PROCESS_SHEAR_RATES", ())]


@st.cache_data(**CACHE)
def process_table(scenario: str) -> dict:
    """Viscosity in each process window (`formulation.process_viscosities`)."""
    def run():
        return fm.process_viscosities(formulation(scenario))
    return dict(zip(("value", "warnings"), _captured(run), strict=True))



@st.cache_data(**CACHE)
def droplet_inputs(scenario: str) -> list[dict]:
    """What the Droplets page needs of each droplet ingredient, read from the formulation."""
    form = formulation(scenario)
    mix, _ = _captured(fm.mixture, form)    # its warnings are shown with the page's results
    out = []
    for k, ing in enumerate(form.ingredients):
        if ing.kind != fm.DROPLET:
            continue
        out.append({
            "index": k, "name": ing.name, "phi": float(mix.phi[k]),
            "solids_present": bool(mix.is_solid.any()),
            "continuous_viscosity_Pa_s": mix.liquid_viscosity_Pa_s,
            "droplet_viscosity_Pa_s": ing.droplet_viscosity_Pa_s
            if ing.droplet_viscosity_Pa_s is not None else mix.liquid_viscosity_Pa_s,
            "interfacial_tension_N_per_m": ing.interfacial_tension_N_per_m,
            "sauter_diameter_m": float(ing.distribution().sauter_diameter_m),
        })
    return out


@st.cache_data(**CACHE)
def liquid_viscosity_at(scenario: str, shear_rate_1_per_s: float) -> float:
    """Apparent viscosity of the scenario's liquid at a shear rate (its whole law, SI)."""
    from predictor import liquids

    law, params = fm.liquid_law_of(formulation(scenario).liquid)
    return float(liquids.liquid_viscosity(shear_rate_1_per_s, law, **params))


@st.cache_data(**CACHE)
def phase_ratio(inputs: tuple, model: str, shear_rate_1_per_s: float, phi_max: float,
                rigid: bool, jammed_yield: str, target_viscosity_Pa_s: float | None,
                target_branch: str, thinning: bool = True) -> dict:
    """Phase-ratio sweep (both branches), the phi for a target, and the breakup size.

    `inputs`: (continuous viscosity, droplet viscosity, interfacial tension, Sauter
    diameter), SI.
    """
    from predictor import emulsion
    from predictor import phase_ratio as pr

    eta_c, eta_d, gamma, d32 = inputs

    def run():
        common = dict(model=model, phi_max=phi_max, surfactant_rigid=rigid,
                      jammed_yield=jammed_yield, deformation_thinning=thinning)
        sweep = pr.phase_ratio_sweep(eta_c, eta_d, gamma, d32, shear_rate_1_per_s, **common)
        target = None
        if target_viscosity_Pa_s:
            target = pr.phase_ratio_for_target(eta_c, eta_d, gamma, d32, shear_rate_1_per_s,
                                               target_viscosity_Pa_s=target_viscosity_Pa_s,
                                               branch=target_branch, **common)
        breakup = float(emulsion.max_stable_droplet_diameter(eta_c, shear_rate_1_per_s, gamma,
                                                             eta_d / eta_c))
        return {"sweep": sweep, "target": target, "breakup_diameter_m": breakup,
                "caution_band": tuple(pr.INVERSION_CAUTION_BAND)}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def lab_data(text: str, source: str, scenario: str) -> dict:
    """The lab table in SI (labdata.read_lab_csv), with the scenario's densities."""
    import io

    from predictor import labdata

    def run():
        buffer = io.StringIO(text)
        buffer.name = source
        form = formulation(scenario)
        with reading(source):
            data = labdata.read_lab_csv(buffer, formulation=form)
        return {"table": data.table, "headers": dict(data.headers),
                "notes": list(data.notes), "liquid_viscosity_Pa_s": data.liquid_viscosity_Pa_s}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def calibrate(text: str, source: str, scenario: str, model: str, shear_rate: float | None,
              compare: bool) -> dict:
    """Fit `model` to the lab loading series (at one shear rate), and compare relations."""
    import io

    from predictor import fitting, labdata

    def run():
        buffer = io.StringIO(text)
        buffer.name = source
        form = formulation(scenario)
        with reading(source):
            data = labdata.read_lab_csv(buffer, formulation=form)
        if shear_rate is not None:
            data = data.at_shear_rate(shear_rate)
        result = data.fit(model)
        phi = result.x
        grid = np.linspace(0.0, float(np.max(phi)) * 1.08, 120)
        if "phi_max" in result.all_params:
            grid = grid[grid < 0.995 * result.all_params["phi_max"]]
        band = result.band(grid, n_samples=BAND_SAMPLES)
        comparison = []
        if compare:
            comparison = fitting.compare_fits(phi, result.y, kind=result.kind).rows()
        return {"model": result.model, "kind": result.kind, "params": dict(result.params),
                "fixed": dict(result.fixed), "intervals": dict(result.intervals),
                "confidence": result.confidence, "r2": result.r2, "rmse": result.rmse,
                "aic": result.aic, "n_points": result.n_points, "notes": list(result.notes),
                "phi": phi.tolist(), "relative_viscosity": result.y.tolist(),
                "fitted": np.asarray(result.fitted).tolist(),
                "residuals": np.asarray(result.residuals).tolist(),
                "curve": pd.DataFrame({"phi": band.x, "central": band.central,
                                       "low": band.low, "high": band.high}),
                "comparison": comparison}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def size_table(data: bytes, name: str) -> dict:
    """A measured size distribution from an uploaded CSV (predictor.batch.read_size_table):
    ``{"dist": its to_dict(), "notes": [warnings, e.g. a rebinned table]}``."""
    import pathlib
    import tempfile

    from predictor import batch

    with tempfile.TemporaryDirectory() as folder:
        path = pathlib.Path(folder) / safe_file_name(name, "sizes.csv")
        path.write_bytes(data)
        with reading(name):
            dist, notes = _captured(batch.read_size_table, path, field=name)
    return {"dist": dist.to_dict(), "notes": notes}


@st.cache_data(**CACHE)
def generated_sizes(kind: str, size_m: float, spread: float) -> dict:
    """A lognormal (median, geometric std) or Rosin-Rammler (x63, uniformity) distribution."""
    from predictor import sizes

    if kind == "lognormal":
        return sizes.SizeDistribution.lognormal(size_m, spread).to_dict()
    return sizes.SizeDistribution.rosin_rammler(size_m, spread).to_dict()


@st.cache_data(**CACHE)
def size_summary(dist_json: str) -> dict:
    """Statistics, both bases and every packing estimate of one distribution."""
    from predictor import packing, sizes

    def run():
        dist = sizes.SizeDistribution.from_dict(json.loads(dist_json))
        est = packing.packing_estimates(dist)
        return {
            "d10_m": dist.d10_m, "d50_m": dist.d50_m, "d90_m": dist.d90_m, "span": dist.span,
            "sauter_diameter_m": dist.sauter_diameter_m, "n_classes": len(dist.diameters_m),
            "classes": pd.DataFrame({"diameter_m": dist.diameters_m,
                                     "volume": dist.fractions_on("volume"),
                                     "number": dist.fractions_on("number")}),
            "estimates": dict(est.estimates), "skipped": dict(est.skipped),
            "default": est.default, "low": est.low, "high": est.high}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def blend(dists_json: tuple[str, ...], densities: tuple[float, ...],
          phi_total: float | None) -> dict:
    """predictor.blend.optimise_blend over 2 or 3 powders, as plain arrays."""
    from predictor import blend as bl
    from predictor import sizes

    def run():
        dists = [sizes.SizeDistribution.from_dict(json.loads(t)) for t in dists_json]
        res = bl.optimise_blend(dists, densities_kg_per_m3=list(densities), phi_total=phi_total)
        return {name: getattr(res, name) for name in (
            "shares", "mass_shares", "phi_max", "relative_viscosity",
            "relative_viscosity_farris", "phi_total", "best_packing_shares", "best_phi_max",
            "best_viscosity_shares", "best_relative_viscosity", "best_farris_shares",
            "best_relative_viscosity_farris")}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def solid_distributions(scenario: str) -> list[dict]:
    """Name, density, loading and size distribution (JSON) of each solid ingredient."""
    form = formulation(scenario)
    mix, _ = _captured(fm.mixture, form)    # its warnings are shown with the page's results
    return [{"index": k, "name": ing.name, "density": ing.density_kg_per_m3,
             "phi": float(mix.phi[k]),
             "dist_json": json.dumps(ing.distribution().to_dict(), sort_keys=True)}
            for k, ing in enumerate(form.ingredients) if ing.kind == fm.SOLID]


@st.cache_data(**CACHE)
def particle_forces(scenario: str, ingredient: str, ionic_strength_mol_per_L: float,
                    surface_potential_V: float, layer_thickness_m: float, hamaker_J: float,
                    n: int = 120) -> dict:
    """The Particle forces panel: one solid of the scenario with the panel's salt,
    potential, layer and Hamaker constant. Everything runs through the formulation (the
    same verdict and yield stress as the flow curve): the energy curve in kT, the verdict,
    the yield stress now and against the loading."""
    from predictor import interactions

    def run():
        form = formulation(scenario)
        solids = [i for i in form.ingredients if i.kind == "solid"]
        ing = next((i for i in solids if i.name == ingredient), None)
        if ing is None:
            raise predictor.InputRangeError("ingredient", ingredient,
                                            "the name of a solid ingredient of the scenario")
        changed = dataclasses.replace(ing, surface_potential_V=surface_potential_V,
                                      hamaker_J=hamaker_J, layer_thickness_m=layer_thickness_m,
                                      flocculated=False)
        variant = dataclasses.replace(
            form, ingredients=tuple(changed if i is ing else i for i in form.ingredients),
            liquid=dataclasses.replace(form.liquid,
                                       ionic_strength_mol_per_L=ionic_strength_mol_per_L))
        state = next(s for s in fm.particle_interactions(variant) if s.ingredient == ing.name)
        liq = variant.liquid
        curve = interactions.energy_curve(
            ing.distribution().sauter_diameter_m, hamaker_J, surface_potential_V,
            ionic_strength_mol_per_L, layer_thickness_m, liq.temperature_K,
            liq.relative_permittivity, points=200)
        h_nm = curve.separation_m * 1e9
        energy = pd.concat([pd.DataFrame({"separation_nm": h_nm, "energy_kT": values,
                                          "term": term})
                            for term, values in (("total", curve.total_kT),
                                                 ("van der Waals", curve.van_der_waals_kT),
                                                 ("double layer", curve.double_layer_kT),
                                                 ("steric", curve.steric_kT))],
                           ignore_index=True)
        mix = fm.mixture(variant)
        grid = np.linspace(0.0, 0.99 * mix.phi_max, n)
        loading = pd.DataFrame({
            "phi": grid, "mass_fraction": fm.solid_mass_fraction(variant, grid, mix),
            "yield_stress_Pa": fm.flocculation_yield_stress(variant, mix, grid)})
        verdict = dataclasses.asdict(state.detail)
        return {"verdict": verdict, "energy": energy, "loading": loading,
                "yield_stress_Pa": fm.flocculation_yield_stress(variant, mix),
                "phi": mix.phi_solids_effective, "phi_max": mix.phi_max,
                "diameter_m": ing.distribution().sauter_diameter_m}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


def hamaker_table() -> pd.DataFrame:
    """The typical Hamaker constants of predictor.interactions, in 1e-20 J, with sources."""
    from predictor import interactions

    return pd.DataFrame([{"Material": name, "Across vacuum [1e-20 J]": e.vacuum_J / 1e-20,
                          "Across water [1e-20 J]": e.water_J / 1e-20,
                          "Across oil (estimate) [1e-20 J]": e.oil_J / 1e-20,
                          "Source": e.source}
                         for name, e in interactions.HAMAKER_CONSTANTS.items()])


@st.cache_data(**CACHE)
def particle_verdicts(scenario: str) -> dict:
    """Verdict of each solid with interactions and the network yield stress now."""
    def run():
        form = formulation(scenario)
        return {"rows": fm.interaction_rows(form),
                "yield_stress_Pa": fm.flocculation_yield_stress(form)}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


# --- Process checks ----------------------------------------------------------------------------


@st.cache_data(**CACHE)
def pipe_flow(scenario: str, flows_m3_per_s: float | tuple[float, ...], diameter_m: float,
              length_m: float, roughness_m: float) -> dict:
    """`process.pipe_flow_of` at one flow rate (a float) or each of a tuple of them:
    {"value": PipeFlow, "warnings": [...]}."""
    from predictor import process

    flows = np.asarray(flows_m3_per_s) if isinstance(flows_m3_per_s, tuple) else flows_m3_per_s

    def run():
        return process.pipe_flow_of(formulation(scenario), flows, diameter_m, length_m,
                                    roughness_m)
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def stirred_tank(scenario: str, speed_1_per_s: float, impeller_diameter_m: float,
                 tank_diameter_m: float, impeller: str) -> dict:
    """`process.stirred_tank_of`: {"value": StirredTank, "warnings": [...]}."""
    from predictor import process

    def run():
        return process.stirred_tank_of(formulation(scenario), speed_1_per_s,
                                       impeller_diameter_m, tank_diameter_m, impeller)
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def coating(scenario: str, thickness_m: float, wavelength_m: float,
            surface_tension_N_per_m: float) -> dict:
    """`process.coating_of`: {"value": Coating, "warnings": [...]}."""
    from predictor import process

    def run():
        return process.coating_of(formulation(scenario), thickness_m, wavelength_m,
                                  surface_tension_N_per_m=surface_tension_N_per_m)
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


# --- Design map ----------------------------------------------------------------------------


@st.cache_data(**CACHE)
def loading_map(scenario: str, x: int, y: int, x_range: tuple[float, float],
                y_range: tuple[float, float], shear_rate_1_per_s: float, n: int, basis: str,
                windows: tuple[tuple, ...]) -> dict:
    """`design.loading_map` of the scenario (windows as (name, rate, max, min) tuples)."""
    from predictor import design

    def run():
        grid = design.loading_map(formulation(scenario), x, y, x_range, y_range,
                                  shear_rate_1_per_s, n=n, basis=basis,
                                  windows=list(windows) or None)
        for message in grid.attrs.get("warnings", ()):
            warnings.warn(message, predictor.ValidityWarning, stacklevel=2)
        return grid
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def loading_ternary(scenario: str, parts: tuple, shear_rate_1_per_s: float, n: int,
                    basis: str, windows: tuple[tuple, ...]) -> dict:
    """`design.loading_ternary` of the scenario (parts by index, or "liquid")."""
    from predictor import design

    def run():
        tri = design.loading_ternary(formulation(scenario), parts, shear_rate_1_per_s, n=n,
                                     basis=basis, windows=list(windows) or None)
        for message in tri.attrs.get("warnings", ()):
            warnings.warn(message, predictor.ValidityWarning, stacklevel=2)
        return tri
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def candidates(scenario: str, factors: tuple[tuple[str, float, float], ...], design: str,
               n: int, levels: int, seed: int, windows: tuple[tuple, ...]) -> dict:
    """A candidate table (CSV bytes per file name, the table first) for the batch screen."""
    from predictor import candidates as cand

    def run():
        table, files = cand.candidate_table(formulation(scenario),
                                            {name: (lo, hi) for name, lo, hi in factors},
                                            design=design, n=n, levels=levels, seed=seed,
                                            windows=list(windows) or None)
        out = {"candidates_from_design_map.csv": table.to_csv(index=False,
                                                              float_format="%.12g").encode()}
        out.update(cand.file_bytes(files))
        return out
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


# --- lab data as it comes: several flow curves, wall slip, thixotropy ------------------------


def _flow_curves(text: str, source: str):
    import io

    from predictor import labdata

    with reading(source):
        return labdata.read_flow_curves(io.StringIO(text), name=source)


TREND_WORDS = {"laplace_pressure_Pa": "Laplace pressure Γ/R [Pa]",
               "phi_c": "critical fraction φc [–]"}


@st.cache_data(**CACHE)
def flow_curve_fits(text: str, source: str, model: str, branch: str) -> dict:
    """Every series of a rheometer export fitted with `model`, and the yield-stress trend."""
    from predictor import labdata

    def run():
        curves = _flow_curves(text, source)
        fits = labdata.fit_flow_curves(curves, model, branch=branch)
        table = curves.table
        lines = []
        for series, fit in fits.fits.items():
            rate = np.logspace(np.log10(fit.x.min()), np.log10(fit.x.max()), 60)
            lines.append(pd.DataFrame({"series": series, "shear_rate_1_per_s": rate,
                                       "shear_stress_Pa": fit.predict(rate) * rate}))
        trend, trend_line, candidates = None, pd.DataFrame(), []
        phi, tau_y, _ = fits.parameter("yield_stress_Pa")
        names = {"mason": "Mason et al.", "princen-kiss": "Princen & Kiss"}
        lines_trend = []
        if np.isfinite(tau_y).sum() >= 3:
            grid = np.linspace(float(phi.min()), float(phi.max()), 80)
            for relation in labdata.YIELD_TRENDS:
                try:
                    fitted = labdata.fit_yield_stress_trend(phi, tau_y, relation)
                except predictor.LoadlineError as err:
                    candidates.append(f"{names[relation]}: not fitted ({err})")
                    continue
                lines_trend.append(pd.DataFrame({"series": f"{names[relation]}, fitted",
                                                 "phi": grid,
                                                 "yield_stress_Pa": fitted.predict(grid)}))
                candidates.append(f"{names[relation]}: " + ", ".join(
                    f"{TREND_WORDS[k]} = {v:.4g} "
                    f"({fitted.intervals[k][0]:.4g} to {fitted.intervals[k][1]:.4g})"
                    for k, v in fitted.params.items()) + f"; AIC {fitted.aic:.1f}")
                if relation == "mason":
                    trend = {"params": fitted.params, "intervals": fitted.intervals}
            if lines_trend:
                trend_line = pd.concat(lines_trend, ignore_index=True)
        return {"table": fits.table(), "points": table[["series", "branch",
                                                        "shear_rate_1_per_s",
                                                        "shear_stress_Pa", "phi"]],
                "lines": pd.concat(lines, ignore_index=True) if lines else pd.DataFrame(),
                "n_series": len(curves.series()), "n_fitted": len(fits.fits),
                "slip_warnings": dict(fits.warnings), "notes": list(curves.notes),
                "trend": trend, "trend_line": trend_line,
                "candidates": candidates,
                "trend_points": pd.DataFrame({"series": "fitted yield stress", "phi": phi,
                                              "yield_stress_Pa": tau_y})}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def slip_corrected(text: str, source: str) -> dict:
    """Apparent curves at two or more gaps and the Yoshimura-Prud'homme corrected curve."""
    from predictor import labdata

    def run():
        curves = _flow_curves(text, source)
        corrected = labdata.slip_correction(curves.by_gap())
        apparent = curves.table[curves.table["branch"] == "up"][
            ["series", "shear_rate_1_per_s", "shear_stress_Pa"]]
        flowing = corrected[~corrected["slip_only"]]
        line = pd.DataFrame({"series": "slip-corrected",
                             "shear_rate_1_per_s": flowing["shear_rate_1_per_s"],
                             "shear_stress_Pa": flowing["shear_stress_Pa"]})
        return {"apparent": apparent, "corrected": corrected, "line": line,
                "gaps_mm": sorted(1e3 * g for g in curves.by_gap())}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


@st.cache_data(**CACHE)
def thixotropy_fit(text: str, source: str, fraction: float, process_rate_1_per_s: float,
                   view_rate_1_per_s: float) -> dict:
    """Moore's model fitted to step tests; recovery after a process step; eta(t) at a rate."""
    from predictor import thixotropy

    def run():
        curves = _flow_curves(text, source)
        steps, loops = curves.thixotropy_tests()
        fit = thixotropy.fit_moore(steps, loops)
        points, lines = [], []
        for name in curves.series():
            rows = curves.table[curves.table["series"] == name]
            t, rate = rows["time_s"].to_numpy(), rows["shear_rate_1_per_s"].to_numpy()
            before = float(rows["preshear_rate_1_per_s"].iloc[0])
            points.append(pd.DataFrame({"series": name, "time_s": t,
                                        "shear_stress_Pa": rows["shear_stress_Pa"]}))
            if np.isnan(before):          # a loop or other history from a rested sample
                grid, model = t, thixotropy.stress_history(t, rate, fit.params, 1.0)
            else:                         # a step test after a pre-shear
                grid = np.linspace(float(t.min()), float(t.max()), 120)
                model = thixotropy.stress_history(np.r_[grid[0] - 1e12, grid],
                                                  np.r_[before, np.full(grid.size, rate[0])],
                                                  fit.params)[1:]
            lines.append(pd.DataFrame({"series": name, "time_s": grid,
                                       "shear_stress_Pa": model}))
        recovery = float(thixotropy.recovery_time(fraction, fit.params, process_rate_1_per_s))
        start = float(thixotropy.equilibrium_structure(
            process_rate_1_per_s, fit.params["build_up_rate_1_per_s"],
            fit.params["breakdown_coefficient"]))
        horizon = max(3.0 * recovery, 10.0 / fit.params["build_up_rate_1_per_s"])
        time = np.linspace(0.0, horizon, 150)
        history = pd.DataFrame({"series": f"at {view_rate_1_per_s:g} 1/s after the step",
                                "time_s": time,
                                "viscosity_Pa_s": thixotropy.viscosity_history(
                                    time, view_rate_1_per_s, fit.params, start)})
        return {"params": fit.params, "intervals": fit.intervals, "rmse": fit.rmse,
                "n_points": fit.n_points, "points": pd.concat(points, ignore_index=True),
                "lines": pd.concat(lines, ignore_index=True), "recovery_s": recovery,
                "structure_after_step": start, "history": history}
    return dict(zip(("value", "warnings"), _captured(run), strict=True))


def param_words(name: str, kind: str, model: str) -> str:
    """A parameter in words with its unit, e.g. 'build-up rate at rest a [1/s]'."""
    from predictor.labels import name_label

    words, unit = name_label(name, (kind,), model)
    return f"{words} [{unit}]"
