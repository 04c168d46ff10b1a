"""Orchestration: a Formulation (liquid + dispersed ingredients) -> flow curve, sweep, limits.

This layer only sequences calls to the model modules and collects results into plain data
(frozen dataclasses, pandas DataFrames with unit-named columns). No relation is written here.

How a formulation becomes one viscosity (documented choices, common practice, no source):

- loadings are converted to volume fractions with `composition.volume_fractions`;
- each solid's volume is swollen by its adsorbed layer (`suspension.effective_volume_fraction`,
  radius = half its Sauter diameter);
- phi_max of the solids comes from their combined size distribution (`packing.max_packing`)
  times a volume-weighted shape factor (`packing.phi_max_for_aspect_ratio`), unless the user
  gives phi_max for an ingredient, which then replaces that ingredient's own estimate;
- droplets are first mixed into the liquid (emulsion relation, droplet fraction counted in the
  liquid + droplets), and the emulsion is the medium the solids see (a Farris-style nesting);
- the flow curve (`predict`) lets the solids' relative viscosity depend on the stress
  (Brownian thinning, optional frictional thickening) in the liquid's own law, solved by
  `shear.flow_curve`; see `predict` for the packing limits and radius it uses.
"""

from __future__ import annotations

import dataclasses
import functools
import warnings
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from . import composition, interactions, liquids, packing, shear, sizes
from .errors import InputRangeError
from .flowset import (
    ZERO_SHEAR_RATIO,
    add_yield_stress,
    droplet_medium,
    jammed_note,
    network_yield_stress,
)
from .registry import get_model

SOLID, DROPLET = "solid", "droplet"
#: Most dispersed ingredients read from a file (scenario or candidate table). A real
#: formulation has a handful (the app edits up to 6); 50 is generous and bounds the work of
#: every question, which solves for all ingredients at once (our limit, no source).
MAX_INGREDIENTS = 50
RANDOM_CLOSE_SPHERES = 0.64  # Berryman, Phys. Rev. A 27, 1053 (1983): 0.64 +- 0.02


@dataclass(frozen=True)
class Liquid:
    """The continuous phase.

    `preset` "water" or "glycerol-water" computes a Newtonian viscosity from the temperature;
    otherwise `law` names a registry relation of kind "liquid" and `params` holds its SI
    parameters. An Arrhenius shift applies where `activation_temperature_K` is given.
    """

    name: str = "water"
    preset: str = "water"                       # "water" | "glycerol-water" | "" (use law)
    law: str = "newtonian"
    params: dict = field(default_factory=dict)  # SI values, names as in the registry
    temperature_K: float = 298.15
    density_kg_per_m3: float = 997.0
    glycerol_mass_fraction: float = 0.0
    reference_temperature_K: float = 298.15
    activation_temperature_K: float | None = None
    ionic_strength_mol_per_L: float = 1e-3     # salt, for charged particles (interactions)
    relative_permittivity: float | None = None  # None: water's at the temperature

    def newtonian_viscosity_Pa_s(self) -> float:
        """Viscosity at `temperature_K` of a preset or Newtonian liquid.

        For a non-Newtonian law this is its apparent viscosity at 1 1/s (a reference value
        for viscosity ratios and the Newtonian sweep; flow curves use the whole law).
        """
        cached = self.__dict__.get("_newtonian_viscosity")   # many rows share one liquid
        if cached is None:
            cached = self._newtonian_viscosity_Pa_s()
            object.__setattr__(self, "_newtonian_viscosity", cached)
        return cached

    def _newtonian_viscosity_Pa_s(self) -> float:
        if self.preset and self.preset not in LIQUID_PRESETS:
            raise InputRangeError("liquid preset", self.preset, "'water', 'glycerol-water' or ''")
        if self.preset:
            return float(liquid_viscosities(self.preset, self.temperature_K,
                                            self.glycerol_mass_fraction))
        if self.law == "newtonian":
            spec = get_model("newtonian", kind="liquid")
            params = law_at_temperature(spec, {"viscosity_Pa_s": self.params.get(
                "viscosity_Pa_s", 1e-3)}, self.shift_factor())[1]
        else:
            params = liquid_law_of(self)[1]
        return float(liquid_viscosities(self.law, self.temperature_K,
                                        self.glycerol_mass_fraction, params))

    def shift_factor(self) -> float:
        """Arrhenius factor from the reference to the working temperature (1 if none given)."""
        if self.activation_temperature_K is None or self.preset:
            return 1.0
        return float(liquid_shift(self.law, self.temperature_K, self.reference_temperature_K,
                                  self.activation_temperature_K))


@dataclass(frozen=True)
class Ingredient:
    """One dispersed ingredient: a solid powder or a droplet phase.

    `loading` is a fraction (0-1) of the whole formulation on `basis` ("mass" or "volume").
    `size` is a `sizes.SizeDistribution`; when None, a single size `diameter_m` is used.
    A solid may carry particle interactions (`particle_interactions`): a surface potential
    `surface_potential_V` (the verdict then follows from the pair energy in the liquid's
    salt) or `flocculated=True` (stated by the user), both with the Hamaker constant
    `hamaker_J` of the particles across the liquid.
    """

    name: str
    density_kg_per_m3: float
    loading: float
    basis: str = "mass"
    kind: str = SOLID
    diameter_m: float = 1e-6
    size: sizes.SizeDistribution | None = None
    aspect_ratio: float = 1.0
    layer_thickness_m: float = 0.0
    phi_max: float | None = None
    intrinsic_viscosity: float | None = None
    droplet_viscosity_Pa_s: float | None = None
    interfacial_tension_N_per_m: float | None = None
    surface_potential_V: float | None = None
    hamaker_J: float | None = None
    flocculated: bool = False

    def distribution(self) -> sizes.SizeDistribution:
        if self.size is not None:
            return self.size
        return sizes.SizeDistribution.single(self.diameter_m)


@dataclass(frozen=True)
class Formulation:
    """A liquid and its dispersed ingredients, with the relations chosen to describe them."""

    liquid: Liquid = field(default_factory=Liquid)
    ingredients: tuple[Ingredient, ...] = ()
    name: str = ""
    description: str = ""
    model: str = "krieger-dougherty"          # suspension relation for the solids
    model_params: dict = field(default_factory=dict)  # solids' overrides, e.g. a calibration
    droplet_model: str = "phan-thien-pham"    # emulsion relation for the droplets
    droplet_model_params: dict = field(default_factory=dict)  # the droplets' own overrides
    thickening_onset_stress_Pa: float | None = None   # frictional thickening; None: off
    phi_max_frictional: float | None = None   # None: FRICTIONAL_RATIO * phi_max

    def __post_init__(self):
        object.__setattr__(self, "ingredients", tuple(self.ingredients))
        for i, ing in enumerate(self.ingredients):
            if ing.kind not in (SOLID, DROPLET):
                raise InputRangeError(f"ingredients[{i}].kind", ing.kind, "'solid' or 'droplet'")
            if ing.basis not in ("mass", "volume"):
                raise InputRangeError(f"ingredients[{i}].basis", ing.basis, "'mass' or 'volume'")
            for name, (low, high) in _INGREDIENT_RANGES.items():
                _check_range(f"ingredients[{i}].{name}", getattr(ing, name), low, high)
            _check_interactions(i, ing)
            if ing.size is not None:
                d = ing.size.diameters_m
                _check_range(f"ingredients[{i}].size (smallest class)", float(d.min()),
                             *SIZE_CLASS_RANGE)
                _check_range(f"ingredients[{i}].size (largest class)", float(d.max()),
                             *SIZE_CLASS_RANGE)
        for name, (low, high) in _LIQUID_RANGES.items():
            _check_range(f"liquid.{name}", getattr(self.liquid, name), low, high)
        for name, (low, high) in _FORMULATION_RANGES.items():
            _check_range(name, getattr(self, name), low, high)


