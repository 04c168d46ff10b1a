"""The `loadline` command: predictions from the shell, for scripts and for nightly runs.

The command parses, validates, converts units (`predictor.units`), calls `predictor` and
formats; it computes nothing itself. Human-readable tables by default, ``--json`` and
``--csv`` for machines. Errors go to stderr with a non-zero exit code:

- 0: done;
- 1: bad input (the message names the field, the value and the allowed range);
- 2: bad command line (argparse);
- 3: `screen` finished, but some rows had bad input (they are reported row by row);
- 4: a part of Loadline that the command needs is not installed yet.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import json
import math
import pathlib
import re
import sys
import textwrap
import time
import warnings

from . import __version__
from ._lazy import LazyModule
from .cautions import CAUTIONS
from .errors import LoadlineError, UnitError
from .labels import name_label, quantity_of, value_words

# Imported on first use: `loadline --help` and `loadline models` never load the numeric stack.
np = LazyModule("numpy")
pd = LazyModule("pandas")
units = LazyModule("predictor.units")

EXIT_OK, EXIT_INPUT, EXIT_USAGE, EXIT_ROWS, EXIT_MISSING = 0, 1, 2, 3, 4
DEMO_SCENARIO = "mineral_coating.loadline.json"
DEMO_TABLE = "candidates.csv"


class MissingPartError(LoadlineError):
    """A module or function the command relies on has not landed in this installation."""


def demo_folder() -> pathlib.Path:
    """The bundled `data_demo/` folder (next to the package in a source or editable install)."""
    here = pathlib.Path(__file__).resolve().parent
    for folder in (here / "data_demo", here.parent / "data_demo"):
        if folder.is_dir():
            return folder
    raise LoadlineError("the bundled demo folder data_demo/ was not found next to the "
                        "predictor package; install Loadline from its source tree "
                        "(pip install -e .) to run the demo.")


def _need(module_name: str, *names: str):
    """The module `predictor.<module_name>`, or `MissingPartError` naming what is missing."""
    import importlib

    try:
        module = importlib.import_module(f"predictor.{module_name}")
    except ImportError as err:
        raise MissingPartError(f"predictor.{module_name} is not available ({err}).") from None
    missing = [n for n in names if not hasattr(module, n)]
    if missing:
        raise MissingPartError(f"predictor.{module_name} has no {', '.join(missing)} yet; "
                               "this command needs it.")
    return module


# -- formatting -------------------------------------------------------------------------------

_SUFFIX_UNITS = (
    ("_Pa_s", "viscosity"), ("_1_per_s", "shear_rate"), ("_Pa", "stress"), ("_m", "length"),
    ("_K", "temperature"), ("_kg_per_m3", "density"), ("_N_per_m", "interfacial_tension"),
    ("_s", "time"),
)
_SHOWN_UNITS = {"shear_rate": "1/s", "stress": "Pa", "length": "um", "temperature": "degC",
                "density": "kg/m**3", "interfacial_tension": "mN/m", "time": "s"}


def unit_columns(frame: pd.DataFrame, viscosity_unit: str = "Pa*s") -> pd.DataFrame:
    """Columns named with SI suffixes (``viscosity_Pa_s``) shown as ``viscosity [mPa*s]``.

    Numeric columns are converted with `units.from_si`; other columns pass unchanged.
    """
    out = {}
    for col in frame.columns:
        values = frame[col]
        name = str(col)
        for suffix, dimension in _SUFFIX_UNITS:
            if name.endswith(suffix) and pd.api.types.is_numeric_dtype(values):
                unit = viscosity_unit if dimension == "viscosity" else _SHOWN_UNITS[dimension]
                label = name[: -len(suffix)].replace("_", " ")
                out[f"{label} [{unit}]"] = units.from_si(values.to_numpy(dtype=float), unit,
                                                   dimension)
                break
        else:
            label = name.replace("_", " ")
            out[label + (" [-]" if pd.api.types.is_float_dtype(values)
                         and "[" not in label else "")] = values.to_numpy()
    return pd.DataFrame(out)


def _fmt(value, quantity: str = "") -> str:
    """4 significant digits; words for an infinite value of `quantity` (never a bare inf)."""
    if isinstance(value, float | np.floating):
        if math.isnan(value):
            return ""
        if math.isinf(value):
            return value_words(value, quantity)
        return f"{value:.4g}"
    return str(value)


def table_text(frame: pd.DataFrame, max_rows: int | None = None) -> str:
    """An aligned plain-text table (rich), numbers to 4 significant digits.

    Never wrapped or cut to the terminal's width (the text is also written to files and
    pipes) and without colour codes.
    """
    from rich import box
    from rich.console import Console
    from rich.table import Table

    shown = frame if max_rows is None else frame.head(max_rows)
    quantities = [quantity_of(str(c)) for c in frame.columns]
    table = Table(box=box.SIMPLE_HEAD, show_edge=False, pad_edge=False, highlight=False)
    for col in frame.columns:
        numeric = pd.api.types.is_numeric_dtype(frame[col])
        table.add_column(str(col), justify="right" if numeric else "left", no_wrap=True)
    for row in shown.itertuples(index=False):
        table.add_row(*(_fmt(v, q) for v, q in zip(row, quantities, strict=True)))
    out = io.StringIO()
    Console(file=out, width=100_000, color_system=None, highlight=False, markup=False,
            emoji=False).print(table)
    lines = [ln.rstrip() for ln in out.getvalue().splitlines() if ln.strip()]
    if max_rows is not None and len(frame) > max_rows:
        lines.append(f"... {len(frame) - max_rows} more rows (use --json, --csv or -o)")
    return "\n".join(lines)


def _emit(args, frame: pd.DataFrame, meta: dict | None = None, text_before: str = "") -> None:
    """Print `frame` as the user asked: table (default), JSON or CSV."""
    if getattr(args, "json", False):
        doc = dict(meta or {})
        doc["rows"] = frame.astype(object).where(frame.notna(), None).to_dict("records")
        print(json.dumps(_finite(doc), indent=1, default=_json_default))
    elif getattr(args, "csv", False):
        from .batch import csv_text

        sys.stdout.write(csv_text(frame))
    else:
        if text_before:
            print(text_before)
        print(table_text(frame))


def _finite(value):
    """JSON has no NaN or inf: they become null."""
    if isinstance(value, float | np.floating):
        return float(value) if math.isfinite(value) else None
    if isinstance(value, dict):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_finite(v) for v in value]
    return value


def _json_default(value):
    if isinstance(value, np.generic):
        value = value.item()
        return None if isinstance(value, float) and not math.isfinite(value) else value
    if isinstance(value, np.ndarray):
        return value.tolist()
    return str(value)


def _quantity(text: str, dimension: str, option: str) -> float:
    return units.parse_quantity(text, dimension, option)


def _check_viscosity_unit(unit: str) -> str:
    try:
        units.from_si(1.0, unit, "viscosity")
    except Exception:  # pint raises several kinds; one message for all
        raise UnitError(f"--viscosity-unit = {unit!r} is not a viscosity unit; write e.g. "
                        "'Pa*s', 'mPa*s' or 'cP'.") from None
    return unit


class Progress:
    """A progress bar on stderr (rich), drawn only when stderr is a terminal or forced.

    Called with the number of rows done so far; `close` ends the bar.
    """

    def __init__(self, total: int | None, label: str, enabled: bool, stream=None):
        self.enabled, self.bar = enabled, None
        if not enabled:
            return
        from rich.console import Console
        from rich.progress import (
            BarColumn,
            MofNCompleteColumn,
            TaskProgressColumn,
            TextColumn,
            TimeElapsedColumn,
        )
        from rich.progress import Progress as Bar

        console = Console(file=stream or sys.stderr)   # plain text when not a terminal
        self.bar = Bar(TextColumn(label), BarColumn(), TaskProgressColumn(),
                       MofNCompleteColumn(), TextColumn("rows"), TimeElapsedColumn(),
                       console=console, transient=False)
        self.task = self.bar.add_task(label, total=total)
        self.bar.start()

    def __call__(self, done: int) -> None:
        if self.bar is not None:
            self.bar.update(self.task, completed=done)

    def close(self) -> None:
        if self.bar is not None:
            self.bar.stop()


#: Seconds between two redraws of `elapsed_ticker`.
TICK_SECONDS = 1.0


@contextlib.contextmanager
def elapsed_ticker(label: str, enabled: bool, stream=None):
    """A line on stderr, redrawn every `TICK_SECONDS`, saying how long a step that reports no
    progress of its own (the jamming simulation) has been running."""
    if not enabled:
        yield
        return
    import threading

    stream = stream or sys.stderr
    every_s = TICK_SECONDS
    stop = threading.Event()
    start = time.perf_counter()

    def tick():
        while not stop.wait(every_s):
            stream.write(f"\r{label}: {time.perf_counter() - start:.0f} s (Ctrl+C stops it)")
            stream.flush()

    thread = threading.Thread(target=tick, daemon=True)
    thread.start()
    try:
        yield
    finally:
        stop.set()
        thread.join()
        stream.write(f"\r{label}: done in {time.perf_counter() - start:.1f} s\n")
        stream.flush()


# -- commands ---------------------------------------------------------------------------------


def _scenario(path):
    from .scenario import read_scenario

    return read_scenario(path)


def _shear_rates(args) -> np.ndarray:
    if args.shear_rate:
        return np.array([_quantity(t, "shear_rate", "--shear-rate") for t in args.shear_rate])
    low = _quantity(args.low, "shear_rate", "--from")
    high = _quantity(args.high, "shear_rate", "--to")
    if not (low > 0 and high > low):
        raise UnitError(f"--from = {args.low!r}, --to = {args.high!r}: expected "
                        "0 < from < to.")
    if not 2 <= args.points <= 10_000:
        raise UnitError(f"--points = {args.points} is not allowed; expected 2 to 10000.")
    return np.geomspace(low, high, args.points)


def cmd_predict(args) -> int:
    from .formulation import interaction_rows, predict

    unit = _check_viscosity_unit(args.viscosity_unit)
    form = _scenario(args.scenario)
    curve = predict(form, _shear_rates(args))
    meta = {"scenario": form.name, **{k: _plain(v) for k, v in curve.attrs.items()}}
    meta["particle_interactions"] = interaction_rows(form)
    meta["yield_stress_Pa"] = meta.get("markers", {}).get("flocculation_yield_stress_Pa", 0.0)
    head = _scenario_head(form, meta) + _interaction_head(meta)
    _emit(args, unit_columns(curve, unit), meta, head)
    return EXIT_OK


def _interaction_head(meta: dict) -> str:
    """Lines naming each solid's verdict and the network yield stress (none: empty)."""
    rows = meta.get("particle_interactions") or []
    if not rows:
        return ""
    lines = []
    for row in rows:
        how = ("stated in the scenario" if row["basis"] == "stated" else
               f"barrier {row['barrier_kT']:.3g} kT, deepest reachable well "
               f"{row['reachable_well_kT']:.3g} kT; {row['criterion']}")
        lines.append(f"particles: {row['ingredient']} {row['verdict']} ({how})")
    lines.append(f"network yield stress (YODEL, Flatt & Bowen 2006) = "
                 f"{meta['yield_stress_Pa']:.4g} Pa, added to the flow curve")
    return "\n" + "\n".join(lines)


