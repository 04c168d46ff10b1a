"""Every session-state key of the app, its default, and the scenario <-> state mapping.

The sidebar widgets hold the scenario in the units the user chose (mPa*s, um, degC, ...).
`document()` turns those values into a scenario document ({"value": v, "unit": u} per
quantity), which `predictor.scenario` converts to SI with pint; `values_from_formulation()`
goes the other way. The app never converts units by hand: it calls `predictor.units`.

Functions take an optional `ss` mapping (default: `st.session_state`), so tests can call
them on a plain dict.
"""

from __future__ import annotations

import json
import math
import os
import pathlib
from collections.abc import MutableMapping

import streamlit as st

import predictor
from predictor import scenario as sc
from predictor.units import from_si

REPO = pathlib.Path(__file__).resolve().parents[1]
DEMO_DIR = REPO / "data_demo"
DEFAULT_SCENARIO = "data_demo/mineral_coating.loadline.json"
SCENARIO_ENV = "LOADLINE_SCENARIO"
MAX_INGREDIENTS = 6
MAX_COMPARE = 4
MAX_UPLOAD_BYTES = 5_000_000

CAUTION = (
    "Predictions are screening estimates for idealised particles and droplets. Confirm by "
    "measurement before scale-up, pump or pressure-equipment selection, and follow local "
    "codes, licensed engineering practice and the materials' safety data sheets (fine "
    "powders, solvents)."
)

# Unit selectors: key -> (dimension in predictor.units.SI_UNITS, choices, shown as).
UNIT_CHOICES: dict[str, tuple[str, tuple[str, ...]]] = {
    "unit_viscosity": ("viscosity", ("mPa*s", "cP", "Pa*s")),
    "unit_size": ("length", ("um", "nm", "mm")),
    "unit_layer": ("length", ("nm", "um")),
    "unit_temperature": ("temperature", ("degC", "K", "degF")),
    "unit_density": ("density", ("kg/m**3", "g/cm**3")),
    "unit_tension": ("interfacial_tension", ("mN/m", "N/m")),
    "unit_shear_rate": ("shear_rate", ("1/s", "1/min")),
}
UNIT_LABELS = {
    "mPa*s": "mPa·s", "cP": "cP", "Pa*s": "Pa·s", "um": "µm", "nm": "nm", "mm": "mm",
    "degC": "°C", "K": "K", "degF": "°F", "kg/m**3": "kg/m³", "g/cm**3": "g/cm³",
    "mN/m": "mN/m", "N/m": "N/m", "1/s": "1/s", "1/min": "1/min", "-": "–", "": "–",
}

# Quantities held in session state in a user-chosen unit: key -> (dimension, unit key).
QUANTITY_KEYS: dict[str, tuple[str, str]] = {
    "liq_temperature": ("temperature", "unit_temperature"),
    "liq_ref_temperature": ("temperature", "unit_temperature"),
    "liq_density": ("density", "unit_density"),
    "limit_viscosity": ("viscosity", "unit_viscosity"),
    "limit_shear_rate": ("shear_rate", "unit_shear_rate"),
    "process_shear_rate": ("shear_rate", "unit_shear_rate"),
    "drop_target": ("viscosity", "unit_viscosity"),
    "sz_size": ("length", "unit_size"),
}
# The same for each ingredient field (key "ing{i}_{field}").
INGREDIENT_QUANTITIES: dict[str, tuple[str, str]] = {
    "density": ("density", "unit_density"),
    "diameter": ("length", "unit_size"),
    "layer": ("length", "unit_layer"),
    "droplet_viscosity": ("viscosity", "unit_viscosity"),
    "tension": ("interfacial_tension", "unit_tension"),
}
INGREDIENT_DEFAULTS: dict[str, object] = {
    "name": "new ingredient", "kind": "solid", "density": 2500.0, "loading": 10.0,
    "basis": "mass", "diameter": 1.0, "size_json": "", "aspect_ratio": 1.0, "layer": 0.0,
    "phi_max": None, "intrinsic": None, "droplet_viscosity": None, "tension": None,
    # particle interactions: "none", "charged" (surface potential) or "flocculated"
    "interaction": "none", "potential": 30.0, "hamaker": 1.0,
}
INTERACTIONS = ("none", "charged", "flocculated")
INTERACTION_LABELS = {"none": "Dispersed (hard spheres)", "charged": "Charged: verdict from "
                      "potential and salt", "flocculated": "Flocculated (stated)"}