# Screening limits of the inputs (our own choice, wide enough for real formulations; common
# practice, no source). None means "not given" and is allowed where the field is optional.
_INGREDIENT_RANGES = {
    "density_kg_per_m3": (10.0, 25_000.0), "loading": (0.0, 1.0), "diameter_m": (1e-9, 1e-2),
    "aspect_ratio": (0.01, 100.0), "layer_thickness_m": (0.0, 1e-5), "phi_max": (0.05, 1.0),
    "intrinsic_viscosity": (1.0, 100.0), "droplet_viscosity_Pa_s": (1e-7, 1e7),
    "interfacial_tension_N_per_m": (1e-7, 1.0), "surface_potential_V": (-0.3, 0.3),
}
_LIQUID_RANGES = {
    "temperature_K": (150.0, 700.0), "density_kg_per_m3": (10.0, 25_000.0),
    "glycerol_mass_fraction": (0.0, 1.0), "reference_temperature_K": (150.0, 700.0),
    "activation_temperature_K": (0.0, 1e5), "ionic_strength_mol_per_L": (1e-9, 10.0),
    "relative_permittivity": (1.0, 200.0),
}
_FORMULATION_RANGES = {"thickening_onset_stress_Pa": (1e-9, 1e7), "phi_max_frictional": (0.05, 1.0)}
#: Size classes allowed in an ingredient's size distribution. [m]
SIZE_CLASS_RANGE = (1e-9, 1e-2)


def _check_interactions(i: int, ing: Ingredient) -> None:
    """A Hamaker constant where interactions are asked for; only solids; A >= 0."""
    if not isinstance(ing.flocculated, bool | np.bool_):
        raise InputRangeError(f"ingredients[{i}].flocculated", ing.flocculated, "true or false")
    wanted = ing.flocculated or ing.surface_potential_V is not None
    if ing.hamaker_J is not None:
        if isinstance(ing.hamaker_J, int | float) and ing.hamaker_J < 0:
            raise InputRangeError(
                f"ingredients[{i}].hamaker_J", ing.hamaker_J, "a value from 0 to 1e-18 J",
                "Particles of one material always attract across a liquid (A >= 0); a "
                "negative Hamaker constant is physical only between two different materials.")
        _check_range(f"ingredients[{i}].hamaker_J", ing.hamaker_J, 0.0, 1e-18)
    if wanted and ing.kind != SOLID:
        raise InputRangeError(f"ingredients[{i}].kind", ing.kind,
                              "'solid' for particle interactions (surface potential, "
                              "flocculated state)")
    if wanted and ing.hamaker_J is None:
        raise InputRangeError(f"ingredients[{i}].hamaker_J", "none",
                              "a Hamaker constant (J) when a surface potential or a "
                              "flocculated state is given (see interactions.HAMAKER_CONSTANTS)")


def _check_range(field_name: str, value, low: float, high: float) -> None:
    if value is None:
        return
    if (isinstance(value, bool) or not isinstance(value, int | float | np.floating)
            or out_of_range(value, low, high)):
        raise range_error(field_name, value, low, high)


def out_of_range(value, low: float, high: float, given=True) -> np.ndarray:
    """Where a given number lies outside [low, high]; NaN and infinities fail.

    The one range test of `Formulation`'s checks: `Formulation.__post_init__` applies it to
    one formulation's fields and the batch to columns of many rows (`given` masks the rows
    that state the field), with the message of `range_error`.

    Examples
    --------
    >>> out_of_range([0.5, 1.5, float("nan"), float("nan")], 0.0, 1.0,
    ...              given=[True, True, True, False])
    array([False,  True,  True, False])
    """
    value = np.asarray(value, dtype=float)
    with np.errstate(invalid="ignore"):
        return np.asarray(given, dtype=bool) & ~((value >= low) & (value <= high))


def range_error(field_name: str, value, low: float, high: float) -> InputRangeError:
    """The error `Formulation` raises for a field outside [low, high] (see `out_of_range`).

    Examples
    --------
    >>> print(range_error("loading", 1.5, 0.0, 1.0).allowed)
    a number from 0 to 1
    """
    return InputRangeError(field_name, value, f"a number from {low:g} to {high:g}")


@dataclass(frozen=True)
class Mixture:
    """What a formulation resolves to: volume fractions, packing limit, parameters.

    Arrays run over the ingredients in their order. `solid_shares` are the solids' shares of
    the total effective solid volume; the loading sweep scales the solids along them.
    `mixtures` gives N variants at once: then the per-row fields carry a leading row axis
    (phi and mass_fraction (N, K), the fractions, phi_max, intrinsic viscosity and density
    (N,)) and `row` picks one.
    """

    phi: np.ndarray                 # volume fraction of each ingredient [-]
    mass_fraction: np.ndarray       # mass fraction of each ingredient [-]
    is_solid: np.ndarray            # bool per ingredient
    swelling: np.ndarray            # (1 + delta/a)**3 per ingredient [-]
    phi_solids: float               # sum of solid volume fractions [-]
    phi_solids_effective: float     # including adsorbed layers [-]
    phi_droplets: float             # sum of droplet volume fractions [-]
    phi_max: float                  # packing limit of the solids [-]
    intrinsic_viscosity: float      # of the solids [-]
    liquid_viscosity_Pa_s: float    # Newtonian viscosity of the liquid at its temperature
    density_kg_per_m3: float        # of the whole formulation

    @property
    def headroom(self) -> float:
        """Jamming headroom phi_eff / phi_max of the solids (1 = jammed)."""
        return self.phi_solids_effective / self.phi_max if self.phi_max else 0.0

    def row(self, i: int) -> Mixture:
        """Row `i` of a `mixtures` result, as the `mixture` of that one variant."""
        return dataclasses.replace(self, **{
            name: (getattr(self, name)[i] if name in _PER_ROW_ARRAYS
                   else float(getattr(self, name)[i])) for name in _PER_ROW})

    def rows(self) -> Mixture:
        """A one-row `mixtures` result of this `mixture` (per-row fields get a row axis)."""
        if np.ndim(self.phi_solids):
            return self
        return dataclasses.replace(self, **{
            name: np.asarray(getattr(self, name), dtype=float)[None] for name in _PER_ROW})


_PER_ROW_ARRAYS = ("phi", "mass_fraction")
_PER_ROW = _PER_ROW_ARRAYS + ("phi_solids", "phi_solids_effective", "phi_droplets", "phi_max",
                              "intrinsic_viscosity", "density_kg_per_m3")


def mixture(formulation: Formulation) -> Mixture:
    """Resolve loadings, packing limit and shape parameters of `formulation`.

    The one-row case of `mixtures`.
    """
    return mixtures(formulation).row(0)