def _plain(value):
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, dict | list | tuple | str | int | float | type(None)):
        return value
    return str(value)


def _scenario_head(form, meta: dict) -> str:
    lines = [f"scenario: {form.name or '(unnamed)'}"]
    parts = []
    for key in ("phi", "phi_max", "headroom"):
        if isinstance(meta.get(key), int | float):
            parts.append(f"{key} = {meta[key]:.4g}")
    if parts:
        lines.append(", ".join(parts))
    return "\n".join(lines)


def cmd_sweep(args) -> int:
    from .formulation import loading_sweep, mixture, require_solid

    unit = _check_viscosity_unit(args.viscosity_unit)
    if not 2 <= args.points <= 100_000:
        raise UnitError(f"--points = {args.points} is not allowed; expected 2 to 100000.")
    form = _scenario(args.scenario)
    require_solid(mixture(form))   # a solids sweep is not asked of droplets alone (as max-load)
    rate = _quantity(args.shear_rate, "shear_rate", "--shear-rate") if args.shear_rate else None
    sweep = _sweep(loading_sweep, form, args.points, rate)
    frame = pd.DataFrame({
        "phi solids [-]": sweep["phi"].to_numpy(),
        "solids [wt%]": 100 * sweep["mass_fraction"].to_numpy(),
        "relative viscosity [-]": sweep["relative_viscosity"].to_numpy(),
        f"viscosity [{unit}]": units.from_si(sweep["viscosity_Pa_s"].to_numpy(), unit, "viscosity"),
    })
    if "yield_stress_Pa" in sweep and (sweep["yield_stress_Pa"] > 0).any():
        frame["yield stress of flocs [Pa]"] = sweep["yield_stress_Pa"].to_numpy()
    meta = {"scenario": form.name, **{k: _plain(v) for k, v in sweep.attrs.items()}}
    head = (f"scenario: {form.name or '(unnamed)'}\n"
            f"phi_max = {meta.get('phi_max', float('nan')):.4g}, current phi = "
            f"{meta.get('phi_current', float('nan')):.4g}\n" + _sweep_basis(rate))
    _emit(args, frame, meta, head)
    return EXIT_OK


def _sweep(loading_sweep, form, points: int, rate: float | None):
    """`formulation.loading_sweep`, at a shear rate when given."""
    if rate is None:
        return loading_sweep(form, n=points)
    import inspect

    if "shear_rate_1_per_s" not in inspect.signature(loading_sweep).parameters:
        raise MissingPartError("formulation.loading_sweep takes no shear rate yet.")
    return loading_sweep(form, n=points, shear_rate_1_per_s=rate)


def _sweep_basis(rate: float | None) -> str:
    if rate is None:
        return ("viscosity: Newtonian view (the relation at phi_max times the liquid's "
                "Newtonian viscosity); give --shear-rate for the full flow curve")
    return f"viscosity: full flow curve at {rate:g} 1/s"