POTENTIAL_UNIT, HAMAKER_SCALE, SALT_UNIT = "mV", 1e-20, "mmol/L"   # as the widgets show them
KINDS = ("solid", "droplet")
BASES = ("mass", "volume")
BASIS_LABELS = {"mass": "wt%", "volume": "vol%"}
# Which liquid-law parameters follow the viscosity unit selector (registry unit -> dimension).
LAW_UNIT_DIMENSIONS = {"Pa*s": "viscosity", "Pa": "stress", "1/s": "shear_rate", "s": "time"}


def _relation_param_defaults() -> dict[str, float]:
    """One default per parameter name over every suspension relation of the registry."""
    out: dict[str, float] = {}
    for spec in predictor.models(kind="suspension"):
        for name, value in spec.defaults().items():
            out.setdefault(name, float(value))
    return out


RELATION_PARAM_DEFAULTS = _relation_param_defaults()
AUTO_PARAMS = ("phi_max", "intrinsic_viscosity")   # estimated from sizes & shape unless set

DEFAULTS: dict[str, object] = {
    # display
    "presentation": False,
    **{key: choices[0] for key, (_, choices) in UNIT_CHOICES.items()},
    # scenario: identity and relations
    "sc_name": "", "sc_description": "", "sc_source": "",
    "model": "krieger-dougherty", "droplet_model": "phan-thien-pham",
    **{f"param_{k}": v for k, v in RELATION_PARAM_DEFAULTS.items()},
    **{f"auto_{k}": True for k in AUTO_PARAMS},
    "extra_params_json": "{}",          # model_params not tied to a widget (kept on save)
    "droplet_params_json": "{}",        # droplet_model_params (kept on save)
    "thick_onset": None, "phi_max_frictional": None,   # frictional shear thickening
    # liquid
    "liq_name": "water", "liq_preset": "water", "liq_law": "newtonian",
    "liq_params_json": "{}",            # law parameters, SI, keyed by registry name
    "liq_temperature": 25.0, "liq_ref_temperature": 25.0, "liq_density": 997.0,
    "liq_glycerol": 0.0, "liq_activation_temperature": None,
    "liq_salt": 1.0, "liq_permittivity": None,     # ionic strength [mmol/L]; None: water
    # ingredients
    "n_ing": 0,
    # Loading sweep page
    "compare_models": [], "compare_scenarios": [], "show_band": True, "find_max": False,
    "limit_viscosity": 1000.0, "limit_shear_rate": 10.0,
    # Flow curve page
    "process_shear_rate": 100.0, "flow_process": "(my own shear rate)",
    "flow_low": 1e-3, "flow_high": 1e5, "flow_show_stress": True,
    # Process checks page (units fixed in the labels)
    "pc_flow": 10.0, "pc_flow_max": 100.0, "pc_diameter": 25.0, "pc_length": 10.0,
    "pc_roughness": 0.0, "pc_impeller": "disc turbine", "pc_speed": 120.0,
    "pc_impeller_d": 100.0, "pc_tank_d": 300.0, "pc_thickness": 100.0,
    "pc_wavelength": 1.0, "pc_surface_tension": 35.0,
    # Sizes & packing page
    "sz_source": "generated", "sz_ingredient": "", "sz_table_bytes": b"",
    "sz_table_name": "", "sz_message": "", "sz_kind": "lognormal", "sz_size": 5.0,
    "sz_spread": 1.6, "sz_particles": 400, "sz_seeds": 2, "sz_sim": {}, "sz_assign": "",
    "sz_dist_json": "", "bl_powders": [], "bl_at_loading": True,
    # Droplets page
    "drop_name": "", "drop_phi_max": 0.64, "drop_rigid": False, "drop_thinning": True,
    "drop_jammed": "mason",
    "drop_target": None, "drop_branch": "direct",
    # Calibration (JSON of the fit that set the relation; "" = none)
    "calibration_json": "", "cal_text": "", "cal_source": "", "cal_message": "",
    "cal_rate": None, "cal_model": "krieger-dougherty", "cal_compare": True,
    # Calibrate page, lab data as it comes (exports, slip at several gaps, step tests)
    "lab_curves_text": "", "lab_curves_source": "", "lab_model": "herschel-bulkley",
    "lab_branch": "up", "lab_slip_text": "", "lab_slip_source": "", "lab_step_text": "",
    "lab_step_source": "", "lab_message": "", "lab_fraction": 90.0,
    "lab_process_rate": 1000.0, "lab_view_rate": 1.0,
    # Batch screen page
    "batch_files": {}, "batch_table_name": "", "batch_message": "", "batch_result": None,
    "batch_summary": {}, "batch_unit": "Pa*s",
    # Particle forces page (salt in mmol/L, potential in mV, layer in nm, A in 1e-20 J)
    "pf_ingredient": "", "pf_salt": 1.0, "pf_potential": 30.0, "pf_layer": 0.0,
    "pf_hamaker": 4.8,
    # Design map page (loadings in % on the chosen basis, windows in SI)
    "map_mode": "plane", "map_x": 0, "map_y": 1, "map_parts": [0, 1, -1],
    "map_x_low": 20.0, "map_x_high": 60.0, "map_y_low": 0.0, "map_y_high": 40.0,
    "map_rate": 100.0, "map_n": 41, "map_basis": "mass", "map_message": "",
    "map_windows": [{"name": "pumping", "shear_rate_1_per_s": 100.0,
                     "max_viscosity_Pa_s": 2.0, "min_viscosity_Pa_s": None},
                    {"name": "sag resistance", "shear_rate_1_per_s": 0.1,
                     "max_viscosity_Pa_s": None, "min_viscosity_Pa_s": 10.0}],
    "cand_design": "full-factorial", "cand_n": 16, "cand_levels": 3, "cand_seed": 0,
    # messages from callbacks, shown on the next run
    "scenario_message": "", "scenario_warning": "", "scenario_loaded": False,
}


