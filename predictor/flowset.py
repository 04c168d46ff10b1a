"""The struct-of-arrays set of N formulations and its solve at M shear rates.

The core of the one engine (`predictor.engine` is its entry point and re-exports these
names): a `FormulationSet` holds the resolved inputs of N formulations as arrays (one
element per row); `evaluate` solves every row at M shear rates with `shear.flow_curves`,
the solve of `shear.flow_curve` vectorised over rows; `max_loading` is the one
highest-loading solver. `formulation.row_inputs` turns a formulation into a row. No pandas.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from . import interactions, liquids, shear
from .errors import InputRangeError, ValidityWarning
from .registry import get_model
from .viscosity import relative_viscosity

#: Final bracket width of `max_loading` on the effective solid volume fraction. [-]
LOADING_TOLERANCE = 1e-9

#: Evenly spaced trial loadings per engine call that `max_loading` adds on a row whose
#: curve jumps: its bracket shrinks 8 times per call (bisection: 2), in about the same
#: number of evaluations. The same on every row, so a row's answer does not depend on the
#: other rows of the set.
GRID_POINTS = 7

#: Zero-shear over high-shear packing limit of Brownian hard spheres, 0.63/0.71 (de Kruif et
#: al., J. Chem. Phys. 83, 4717, 1985; from memory, not checked against the source).
ZERO_SHEAR_RATIO = 0.63 / 0.71


def droplet_medium(model: str, params: dict, phi_droplets, phi_solids):
    """Relative viscosity of droplets in the liquid, vectorised over rows (1 without).

    The droplets' fraction is counted in the liquid + droplets: phi_d / (1 - phi_solids).
    Through the dispatcher, so that droplets past a relation's range are reported.
    """
    phi_d = np.asarray(phi_droplets, dtype=float)
    has = phi_d > 0.0
    if not np.any(has):
        return np.ones(np.shape(phi_d)) if np.ndim(phi_d) else 1.0
    share = np.minimum(phi_d / np.maximum(1.0 - np.asarray(phi_solids, float), 1e-12), 1.0)
    value = relative_viscosity(np.where(has, share, 0.0), model=model, **params)
    return np.where(has, value, 1.0)


def jammed_note(phi, phi_droplets) -> str:
    """The note of a row whose solids and droplets together leave no liquid to flow in."""
    return (f"phi = {phi:.3g} of solids with droplets at {phi_droplets:.3g}: the dispersed "
            "phases are jammed; no flow is predicted.")


def add_yield_stress(shear_rate_1_per_s, shear_stress_Pa, regime, yield_stress_Pa):
    """A network yield stress added to flow curves (Herschel-Bulkley-like), array-wise.

    sigma = tau_y + sigma_suspension(rate); "yield" where tau_y carries more than half the
    stress (jammed points stay jammed). Arrays broadcast: rates (M,), stresses and regimes
    (M,) or (N, M), tau_y a float or (N, 1). Returns (stress, viscosity, regime).
    """
    tau = np.asarray(yield_stress_Pa, dtype=float)
    sigma = np.asarray(shear_stress_Pa, dtype=float) + tau
    regime = np.asarray(regime)
    regime = np.where((tau > 0) & (sigma < 2.0 * tau) & (regime != "jammed"), "yield", regime)
    return sigma, sigma / shear_rate_1_per_s, regime.astype(str)


def network_yield_stress(network, phi_solids_effective):
    """Yield stress [Pa] of a `flocculation_network` at effective solid fractions (0 if None)."""
    phi = np.asarray(phi_solids_effective, dtype=float)
    if network is None:
        return 0.0 if phi.ndim == 0 else np.zeros_like(phi)
    phi0, phi_max, terms = network
    tau = 0.0
    for share, diameter, hamaker, separation, size_factor in terms:
        tau = tau + share * interactions.yodel_yield_stress(
            np.minimum(phi, 1.0), phi0, phi_max, diameter, hamaker, separation,
            size_factor=size_factor)
    return float(tau) if np.ndim(tau) == 0 else tau



@dataclass(frozen=True)
class FormulationSet:
    """N formulations as arrays, one element per row (build with `stack` or `vary`).

    Text fields (`liquid_law`, `relation`, `droplet_model`) are arrays of str; parameter
    dicts map a parameter name to an array (N,), ``nan`` in rows where it does not apply.
    ``nan`` in `onset_stress_Pa`, `phi_max_frictional` or `radius_m` switches thickening or
    Brownian thinning off in that row. `yield_stress_Pa` is added to the liquid law's own
    yield stress (0 by default); `network` holds each row's flocculated network (None: none),
    whose yield stress at the row's loading is added to the suspension's stress.
    """

    phi: np.ndarray                   # effective solid volume fraction (with layers) [-]
    phi_solids: np.ndarray            # bare solid volume fraction [-]
    swelling: np.ndarray              # effective over bare solid volume [-]
    phi_droplets: np.ndarray          # droplet volume fraction [-]
    phi_max: np.ndarray               # high-shear packing limit of the solids [-]
    phi_max_frictional: np.ndarray    # frictional packing limit, nan: no thickening [-]
    onset_stress_Pa: np.ndarray       # onset of frictional thickening, nan: none [Pa]
    radius_m: np.ndarray              # Brownian (Sauter) radius of the solids, nan: none [m]
    temperature_K: np.ndarray
    yield_stress_Pa: np.ndarray       # added to the liquid law's yield stress [Pa]
    has_solids: np.ndarray            # bool: some solid ingredient to scale
    liquid_law: np.ndarray
    liquid_params: dict
    relation: np.ndarray
    relation_params: dict
    droplet_model: np.ndarray
    droplet_params: dict
    network: np.ndarray               # object: `formulation.flocculation_network` or None

    def __len__(self) -> int:
        return int(self.phi.size)

    def take(self, rows) -> FormulationSet:
        """The set of the selected rows (boolean mask or indices)."""
        changes = {}
        for f in dataclasses.fields(self):
            value = getattr(self, f.name)
            changes[f.name] = ({k: v[rows] for k, v in value.items()}
                               if isinstance(value, dict) else value[rows])
        return FormulationSet(**changes)

    def distinct(self, *extra) -> tuple[np.ndarray, np.ndarray]:
        """Indices of the distinct rows (with `extra` per-row arrays) and the inverse map.

        ``fs.take(first)`` holds each distinct row once; ``inverse`` maps every row to its
        position there. Tables of designed experiments repeat formulations many times.
        """
        n = len(self)
        columns = []
        for f in dataclasses.fields(self):
            value = getattr(self, f.name)
            for v in (value.values() if isinstance(value, dict) else (value,)):
                v = np.asarray(v)
                columns.append(_codes(v.ravel()) if v.dtype.kind in "OUS" else v)
        columns += [np.asarray(e, dtype=float).reshape(n, -1) for e in extra]
        columns = [c for v in columns for c in np.asarray(v, dtype=float).reshape(n, -1).T]
        # Each value as its bits (one NaN, one zero), and a 64-bit hash of each row: one sort
        # of n integers, not a lexicographic sort of rows; checked exactly below.
        bits = [np.where(np.isnan(c), np.nan, c + 0.0).view(np.uint64) for c in columns]
        hashed = np.zeros(n, dtype=np.uint64)
        mix = np.uint64(0x9E3779B97F4A7C15)
        with np.errstate(over="ignore"):
            for b in bits:
                hashed = (hashed ^ (b + (hashed << np.uint64(6)) + (hashed >> np.uint64(2)))) * mix
        _, first, inverse = np.unique(hashed, return_index=True, return_inverse=True)
        inverse = inverse.ravel()
        if not all(np.array_equal(b[first][inverse], b) for b in bits):   # a collision
            table = np.ascontiguousarray(np.column_stack(bits))
            keys = table.view(np.dtype((np.void, table.shape[1] * 8))).ravel()
            _, first, inverse = np.unique(keys, return_index=True, return_inverse=True)
        return first, inverse.ravel()

    def at_loading(self, phi) -> FormulationSet:
        """The set with each row's solids scaled, along their shares, to effective `phi`.

        Droplets keep their volume fraction; the packing limit is unchanged (the shares
        are), as in `formulation.max_loading`.
        """
        phi = np.broadcast_to(np.asarray(phi, dtype=float), self.phi.shape).copy()
        return dataclasses.replace(self, phi=phi, phi_solids=phi / self.swelling)


@dataclass(frozen=True)
class Result:
    """`evaluate`'s answer: arrays (N, M) over rows and rates, and (N,) per row."""

    shear_rate_1_per_s: np.ndarray    # (M,)
    viscosity_Pa_s: np.ndarray        # (N, M), inf where jammed
    shear_stress_Pa: np.ndarray       # (N, M)
    relative_viscosity: np.ndarray    # (N, M), over the liquid at the same rate
    liquid_viscosity_Pa_s: np.ndarray  # (N, M)
    regime: np.ndarray                # (N, M) str, one of shear.REGIMES
    phi: np.ndarray                   # (N,) effective solids volume fraction
    phi_max: np.ndarray               # (N,) packing limit of each row
    apparent_yield_stress_Pa: np.ndarray  # (N,)
    dst_low_1_per_s: np.ndarray       # (N,) discontinuous thickening range, nan if none
    dst_high_1_per_s: np.ndarray
    shear_jamming_1_per_s: np.ndarray  # (N,) rate above which the row jams, nan if none

    @property
    def headroom(self) -> np.ndarray:
        """phi / phi_max of each row (1 = jammed)."""
        return np.where(self.phi_max > 0, self.phi / np.where(self.phi_max > 0,
                                                              self.phi_max, 1.0), 0.0)