def cmd_max_load(args) -> int:
    from .formulation import max_loading, mixture, solid_mass_fraction

    _check_viscosity_unit(args.viscosity_unit)
    form = _scenario(args.scenario)
    limits = [_quantity(t, "viscosity", "--limit") for t in args.limit]
    rates = [_quantity(t, "shear_rate", "--shear-rate") for t in (args.shear_rate or ["1 1/s"])]
    if len(rates) == 1:
        rates = rates * len(limits)
    if len(rates) != len(limits):
        raise UnitError(f"--shear-rate given {len(rates)} times for {len(limits)} --limit "
                        "values; give one shear rate, or one per limit.")
    mix = mixture(form)
    rows = []
    for limit, rate in zip(limits, rates, strict=True):
        phi = max_loading(form, limit, rate)
        rows.append({
            "shear rate [1/s]": rate,
            f"viscosity limit [{args.viscosity_unit}]": units.from_si(limit, args.viscosity_unit,
                                                                "viscosity"),
            "max phi solids [-]": phi,
            "max solids [wt%]": 100 * float(solid_mass_fraction(form, phi, mix)[0]),
            "max phi/phi_max [-]": phi / mix.phi_max,
        })
    head = (f"scenario: {form.name or '(unnamed)'}\ncurrent phi solids = "
            f"{mix.phi_solids_effective:.4g}, phi_max = {mix.phi_max:.4g}")
    _emit(args, pd.DataFrame(rows), {"scenario": form.name, "phi_max": mix.phi_max,
                                     "phi_current": mix.phi_solids_effective}, head)
    return EXIT_OK


def relations_snapshot(kind: str | None = None) -> list[dict]:
    """The registry's relations from the static snapshot `predictor/data/models.json`.

    The snapshot is generated from the registry (``python -m predictor.registry
    --snapshot``; tests/test_registry.py fails when it is stale), so listing the relations
    imports no numeric library.
    """
    from .registry import SNAPSHOT

    path = pathlib.Path(__file__).resolve().parent / SNAPSHOT
    relations = json.loads(path.read_text(encoding="utf-8"))
    return [r for r in relations if kind is None or r["kind"] == kind]


def _parameters_text(relation: dict) -> str:
    def bound(x):
        return "inf" if x is None else f"{x:g}"

    return "; ".join(
        f"{p['name']}={'' if p['default'] is None else format(p['default'], 'g')} "
        f"[{p['unit']}] ({bound(p['bounds'][0])}..{bound(p['bounds'][1])})"
        for p in relation["parameters"]) or "-"


def cmd_models(args) -> int:
    relations = relations_snapshot(args.kind)
    if args.json:
        print(json.dumps({"count": len(relations), "rows": relations}, indent=1,
                         ensure_ascii=False))
        return EXIT_OK
    if args.csv:
        import csv

        writer = csv.writer(sys.stdout, lineterminator="\n")
        writer.writerow(["name", "kind", "parameters", "validity", "source"])
        for r in relations:
            writer.writerow([r["name"], r["kind"], _parameters_text(r), r["validity"],
                             r["source"]])
        return EXIT_OK
    for r in relations:
        print(f"{r['name']}  ({r['kind']})  source: {r['source']}")
        print(textwrap.fill(f"parameters: {_parameters_text(r)}", 100,
                            initial_indent="    ", subsequent_indent="      "))
        print(textwrap.fill(f"validity: {r['validity']}", 100, initial_indent="    ",
                            subsequent_indent="      "))
    print(f"\n{len(relations)} relations.")
    return EXIT_OK


def cmd_screen(args) -> int:
    from .batch import count_rows, screen_file

    unit = _check_viscosity_unit(args.viscosity_unit)
    if args.chunk_rows < 1:
        raise UnitError(f"--chunk-rows = {args.chunk_rows} is not allowed; expected >= 1.")
    path = pathlib.Path(args.table)
    show_progress = args.progress if args.progress is not None else sys.stderr.isatty()
    progress = Progress(count_rows(path) if show_progress else None, "screen", show_progress)
    keep = -1 if (args.json or args.csv) else args.show
    try:
        summary, shown = screen_file(path, args.output, viscosity_unit=unit,
                                     chunk_rows=args.chunk_rows, progress=progress, keep=keep,
                                     dask=args.dask)
    finally:
        progress.close()
    for header in summary.unrecognised:
        print(f"loadline: warning: column '{header}' is not one Loadline reads; it is "
              "passed through unchanged (see `loadline screen --help`).", file=sys.stderr)
    for row, name, message in summary.first_errors:
        print(f"loadline: line {row}{f' ({name})' if name else ''}: {message}", file=sys.stderr)
    if summary.errors > len(summary.first_errors):
        print(f"loadline: ... {summary.errors - len(summary.first_errors)} more rows with "
              "errors (see the 'error' column of the output).", file=sys.stderr)
    if args.json or args.csv:
        _emit(args, shown, {"rows_total": summary.rows, "rows_ok": summary.ok,
                            "rows_error": summary.errors})
    else:
        print(_screen_text(summary, shown, args))
    return EXIT_ROWS if summary.errors else EXIT_OK


def _screen_text(summary, shown: pd.DataFrame, args) -> str:
    lines = [f"screened {summary.rows} candidates: {summary.ok} predicted, "
             f"{summary.errors} with input errors"]
    if summary.windows:
        lines[0] += f", {summary.passed_all} pass every window"
    if args.output:
        lines.append(f"results written to {args.output}")
    if shown.empty:
        return "\n".join(lines)
    keep = [c for c in shown.columns if c in ("candidate", "status", "headroom phi/phi_max [-]",
                                              "settling")
            or re.fullmatch(r"window \d+ (viscosity \[.*\]|verdict)", c)]
    compact = shown[keep].copy()
    compact.columns = [c.replace("headroom phi/phi_max", "phi/phi_max") for c in keep]
    lines += ["", table_text(compact, args.show)]
    return "\n".join(lines)


def cmd_pack(args) -> int:
    from .batch import read_size_table

    packing = _need("packing", "packing_estimates")
    dist = read_size_table(args.sizes, field=str(args.sizes))
    show = args.progress if args.progress is not None else sys.stderr.isatty()
    with elapsed_ticker("pack: jamming simulation", show and args.simulation):
        est = packing.packing_estimates(dist.diameters_m, dist.fractions,
                                        include_simulation=args.simulation)
    rows = [{"method": name, "phi_max [-]": float(value), "note": ""}
            for name, value in est.estimates.items()]
    rows += [{"method": name, "phi_max [-]": float("nan"), "note": f"skipped: {reason}"}
             for name, reason in est.skipped.items()]
    meta = {"d10_um": dist.d10_m * 1e6, "d50_um": dist.d50_m * 1e6, "d90_um": dist.d90_m * 1e6,
            "sauter_diameter_um": dist.sauter_diameter_m * 1e6, "span": dist.span,
            "classes": int(dist.diameters_m.size), "phi_max_default": est.default,
            "phi_max_low": est.low, "phi_max_high": est.high}
    head = (f"size table: {args.sizes} ({meta['classes']} classes)\n"
            f"D10 {meta['d10_um']:.3g} um, D50 {meta['d50_um']:.3g} um, D90 "
            f"{meta['d90_um']:.3g} um, Sauter {meta['sauter_diameter_um']:.3g} um, span "
            f"{meta['span']:.3g}\n"
            f"phi_max {est.default:.4g} (default estimator); range over the estimators "
            f"{est.low:.4g} to {est.high:.4g}")
    _emit(args, pd.DataFrame(rows, columns=["method", "phi_max [-]", "note"]), meta, head)
    return EXIT_OK