def ingredient_key(i: int, field: str) -> str:
    return f"ing{i}_{field}"


def _session(ss):
    return st.session_state if ss is None else ss


def _values(ss: MutableMapping) -> dict:
    """Every value in the session at once, as a plain dict.

    Each read of ``st.session_state[key]`` goes through Streamlit's locks and checks (some
    15 us); a loop over all declared keys read one by one cost 10-15 ms per run, one copy
    (`to_dict`) about one ms.
    """
    to_dict = getattr(ss, "to_dict", None)
    return dict(to_dict()) if callable(to_dict) else dict(ss)


SNAPSHOT_KEY = "_scenario_snapshot"
SAVE_BOX_KEY = "_save_box"


def save_box(ss: MutableMapping | None = None) -> dict:
    """The dict the Save button reads when pressed: {"text": the current scenario JSON}.

    A download button given a callable calls it on another thread, where session state
    cannot be read; the callable keeps this very dict instead, and runs refresh its text.
    """
    return _session(ss).setdefault(SAVE_BOX_KEY, {})


def snapshot(ss: MutableMapping | None = None) -> None:
    """Copy every declared value under one key no widget owns (call at the end of a run).

    Streamlit may drop a widget's value when a run is interrupted by the next interaction
    (a quick click on another page while the sidebar is still being drawn); `init()` then
    restores the scenario from this copy instead of falling back to the defaults.
    """
    ss = _session(ss)
    have = _values(ss)
    ss[SNAPSHOT_KEY] = {key: have[key] for key in all_keys(have) if key in have}