def from_rows(rows: Sequence[Mapping]) -> FormulationSet:
    """A `FormulationSet` from row dicts with the fields of `FormulationSet`.

    Scalars broadcast; parameter dicts are merged by name (``nan`` where a row lacks one).
    """
    out = {}
    for f in dataclasses.fields(FormulationSet):
        values = [r[f.name] for r in rows]
        if f.name.endswith("_params"):
            names = sorted({k for v in values for k in v})
            out[f.name] = {k: np.array([float(v.get(k, np.nan)) for v in values])
                           for k in names}
        elif f.name in ("liquid_law", "relation", "droplet_model"):
            out[f.name] = np.array(values, dtype=object)
        elif f.name == "has_solids":
            out[f.name] = np.array(values, dtype=bool)
        elif f.name == "network":
            out[f.name] = np.empty(len(values), dtype=object)
            out[f.name][:] = values
        else:
            out[f.name] = np.array(values, dtype=float)
    return FormulationSet(**out)


def _codes(values: np.ndarray) -> np.ndarray:
    """Integer codes of the distinct objects of a 1-D array (by their text if unhashable)."""
    try:
        uniques = list(dict.fromkeys(values.tolist()))
    except TypeError:
        values = np.array([str(x) for x in values], dtype=object)
        uniques = list(dict.fromkeys(values.tolist()))
    if len(uniques) > 16:
        index = {u: i for i, u in enumerate(uniques)}
        return np.fromiter((index[x] for x in values.tolist()), dtype=float, count=len(values))
    codes = np.zeros(len(values))
    for i, u in enumerate(uniques[1:], start=1):
        codes[values == u] = i
    return codes