def cmd_fit(args) -> int:
    labdata = _need("labdata", "read_lab_csv")
    from .registry import get_model

    if get_model(args.model).kind == "liquid":
        return _fit_flow_curves(args, labdata)
    options = {}
    if args.scenario:
        options["formulation"] = _scenario(args.scenario)
    for name, dimension, option in (("particle_density", "density", "--particle-density"),
                                    ("liquid_density", "density", "--liquid-density")):
        text = getattr(args, name)
        if text:
            options[f"{name}_kg_per_m3"] = _quantity(text, dimension, option)
    if args.liquid_viscosity:
        options["liquid_viscosity_Pa_s"] = _quantity(args.liquid_viscosity, "viscosity",
                                                     "--liquid-viscosity")
    data = labdata.read_lab_csv(args.data, **options)
    if args.shear_rate:
        data = data.at_shear_rate(_quantity(args.shear_rate, "shear_rate", "--shear-rate"))
    result = data.fit(args.model)
    rows = [{"parameter": name, "meaning": _param_meaning(name, result.model),
             "value": float(value),
             f"{100 * result.confidence:g} % low": float(result.intervals[name][0]),
             f"{100 * result.confidence:g} % high": float(result.intervals[name][1])}
            for name, value in result.params.items()]
    rows += [{"parameter": f"{name} (fixed)", "meaning": _param_meaning(name, result.model),
              "value": float(value)} for name, value in result.fixed.items()]
    meta = {"model": result.model, "points": result.n_points, "rmse_ln": result.rmse,
            "r2_ln": result.r2, "aic": result.aic, "notes": list(result.notes)}
    head = (f"fit of {result.model} to {result.n_points} points from {args.data}\n"
            f"rmse {result.rmse:.3g} in ln(viscosity), R2 {result.r2:.4f}")
    for note in result.notes:
        head += f"\nnote: {note}"
    _emit(args, pd.DataFrame(rows), meta, head)
    return EXIT_OK


def _fit_flow_curves(args, labdata) -> int:
    """`loadline fit EXPORT --model <liquid law>`: every series of a rheometer export."""
    curves = labdata.read_flow_curves(args.data)
    fits = labdata.fit_flow_curves(curves, args.model, branch=args.branch)
    frame = fits.table()
    trends = {}
    phi, tau_y, _ = fits.parameter("yield_stress_Pa")
    if np.isfinite(tau_y).sum() >= 3:
        for relation in labdata.YIELD_TRENDS:
            try:
                trend = labdata.fit_yield_stress_trend(phi, tau_y, relation)
            except LoadlineError as err:
                trends[relation] = {"error": str(err)}
                continue
            trends[relation] = {"params": trend.params,
                                "intervals": {k: list(v) for k, v in trend.intervals.items()},
                                "rmse_sqrt": trend.rmse_sqrt, "aic": trend.aic}
    meta = {"model": fits.model, "branch": fits.branch, "series": len(curves.series()),
            "points": int(len(curves.table)), "controlled": curves.controlled,
            "notes": list(curves.notes), "slip_warnings": fits.warnings, "trends": trends}
    head = [f"fit of {fits.model} to every series of {args.data} ({meta['series']} series, "
            f"{meta['points']} points, {fits.branch} branch; 95 % intervals)"]
    for series, text in fits.warnings.items():
        head.append(f"warning, {series}: {text}")
    for relation, trend in trends.items():
        if "error" in trend:
            head.append(f"yield stress against phi, {relation}: not fitted ({trend['error']})")
        else:
            words = {"laplace_pressure_Pa": ("Laplace pressure Γ/R", " Pa"),
                     "phi_c": ("critical fraction φc", "")}
            head.append(f"yield stress against phi, {relation}: " + ", ".join(
                f"{words[k][0]} = {v:.4g}{words[k][1]} ({trend['intervals'][k][0]:.4g} to "
                f"{trend['intervals'][k][1]:.4g}, 95 %)" for k, v in trend["params"].items()))
    if not (args.json or args.csv):           # a table for people: parameters in words
        frame = frame.rename(columns=lambda c: _series_column(c, fits.model))
    _emit(args, frame, meta, "\n".join(head))
    return EXIT_OK


def _series_column(column: str, model: str) -> str:
    """'yield_stress_Pa low' -> 'yield stress τy, 95 % low [Pa]'; other columns as they are."""
    fixed = {"series": "series", "phi": "phi [-]", "points": "points", "note": "note",
             "rmse_ln": "rms error (ln)"}
    if column in fixed:
        return fixed[column]
    name, _, end = column.partition(" ")
    words, unit = name_label(name, ("liquid",), model)
    return f"{words}{', 95 % ' + end if end else ''} [{unit}]"


def _param_meaning(name: str, model: str) -> str:
    """A fitted parameter in words with its unit (``phi_max`` -> maximum packing fraction [–])."""
    words, unit = name_label(name, ("suspension", "emulsion"), model)
    return f"{words} [{unit}]"


def cmd_report(args) -> int:
    from .report import write_report

    unit = _check_viscosity_unit(args.viscosity_unit)
    written = write_report(args.scenario, args.output, pdf_path=args.pdf, viscosity_unit=unit)
    for path in written:
        print(f"wrote {path}")
    print(f"\nCaution: {CAUTIONS}")
    return EXIT_OK


# -- map ----------------------------------------------------------------------------------

_RANGE = re.compile(r"^\s*(\S+)\s+(\S+)\s*(.*?)\s*$")


def _loading_range(text: str, option: str) -> tuple[tuple[float, float], str]:
    """'20 45 wt%' -> ((0.2, 0.45), "mass")."""
    from .units import parse_loading

    match = _RANGE.match(str(text))
    if not match:
        raise UnitError(f"{option} = {text!r} could not be read; write two loadings and a "
                        "unit, e.g. '20 45 wt%' or '5 25 vol%'.")
    low, high, unit = match.groups()
    (a, basis), (b, _) = (parse_loading(f"{v} {unit}".strip(), option, "mass")
                          for v in (low, high))
    return (a, b), basis


def _ingredient_arg(form, text: str, option: str):
    """An ingredient given on the command line: its number (1 = first) or its name."""
    from .errors import InputRangeError

    names = [i.name for i in form.ingredients]
    if text in names:
        return names.index(text)
    if str(text).strip().isdigit() and 1 <= int(text) <= len(names):
        return int(text) - 1
    if str(text).strip().lower() == "liquid" and option == "--z":
        return "liquid"
    raise InputRangeError(option, text, f"an ingredient number from 1 to {len(names)} or one "
                                        "of the names " + ", ".join(repr(n) for n in names))


def _window_arg(text: str):
    """'pumping, 100 1/s, max 2 Pa*s[, min 0.1 Pa*s]' -> (name, rate, max, min) in SI."""
    parts = [p.strip() for p in str(text).split(",")]
    if len(parts) < 3 or not parts[0]:
        raise UnitError(f"--window = {text!r} could not be read; write e.g. "
                        "'pumping, 100 1/s, max 2 Pa*s' or 'sag, 0.1 1/s, min 10 Pa*s'.")
    rate = _quantity(parts[1], "shear_rate", f"--window {parts[0]!r} shear rate")
    limits = {"max": None, "min": None}
    for part in parts[2:]:
        word, _, value = part.partition(" ")
        if word.lower() not in limits or not value.strip():
            raise UnitError(f"--window {parts[0]!r}: {part!r} should read 'max VISCOSITY' or "
                            "'min VISCOSITY', e.g. 'max 2 Pa*s'.")
        limits[word.lower()] = _quantity(value, "viscosity", f"--window {parts[0]!r} {word}")
    return parts[0], rate, limits["max"], limits["min"]