def mixtures(formulation: Formulation, loadings=None, is_mass=None) -> Mixture:
    """`mixture` of N variants of one formulation at once, vectorised over the rows.

    Parameters
    ----------
    formulation : Formulation
        Every field but the loadings is taken from it.
    loadings : array_like, optional
        (N, K) loading of each ingredient in each row, fractions (0-1); default the
        formulation's own (one row).
    is_mass : array_like of bool, optional
        (K,) or (N, K): True where a loading is a mass fraction; default each ingredient's
        basis.

    Returns
    -------
    Mixture
        With a leading row axis on the per-row fields (see `Mixture`).
    """
    ings = formulation.ingredients
    liq = formulation.liquid
    eta_l = liq.newtonian_viscosity_Pa_s()
    if loadings is None:
        loadings = [[i.loading for i in ings]]
    if is_mass is None:
        is_mass = [i.basis == "mass" for i in ings]
    w_in = np.atleast_2d(np.asarray(loadings, dtype=float))
    n = w_in.shape[0]
    if not ings:
        zero = np.zeros(n)
        return Mixture(np.zeros((n, 0)), np.zeros((n, 0)), np.zeros(0, bool), np.zeros(0), zero,
                       zero, zero, np.full(n, RANDOM_CLOSE_SPHERES), np.full(n, 2.5), eta_l,
                       np.full(n, liq.density_kg_per_m3))
    rho = np.array([i.density_kg_per_m3 for i in ings], dtype=float)
    phi = composition.volume_fractions(w_in, is_mass, rho, liq.density_kg_per_m3)
    w = composition.mass_fractions(phi, rho, liq.density_kg_per_m3)
    is_solid = np.array([i.kind == SOLID for i in ings])
    dists = [i.distribution() for i in ings]
    swelling = np.array([layer_swelling(i.layer_thickness_m, d.sauter_diameter_m)
                         if i.kind == SOLID else 1.0 for i, d in zip(ings, dists, strict=True)])
    phi_s = phi[:, is_solid].sum(axis=1)
    phi_eff = (phi * swelling)[:, is_solid].sum(axis=1)
    phi_max, eta_i = _solid_packing(ings, dists, phi * swelling, is_solid)
    # A calibration (model_params) overrides the estimates everywhere, not only in the relation.
    phi_max = np.broadcast_to(np.asarray(formulation.model_params.get("phi_max", phi_max),
                                         dtype=float), (n,)).copy()
    eta_i = np.broadcast_to(np.asarray(
        formulation.model_params.get("intrinsic_viscosity", eta_i), dtype=float), (n,)).copy()
    return Mixture(phi, w, is_solid, swelling, phi_s, phi_eff, phi[:, ~is_solid].sum(axis=1),
                   phi_max, eta_i, eta_l,
                   np.atleast_1d(composition.mixture_density(phi, rho, liq.density_kg_per_m3)))


def layer_swelling(layer_thickness_m, diameter_m):
    """Effective over bare volume of particles with an adsorbed layer, (1 + delta/a)**3,
    a the (Sauter) radius."""
    return (1.0 + layer_thickness_m / (0.5 * diameter_m)) ** 3


def _solid_packing(ings, dists, phi_eff, is_solid):
    """phi_max and intrinsic viscosity (N,) of the solids in each row of `phi_eff` (N, K).

    See the module docstring: `powder_terms` of the solids, then `blend_packing` of the
    rows, whose validity notes are warned once each.
    """
    n = phi_eff.shape[0]
    solid = [k for k in range(len(ings)) if is_solid[k]]
    if not solid:
        return np.full(n, RANDOM_CLOSE_SPHERES), np.full(n, 2.5)
    terms = powder_terms([dists[k] for k in solid], [ings[k].aspect_ratio for k in solid],
                         [ings[k].intrinsic_viscosity for k in solid],
                         [ings[k].phi_max for k in solid])
    phi_max, eta_i, notes = blend_packing(terms, phi_eff[:, solid])
    for note in dict.fromkeys(str(x) for x in notes if x):
        warnings.warn(note, packing.ValidityWarning, stacklevel=4)
    return phi_max, eta_i


def _given(value) -> bool:
    return value is not None and not (isinstance(value, float) and np.isnan(value))


def powder_terms(dists, aspect_ratios, intrinsic_viscosities, phi_maxes) -> dict:
    """What the packing of blends of some powders needs of each powder, resolved once.

    Parameters
    ----------
    dists : sequence of sizes.SizeDistribution
    aspect_ratios : sequence of float
    intrinsic_viscosities, phi_maxes : sequence of float or None
        Given values (None or nan: estimated from the aspect ratio and the sizes).

    Returns
    -------
    dict
        ``shape`` (packing factor of each powder's shape over spheres), ``intrinsic``
        (intrinsic viscosities), ``own`` (each powder's own packing limit when any is
        given, else None), ``diameters`` (one class grid) and ``fractions`` (each
        powder's volume fractions on it); the input of `blend_packing`.
    """
    sphere = packing.phi_max_for_aspect_ratio(1.0)
    shape = np.array([packing.phi_max_for_aspect_ratio(float(a)) / sphere
                      for a in aspect_ratios])
    eta_i = np.array([float(x) if _given(x) else
                      packing.intrinsic_viscosity_for_aspect_ratio(float(a))
                      for x, a in zip(intrinsic_viscosities, aspect_ratios, strict=True)])
    own = None
    if any(_given(m) for m in phi_maxes):
        own = np.array([float(m) if _given(m) else
                        shape[j] * packing.max_packing(d.diameters_m, d.fractions)
                        for j, (m, d) in enumerate(zip(phi_maxes, dists, strict=True))])
    grid = np.unique(np.concatenate([d.diameters_m for d in dists]))
    classes = np.zeros((len(dists), grid.size))
    for j, d in enumerate(dists):
        classes[j, np.searchsorted(grid, d.diameters_m)] = d.fractions
    classes /= classes.sum(axis=1, keepdims=True)
    return {"shape": shape, "intrinsic": eta_i, "own": own, "diameters": grid,
            "fractions": classes}


def blend_packing(terms: dict, phi_eff) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """phi_max, intrinsic viscosity and validity notes (N,) of N blends of the powders of
    `terms` (`powder_terms`), the blends given by each powder's effective volume `phi_eff`
    (N, P) (equal shares where a row has none).

    The packing limit is the blend of the powders' own limits when any is given, else the
    shape factor times `packing.max_packing_blends` of the blended size classes (the
    estimate `packing.max_packing` gives each blend), whose notes are returned, not warned.
    """
    weights = np.asarray(phi_eff, dtype=float)
    total = weights.sum(axis=1, keepdims=True)
    weights = np.where(total > 0, weights / np.where(total > 0, total, 1.0),
                       1.0 / weights.shape[1])
    eta_i = terms["intrinsic"]
    if terms["own"] is not None:
        phi_max = weights @ terms["own"]
        notes = np.full(weights.shape[0], "", dtype=object)
    else:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", packing.ValidityWarning)
            blended, notes = packing.max_packing_blends(terms["diameters"], terms["fractions"],
                                                        weights)
        phi_max = (weights @ terms["shape"]) * blended
    # clip: a weighted mean of equal values must not round outside their range
    return phi_max, np.clip(weights @ eta_i, eta_i.min(), eta_i.max()), np.asarray(notes,
                                                                                  dtype=object)


def _relation_params(spec, mix: Mixture, overrides: dict) -> dict:
    """The relation's own parameters, filled from the mixture, then from the overrides."""
    known = {"phi_max": mix.phi_max, "intrinsic_viscosity": mix.intrinsic_viscosity}
    params = {k: v for k, v in known.items() if k in spec.param_names()}
    params.update({k: v for k, v in overrides.items() if k in spec.param_names()})
    return params


def relative_viscosity_at(formulation: Formulation, phi_solids_effective,
                          mix: Mixture | None = None):
    """Relative viscosity of the formulation (Newtonian view) at effective solid fractions.

    Vectorised over `phi_solids_effective`; droplets stay at their own loading.
    """
    mix = mix or mixture(formulation)
    spec = get_model(formulation.model, kind="suspension")
    params = spec.check_params(_relation_params(spec, mix, formulation.model_params))
    phi = np.asarray(phi_solids_effective, dtype=float)
    eta_s = np.where(phi < 1.0, spec.func(np.clip(phi, 0.0, 1.0), **params), np.inf)
    return eta_s * droplet_factor(formulation, mix)