def _rates(shear_rate_1_per_s, n: int) -> np.ndarray:
    rates = np.atleast_1d(np.asarray(shear_rate_1_per_s, dtype=float))
    if rates.ndim == 2 and rates.shape[0] != n or rates.ndim > 2:
        raise InputRangeError("shear_rate_1_per_s", f"an array of shape {rates.shape}",
                              f"rates (M,) shared by the rows, or ({n}, M)")
    bad = ~(np.isfinite(rates) & (rates > 0))
    if rates.size == 0 or np.any(bad):
        raise InputRangeError("shear_rate_1_per_s", rates[bad][0] if bad.any() else "none",
                              "positive, finite shear rates")
    return rates


def _groups(*labels: np.ndarray):
    """Row indices of each distinct combination of the label arrays."""
    codes = np.zeros(len(labels[0]), dtype=np.int64)
    for lab in labels:
        lab = np.asarray(lab).ravel()
        inverse = _codes(lab if lab.dtype.kind == "O" else lab.astype(str).astype(object))
        inverse = inverse.astype(np.int64)
        codes = codes * (int(inverse.max(initial=0)) + 1) + inverse
    order = np.argsort(codes, kind="stable")
    cuts = np.flatnonzero(np.diff(codes[order])) + 1
    yield from (part for part in np.split(order, cuts) if part.size)


def _params(params: dict, rows: np.ndarray, spec) -> dict:
    """The parameters of `spec` for rows, from the merged parameter dict."""
    return {k: params[k][rows] for k in spec.param_names() if k in params}