def cmd_map(args) -> int:
    from . import design

    unit = _check_viscosity_unit(args.viscosity_unit)
    if not 2 <= args.n <= design.MAX_GRID:
        raise UnitError(f"-n = {args.n} is not allowed; expected 2 to {design.MAX_GRID}.")
    form = _scenario(args.scenario)
    rate = _quantity(args.shear_rate, "shear_rate", "--shear-rate")
    windows = [_window_arg(t) for t in args.window or []] or None
    x = _ingredient_arg(form, args.x, "--x")
    y = _ingredient_arg(form, args.y, "--y")
    if args.z is not None:
        z = _ingredient_arg(form, args.z, "--z")
        total, basis = (None, args.basis) if args.total is None else (
            _total(args.total))
        grid = design.loading_ternary(form, (x, y, z), rate, total=total, n=args.n,
                                      basis=basis, windows=windows)
        names = grid.attrs["parts"]
        lead = {f"share {k} [-]": grid[f"share_{k}"] for k in (1, 2, 3)}
        meta_names = {"parts": names, "total": grid.attrs["total"]}
    else:
        (x_range, x_basis), (y_range, y_basis) = (
            _loading_range(args.x_range, "--x-range"), _loading_range(args.y_range, "--y-range"))
        if x_basis != y_basis:
            raise UnitError(f"--x-range is in {x_basis} and --y-range in {y_basis} fractions; "
                            "give both on the same basis (wt% or vol%).")
        grid = design.loading_map(form, x, y, x_range, y_range, rate, n=args.n, basis=x_basis,
                                  windows=windows)
        basis = x_basis
        sign = "wt%" if basis == "mass" else "vol%"
        lead = {f"{grid.attrs['x_ingredient']} [{sign}]": 100 * grid["x_loading"],
                f"{grid.attrs['y_ingredient']} [{sign}]": 100 * grid["y_loading"]}
        meta_names = {"x_ingredient": grid.attrs["x_ingredient"],
                      "y_ingredient": grid.attrs["y_ingredient"]}
    for message in grid.attrs.get("warnings", ()):
        warnings.warn(message, stacklevel=1)
    if args.png:
        _write_map_png(grid, unit, args.png, args.scenario)
    meta = {"scenario": form.name, **meta_names, "basis": grid.attrs["basis"],
            "shear_rate_1_per_s": rate, "viscosity_unit": unit,
            "windows": grid.attrs["windows"], "current": grid.attrs["current"],
            "cautions": CAUTIONS}
    eta = units.from_si(grid["viscosity_Pa_s"].to_numpy(float), unit, "viscosity")
    frame = pd.DataFrame({**lead, f"viscosity [{unit}]": eta,
                          "phi/phi_max [-]": grid["phi_over_phi_max"],
                          "regime": grid["regime"]})
    for w in grid.attrs["windows"]:
        frame[f"{w['name']} viscosity [{unit}]"] = units.from_si(
            grid[f"{w['column']}_viscosity_Pa_s"].to_numpy(float), unit, "viscosity")
        frame[f"{w['name']} pass"] = grid[f"{w['column']}_pass"].map({True: "pass",
                                                                       False: "fail"})
    if "feasible" in grid:
        frame["feasible"] = grid["feasible"].map({True: "yes", False: "no"})
    if args.output:
        from .batch import write_table

        write_table(frame, args.output, inputs=[args.scenario])
    if args.json or args.csv:
        _emit(args, frame, meta)
        return EXIT_OK
    head = (f"scenario: {form.name or '(unnamed)'}\n{len(grid)} recipes at "
            f"{rate:g} 1/s, loadings on a {basis} basis"
            + (f"; {int(grid['feasible'].sum())} inside every window"
               if "feasible" in grid else ""))
    print(head)
    print(table_text(frame, max_rows=args.show))
    print(f"\nCaution: {CAUTIONS}")
    return EXIT_OK


def _total(text: str) -> tuple[float, str]:
    from .units import parse_loading

    return parse_loading(text, "--total", "mass")


def _write_map_png(grid, unit: str, path: str, scenario: str) -> None:
    from . import charts
    from .files import atomic_write

    build = charts.design_triangle if "share_1" in grid else charts.design_map
    atomic_write(path, charts.to_png(build(grid, unit, joined=True)), inputs=[scenario])


# -- candidates -----------------------------------------------------------------------------

_FACTOR_DIMENSIONS = {"d50": "length", "temperature": "temperature",
                      "liquid viscosity": "viscosity"}


def _factor_arg(form, text: str) -> tuple[str, tuple[float, float]]:
    """'ingredient 1 loading: 20 40 wt%' -> ("ingredient 1 loading", (0.2, 0.4)) in SI."""
    from .units import parse_loading

    name, sep, rest = str(text).partition(":")
    match = _RANGE.match(rest) if sep else None
    if not match:
        raise UnitError(f"--factor = {text!r} could not be read; write e.g. 'ingredient 1 "
                        "loading: 20 40 wt%', 'ingredient 2 d50: 0.3 1.2 um' or "
                        "'temperature: 15 45 degC'.")
    name = " ".join(name.lower().split())
    low, high, unit = match.groups()
    what = name.split()[-1] if name.startswith("ingredient") else name
    if what in ("loading", "glycerol"):
        own = "mass"
        if what == "loading":
            k = name.split()[1]
            if k.isdigit() and 1 <= int(k) <= len(form.ingredients):
                own = form.ingredients[int(k) - 1].basis
        values = [parse_loading(f"{v} {unit}".strip(), f"--factor {name!r}", own)
                  for v in (low, high)]
        if any(basis != own for _, basis in values):
            raise UnitError(f"--factor {name!r}: give it on its own basis "
                            f"({'wt%' if own == 'mass' else 'vol%'}).")
        return name, (values[0][0], values[1][0])
    dimension = _FACTOR_DIMENSIONS.get(what)
    if dimension is None:       # candidates.candidate_table names the allowed factors
        return name, (float("nan"), float("nan"))
    return name, tuple(_quantity(f"{v} {unit}", dimension, f"--factor {name!r}")
                       for v in (low, high))


def cmd_candidates(args) -> int:
    from . import candidates
    from .files import atomic_write

    form = _scenario(args.scenario)
    factors = dict(_factor_arg(form, t) for t in args.factor)
    windows = [_window_arg(t) for t in args.window or []] or None
    out = pathlib.Path(args.output)
    if out.suffix.lower() != ".csv":
        raise UnitError(f"-o {args.output!r}: the candidate table is written as .csv")
    base = f"{out.stem}.base.loadline.json"
    table, files = candidates.candidate_table(
        form, factors, design=args.design, n=args.n, levels=args.levels, seed=args.seed,
        windows=windows, base_name=base)
    atomic_write(out, table.to_csv(index=False, float_format="%.12g"), inputs=[args.scenario])
    for name, data in candidates.file_bytes(files).items():
        atomic_write(out.parent / name, data, inputs=[args.scenario])
    sizes = len(files) - 1
    print(f"wrote {len(table)} candidates ({args.design}) to {out}, the scenario beside it "
          f"as {base}" + (f" and {sizes} size tables" if sizes else "")
          + f"; screen them with: loadline screen {out}")
    return EXIT_OK