def init(ss: MutableMapping | None = None) -> None:
    """Declare every key with its default (`setdefault`); load the opening scenario once."""
    ss = _session(ss)
    have = _values(ss)

    def declare(key, value):
        if key not in have:
            ss[key] = have[key] = value
    kept = have.get(SNAPSHOT_KEY) or {}
    for key in all_keys(have):
        if key in kept:
            declare(key, kept[key])
    for key, value in DEFAULTS.items():
        declare(key, type(value)(value) if isinstance(value, list | dict) else value)
    for i in range(int(have["n_ing"])):
        for field, value in INGREDIENT_DEFAULTS.items():
            declare(ingredient_key(i, field), value)
    if not ss["scenario_loaded"]:
        ss["scenario_loaded"] = True
        path = opening_scenario_path()
        try:
            form, notes = with_notes(sc.read_scenario, path)
            apply_formulation(form, ss, source=path.name)
            ss["scenario_warning"] = " ".join(notes)
        except predictor.LoadlineError as err:
            ss["scenario_message"] = f"The opening scenario could not be read: {err}"


def keep_widget_values(ss: MutableMapping | None = None, keys=None) -> None:
    """Re-assign every declared key (or just `keys`) so that page switches and closed
    sections do not drop widget values.

    Streamlit removes the value of a widget that is not drawn in a run; writing the value
    back keeps it (called at the top of app/main.py, and by a page for the fields of a
    closed section, since a page body reruns alone).
    """
    ss = _session(ss)
    have = _values(ss)
    for key in all_keys(have) if keys is None else keys:
        if key in have:
            ss[key] = have[key]


def all_keys(ss: MutableMapping | None = None) -> list[str]:
    ss = _session(ss)
    keys = list(DEFAULTS)
    for i in range(int(ss.get("n_ing", 0))):
        keys.extend(ingredient_key(i, f) for f in INGREDIENT_DEFAULTS)
    return keys


def opening_scenario_path() -> pathlib.Path:
    """The scenario named by LOADLINE_SCENARIO (relative to the repository root) or the demo."""
    path = pathlib.Path(os.environ.get(SCENARIO_ENV) or DEFAULT_SCENARIO)
    return path if path.is_absolute() else REPO / path


def demo_files() -> dict[str, pathlib.Path]:
    """Demo scenarios by display name (the scenario's own name)."""
    out = {}
    for path in sorted(DEMO_DIR.glob("*" + sc.SUFFIX)):
        try:
            out[json.loads(path.read_text(encoding="utf-8")).get("name") or path.name] = path
        except (OSError, ValueError):
            continue
    return out


# --- units -----------------------------------------------------------------------------------


def _clean(value: float) -> float:
    """Round a converted value to 12 significant digits (no 24.999999999999943 in a widget)."""
    return float(f"{value:.12g}") if math.isfinite(value) else value


def convert_units(unit_key: str, old: str, new: str, ss: MutableMapping | None = None) -> None:
    """Re-express every value that follows `unit_key` from unit `old` to unit `new`."""
    ss = _session(ss)
    if old == new:
        return
    dimension = UNIT_CHOICES[unit_key][0]
    keys = [k for k, (_, u) in QUANTITY_KEYS.items() if u == unit_key]
    for i in range(int(ss.get("n_ing", 0))):
        keys += [ingredient_key(i, f) for f, (_, u) in INGREDIENT_QUANTITIES.items()
                 if u == unit_key]
    for key in keys:
        value = ss.get(key)
        if value is None:
            continue
        si = predictor.units.to_si(float(value), old, dimension, key)
        ss[key] = _clean(from_si(si, new, dimension))