def droplet_factor(formulation: Formulation, mix: Mixture) -> float:
    """Relative viscosity of the droplets in the liquid (1 without droplets)."""
    model, params = droplet_relation(formulation, mix)
    return float(droplet_medium(model, params, mix.phi_droplets, mix.phi_solids))


def droplet_relation(formulation: Formulation, mix: Mixture) -> tuple[str, dict]:
    """Emulsion relation of the droplets and its parameters (viscosity ratio, overrides).

    For a `mixtures` result the viscosity ratio is an array over the rows (nan in rows
    without droplets); for one `mixture` a float, left out without droplets.
    """
    spec = get_model(formulation.droplet_model, kind="emulsion")
    drops = [k for k, i in enumerate(formulation.ingredients) if i.kind == DROPLET]
    rows = mix.rows()
    params = {}
    on = rows.phi_droplets > 0.0
    if drops and on.any() and "viscosity_ratio" in spec.param_names():
        eta_d = np.array([np.nan if i.droplet_viscosity_Pa_s is None else
                          i.droplet_viscosity_Pa_s for i in formulation.ingredients])
        is_drop = np.array([i.kind == DROPLET for i in formulation.ingredients])
        ratio = droplet_viscosity_ratio(rows.phi, is_drop, eta_d, mix.liquid_viscosity_Pa_s)
        params["viscosity_ratio"] = ratio if rows is mix else float(ratio[0])
    params.update({k: v for k, v in formulation.droplet_model_params.items()
                   if k in spec.param_names()})
    return spec.name, params


def droplet_viscosity_ratio(phi, is_droplet, droplet_viscosity_Pa_s, liquid_viscosity_Pa_s):
    """Viscosity ratio (N,) of the droplets over the liquid, volume-weighted over the
    droplet ingredients of each row; nan in rows without droplets.

    phi, is_droplet and droplet_viscosity_Pa_s are (N, K) or (K,) (nan viscosity: the
    liquid's); liquid_viscosity_Pa_s a float or (N,).
    """
    phi = np.atleast_2d(np.asarray(phi, dtype=float))
    eta_l = np.asarray(liquid_viscosity_Pa_s, dtype=float)
    eta_d = np.asarray(droplet_viscosity_Pa_s, dtype=float)
    eta_d = np.where(np.isnan(eta_d), eta_l[..., None] if eta_l.ndim else eta_l, eta_d)
    volume = np.where(is_droplet, phi, 0.0)
    total = volume.sum(axis=1)
    on = total > 0.0
    with np.errstate(invalid="ignore"):
        weighted = np.where(is_droplet, phi * eta_d, 0.0).sum(axis=1)
        return np.where(on, weighted / np.where(on, total, 1.0), np.nan) / eta_l


#: Frictional over frictionless jamming point, 0.58/0.64 (Wyart & Cates 2014 and Singh et al.
#: 2018 for friction coefficients near 1; from memory, not checked against the source).
FRICTIONAL_RATIO = 0.58 / 0.64
#: Default shear rates of `predict`: 61 points, log-spaced over 1e-3 to 1e5 1/s.
DEFAULT_RANGE_1_PER_S = (1e-3, 1e5)
#: Units of the law parameters scaled by the Arrhenius factor (time-temperature
#: superposition also scales time constants; common practice, no source).
_SHIFTED_UNITS = ("Pa*s", "s")
#: Liquid presets computed from the temperature (Newtonian).
LIQUID_PRESETS = ("water", "glycerol-water")


def liquid_law_of(liquid: Liquid) -> tuple[str, dict]:
    """Registry law name and SI parameters of the liquid at its working temperature.

    Presets ("water", "glycerol-water") are Newtonian at their computed viscosity. A law's
    viscosity-like and time-constant parameters are multiplied by the Arrhenius factor
    `Liquid.shift_factor()` (1 when no activation temperature is given); yield stresses
    and flow indices are kept.
    """
    cached = liquid.__dict__.get("_law")     # many rows share one liquid
    if cached is None:
        cached = _liquid_law_of(liquid)
        object.__setattr__(liquid, "_law", cached)
    return cached[0], dict(cached[1])


def _liquid_law_of(liquid: Liquid) -> tuple[str, dict]:
    if liquid.preset:
        return "newtonian", {"viscosity_Pa_s": liquid.newtonian_viscosity_Pa_s()}
    spec = get_model(liquid.law, kind="liquid")
    return law_at_temperature(spec, spec.check_params(dict(liquid.params)),
                              liquid.shift_factor())


def liquid_shift(kind, temperature_K, reference_temperature_K, activation_temperature_K):
    """Arrhenius factor of each row's liquid, from its reference to its working temperature.

    The one liquid shift of the core: `Liquid.shift_factor` is its one-row case and the batch
    calls it for many rows. `kind` is the preset or law name of each row; presets
    (`LIQUID_PRESETS`) and rows without an activation temperature (NaN) get 1.

    Examples
    --------
    >>> liquid_shift(["newtonian", "water", "power-law"], 323.15, 298.15,
    ...              [2000.0, 2000.0, float("nan")]).round(4)
    array([0.5951, 1.    , 1.    ])
    """
    kind, t, ref, act = np.broadcast_arrays(np.asarray(kind, dtype=object),
                                            np.asarray(temperature_K, dtype=float),
                                            np.asarray(reference_temperature_K, dtype=float),
                                            np.asarray(activation_temperature_K, dtype=float))
    out = np.ones(t.shape)
    on = ~np.isnan(act)
    for preset in LIQUID_PRESETS:
        on &= kind != preset
    if on.any():
        out[on] = liquids.arrhenius_shift(t[on], ref[on], act[on])
    return out


def law_at_temperature(spec, params: dict, shift) -> tuple[str, dict]:
    """Registry name and parameters of a liquid law at the working temperature.

    Viscosity-like and time-constant parameters (`_SHIFTED_UNITS`) are multiplied by the
    Arrhenius factor `shift` (scalar or one per row); yield stresses and flow indices are
    kept. `spec` is the law's registry entry; `params` holds SI values (floats or arrays).
    """
    units = {p.name: p.unit for p in spec.params}
    return spec.name, {k: v * shift if units[k] in _SHIFTED_UNITS else v
                       for k, v in params.items()}


def liquid_viscosities(kind: str, temperature_K, glycerol_mass_fraction=0.0,
                       params: dict | None = None):
    """Viscosity of rows that share one liquid kind, at their working temperatures.

    The one liquid resolution of the core: `Liquid.newtonian_viscosity_Pa_s` is its one-row
    case and the batch calls it per kind for many rows. Presets compute it from the
    temperature (and glycerol mass fraction); "newtonian" returns the given viscosity; any
    other law returns its apparent viscosity at 1 1/s. `params` are the law's parameters at
    temperature (`law_at_temperature`).

    Examples
    --------
    >>> float(liquid_viscosities("newtonian", 298.15, params={"viscosity_Pa_s": 0.5}))
    0.5
    """
    if kind == "water":
        return liquids.water_viscosity(temperature_K)
    if kind == "glycerol-water":
        return liquids.glycerol_water_viscosity(glycerol_mass_fraction, temperature_K)
    if kind == "newtonian":
        return np.asarray(params["viscosity_Pa_s"], dtype=float)
    return liquids.liquid_viscosity(1.0, kind, **params)


def _solid_radius_m(formulation: Formulation, mix: Mixture) -> np.ndarray:
    """Sauter radius (N,) of all solids together in each row of a `mixtures` result (total
    volume over total surface); nan where there is no solid."""
    solids = [k for k, i in enumerate(formulation.ingredients) if i.kind == SOLID]
    if not solids:
        return np.full(mix.phi.shape[0], np.nan)
    volume = mix.phi[:, solids]
    radius = np.array([0.5 * formulation.ingredients[k].distribution().sauter_diameter_m
                       for k in solids])
    total = volume.sum(axis=1)
    return np.where(total > 0, total / np.sum(volume / radius, axis=1), np.nan)