def _pipe_flows(args) -> np.ndarray:
    flows = [_quantity(t, "flow_rate", "--flow") for t in args.flow]
    if args.flow_to is None:
        return np.array(flows)
    high = _quantity(args.flow_to, "flow_rate", "--flow-to")
    if len(flows) != 1 or not 0 < flows[0] < high:
        raise UnitError(f"--flow-to = {args.flow_to!r} needs one --flow below it "
                        "(the start of the range).")
    if not 2 <= args.points <= 10_000:
        raise UnitError(f"--points = {args.points} is not allowed; expected 2 to 10000.")
    return np.geomspace(flows[0], high, args.points)


def cmd_pipe(args) -> int:
    from .process import CAUTION, pipe_flow_of
    from .report import pipe_table

    form = _scenario(args.scenario)
    flows = _pipe_flows(args)
    diameter = _quantity(args.diameter, "length", "--diameter")
    length = _quantity(args.length, "length", "--length")
    roughness = _quantity(args.roughness, "length", "--roughness")
    for unit, dimension, option in ((args.flow_unit, "flow_rate", "--flow-unit"),
                                    (args.pressure_unit, "pressure", "--pressure-unit")):
        try:
            units.from_si(1.0, unit, dimension)
        except Exception:  # pint raises several kinds; one message for all
            raise UnitError(f"{option} = {unit!r} is not a {dimension.replace('_', ' ')} "
                            "unit.") from None
    flow = pipe_flow_of(form, flows, diameter, length, roughness)
    meta = {"scenario": form.name, "diameter_m": diameter, "length_m": length,
            "roughness_m": roughness, "density_kg_per_m3": flow.density_kg_per_m3,
            "yield_stress_Pa": flow.yield_stress_Pa,
            "startup_pressure_Pa": flow.startup_pressure_Pa,
            "hedstrom_number": flow.hedstrom_number, "warnings": list(flow.warnings),
            "caution": CAUTION}
    pu = args.pressure_unit
    restart = units.from_si(flow.startup_pressure_Pa, pu, "pressure")
    head = (f"scenario: {form.name or '(unnamed)'}\n"
            f"pipe: D = {1e3 * diameter:.4g} mm, L = {length:.4g} m, roughness "
            f"{1e3 * roughness:.3g} mm; density {flow.density_kg_per_m3:.4g} kg/m3\n"
            f"apparent yield stress {flow.yield_stress_Pa:.3g} Pa; restart pressure of the "
            f"standing line 4 tau_y L/D = {restart:.4g} {pu}\n"
            f"Caution: {CAUTION}\n")
    _emit(args, pipe_table(flow, args.flow_unit, pu), meta, head)
    return EXIT_OK


def cmd_demo(args) -> int:
    from .formulation import loading_sweep, max_loading, mixture, predict, solid_mass_fraction
    from .report import inputs_table, liquid_table

    unit = _check_viscosity_unit(args.viscosity_unit)
    path = demo_folder() / DEMO_SCENARIO
    form = _scenario(path)
    mix = mixture(form)
    out = io.StringIO()
    w = out.write
    w(f"Loadline demo: {form.name}\n{form.description}\nscenario file: {path}\n\n")
    w("Liquid\n" + table_text(liquid_table(form, unit)) + "\n\n")
    w("Dispersed ingredients\n" + table_text(inputs_table(form)) + "\n\n")
    w(f"Solids: phi = {mix.phi_solids_effective:.4g} (with adsorbed layers), phi_max = "
      f"{mix.phi_max:.4g}, headroom phi/phi_max = {mix.headroom:.3g}\n\n")
    curve = predict(form, np.array([0.1, 1.0, 10.0, 100.0, 1000.0]))
    w("Flow curve\n" + table_text(unit_columns(curve, unit)) + "\n\n")
    sweep = _sweep(loading_sweep, form, 6, 100.0)
    w("Loading sweep (solids scaled in their proportions; " + _sweep_basis(100.0)
      + ")\n" + table_text(pd.DataFrame({
        "phi solids [-]": sweep["phi"], "solids [wt%]": 100 * sweep["mass_fraction"],
        "relative viscosity [-]": sweep["relative_viscosity"],
        f"viscosity [{unit}]": units.from_si(sweep["viscosity_Pa_s"].to_numpy(), unit,
                                       "viscosity")})) + "\n\n")
    rows = []
    for label, rate, limit in (("brushing", 1e4, 0.2), ("pumping", 100.0, 1.0),
                               ("levelling", 0.1, 10.0)):
        phi = max_loading(form, limit, rate)
        rows.append({"window": label, "shear rate [1/s]": rate,
                     f"limit [{unit}]": units.from_si(limit, unit, "viscosity"),
                     "max phi solids [-]": phi,
                     "max solids [wt%]": 100 * float(solid_mass_fraction(form, phi, mix)[0])})
    w("Highest solids loading under a viscosity limit (example windows, invented limits)\n"
      + table_text(pd.DataFrame(rows)) + "\n\n")
    w("Next: loadline screen " + str(demo_folder() / DEMO_TABLE) + "\n")
    w("      loadline report " + str(path) + " -o demo_report.html\n\n")
    w("Caution: " + CAUTIONS + "\n")
    sys.stdout.write(out.getvalue())
    return EXIT_OK


# -- parser -----------------------------------------------------------------------------------

_EPILOG = "Caution: " + CAUTIONS