def medium_factor(fs: FormulationSet) -> np.ndarray:
    """Relative viscosity of each row's droplets in the liquid (1 without droplets)."""
    out = np.ones(len(fs))
    has = fs.phi_droplets > 0
    for rows in _groups(fs.droplet_model[has]):
        sel = np.flatnonzero(has)[rows]
        spec = get_model(fs.droplet_model[sel[0]], kind="emulsion")
        out[sel] = droplet_medium(spec.name, _params(fs.droplet_params, sel, spec),
                                     fs.phi_droplets[sel], fs.phi_solids[sel])
    return out


def row_notes(fs: FormulationSet) -> tuple[np.ndarray, np.ndarray]:
    """The notes of each row at its own loading, as (flow notes, droplet notes), (N,) str.

    Flow notes: those `formulation.flow_curve_of` gives the row (`jammed_note` for
    dispersed phases that are jammed, else `shear.flow_notes`, the wording of
    `shear.flow_curve`); droplet notes: the droplets' relation used outside its validity
    range, the message `droplet_medium` warns. Each joined with "; ", "" where none.
    """
    n = len(fs)
    flow = np.full(n, "", dtype=object)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        medium = medium_factor(fs)
    jammed = (fs.phi >= 1.0) | ~np.isfinite(medium)
    flow[jammed] = shear._worded(np.ones(int(jammed.sum()), bool), jammed_note,
                                 fs.phi[jammed], fs.phi_droplets[jammed])
    live = np.flatnonzero(~jammed)
    for rows in _groups(fs.relation[live]):
        sel = live[rows]
        rel = get_model(fs.relation[sel[0]], kind="suspension")
        flow[sel] = shear.flow_notes(
            fs.phi[sel], relation=rel.name, relation_params=_params(fs.relation_params, sel, rel),
            phi_max_zero_shear=ZERO_SHEAR_RATIO * fs.phi_max[sel],
            phi_max_high_shear=fs.phi_max[sel], phi_max_frictional=fs.phi_max_frictional[sel],
            onset_stress_Pa=fs.onset_stress_Pa[sel], radius_m=fs.radius_m[sel],
            temperature_K=fs.temperature_K[sel])
    drops = np.full(n, "", dtype=object)
    has = np.flatnonzero(fs.phi_droplets > 0)
    for rows in _groups(fs.droplet_model[has]):
        sel = has[rows]
        spec = get_model(fs.droplet_model[sel[0]], kind="emulsion")
        names = list(spec.defaults())
        given = _params(fs.droplet_params, sel, spec)
        params = {k: given.get(k, np.full(sel.size, v)) for k, v in spec.defaults().items()}
        share = np.minimum(fs.phi_droplets[sel] / np.maximum(1.0 - fs.phi_solids[sel], 1e-12),
                           1.0)
        x = share / params.get("phi_max", 1.0) if spec.phi_range_relative else share
        low, high = spec.phi_range
        drops[sel] = shear._worded((x < low) | (x > high), lambda s, *v, spec=spec, names=names: (
            spec.validity_message(s, dict(zip(names, v, strict=True))) or ""),
            share, *(params[k] for k in names))
    return flow, drops