def unit_of(key: str, ss: MutableMapping | None = None) -> str:
    """The unit a quantity key is currently shown in."""
    ss = _session(ss)
    field = key.split("_", 1)[1] if key.startswith("ing") else None
    if key in QUANTITY_KEYS:
        return ss[QUANTITY_KEYS[key][1]]
    if field in INGREDIENT_QUANTITIES:
        return ss[INGREDIENT_QUANTITIES[field][1]]
    raise KeyError(key)


def label(unit: str) -> str:
    return UNIT_LABELS.get(unit, unit)


# --- scenario <-> state ----------------------------------------------------------------------


def _q(value, unit: str):
    return None if value is None else {"value": float(value), "unit": unit}


def model_params(ss: MutableMapping | None = None) -> dict[str, float]:
    """Parameters of the chosen solids relation set by hand (auto ones left to the mixture)."""
    ss = _session(ss)
    params = dict(json.loads(ss.get("extra_params_json") or "{}"))
    try:
        names = predictor.get_model(ss["model"], kind="suspension").param_names()
    except predictor.LoadlineError:
        names = ()
    for name in names:
        if name in AUTO_PARAMS and ss.get(f"auto_{name}", True):
            params.pop(name, None)
            continue
        value = ss.get(f"param_{name}")
        if value is not None:
            params[name] = float(value)
    return params


def document(ss: MutableMapping | None = None) -> dict:
    """The scenario document (predictor.scenario format) of the values in session state."""
    ss = _session(ss)
    units = {key: ss[key] for key in UNIT_CHOICES}
    activation = ss.get("liq_activation_temperature")
    liquid = {
        "name": ss["liq_name"], "preset": ss["liq_preset"], "law": ss["liq_law"],
        "parameters": {k: {"value": float(v), "unit": ""}
                       for k, v in json.loads(ss["liq_params_json"] or "{}").items()},
        "glycerol_mass_fraction": float(ss["liq_glycerol"]) / 100.0,
        "temperature": _q(ss["liq_temperature"], units["unit_temperature"]),
        "density": _q(ss["liq_density"], units["unit_density"]),
        "reference_temperature": _q(ss["liq_ref_temperature"], units["unit_temperature"]),
        "activation_temperature": _q(activation, "K"),
        "ionic_strength": _q(ss.get("liq_salt", 1.0), SALT_UNIT),
        "relative_permittivity": ss.get("liq_permittivity"),
    }
    ingredients = []
    for i in range(int(ss["n_ing"])):
        def get(field, i=i):
            return ss.get(ingredient_key(i, field), INGREDIENT_DEFAULTS[field])

        size = get("size_json")
        droplet = get("kind") == "droplet"
        mode = "none" if droplet else get("interaction")
        ingredients.append({
            "name": get("name"), "kind": get("kind"),
            "loading": {"value": float(get("loading")) / 100.0, "basis": get("basis")},
            "density": _q(get("density"), units["unit_density"]),
            "diameter": _q(get("diameter"), units["unit_size"]),
            "layer_thickness": _q(get("layer"), units["unit_layer"]),
            "droplet_viscosity": _q(get("droplet_viscosity"), units["unit_viscosity"])
            if droplet else None,
            "interfacial_tension": _q(get("tension"), units["unit_tension"]) if droplet else None,
            "aspect_ratio": float(get("aspect_ratio")),
            "phi_max": get("phi_max"),
            "intrinsic_viscosity": get("intrinsic"),
            "size_distribution": json.loads(size) if size else None,
            "surface_potential": _q(get("potential"), POTENTIAL_UNIT)
            if mode == "charged" else None,
            "hamaker_constant": None if mode == "none" or get("hamaker") is None
            else {"value": float(get("hamaker")) * HAMAKER_SCALE, "unit": "J"},
            **({"flocculated": True} if mode == "flocculated" else {}),
        })
    return {
        "format": sc.FORMAT, "schema_version": sc.SCHEMA_VERSION,
        "name": ss["sc_name"], "description": ss["sc_description"],
        "relations": {"solids": ss["model"], "droplets": ss["droplet_model"],
                      "parameters": model_params(ss),
                      "droplet_parameters": json.loads(ss.get("droplet_params_json") or "{}"),
                      "thickening_onset_stress": _q(ss.get("thick_onset"), "Pa"),
                      "phi_max_frictional": ss.get("phi_max_frictional")},
        "liquid": liquid, "ingredients": ingredients,
    }