_EXAMPLES = {
    "predict": """\
examples:
  loadline predict data_demo/mineral_coating.loadline.json
  loadline predict paint.loadline.json --shear-rate "0.1 1/s" --shear-rate "100 1/s"
  loadline predict paint.loadline.json --from "1e-2 1/s" --to "1e4 1/s" --points 25 \\
      --viscosity-unit mPa*s --csv > flow_curve.csv""",
    "sweep": """\
examples:
  loadline sweep data_demo/ceramic_slip.loadline.json
  loadline sweep slip.loadline.json --points 50 --shear-rate "100 1/s" --json""",
    "max-load": """\
examples:
  loadline max-load data_demo/mineral_coating.loadline.json --limit "0.5 Pa*s" \\
      --shear-rate "100 1/s"
  loadline max-load slip.loadline.json --limit "500 mPa*s" --limit "2 Pa*s" \\
      --shear-rate "100 1/s" --shear-rate "0.1 1/s" """,
    "screen": """\
examples:
  loadline screen data_demo/candidates.csv
  loadline screen doe.csv -o doe_results.csv --viscosity-unit mPa*s
  loadline screen doe.xlsx -o doe_results.xlsx --progress
  loadline screen doe.csv --json > doe_results.json
  loadline screen big_doe.parquet -o big_results.parquet --chunk-rows 100000 --dask
  loadline screen big_doe.parquet -o big_results.parquet --dask tcp://10.0.0.5:8786

The table has one candidate per row; the columns (units in square brackets) are described
in predictor/batch.py and the README, e.g. 'ingredient 1 loading [wt%]', 'ingredient 1 d50
[um]', 'window 1 shear rate [1/s]', 'window 1 max viscosity [Pa*s]'. Rows with bad input
are reported row by row (stderr and the 'error' column); the other rows are predicted.
Cells of the output that start with = + - @ are escaped for spreadsheets.
Exit code 3 when some rows had bad input.""",
    "models": """\
examples:
  loadline models
  loadline models --kind suspension
  loadline models --json""",
    "pack": """\
examples:
  loadline pack data_demo/sizes_filler_coarse.csv
  loadline pack sizes.csv --json

The size table has a 'size [um]' column and 'passing [vol%]' (cumulative), 'amount [vol%]'
(per class) or 'retained [g]' (any total).""",
    "fit": """\
examples:
  loadline fit data_demo/lab_loading_series.csv --particle-density "2700 kg/m3" \\
      --liquid-density "997 kg/m3" --liquid-viscosity "0.89 mPa*s"
  loadline fit lab.csv --scenario paint.loadline.json --model maron-pierce --json
  loadline fit data_demo/lab_emulsion_series.csv --model herschel-bulkley

With a relation of loadings (krieger-dougherty, ...) the file holds viscosities at several
loadings. With a liquid law (herschel-bulkley, power-law, bingham, ...) it is a rheometer
export with one or several flow curves (a sample column, or blocks one after another):
every series is fitted, and the yield stress against phi with the jammed-emulsion
relations.""",
    "report": """\
examples:
  loadline report data_demo/mineral_coating.loadline.json -o coating_report.html
  loadline report slip.loadline.json -o slip.html --pdf slip.pdf --viscosity-unit mPa*s

The HTML file is self-contained (charts embedded as SVG); it opens without a network.""",
    "map": """\
examples:
  loadline map data_demo/mineral_coating.loadline.json --x 1 --y 2 \\
      --x-range "20 45 wt%" --y-range "5 25 wt%" --shear-rate "100 1/s"
  loadline map paint.loadline.json --x filler --y pigment --shear-rate "100 1/s" \\
      --window "pumping, 100 1/s, max 2 Pa*s" --window "sag, 0.1 1/s, min 10 Pa*s" --png map.png
  loadline map paint.loadline.json --x 1 --y 2 --z liquid --shear-rate "100 1/s" -n 21 --json

Ingredients by number (1 = first, as in the candidate table) or by name; every other
ingredient keeps its scenario loading. Cells at or beyond the packing limit have no flow
(viscosity inf, regime "jammed"). --json gives every cell in SI units (fractions, Pa*s).""",
    "candidates": """\
examples:
  loadline candidates slurry.loadline.json --factor "ingredient 1 loading: 20 40 wt%" \\
      --factor "ingredient 2 d50: 0.3 1.2 um" --factor "temperature: 15 45 degC" \\
      --design latin-hypercube -n 50 --window "pumping, 100 1/s, max 1 Pa*s" -o cand.csv
  loadline screen cand.csv

Every other field of a row is the scenario's. The batch screen reads Newtonian liquids
without thickening; a scenario it cannot read is refused, naming the field.""",
    "pipe": """\
examples:
  loadline pipe data_demo/mineral_coating.loadline.json --flow "10 L/min" \\
      --diameter "25 mm" --length "10 m"
  loadline pipe paint.loadline.json --flow "1 L/min" --flow-to "100 L/min" --points 20 \\
      --diameter "1 in" --length "30 m" --csv > system_curve.csv

Laminar flow from the predicted flow curve (Rabinowitsch-Mooney); transition by the
Metzner-Reed Reynolds number (Hanks for Bingham liquids); turbulent friction by Colebrook,
Dodge-Metzner or Darby. The restart pressure 4 tau_y L/D is printed above the table.""",
    "demo": """\
examples:
  loadline demo
  loadline demo --viscosity-unit mPa*s""",
}