def set_columns(formulation: Formulation, mix: Mixture) -> dict:
    """The resolved inputs of N variants (a `mixtures` result): the fields of a
    `FormulationSet`, arrays over the rows. See `predict` for the choices made.

    `resolve_columns` of the formulation's fields; `engine.vary` builds its set from
    these; `row_inputs` is their one-row case.
    """
    mix = mix.rows()
    n = mix.phi.shape[0]
    law, params = liquid_law_of(formulation.liquid)
    spec = get_model(formulation.model, kind="suspension")
    rel = spec.check_params(_relation_params(spec, mix, formulation.model_params))
    phi_max = rel.pop("phi_max", mix.phi_max)
    droplet_model, droplet_params = droplet_relation(formulation, mix)
    droplet_params.pop("viscosity_ratio", None)
    ings = formulation.ingredients
    onset, frictional = formulation.thickening_onset_stress_Pa, formulation.phi_max_frictional
    return resolve_columns(
        phi_solids_effective=mix.phi_solids_effective, phi_solids=mix.phi_solids,
        phi_droplets=mix.phi_droplets, phi=mix.phi, is_solid=mix.is_solid,
        swelling=mix.swelling,
        sauter_diameter_m=np.array([i.distribution().sauter_diameter_m for i in ings]),
        droplet_viscosity_Pa_s=np.array([np.nan if i.droplet_viscosity_Pa_s is None
                                         else i.droplet_viscosity_Pa_s for i in ings]),
        liquid_viscosity_Pa_s=np.full(n, mix.liquid_viscosity_Pa_s), phi_max=phi_max,
        relation=spec.name, relation_params=rel, droplet_model=droplet_model,
        droplet_params=droplet_params, ratio="viscosity_ratio" in get_model(
            droplet_model, kind="emulsion").param_names() and bool(np.any(mix.phi_droplets > 0)),
        onset_stress_Pa=np.nan if onset is None else onset,
        phi_max_frictional=np.nan if frictional is None else frictional,
        temperature_K=formulation.liquid.temperature_K, liquid_law=law, liquid_params=params,
        network=_networks(formulation, mix))


def resolve_columns(*, phi_solids_effective, phi_solids, phi_droplets, phi, is_solid, swelling,
                    sauter_diameter_m, droplet_viscosity_Pa_s, liquid_viscosity_Pa_s, phi_max,
                    relation, relation_params, droplet_model, droplet_params, ratio=True,
                    onset_stress_Pa, phi_max_frictional, temperature_K, liquid_law,
                    liquid_params, network=None) -> dict:
    """The fields of a `FormulationSet` of N rows from per-row arrays: the one resolution
    of formulations into engine rows (`set_columns` for variants of one formulation, the
    batch screen for a table of many).

    Per-row values are floats, str or arrays (N,); per-ingredient ones (N, K) or (K,):
    phi (bare volume fractions, 0 where absent), is_solid (False for droplets and absent
    ingredients), swelling (adsorbed layers, (1 + delta/a)**3), sauter_diameter_m,
    droplet_viscosity_Pa_s (nan: the liquid's). Parameter dicts map names to floats or
    arrays (N,). `ratio` adds the droplets' `droplet_viscosity_ratio` to the droplet
    parameters (before `droplet_params`, which override it). phi_max_frictional nan means
    `FRICTIONAL_RATIO` times phi_max; it is dropped (nan) where onset_stress_Pa is nan.
    Choices: see `predict`.
    """
    eff = np.atleast_1d(np.asarray(phi_solids_effective, dtype=float))
    n = eff.shape[0]

    def full(value, dtype=float):
        return np.broadcast_to(np.asarray(value, dtype=dtype), (n,)).copy()

    phi = np.broadcast_to(np.asarray(phi, dtype=float), (n, np.shape(phi)[-1]))
    solid = np.broadcast_to(np.asarray(is_solid, dtype=bool), phi.shape)
    swelling_k = np.broadcast_to(np.asarray(swelling, dtype=float), phi.shape)
    bare = full(phi_solids)
    count = solid.sum(axis=1)
    held = np.where(count > 0, np.where(solid, swelling_k, 0.0).sum(axis=1)
                    / np.maximum(count, 1), 1.0)        # mean swelling of the solids
    with np.errstate(invalid="ignore", divide="ignore"):
        swelling_row = np.where(eff > 0, eff / np.where(eff > 0, bare, 1.0), held)
        half = np.where(solid, 0.5 * np.broadcast_to(sauter_diameter_m, phi.shape), 1.0)
        volume = np.where(solid, phi, 0.0)
        total = volume.sum(axis=1)
        radius = np.where(total > 0, total / np.where(solid, volume / half, 0.0).sum(axis=1),
                          np.nan)                       # Sauter radius of all solids
    phi_max = full(phi_max)
    onset = full(onset_stress_Pa)
    frictional = full(phi_max_frictional)
    frictional = np.where(np.isnan(onset), np.nan,
                          np.where(np.isnan(frictional), FRICTIONAL_RATIO * phi_max, frictional))
    drops = {}
    if ratio:
        drops["viscosity_ratio"] = droplet_viscosity_ratio(
            phi, ~solid & (phi > 0), droplet_viscosity_Pa_s, full(liquid_viscosity_Pa_s))
    drops.update(droplet_params)
    return {
        "phi": eff, "phi_solids": bare, "swelling": swelling_row,
        "phi_droplets": full(phi_droplets), "phi_max": phi_max,
        "phi_max_frictional": frictional, "onset_stress_Pa": onset, "radius_m": radius,
        "temperature_K": full(temperature_K), "yield_stress_Pa": np.zeros(n),
        "has_solids": solid.any(axis=1), "liquid_law": full(liquid_law, object),
        "liquid_params": {k: full(v) for k, v in liquid_params.items()},
        "relation": full(relation, object),
        "relation_params": {k: full(v) for k, v in relation_params.items()},
        "droplet_model": full(droplet_model, object),
        "droplet_params": {k: full(v) for k, v in drops.items()},
        "network": full(None, object) if network is None else network,
    }


def row_inputs(formulation: Formulation, mix: Mixture | None = None) -> dict:
    """The resolved inputs of one formulation, one row of a `FormulationSet`.

    `mix` (default `formulation.mixture`) may be a mixture scaled in place. The one-row
    case of `set_columns` (see `predict` for the choices made); `engine.stack` stacks these
    rows, `engine.vary` uses `set_columns` directly.
    """
    columns = set_columns(formulation, mix or mixture(formulation))
    row = {}
    for name, value in columns.items():
        if isinstance(value, dict):
            row[name] = {k: float(v[0]) for k, v in value.items() if not np.isnan(v[0])}
        elif name in ("liquid_law", "relation", "droplet_model", "network"):
            row[name] = value[0]
        elif name == "has_solids":
            row[name] = bool(value[0])
        else:
            row[name] = float(value[0])
    return row