def evaluate(fs: FormulationSet, shear_rate_1_per_s, regimes: bool = True) -> Result:
    """Flow curves of every row of `fs` at the shear rates (M,), shared by all rows.

    Rows are grouped by liquid law and relation; each group is one call of
    `shear.flow_curves` (the solve of `shear.flow_curve`, vectorised over rows). A row whose
    solids are at or above the packing limit, or whose dispersed phases are jammed, gets
    ``inf`` viscosity and the regime "jammed" at every rate.

    Parameters
    ----------
    fs : FormulationSet
    shear_rate_1_per_s : float or array_like
        Shear rates, > 0: (M,) shared by all rows, or (N, M) one set per row. [1/s]
    regimes : bool, optional
        Label each point's regime (`shear.flow_curves`); `max_loading`'s search, which
        needs only the viscosity, turns it off.

    Returns
    -------
    Result
    """
    n = len(fs)
    rates = _rates(shear_rate_1_per_s, n)
    if rates.ndim == 1:                     # each distinct rate solved once (a map's window
        unique, back = np.unique(rates, return_inverse=True)    # often shares its rate)
        if unique.size < rates.size:
            res = evaluate(fs, unique, regimes)
            return Result(rates, *(value[:, back] if value.ndim == 2 else value
                                   for value in (getattr(res, f.name)
                                                 for f in dataclasses.fields(Result)[1:])))
    if n > 64:                              # each distinct row (and its rates) solved once
        first, inverse = fs.distinct(*(() if rates.ndim == 1 else (rates,)))
        if first.size < 0.9 * n:
            res = evaluate(fs.take(first), rates if rates.ndim == 1 else rates[first], regimes)
            return Result(res.shear_rate_1_per_s if rates.ndim == 1 else rates,
                          *(getattr(res, f.name)[inverse]
                            for f in dataclasses.fields(Result)[1:]))
    m = rates.shape[-1]
    medium = medium_factor(fs)
    full = np.full((n, m), np.inf)
    out = {"sigma": full.copy(), "eta": full.copy(), "eta_l": np.full((n, m), np.nan),
           "regime": np.full((n, m), "jammed", dtype=object), "ys": np.zeros(n),
           "low": np.full(n, np.nan), "high": np.full(n, np.nan), "jam": np.zeros(n)}
    alive = (fs.phi < 1.0) & np.isfinite(medium)
    idx = np.flatnonzero(alive)
    for rows in _groups(fs.liquid_law[alive], fs.relation[alive]):
        sel = idx[rows]
        law = get_model(fs.liquid_law[sel[0]], kind="liquid")
        rel = get_model(fs.relation[sel[0]], kind="suspension")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityWarning)
            fc = shear.flow_curves(
                rates if rates.ndim == 1 else rates[sel], fs.phi[sel], liquid_law_name=law.name,
                liquid_params=_params(fs.liquid_params, sel, law),
                medium_factor=medium[sel], relation=rel.name,
                relation_params=_params(fs.relation_params, sel, rel),
                phi_max_zero_shear=ZERO_SHEAR_RATIO * fs.phi_max[sel],
                phi_max_high_shear=fs.phi_max[sel],
                phi_max_frictional=fs.phi_max_frictional[sel],
                onset_stress_Pa=fs.onset_stress_Pa[sel], radius_m=fs.radius_m[sel],
                temperature_K=fs.temperature_K[sel], yield_stress_Pa=fs.yield_stress_Pa[sel],
                regimes=regimes)
        out["sigma"][sel], out["eta"][sel] = fc.shear_stress_Pa, fc.viscosity_Pa_s
        out["eta_l"][sel], out["regime"][sel] = fc.liquid_viscosity_Pa_s, fc.regime
        out["ys"][sel], out["low"][sel] = fc.apparent_yield_stress_Pa, fc.dst_low_1_per_s
        out["high"][sel], out["jam"][sel] = fc.dst_high_1_per_s, fc.shear_jamming_1_per_s
    dead = np.flatnonzero(~alive)
    for rows in _groups(fs.liquid_law[dead]):     # the liquid's own curve beside a jam
        sel = dead[rows]
        spec = get_model(fs.liquid_law[sel[0]], kind="liquid")
        params = {k: v[:, None] for k, v in _params(fs.liquid_params, sel, spec).items()}
        out["eta_l"][sel] = liquids.liquid_law(spec.name, **params).viscosity(
            rates if rates.ndim == 1 else rates[sel])
    nets = np.flatnonzero(np.array([x is not None for x in fs.network], dtype=bool))
    for rows in _groups(np.array([str(x) for x in fs.network[nets]])):   # flocculated
        sel = nets[rows]
        tau = np.asarray(network_yield_stress(fs.network[sel[0]], fs.phi[sel]))[:, None]
        sigma, eta, regime = add_yield_stress(rates if rates.ndim == 1 else rates[sel],
                                                 out["sigma"][sel], out["regime"][sel], tau)
        out["sigma"][sel], out["eta"][sel], out["regime"][sel] = sigma, eta, regime
        out["ys"][sel] += tau[:, 0]
    with np.errstate(invalid="ignore"):
        relative = out["eta"] / out["eta_l"]
    return Result(rates, out["eta"], out["sigma"], relative, out["eta_l"],
                  out["regime"].astype(str), fs.phi.copy(), fs.phi_max.copy(), out["ys"],
                  out["low"], out["high"], out["jam"])