def _add_output(parser, machine: bool = True, viscosity: bool = True) -> None:
    if machine:
        group = parser.add_mutually_exclusive_group()
        group.add_argument("--json", action="store_true", help="print JSON instead of a table")
        group.add_argument("--csv", action="store_true", help="print CSV instead of a table")
    if viscosity:
        parser.add_argument("--viscosity-unit", default="Pa*s", metavar="UNIT",
                            help="unit of viscosities in the output (default Pa*s; e.g. "
                                 "mPa*s, cP)")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="loadline",
        description="Loadline: viscosity of suspensions and emulsions from what is known "
                    "before the lab trial.",
        epilog="commands: predict, sweep, max-load, map, candidates, screen, pack, fit, "
               "report, pipe, models, demo. Run 'loadline COMMAND --help' for examples.\n\n"
               + _EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--version", action="version", version=f"loadline {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    def add(name, help_text, func):
        p = sub.add_parser(name, help=help_text, description=help_text,
                           epilog=_EXAMPLES[name] + "\n\n" + _EPILOG,
                           formatter_class=argparse.RawDescriptionHelpFormatter)
        p.set_defaults(func=func)
        return p

    p = add("predict", "flow curve of a scenario file (*.loadline.json)", cmd_predict)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--shear-rate", action="append", metavar="RATE",
                   help='a shear rate with its unit, e.g. "100 1/s" (repeatable)')
    p.add_argument("--from", dest="low", default="1e-3 1/s", metavar="RATE",
                   help="lowest shear rate of the default grid (default 1e-3 1/s)")
    p.add_argument("--to", dest="high", default="1e5 1/s", metavar="RATE",
                   help="highest shear rate of the default grid (default 1e5 1/s)")
    p.add_argument("--points", type=int, default=9, help="points of the grid (default 9)")
    _add_output(p)

    p = add("sweep", "viscosity against solids loading, up to the packing limit", cmd_sweep)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--points", type=int, default=11, help="number of loadings (default 11)")
    p.add_argument("--shear-rate", metavar="RATE",
                   help='evaluate the full flow curve at this rate, e.g. "100 1/s" '
                        "(default: the Newtonian view)")
    _add_output(p)

    p = add("max-load", "highest solids loading under a viscosity limit", cmd_max_load)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--limit", action="append", required=True, metavar="VISCOSITY",
                   help='viscosity limit with its unit, e.g. "0.5 Pa*s" (repeatable)')
    p.add_argument("--shear-rate", action="append", metavar="RATE",
                   help='shear rate of the limit, e.g. "100 1/s" (default 1 1/s)')
    _add_output(p)

    p = add("screen", "predict a table of candidate formulations (CSV, Excel or Parquet)",
            cmd_screen)
    p.add_argument("table", help="candidate table (.csv, .xlsx or .parquet)")
    p.add_argument("-o", "--output",
                   help="write all result rows here (.csv, .xlsx, .parquet or .json)")
    p.add_argument("--chunk-rows", type=int, default=50_000,
                   help="rows computed at once; bounds the memory (default 50000)")
    p.add_argument("--show", type=int, default=20, help="rows shown in the table (default 20)")
    p.add_argument("--progress", action=argparse.BooleanOptionalAction, default=None,
                   help="progress bar on stderr (default: when stderr is a terminal)")
    p.add_argument("--dask", nargs="?", const="", default=None, metavar="ADDRESS",
                   help="compute the chunks on a Dask cluster: a local one by default, or the "
                        "scheduler at ADDRESS (e.g. tcp://host:8786); needs "
                        "'pip install loadline[dask]'. Give it after the table.")
    _add_output(p)

    p = add("pack", "packing limit phi_max of a size table, every estimator", cmd_pack)
    p.add_argument("sizes", help="size table CSV")
    p.add_argument("--simulation", action="store_true",
                   help="also run the jamming simulation (takes seconds)")
    p.add_argument("--progress", action=argparse.BooleanOptionalAction, default=None,
                   help="elapsed time of the simulation on stderr (default: when stderr is "
                        "a terminal)")
    _add_output(p, viscosity=False)

    p = add("fit", "calibrate a relation to lab viscosities or flow curves (CSV)", cmd_fit)
    p.add_argument("data", help="lab CSV or rheometer export (units in the headers)")
    p.add_argument("--model", default="krieger-dougherty", help="relation to fit")
    p.add_argument("--scenario", help="scenario giving the densities and the liquid")
    p.add_argument("--particle-density", metavar="DENSITY", help='e.g. "2700 kg/m3"')
    p.add_argument("--liquid-density", metavar="DENSITY", help='e.g. "997 kg/m3"')
    p.add_argument("--liquid-viscosity", metavar="VISCOSITY", help='e.g. "0.89 mPa*s"')
    p.add_argument("--shear-rate", metavar="RATE",
                   help="use the rows measured at this shear rate")
    p.add_argument("--branch", choices=["up", "down"], default="up",
                   help="with a liquid law: the branch of each flow curve to fit (default up)")
    _add_output(p, viscosity=False)

    p = add("report", "write an HTML (and optionally PDF) report of a scenario", cmd_report)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("-o", "--output", default="loadline_report.html",
                   help="HTML file to write (default loadline_report.html)")
    p.add_argument("--pdf", help="also write this PDF file")
    _add_output(p, machine=False)

    p = add("map", "design map: viscosity over two ingredients' loadings (or a triangle of "
                   "three)", cmd_map)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--x", required=True, metavar="INGREDIENT",
                   help="ingredient across the map: its number (1 = first) or name")
    p.add_argument("--y", required=True, metavar="INGREDIENT", help="ingredient up the map")
    p.add_argument("--z", metavar="PART",
                   help="a third part (ingredient or 'liquid'): draw a triangle instead")
    p.add_argument("--x-range", default="0 50 wt%", metavar="RANGE",
                   help='loadings across, e.g. "20 45 wt%%" (default "0 50 wt%%")')
    p.add_argument("--y-range", default="0 50 wt%", metavar="RANGE",
                   help='loadings up, e.g. "5 25 wt%%" (default "0 50 wt%%")')
    p.add_argument("--total", metavar="LOADING",
                   help='triangle: total of the three parts, e.g. "50 wt%%" (default: now)')
    p.add_argument("--basis", choices=["mass", "volume"], default="mass",
                   help="triangle: basis of the loadings (default mass)")
    p.add_argument("--shear-rate", required=True, metavar="RATE",
                   help='shear rate of the map, e.g. "100 1/s"')
    p.add_argument("--window", action="append", metavar="WINDOW",
                   help="a process window, e.g. 'pumping, 100 1/s, max 2 Pa*s' or "
                        "'sag, 0.1 1/s, min 10 Pa*s' (repeatable)")
    p.add_argument("-n", type=int, default=41, help="grid points per side (default 41)")
    p.add_argument("--show", type=int, default=20, help="rows shown in the table (default 20)")
    p.add_argument("--png", metavar="FILE", help="also write the chart as PNG")
    p.add_argument("-o", "--output", help="also write every cell here (.csv, .xlsx or .json)")
    _add_output(p)

    p = add("candidates", "candidate table from a scenario: a design over chosen factors, "
                          "for loadline screen", cmd_candidates)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--factor", action="append", required=True, metavar="FACTOR",
                   help="'NAME: LOW HIGH UNIT', NAME one of 'ingredient k loading', "
                        "'ingredient k d50', 'temperature', 'liquid viscosity', 'glycerol' "
                        "(repeatable)")
    p.add_argument("--design", default="full-factorial",
                   choices=["full-factorial", "latin-hypercube", "sobol", "halton"],
                   help="full factorial (default) or a space-filling design")
    p.add_argument("-n", type=int, default=16,
                   help="rows of a space-filling design (default 16)")
    p.add_argument("--levels", type=int, default=3,
                   help="levels per factor of the full factorial (default 3)")
    p.add_argument("--seed", type=int, default=0, help="seed of the space-filling designs")
    p.add_argument("--window", action="append", metavar="WINDOW",
                   help="a process window for every row, as in 'loadline map'")
    p.add_argument("-o", "--output", required=True, help="candidate table to write (.csv)")

    p = add("pipe", "pressure drop, regime and restart pressure in a pipe or hose", cmd_pipe)
    p.add_argument("scenario", help="scenario file (*.loadline.json)")
    p.add_argument("--flow", action="append", required=True, metavar="FLOW",
                   help='flow rate with its unit, e.g. "10 L/min" (repeatable)')
    p.add_argument("--flow-to", metavar="FLOW",
                   help="end of a flow range from --flow (a system curve)")
    p.add_argument("--points", type=int, default=11,
                   help="points of the flow range (default 11)")
    p.add_argument("--diameter", required=True, metavar="LENGTH",
                   help='inner diameter, e.g. "25 mm"')
    p.add_argument("--length", required=True, metavar="LENGTH", help='length, e.g. "10 m"')
    p.add_argument("--roughness", default="0 m", metavar="LENGTH",
                   help='wall roughness, e.g. "0.05 mm" (default 0: smooth)')
    p.add_argument("--flow-unit", default="L/min", metavar="UNIT",
                   help="unit of flow rates in the table (default L/min)")
    p.add_argument("--pressure-unit", default="bar", metavar="UNIT",
                   help="unit of pressures in the table (default bar)")
    _add_output(p, viscosity=False)

    p = add("models", "the published relations Loadline knows, with their sources", cmd_models)
    p.add_argument("--kind", choices=["suspension", "emulsion", "packing", "liquid", "shear",
                                      "thixotropy", "process", "interaction"],
                   help="only relations of this kind")
    _add_output(p, viscosity=False)

    p = add("demo", "run the main job on the bundled demo scenario", cmd_demo)
    _add_output(p, machine=False)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Entry point of the `loadline` command; returns the exit code."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exit_:
        return int(exit_.code or 0)
    if not getattr(args, "command", None):
        parser.print_help()
        return EXIT_USAGE
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            code = args.func(args)
        for message in dict.fromkeys(str(w.message) for w in caught):
            print(f"loadline: note: {message}", file=sys.stderr)
        return code
    except MissingPartError as err:
        print(f"loadline: not available yet: {err}", file=sys.stderr)
        return EXIT_MISSING
    except LoadlineError as err:
        print(f"loadline: error: {err}", file=sys.stderr)
        return EXIT_INPUT
    except BrokenPipeError:   # output piped into `head` and closed early: not an error
        sys.stderr.close()
        return EXIT_OK
    except OSError as err:
        print(f"loadline: error: {err.strerror or err}: {err.filename or ''}", file=sys.stderr)
        return EXIT_INPUT
    except KeyboardInterrupt:
        print("loadline: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    raise SystemExit(main())