def flow_curve_of(formulation: Formulation, shear_rate_1_per_s=None,
                  mix: Mixture | None = None):
    """The `shear.FlowCurve` of a formulation: one row of the engine, with its markers.

    The row's inputs are `row_inputs` (see `predict` for the choices made) and the
    solve is `shear.flow_curve`, the one-row case of `shear.flow_curves` that
    `engine.evaluate` runs over many rows.
    """
    rates = _rates(shear_rate_1_per_s)
    row = row_inputs(formulation, mix)
    phi = row["phi"]
    medium = float(droplet_medium(row["droplet_model"], row["droplet_params"],
                                  row["phi_droplets"], row["phi_solids"]))
    law, params = row["liquid_law"], row["liquid_params"]
    if phi >= 1.0 or not np.isfinite(medium):
        inf = np.full_like(rates, np.inf)
        eta_l = np.asarray(liquids.liquid_viscosity(rates, law, **params)) * np.ones_like(rates)
        return shear.FlowCurve(rates, inf, inf, inf, eta_l, np.full(rates.shape, "jammed"),
                               {"shear_jamming_1_per_s": 0.0},
                               (jammed_note(phi, row["phi_droplets"]),))

    def given(name):
        return None if np.isnan(row[name]) else float(row[name])

    curve = shear.flow_curve(
        rates, phi, liquid_law_name=law, liquid_params=params, medium_factor=medium,
        relation=row["relation"], relation_params=row["relation_params"],
        phi_max_zero_shear=ZERO_SHEAR_RATIO * row["phi_max"],
        phi_max_high_shear=row["phi_max"], phi_max_frictional=given("phi_max_frictional"),
        onset_stress_Pa=given("onset_stress_Pa"), radius_m=given("radius_m"),
        temperature_K=row["temperature_K"], yield_stress_Pa=row["yield_stress_Pa"])
    return _with_added_yield_stress(curve, network_yield_stress(row["network"], phi))


def _rates(shear_rate_1_per_s):
    if shear_rate_1_per_s is None:
        return np.logspace(*np.log10(DEFAULT_RANGE_1_PER_S), 61)
    rates = np.atleast_1d(np.asarray(shear_rate_1_per_s, dtype=float))
    if not np.all(np.isfinite(rates)) or np.any(rates <= 0):
        raise InputRangeError("shear_rate_1_per_s", rates[~(np.isfinite(rates) & (rates > 0))][0],
                              "a positive, finite shear rate")
    return rates


def predict(formulation: Formulation, shear_rate_1_per_s=None) -> pd.DataFrame:
    """Flow curve of the formulation: viscosity, stress and regime at each shear rate.

    The solids' relative viscosity depends on the stress (Brownian thinning between a
    zero-shear and a high-shear plateau, optional frictional thickening) and the liquid may
    be non-Newtonian; `shear.flow_curve` solves for the stress at every rate. Choices made
    here (common practice, no source, unless noted):

    - high-shear packing limit = the solids' phi_max (`mixture`); zero-shear limit =
      `ZERO_SHEAR_RATIO` times it; frictional limit = `Formulation.phi_max_frictional` or
      `FRICTIONAL_RATIO` times it, used only when `thickening_onset_stress_Pa` is set;
    - the Brownian radius is the Sauter radius of all solids together; above 3 um the
      Brownian term is left out;
    - droplets scale the liquid's stress by their relative viscosity (Farris-style nesting);
    - the liquid law comes from `liquid_law_of` (presets are Newtonian).

    Parameters
    ----------
    formulation : Formulation
    shear_rate_1_per_s : float or array_like, optional
        Shear rates, > 0; default 61 points log-spaced from 1e-3 to 1e5. [1/s]

    Returns
    -------
    pandas.DataFrame
        Columns shear_rate_1_per_s, viscosity_Pa_s, shear_stress_Pa, relative_viscosity
        (over the liquid at the same rate), liquid_viscosity_Pa_s, regime (see
        `shear.REGIMES`). `attrs` holds phi, phi_max, headroom, `markers` (dict of floats:
        plateaus, onsets, discontinuous-thickening range, shear jamming, apparent yield
        stress) and `warnings` (tuple of str).
    """
    mix = mixture(formulation)
    curve = flow_curve_of(formulation, shear_rate_1_per_s, mix)
    frame = pd.DataFrame({
        "shear_rate_1_per_s": curve.shear_rate_1_per_s,
        "viscosity_Pa_s": curve.viscosity_Pa_s,
        "shear_stress_Pa": curve.shear_stress_Pa,
        "relative_viscosity": curve.relative_viscosity,
        "liquid_viscosity_Pa_s": curve.liquid_viscosity_Pa_s,
        "regime": curve.regime,
    })
    frame.attrs.update(phi=mix.phi_solids_effective, phi_max=mix.phi_max, headroom=mix.headroom,
                       markers=dict(curve.markers), warnings=tuple(curve.warnings))
    return frame


def flow_curve_summary(formulation: Formulation, shear_rate_1_per_s=None) -> dict:
    """Markers and warnings of the flow curve as one plain dict (for the app and the CLI).

    Keys: phi, phi_max, headroom, warnings, every marker of `shear.flow_curve`
    (``thinning_onset_1_per_s``, ``dst_low_1_per_s``, ``apparent_yield_stress_Pa``, ...),
    and particle_interactions (`interaction_rows`; empty without interactions).
    """
    attrs = predict(formulation, shear_rate_1_per_s).attrs
    return {"phi": attrs["phi"], "phi_max": attrs["phi_max"], "headroom": attrs["headroom"],
            **attrs["markers"], "warnings": attrs["warnings"],
            "particle_interactions": interaction_rows(formulation)}


def process_viscosities(formulation: Formulation, windows=None) -> pd.DataFrame:
    """Viscosity at the ends of each process's shear-rate window.

    Parameters
    ----------
    formulation : Formulation
    windows : sequence of (name, low, high), optional
        Shear-rate windows in 1/s; default `shear.PROCESS_SHEAR_RATES` (common practice,
        no source).

    Returns
    -------
    pandas.DataFrame
        One row per window: process, low_1_per_s, high_1_per_s, viscosity_low_Pa_s,
        viscosity_high_Pa_s, regime_low, regime_high.
    """
    windows = tuple(shear.PROCESS_SHEAR_RATES if windows is None else windows)
    for name, low, high in windows:
        if not (np.isfinite(low) and np.isfinite(high) and 0 < low <= high):
            raise InputRangeError(f"window {name!r}", (low, high),
                                  "finite shear rates with 0 < low <= high [1/s]")
    from . import flowset

    rates = np.array([[w[1], w[2]] for w in windows], dtype=float).ravel()
    # The engine's row (no flow-curve markers to find): the same numbers as `predict`.
    res = flowset.evaluate(flowset.from_rows([row_inputs(formulation)]), rates)
    eta = res.viscosity_Pa_s[0].reshape(-1, 2)
    regime = res.regime[0].reshape(-1, 2)
    return pd.DataFrame({
        "process": [w[0] for w in windows],
        "low_1_per_s": rates[0::2], "high_1_per_s": rates[1::2],
        "viscosity_low_Pa_s": eta[:, 0], "viscosity_high_Pa_s": eta[:, 1],
        "regime_low": regime[:, 0], "regime_high": regime[:, 1],
    })