def document_text(ss: MutableMapping | None = None) -> str:
    """`document()` as canonical JSON text: the cache key of every computation."""
    return json.dumps(document(ss), sort_keys=True)


def values_from_formulation(formulation, ss: MutableMapping | None = None) -> dict:
    """Session-state values (in the units currently chosen) describing `formulation`."""
    ss = _session(ss)
    doc = sc.scenario_to_dict(formulation)
    unit = {key: ss.get(key, DEFAULTS[key]) for key in UNIT_CHOICES}

    def shown(q, dimension, unit_key):
        return None if q is None else _clean(from_si(q["value"], unit[unit_key], dimension))

    liq = doc["liquid"]
    params = dict(doc["relations"]["parameters"])
    onset = doc["relations"].get("thickening_onset_stress")
    values: dict[str, object] = {
        "thick_onset": None if onset is None else _clean(float(onset["value"])),
        "phi_max_frictional": doc["relations"].get("phi_max_frictional"),
        "sc_name": doc["name"], "sc_description": doc["description"],
        "model": doc["relations"]["solids"], "droplet_model": doc["relations"]["droplets"],
        "liq_name": liq["name"], "liq_preset": liq["preset"], "liq_law": liq["law"],
        "liq_params_json": json.dumps(
            {k: formulation.liquid.params[k] for k in sorted(formulation.liquid.params)}),
        "liq_glycerol": _clean(100.0 * liq["glycerol_mass_fraction"]),
        "liq_temperature": shown(liq["temperature"], "temperature", "unit_temperature"),
        "liq_ref_temperature": shown(liq["reference_temperature"], "temperature",
                                     "unit_temperature"),
        "liq_density": shown(liq["density"], "density", "unit_density"),
        "liq_activation_temperature": None if liq["activation_temperature"] is None
        else float(liq["activation_temperature"]["value"]),
        "n_ing": len(doc["ingredients"]),
        "liq_salt": _clean(1000.0 * formulation.liquid.ionic_strength_mol_per_L),
        "liq_permittivity": formulation.liquid.relative_permittivity,
    }
    for name in AUTO_PARAMS:
        values[f"auto_{name}"] = name not in params
    for name in list(params):
        if f"param_{name}" in DEFAULTS:
            values[f"param_{name}"] = float(params.pop(name))
    values["extra_params_json"] = json.dumps(params, sort_keys=True)
    values["droplet_params_json"] = json.dumps(doc["relations"]["droplet_parameters"],
                                               sort_keys=True)
    for i, ing in enumerate(doc["ingredients"]):
        droplet = ing["kind"] == "droplet"
        values.update({
            ingredient_key(i, "name"): ing["name"],
            ingredient_key(i, "kind"): ing["kind"],
            ingredient_key(i, "loading"): _clean(100.0 * ing["loading"]["value"]),
            ingredient_key(i, "basis"): ing["loading"]["basis"],
            ingredient_key(i, "density"): shown(ing["density"], "density", "unit_density"),
            ingredient_key(i, "diameter"): shown(ing["diameter"], "length", "unit_size"),
            ingredient_key(i, "layer"): shown(ing["layer_thickness"], "length", "unit_layer")
            or 0.0,
            ingredient_key(i, "aspect_ratio"): float(ing["aspect_ratio"] or 1.0),
            ingredient_key(i, "phi_max"): ing["phi_max"],
            ingredient_key(i, "intrinsic"): ing["intrinsic_viscosity"],
            ingredient_key(i, "droplet_viscosity"): shown(
                ing["droplet_viscosity"], "viscosity", "unit_viscosity") if droplet else None,
            ingredient_key(i, "tension"): shown(
                ing["interfacial_tension"], "interfacial_tension", "unit_tension")
            if droplet else None,
            ingredient_key(i, "size_json"): "" if ing["size_distribution"] is None
            else json.dumps(ing["size_distribution"], sort_keys=True),
            **_interaction_values(i, formulation.ingredients[i]),
        })
    return values