def max_loading(fs: FormulationSet, viscosity_limit_Pa_s, shear_rate_1_per_s=1.0,
                tolerance: float = LOADING_TOLERANCE, upper=None):
    """Highest effective solid fraction of each row whose viscosity stays under a limit.

    The one solver of the question "how much can I load": each row's solids are scaled
    along their shares (droplets stay, `FormulationSet.at_loading`), and the viscosity at
    the shear rate comes from `evaluate`, so thinning, thickening and non-Newtonian
    liquids count. A bracketing search vectorised over rows (regula falsi, with several
    evenly spaced trial loadings per call where the curve jumps, see the comments) narrows
    [0, phi_max] to `tolerance`; packing-limited rows answer phi_max (1 - 1e-9). The
    viscosity is taken to rise with loading; where it jumps up and falls back, the answer
    is a crossing of the limit, not necessarily the lowest.

    Parameters
    ----------
    fs : FormulationSet
    viscosity_limit_Pa_s : float or array_like
        Highest acceptable viscosity, per row or shared. [Pa*s]
    shear_rate_1_per_s : float or array_like
        Shear rate at which the limit applies, per row or shared. [1/s]
    tolerance : float
        Width of the final bracket in phi. [-]
    upper : float or array_like, optional
        Upper end of the search per row; default the packing limit phi_max (a relation
        without a packing limit may set its own, see `design`). [-]

    Returns
    -------
    phi : numpy.ndarray
        (N,) effective solid volume fraction; 0 where the liquid alone exceeds the limit.
        Validity warnings of the trial loadings are not raised.
    limited_by : numpy.ndarray
        (N,) str: "viscosity" (the limit is reached), "liquid" (the liquid with its
        droplets already exceeds it) or "packing" (the limit is not reached below phi_max).

    Raises
    ------
    InputRangeError
        A limit or shear rate not positive and finite; a row without solid to scale.
    """
    n = len(fs)
    limit = np.broadcast_to(np.asarray(viscosity_limit_Pa_s, dtype=float), (n,))
    if not np.all(np.isfinite(limit) & (limit > 0)):
        raise InputRangeError("viscosity_limit_Pa_s", limit[~(np.isfinite(limit) & (limit > 0))]
                              [0], "a positive, finite viscosity")
    rate = np.broadcast_to(np.asarray(shear_rate_1_per_s, dtype=float), (n,))
    if not np.all(np.isfinite(rate) & (rate > 0)):
        raise InputRangeError("shear_rate_1_per_s", rate[~(np.isfinite(rate) & (rate > 0))][0],
                              "a positive, finite shear rate")
    if not np.all(fs.has_solids):
        raise InputRangeError("ingredients", "no solid",
                              "at least one solid ingredient to scale (for droplets, use the "
                              "phase-ratio questions in predictor.phase_ratio)")
    if n > 64:                              # each distinct (row, limit, rate) solved once
        first, inverse = fs.distinct(limit, rate)
        if first.size < 0.9 * n:
            phi, reason = max_loading(fs.take(first), limit[first], rate[first],
                                      tolerance, None if upper is None else
                                      np.broadcast_to(np.asarray(upper, float), (n,))[first])
            return phi[inverse], reason[inverse]
    rates = rate[:, None]

    def excess(phi, rows):
        """ln(eta / limit) of the rows at phi; +inf where jammed or not a number."""
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityWarning)
            res = evaluate(fs.take(rows).at_loading(phi), rates[rows], regimes=False)
        eta = res.viscosity_Pa_s[:, 0]
        with np.errstate(divide="ignore", invalid="ignore"):
            out = np.log(eta / limit[rows])
        return np.where(np.isnan(out), np.inf, out)    # too thick: excess >= 0

    every = np.arange(n)
    top_phi = fs.phi_max if upper is None else np.broadcast_to(np.asarray(upper, float), (n,))
    top = np.array(top_phi, dtype=float) * (1.0 - 1e-9)
    r_low = excess(np.zeros(n), every)
    r_high = excess(top, every)
    thick0, roomy = r_low >= 0, r_high < 0
    phi = np.where(thick0, 0.0, top)
    reason = np.where(thick0, "liquid", np.where(roomy, "packing", "viscosity")).astype(str)
    # Regula falsi (Illinois) on the bracket [ok, too thick], interpolating in
    # u = -ln(1 - phi/phi_top), where ln(eta) of a relation diverging at phi_top is nearly
    # straight; each step evaluates the two points half a tolerance either side of the
    # estimate, so an accurate estimate closes the bracket at once. A row whose step did not
    # halve the bracket (a jump in the curve; from then on, every step) or whose excess is
    # not finite also gets `GRID_POINTS` evenly spaced points across its bracket in the same
    # engine call (a multi-point search: the bracket shrinks GRID_POINTS + 1 times per call
    # where bisection halved it, whose points include). The new bracket is [the last point
    # under the limit, the first over it]. The answer is the lower end: a crossing of the
    # limit; where the curve jumps up and falls back, not necessarily the first one.
    rows = np.flatnonzero(~thick0 & ~roomy)
    low, high = np.zeros(n), top.copy()
    side = np.zeros(n, int)
    slow = np.zeros(n, bool)
    end_all = np.asarray(top_phi, dtype=float)
    for _ in range(300):
        rows = rows[high[rows] - low[rows] > tolerance]
        if rows.size == 0:
            break
        lo, hi, f_lo, f_hi = low[rows], high[rows], r_low[rows], r_high[rows]
        finite = np.isfinite(f_lo) & np.isfinite(f_hi) & (f_hi > f_lo)
        ok = finite & ~slow[rows]
        end = end_all[rows]
        u_lo, u_hi = -np.log1p(-lo / end), -np.log1p(-hi / end)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            u = u_lo - f_lo * (u_hi - u_lo) / np.where(finite, f_hi - f_lo, 1.0)
            x = np.where(finite, -end * np.expm1(-u), 0.5 * (lo + hi))
        width = hi - lo
        step = np.minimum(0.49 * tolerance, 0.25 * width)
        x = np.where(np.isfinite(x), x, 0.5 * (lo + hi))
        pair = np.stack([np.clip(x - step, lo + step, hi - 3 * step),
                         np.clip(x + step, lo + 3 * step, hi - step)])       # (2, r)
        grid_rows = np.flatnonzero(~ok)
        k = GRID_POINTS
        fractions = np.arange(1, k + 1) / (k + 1.0)
        grid = lo[grid_rows] + width[grid_rows] * fractions[:, None]          # (k, g)
        f_all = excess(np.concatenate([pair.ravel(), grid.ravel()]),
                       np.concatenate([rows, rows, np.tile(rows[grid_rows], k)]))
        points = np.vstack([pair, np.broadcast_to(hi, (k, rows.size))])       # (2 + k, r)
        values = np.vstack([f_all[:2 * rows.size].reshape(2, -1),
                            np.broadcast_to(f_hi, (k, rows.size))])
        points[2:, grid_rows] = grid
        values[2:, grid_rows] = f_all[2 * rows.size:].reshape(k, -1)
        order = np.argsort(points, axis=0, kind="stable")
        points = np.take_along_axis(points, order, axis=0)
        values = np.take_along_axis(values, order, axis=0)
        thick = values >= 0
        first = np.where(thick.any(axis=0), thick.argmax(axis=0), points.shape[0])
        cols = np.arange(rows.size)
        above = np.minimum(first, points.shape[0] - 1)
        new_hi = np.where(first < points.shape[0], points[above, cols], hi)
        f_new_hi = np.where(first < points.shape[0], values[above, cols], f_hi)
        below = np.maximum(first - 1, 0)
        new_lo = np.where(first > 0, points[below, cols], lo)
        f_new_lo = np.where(first > 0, values[below, cols], f_lo)
        moved = np.where(first == 0, 1, np.where(first == points.shape[0], -1, 0))
        s = side[rows]
        # Illinois: halve the stale end's excess when the same end alone moves twice.
        r_low[rows] = np.where((moved == 1) & (s == 1), 0.5 * f_new_lo, f_new_lo)
        r_high[rows] = np.where((moved == -1) & (s == -1), 0.5 * f_new_hi, f_new_hi)
        slow[rows] |= ok & (new_hi - new_lo > 0.5 * width)
        low[rows], high[rows], side[rows] = new_lo, new_hi, moved
    phi = np.where(reason == "viscosity", low, phi)
    return phi, reason