def loading_sweep(formulation: Formulation, phi=None, n: int = 200,
                  shear_rate_1_per_s: float | None = None) -> pd.DataFrame:
    """Viscosity against total solid volume fraction, solids scaled along their shares.

    Parameters
    ----------
    formulation : Formulation
    phi : array_like, optional
        Total effective solid volume fractions; default `n` points from 0 to just below
        phi_max.
    n : int
        Number of points of the default grid.
    shear_rate_1_per_s : float, optional
        Evaluate the full flow curve (thinning, thickening, non-Newtonian liquid) at this
        shear rate; None gives the Newtonian view: the relation at phi_max times the
        liquid's Newtonian viscosity. [1/s]

    Returns
    -------
    pandas.DataFrame
        Columns phi, mass_fraction (of all solids), relative_viscosity, viscosity_Pa_s,
        yield_stress_Pa (of flocculated solids, `flocculation_yield_stress`; 0 without);
        `attrs` holds phi_max, the current loading and the shear rate. The Newtonian view
        leaves the yield stress out of the viscosity; at a shear rate it is included.
    """
    mix = mixture(formulation)
    grid = np.linspace(0.0, mix.phi_max * 0.995, n) if phi is None else np.atleast_1d(
        np.asarray(phi, float))
    if grid.size and (not np.all(np.isfinite(grid)) or grid.min() < 0 or grid.max() > 1):
        raise InputRangeError("phi", grid[~((grid >= 0) & (grid <= 1))][0], "0 to 1")
    if shear_rate_1_per_s is None:
        eta_r = relative_viscosity_at(formulation, grid, mix)
        eta = eta_r * mix.liquid_viscosity_Pa_s
    else:
        from . import flowset

        rate = _rates(shear_rate_1_per_s)[:1]
        row = flowset.from_rows([row_inputs(formulation, mix)])
        res = flowset.evaluate(row.take(np.zeros(grid.size, int)).at_loading(grid), rate)
        eta, eta_r = res.viscosity_Pa_s[:, 0], res.relative_viscosity[:, 0]
    frame = pd.DataFrame({
        "phi": grid,
        "mass_fraction": solid_mass_fraction(formulation, grid, mix),
        "relative_viscosity": eta_r,
        "viscosity_Pa_s": eta,
        "yield_stress_Pa": flocculation_yield_stress(formulation, mix, grid),
    })
    frame.attrs.update(phi_max=mix.phi_max, phi_current=mix.phi_solids_effective,
                       shear_rate_1_per_s=shear_rate_1_per_s)
    return frame


def _at_loading(mix: Mixture, phi_solids_effective: float) -> Mixture:
    """`mix` with its solids scaled, along their shares, to a new effective fraction."""
    x = float(phi_solids_effective)
    if mix.phi_solids_effective > 0:
        bare = mix.phi_solids * x / mix.phi_solids_effective
    else:
        bare = x / float(np.mean(mix.swelling[mix.is_solid])) if mix.is_solid.any() else 0.0
    return dataclasses.replace(mix, phi_solids_effective=x, phi_solids=bare)


def solid_mass_fraction(formulation: Formulation, phi_solids_effective,
                        mix: Mixture | None = None):
    """Total mass fraction of the solids when their effective volume fraction is scaled."""
    mix = mix or mixture(formulation)
    rho = np.array([i.density_kg_per_m3 for i in formulation.ingredients])
    return scaled_solid_mass_fraction(phi_solids_effective, mix.phi, mix.is_solid, mix.swelling,
                                      rho, formulation.liquid.density_kg_per_m3)


def scaled_solid_mass_fraction(phi_solids_effective, phi, is_solid, swelling, density_kg_per_m3,
                               liquid_density_kg_per_m3):
    """Total mass fraction of the solids (N,) when each row's solids are scaled, along their
    shares of the effective volume, to effective fraction `phi_solids_effective` (N,).

    Per-ingredient arrays (volume fractions `phi`, `is_solid`, `swelling`, densities) are
    (K,) or (N, K); droplets keep their volume fraction. The one scaling of
    `solid_mass_fraction` and the batch's highest loadings.
    """
    phi_eff = np.atleast_1d(np.asarray(phi_solids_effective, dtype=float))
    solid = np.asarray(is_solid, dtype=bool)
    phi = np.asarray(phi, dtype=float)
    shares = np.where(solid, phi * swelling, 0.0)
    total = shares.sum(axis=-1, keepdims=True)
    even = solid / np.maximum(solid.sum(axis=-1, keepdims=True), 1)
    shares = np.where(total > 0, shares / np.where(total > 0, total, 1.0), even)
    bare = phi_eff[:, None] * shares / swelling            # real solid volume per ingredient
    drops = np.where(solid, 0.0, phi)
    phi_all = np.clip(bare + drops, 0.0, None)
    phi_all = phi_all / np.maximum(phi_all.sum(axis=1, keepdims=True), 1.0)
    w = composition.mass_fractions(phi_all, density_kg_per_m3, liquid_density_kg_per_m3)
    return np.where(solid, w, 0.0).sum(axis=1)


def max_loading(formulation: Formulation, viscosity_limit_Pa_s: float,
                shear_rate_1_per_s: float = 1.0) -> float:
    """Highest effective solid volume fraction whose viscosity at a shear rate stays under a limit.

    The solids are scaled along their shares (droplets stay); the viscosity at the shear
    rate comes from the full flow curve, so thinning, thickening and a non-Newtonian
    liquid count. The one solver `engine.max_loading` (a bracketing search to 1e-9 in phi, which
    also gives the limiting reason); returns 0 when the liquid alone (with its droplets)
    already exceeds the limit.

    Parameters
    ----------
    formulation : Formulation
    viscosity_limit_Pa_s : float
        Highest acceptable viscosity. [Pa*s]
    shear_rate_1_per_s : float
        Shear rate at which the limit applies. [1/s]

    Returns
    -------
    float
        Total effective solid volume fraction. [-]
    """
    from . import flowset

    fs = flowset.from_rows([row_inputs(formulation)])
    phi, reason = flowset.max_loading(fs, viscosity_limit_Pa_s, shear_rate_1_per_s)
    if reason[0] == "liquid":
        rate = float(shear_rate_1_per_s)
        eta = float(flowset.evaluate(fs.at_loading(0.0), [rate]).viscosity_Pa_s[0, 0])
        warnings.warn(f"even the liquid without solids (with its droplets, if any) is "
                      f"{eta:.4g} Pa*s at {rate:g} 1/s, above the limit "
                      f"{float(viscosity_limit_Pa_s):.4g} Pa*s: no solid loading meets it "
                      "(the answer 0 means none).", UserWarning, stacklevel=2)
    return float(phi[0])


def require_solid(mix: Mixture) -> Mixture:
    """`mix`, or `InputRangeError` when it has no solid ingredient to scale: the solids
    questions (`max_loading`, a loading sweep) are not asked of droplets alone."""
    if not mix.is_solid.any():
        raise InputRangeError("ingredients", "no solid",
                              "at least one solid ingredient to scale (for droplets, use the "
                              "phase-ratio questions in predictor.phase_ratio)")
    return mix


def with_solids_scaled(formulation: Formulation, phi_solids_effective: float) -> Formulation:
    """A copy of `formulation` whose solids sit at a new total effective volume fraction."""
    mix = mixture(formulation)
    if mix.phi_solids_effective <= 0:
        raise InputRangeError("solid loading", 0.0, "a formulation with some solid to scale")
    factor = phi_solids_effective / mix.phi_solids_effective
    new = []
    for k, ing in enumerate(formulation.ingredients):
        if ing.kind == SOLID:
            new.append(dataclasses.replace(ing, loading=float(mix.phi[k] * factor),
                                           basis="volume"))
        else:
            new.append(dataclasses.replace(ing, loading=float(mix.phi[k]), basis="volume"))
    return dataclasses.replace(formulation, ingredients=tuple(new))


# --- particle interactions (predictor.interactions) in a formulation ---------------------


@dataclass(frozen=True)
class ParticleInteraction:
    """Interactions of one solid ingredient (see `particle_interactions`).

    `separation_m` is the contact separation H that `interactions.yodel_yield_stress`
    uses (inf when stable); `detail` the full `interactions.StabilityVerdict` when the
    verdict was computed from a surface potential, None when the user stated "flocculated".
    """

    ingredient: str
    verdict: str
    stated: bool
    hamaker_J: float
    diameter_m: float
    separation_m: float
    size_factor: float
    detail: interactions.StabilityVerdict | None