def _interaction_values(i: int, ing) -> dict:
    """Session values of an ingredient's interactions (mode, potential in mV, A in 1e-20 J)."""
    mode = ("flocculated" if ing.flocculated else
            "charged" if ing.surface_potential_V is not None else "none")
    return {
        ingredient_key(i, "interaction"): mode,
        ingredient_key(i, "potential"): INGREDIENT_DEFAULTS["potential"]
        if ing.surface_potential_V is None else _clean(1000.0 * ing.surface_potential_V),
        ingredient_key(i, "hamaker"): INGREDIENT_DEFAULTS["hamaker"]
        if ing.hamaker_J is None else _clean(ing.hamaker_J / HAMAKER_SCALE),
    }


def apply_formulation(formulation, ss: MutableMapping | None = None, source: str = "") -> None:
    """Put `formulation` into session state (call from a callback or before any widget)."""
    ss = _session(ss)
    values = values_from_formulation(formulation, ss)
    for i in range(int(values["n_ing"]), MAX_INGREDIENTS + 8):
        for field in INGREDIENT_DEFAULTS:
            if ingredient_key(i, field) in ss:
                del ss[ingredient_key(i, field)]
    for key, value in values.items():
        ss[key] = value
    ss["calibration_json"] = ""
    ss["sc_source"] = source
    ss["scenario_message"] = ""
    ss["scenario_warning"] = ""


def with_notes(read, *args):
    """`read(*args)` and the warnings it raised (unknown keys, rebinned size tables), as
    texts for the user: a warning must reach the page, not only the server log."""
    import warnings

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        value = read(*args)
    return value, list(dict.fromkeys(str(w.message) for w in caught))


def apply_text(text: str, ss: MutableMapping | None = None, source: str = "") -> None:
    """Load a scenario from JSON text; a `LoadlineError` names what is wrong. Warnings
    (unknown keys ...) are kept in ``scenario_warning`` for the page to show."""
    form, notes = with_notes(sc.loads, text, source or "the scenario")
    apply_formulation(form, ss, source=source)
    _session(ss)["scenario_warning"] = " ".join(notes)


def set_loadings(loadings: dict[int, float], basis: str,
                 ss: MutableMapping | None = None) -> None:
    """Set ingredients' loadings (fractions on `basis`), e.g. a design-map cell's recipe."""
    ss = _session(ss)
    for k, value in loadings.items():
        ss[ingredient_key(int(k), "loading")] = _clean(round(100.0 * float(value), 6))
        ss[ingredient_key(int(k), "basis")] = basis


def add_ingredient(ss: MutableMapping | None = None) -> None:
    ss = _session(ss)
    n = int(ss["n_ing"])
    if n >= MAX_INGREDIENTS:
        ss["scenario_message"] = f"At most {MAX_INGREDIENTS} ingredients in one scenario."
        return
    for field, value in INGREDIENT_DEFAULTS.items():
        ss[ingredient_key(n, field)] = value
    ss[ingredient_key(n, "name")] = f"ingredient {n + 1}"
    ss["n_ing"] = n + 1


def remove_ingredient(index: int, ss: MutableMapping | None = None) -> None:
    ss = _session(ss)
    n = int(ss["n_ing"])
    for i in range(index, n - 1):
        for field in INGREDIENT_DEFAULTS:
            ss[ingredient_key(i, field)] = ss.get(ingredient_key(i + 1, field),
                                                  INGREDIENT_DEFAULTS[field])
    for field in INGREDIENT_DEFAULTS:
        if ingredient_key(n - 1, field) in ss:
            del ss[ingredient_key(n - 1, field)]
    ss["n_ing"] = n - 1