def particle_interactions(formulation: Formulation) -> tuple[ParticleInteraction, ...]:
    """Verdict of every solid that carries interactions (surface potential or flocculated).

    A surface potential gives `interactions.stability_verdict` for the ingredient's Sauter
    diameter, its adsorbed layer and the liquid's salt, temperature and permittivity. A
    stated flocculated state has its contacts at twice the layer thickness, or at
    `interactions.CLOSEST_APPROACH_m` without a layer. The YODEL size is the volume median
    diameter with `interactions.yodel_size_factor` of the distribution.
    """
    liq = formulation.liquid
    found = []
    for ing in formulation.ingredients:
        if ing.kind != SOLID or not (ing.flocculated or ing.surface_potential_V is not None):
            continue
        dist = ing.distribution()
        d50, sauter, factor = _sizes_of(dist)
        if ing.flocculated:
            found.append(ParticleInteraction(
                ing.name, "flocculated", True, ing.hamaker_J, d50,
                max(2.0 * ing.layer_thickness_m, interactions.CLOSEST_APPROACH_m), factor, None))
            continue
        detail = _verdict(sauter, ing.hamaker_J, ing.surface_potential_V,
                          liq.ionic_strength_mol_per_L, ing.layer_thickness_m, liq.temperature_K,
                          liq.relative_permittivity)
        found.append(ParticleInteraction(ing.name, detail.verdict, False, ing.hamaker_J,
                                         d50, detail.bond_separation_m, factor, detail))
    return tuple(found)


# Sweeps and bisections ask the same questions many times: each answer is kept once.
@functools.lru_cache(maxsize=256)
def _verdict(*args) -> interactions.StabilityVerdict:
    """`interactions.stability_verdict`, once per set of inputs."""
    return interactions.stability_verdict(*args)


@functools.lru_cache(maxsize=256)
def _sizes_of(dist: sizes.SizeDistribution) -> tuple[float, float, float]:
    """(volume median diameter, Sauter diameter, YODEL size factor) of a distribution."""
    factor = interactions.yodel_size_factor(dist.diameters_m, dist.fractions)
    return dist.d50_m, dist.sauter_diameter_m, float(np.clip(factor, 0.01, 100.0))


def flocculation_yield_stress(formulation: Formulation, mix: Mixture | None = None,
                              phi_solids_effective=None):
    """Yield stress of the flocculated solids' network at the mixture's loading. [Pa]

    At `phi_solids_effective` (an array: the loading sweep) when given, else at the
    mixture's own effective solid fraction (a float).

    `interactions.yodel_yield_stress` at the total effective solid fraction and the
    solids' phi_max, for each solid whose verdict (`particle_interactions`) is
    "flocculated" or "weakly flocculated", weighted by its share of the solids' effective
    volume (our own mixing rule, common practice, no source). The percolation threshold is
    `interactions.YODEL_PERCOLATION`, lowered to half of phi_max for very loose packings;
    contacts held beyond 1 um (very weak secondary minima) are taken at 1 um, where the
    yield stress is negligible. 0 when no solid is flocculated or below percolation; inf at
    and above phi_max.
    """
    network = flocculation_network(formulation, mix)
    phi = None if phi_solids_effective is None else np.asarray(phi_solids_effective, float)
    if network is None:
        return 0.0 if phi is None else np.zeros_like(phi)
    mix = mix or mixture(formulation)
    tau = network_yield_stress(network, mix.phi_solids_effective if phi is None else phi)
    return float(tau) if np.ndim(tau) == 0 else tau


def flocculation_network(formulation: Formulation, mix: Mixture | None = None):
    """What `flocculation_yield_stress` needs beyond the loading, or None (no network).

    (percolation threshold, phi_max, ((share, diameter_m, hamaker_J, separation_m,
    size_factor), ...)): constant while the solids are scaled along their shares, so the
    engine carries it per row and `network_yield_stress` gives the yield stress at any
    loading. The one-row case of `_networks`.
    """
    return _networks(formulation, (mix or mixture(formulation)).rows())[0]


def _networks(formulation: Formulation, mix: Mixture) -> np.ndarray:
    """`flocculation_network` of each row (N,) of a `mixtures` result (object array)."""
    n = mix.phi.shape[0]
    out = np.full(n, None, dtype=object)
    states = [s for s in particle_interactions(formulation) if s.verdict != "stable"]
    if not states:
        return out
    names = [i.name for i in formulation.ingredients]
    volume = np.where(mix.is_solid, mix.phi * mix.swelling, 0.0)
    total = volume.sum(axis=1)
    phi0 = np.minimum(interactions.YODEL_PERCOLATION, 0.5 * mix.phi_max)
    picked = [names.index(state.ingredient) for state in states]
    for i in range(n):
        terms = tuple(
            (float(volume[i, k] / total[i]) if total[i] > 0 else 1.0 / len(states),
             float(state.diameter_m), float(state.hamaker_J),
             float(min(state.separation_m, 1e-6)), float(state.size_factor))
            for k, state in zip(picked, states, strict=True))
        out[i] = (float(phi0[i]), float(mix.phi_max[i]), terms)
    return out


def _with_added_yield_stress(curve: shear.FlowCurve, yield_stress_Pa: float) -> shear.FlowCurve:
    """The flow curve with a network yield stress added to its stress (Herschel-Bulkley-like:
    sigma = tau_y + sigma_suspension(rate)), on top of any yield stress of the liquid.

    YODEL gives the suspension's own yield stress, so it is added as it is, not scaled by
    the suspension factor that a liquid's yield stress gets in `shear.flow_curve`. Marker
    ``flocculation_yield_stress_Pa`` (only when > 0).
    """
    if yield_stress_Pa <= 0:
        return curve
    sigma, viscosity, regime = add_yield_stress(curve.shear_rate_1_per_s,
                                                curve.shear_stress_Pa, curve.regime,
                                                yield_stress_Pa)
    markers = dict(curve.markers, flocculation_yield_stress_Pa=float(yield_stress_Pa))
    markers["apparent_yield_stress_Pa"] = markers.get("apparent_yield_stress_Pa", 0.0) \
        + yield_stress_Pa
    note = (f"Flocculated solids: their network adds a yield stress of {yield_stress_Pa:.3g} Pa "
            "(YODEL, Flatt & Bowen 2006) to the flow curve.")
    return dataclasses.replace(curve, shear_stress_Pa=sigma, viscosity_Pa_s=viscosity,
                               relative_viscosity=viscosity / curve.liquid_viscosity_Pa_s,
                               regime=regime, markers=markers,
                               warnings=tuple(curve.warnings) + (note,))


def interaction_rows(formulation: Formulation) -> list[dict]:
    """`particle_interactions` as plain rows for tables, the CLI and the report.

    Keys: ingredient, verdict, basis ("stated" or "pair energy"), barrier_kT,
    secondary_minimum_kT, reachable_well_kT, debye_length_m, kappa_a, criterion, notes
    (nan / "" where the state was stated by the user).
    """
    rows = []
    for s in particle_interactions(formulation):
        d = s.detail
        rows.append({
            "ingredient": s.ingredient, "verdict": s.verdict,
            "basis": "stated" if s.stated else "pair energy",
            "barrier_kT": d.barrier_kT if d else float("nan"),
            "secondary_minimum_kT": d.secondary_minimum_kT if d else float("nan"),
            "reachable_well_kT": d.reachable_well_kT if d else float("nan"),
            "debye_length_m": d.debye_length_m if d else float("nan"),
            "kappa_a": d.kappa_a if d else float("nan"),
            "criterion": d.criterion if d else "stated by the user",
            "notes": " ".join(d.notes) if d else "",
        })
    return rows
