"""Batch screening: a table of candidate formulations, one per row, predicted in one pass.

This is an orchestration module like `formulation.py`: it reads the table, converts units
at the edge (`predictor.units`), and sequences vectorised calls to the core over all rows of
a chunk at once (`composition`, `suspension`, the registry's relations, `liquids`,
`engine.evaluate` and `engine.max_loading`; `formulation.mixture` once per distinct powder
blend). It
writes no relation of its own. Rows with bad input get a message in their `error` column and
never stop the run; so does a CSV row with more cells than the header.

The candidate table (CSV, or Excel with openpyxl)
------------------------------------------------
One row per candidate. Column names are case-insensitive; a unit in square brackets after a
numeric column's name is required where the quantity has a dimension, and may be any unit
pint reads (``[cP]``, ``[mPa*s]``, ``[degC]``, ``[g/cm3]``, ``[nm]``). Empty cells take the
default shown. ``k`` numbers the ingredients (1, 2, ...) and ``j`` the target windows.

======================================  ======================================================
column                                  meaning
======================================  ======================================================
``candidate``                           name of the row (default: its row number)
``base scenario``                       a ``*.loadline.json`` (path relative to the table, in
                                        its folder); the row's other cells override it field
                                        by field (see below)
``liquid``                              ``water`` (default), ``glycerol-water``, ``newtonian``
                                        or a registry liquid law
``liquid law``                          a registry liquid law (``carreau-yasuda``, ``cross``,
                                        ``power-law``, ``bingham``, ``herschel-bulkley``,
                                        ``casson``, ``newtonian``); replaces ``liquid``
``liquid <parameter> [unit]``           a parameter of the liquid law, named after the
                                        registry parameter without its unit suffix
                                        (``liquid zero shear viscosity [Pa*s]``,
                                        ``liquid time constant [s]``, ``liquid flow index [-]``,
                                        ``liquid yield stress [Pa]``, ...) or by the registry
                                        name itself; empty cells take the registry default
``liquid viscosity [Pa*s]``             viscosity of a ``newtonian`` liquid
``liquid activation temperature [K]``   Arrhenius shift of a law's viscosities and time
                                        constants (empty: none)
``liquid reference temperature [degC]`` temperature of the law's parameters (default 25 degC)
``thickening onset [Pa]``               onset stress of frictional thickening (empty: none)
``phi_max frictional [-]``              frictional packing limit (default 0.58/0.64 phi_max)
``temperature [degC]``                  default 25 degC
``liquid density [kg/m3]``              default 997 kg/m3 for water; required otherwise
``glycerol [wt%]``                      glycerol share of a ``glycerol-water`` liquid
``relation``                            solids relation (default ``krieger-dougherty``)
``droplet relation``                    droplets relation (default ``phan-thien-pham``)
``ingredient k``                        name; an empty name and loading means "no ingredient k"
``ingredient k kind``                   ``solid`` (default) or ``droplet``
``ingredient k loading [wt%]``          also ``[vol%]``, ``[wt fraction]``, ``[vol fraction]``
``ingredient k density [kg/m3]``        particle or droplet density (required)
``ingredient k d50 [um]``               volume-basis median size (required for solids unless
                                        a size table is given)
``ingredient k spread [-]``             geometric standard deviation of a volume lognormal;
                                        empty or 1 means one size
``ingredient k size table``             CSV file (path relative to the candidate table) with
                                        ``size [um]`` and ``passing [vol%]`` (cumulative) or
                                        ``amount [vol%]`` columns; replaces d50 and spread
``ingredient k aspect ratio [-]``       default 1 (spheres)
``ingredient k layer [nm]``             adsorbed-layer thickness, default 0
``ingredient k phi_max [-]``            measured packing limit, replaces the estimate
``ingredient k intrinsic viscosity [-]`` replaces the estimate from the aspect ratio
``ingredient k droplet viscosity [Pa*s]`` default: the liquid's viscosity
``ingredient k basis``                  ``mass`` or ``volume``: overrides the loading column's
``window j``                            name of the window (e.g. ``pumping``)
``window j shear rate [1/s]``           shear rate of the window (required for a window)
``window j min viscosity [Pa*s]``       lower limit (optional)
``window j max viscosity [Pa*s]``       upper limit (optional)
======================================  ======================================================

Columns the table has beyond these are passed through unchanged; a column whose name starts
like one of ours (``ingredient``, ``window``, ``liquid``) but is not recognised is reported.

With a ``base scenario`` column a table needs only the columns that vary: the scenario gives
the liquid (law, parameters, temperatures, density), the relations, thickening and each
ingredient (name, kind, loading and its basis, density, size distribution, shape, layer,
packing limit, intrinsic and droplet viscosity); a non-empty cell of the row replaces the
field. A row's own ``ingredient k d50`` or ``size table`` replaces the base's size
distribution; its ``spread`` alone makes a lognormal around the base's D50. A missing,
unreadable or malformed base scenario, or one outside the table's folder, is the error of
each row naming it; rows with an empty ``base scenario`` cell read as without the column.
A base scenario with calibrated relation parameters is refused (no columns for them yet).

Output columns, appended to the input columns: ``status`` (``ok`` / ``error``), ``error``,
``phi solids [-]`` (effective, with adsorbed layers), ``phi droplets [-]``, ``phi_max [-]``,
``headroom phi/phi_max [-]``, ``liquid viscosity [Pa*s]``, and per window
``window j viscosity [Pa*s]``, ``window j regime``, ``window j max solids [vol%]``
(effective), ``window j max solids [wt%]`` and ``window j limited by`` (when the window has
a max viscosity; what sets the highest loading: ``viscosity`` where the max viscosity is
reached, ``packing`` where it is not reached below phi_max, ``liquid`` where the liquid with
its droplets is already above it; empty where not computed),
``window j verdict`` (``pass`` / ``fail`` / ``error``), then ``settling`` and ``warnings``.
The viscosity unit of the output is selectable.

The viscosity at a window's shear rate and the highest loading come from the one
formulation engine (`predictor.engine`): every row of a chunk is one row of a
`FormulationSet`, solved at its window shear rates in one vectorised call
(`engine.evaluate`, the solve `formulation.predict` uses) and the highest loadings by one
search vectorised over rows and windows (`engine.max_loading`, the solver of
`formulation.max_loading`), so a batch row equals them for the same inputs.
"""

from __future__ import annotations

import contextlib
import dataclasses
import io
import math
import pathlib
import re
import warnings as warnings_module
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from . import composition, engine, formulation, packing, shear, sizes, suspension
from .errors import InputRangeError, LoadlineError, ScenarioError, UnitError, ValidityWarning
from .files import atomic_write, check_output, open_atomic
from .labdata import decimal_point, decode_text, looks_like_data, read_bytes
from .registry import get_model
from .units import from_si, parse_loading, to_si

CHUNK_ROWS = 50_000
DEFAULT_RELATION = "krieger-dougherty"
DEFAULT_DROPLET_RELATION = "phan-thien-pham"
WATER_DENSITY_KG_PER_M3 = 997.0  # the default of formulation.Liquid
CLOSE_TO_JAMMING = 0.95          # headroom above which a row is flagged (our own threshold)
# Candidate tables are streamed in chunks, so their limit is far above the 5 MB of a size
# table or a scenario; it only stops a wrong file (a disk image, a video) being parsed.
MAX_TABLE_BYTES = 500_000_000
MAX_SIZE_TABLE_BYTES = 5_000_000

# field name -> dimension passed to units.to_si ("loading" and "text" are special)
_LIQUID_FIELDS = {
    "candidate": "text", "liquid": "text", "relation": "text", "droplet relation": "text",
    "liquid viscosity": "viscosity", "temperature": "temperature",
    "liquid density": "density", "glycerol": "loading", "base scenario": "text",
    "liquid law": "text", "liquid reference temperature": "temperature",
    "liquid activation temperature": "temperature_difference",
    "thickening onset": "stress", "phi_max frictional": "dimensionless",
}
_INGREDIENT_FIELDS = {
    "": "text", "kind": "text", "loading": "loading", "density": "density", "d50": "length",
    "spread": "dimensionless", "size table": "text", "aspect ratio": "dimensionless",
    "layer": "length", "phi_max": "dimensionless", "droplet viscosity": "viscosity",
    "intrinsic viscosity": "dimensionless", "basis": "text",
}
_WINDOW_FIELDS = {
    "": "text", "shear rate": "shear_rate", "min viscosity": "viscosity",
    "max viscosity": "viscosity",
}
_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]*?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")
_INDEXED = re.compile(r"^(?P<what>ingredient|window)\s+(?P<k>\d+)\s*(?P<field>.*)$")
_NUMBER = re.compile(r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$")
_FRACTION_UNITS = {"wt fraction": "mass", "mass fraction": "mass", "w/w": "mass",
                   "vol fraction": "volume", "volume fraction": "volume", "v/v": "volume"}


@dataclass(frozen=True)
class Column:
    """One recognised column: what it holds and how to turn a cell into SI."""

    header: str
    field: str            # e.g. "temperature", "loading", "d50"
    index: int = 0        # ingredient or window number, 0 for row-level fields
    dimension: str = "text"
    scale: float = 1.0    # SI = offset + scale * cell
    offset: float = 0.0
    basis: str = ""       # "mass" / "volume" for loadings


@dataclass(frozen=True)
class Layout:
    """The parsed header of a candidate table."""

    columns: tuple[Column, ...]
    ingredients: tuple[int, ...]
    windows: tuple[int, ...]
    unrecognised: tuple[str, ...]

    def get(self, field_name: str, index: int = 0) -> Column | None:
        for col in self.columns:
            if col.field == field_name and col.index == index:
                return col
        return None


#: Parameter units of the registry's liquid laws -> dimension passed to units.to_si.
_PARAM_DIMENSIONS = {"Pa*s": "viscosity", "s": "time", "Pa": "stress", "-": "dimensionless",
                     "": "dimensionless"}


def liquid_parameter_columns() -> dict[str, tuple[str, str]]:
    """Column names (after ``liquid``) of the registry liquid laws' parameters.

    The registry name with its SI suffix dropped and spaces for underscores
    (``zero shear viscosity`` for ``zero_shear_viscosity_Pa_s``), and the registry name
    itself; each maps to (registry name, dimension). ``viscosity`` is the column
    ``liquid viscosity`` of a newtonian liquid.
    """
    from .registry import models

    out = {}
    for spec in models("liquid"):
        for p in spec.params:
            short = re.sub(r"_(Pa_s|Pa|s)$", "", p.name).replace("_", " ")
            dim = "consistency" if p.name.startswith("consistency") else \
                _PARAM_DIMENSIONS.get(p.unit, "dimensionless")
            for key in (short, p.name.lower()):
                out.setdefault(key, (p.name, dim))
    return out


def parse_header(headers) -> Layout:
    """Recognise the columns of a candidate table; a bad unit in a header raises.

    Raises
    ------
    UnitError
        A header's unit cannot be read or has the wrong dimension (names the column).
    InputRangeError
        A column appears twice, or an ingredient lacks its loading or density column.
    """
    columns, unrecognised, seen = [], [], {}
    for header in headers:
        match = _HEADER.match(str(header))
        name = re.sub(r"\s+", " ", (match.group("name") if match else str(header))).lower()
        unit = (match.group("unit") or "").strip() if match else ""
        indexed = _INDEXED.match(name)
        if indexed:
            kind, index, fname = indexed["what"], int(indexed["k"]), indexed["field"].strip()
            table = _INGREDIENT_FIELDS if kind == "ingredient" else _WINDOW_FIELDS
            if fname not in table:
                unrecognised.append(str(header))
                continue
            dimension = table[fname]
            fname = f"{kind} {fname}".strip()
        elif name in _LIQUID_FIELDS:
            index, fname, dimension = 0, name, _LIQUID_FIELDS[name]
        elif name.startswith("liquid ") and name[7:] in liquid_parameter_columns():
            param, dimension = liquid_parameter_columns()[name[7:]]
            index, fname = 0, f"liquid param {param}"
        else:
            if name.split(" ")[0] in ("ingredient", "window", "liquid"):
                unrecognised.append(str(header))
            continue
        if index < 0 or (indexed and index == 0):
            raise InputRangeError(f"column '{header}'", index, "numbers from 1")
        if indexed and kind == "ingredient" and index > formulation.MAX_INGREDIENTS:
            raise InputRangeError(f"column '{header}'", index,
                                  f"ingredients numbered 1 to {formulation.MAX_INGREDIENTS} "
                                  "(a limit that bounds the work of each row)")
        key = (fname, index)
        if key in seen:
            raise InputRangeError(f"column '{header}'", "a second time",
                                  f"one column per field (also '{seen[key]}')")
        seen[key] = str(header)
        columns.append(_column(str(header), fname, index, dimension, unit))
    cols = tuple(columns)
    ingredients = tuple(sorted({c.index for c in cols if c.field.startswith("ingredient")}))
    windows = tuple(sorted({c.index for c in cols if c.field.startswith("window")}))
    layout = Layout(cols, ingredients, windows, tuple(unrecognised))
    based = layout.get("base scenario") is not None   # the base gives what columns leave out
    for k in ingredients:
        for needed in ("loading", "density"):
            if layout.get(f"ingredient {needed}", k) is None and not based:
                raise InputRangeError(f"column 'ingredient {k} {needed}'", "missing",
                                      f"a column 'ingredient {k} {needed} [unit]' for "
                                      f"ingredient {k}")
    for j in windows:
        if layout.get("window shear rate", j) is None:
            raise InputRangeError(f"column 'window {j} shear rate'", "missing",
                                  f"a column 'window {j} shear rate [1/s]' for window {j}")
    if not ingredients and not based:
        raise InputRangeError("columns", "no ingredient", "at least the columns "
                              "'ingredient 1 loading [wt%]' and 'ingredient 1 density [kg/m3]'")
    return layout


def _column(header, fname, index, dimension, unit) -> Column:
    if dimension == "text":
        return Column(header, fname, index)
    if dimension == "temperature_difference":      # an activation temperature: no offset
        if not unit:
            raise UnitError(f"column '{header}': give its unit in square brackets, e.g. "
                            f"'{header} [K]'.")
        field_name = f"unit of column '{header}'"
        scale = (to_si(1.0, unit, "temperature", field_name)
                 - to_si(0.0, unit, "temperature", field_name))
        return Column(header, fname, index, dimension, scale, 0.0)
    if dimension == "loading":
        if unit.lower() in _FRACTION_UNITS:
            return Column(header, fname, index, dimension, 1.0, 0.0, _FRACTION_UNITS[unit.lower()])
        if not unit or unit.strip() == "%":
            raise UnitError(f"column '{header}': write the loading's basis in the header, "
                            "e.g. [wt%], [vol%], [wt fraction] or [vol fraction].")
        try:
            scale, basis = parse_loading(f"100 {unit}", field=f"column '{header}'")
        except LoadlineError:
            raise UnitError(f"column '{header}': unit [{unit}] is not a loading; write [wt%], "
                            "[vol%], [wt fraction] or [vol fraction].") from None
        return Column(header, fname, index, dimension, scale / 100.0, 0.0, basis)
    if not unit or unit == "-":
        if dimension != "dimensionless":
            raise UnitError(f"column '{header}': give its unit in square brackets, e.g. "
                            f"'{header} [{_EXAMPLE_UNITS[dimension]}]'.")
        return Column(header, fname, index, dimension)
    field_name = f"unit of column '{header}'"
    offset = to_si(0.0, unit, dimension, field_name)
    scale = to_si(1.0, unit, dimension, field_name) - offset
    return Column(header, fname, index, dimension, scale, offset)


_EXAMPLE_UNITS = {"viscosity": "Pa*s", "temperature": "degC", "density": "kg/m3",
                  "length": "um", "shear_rate": "1/s", "stress": "Pa", "time": "s",
                  "consistency": "Pa*s^n"}


# -- reading ----------------------------------------------------------------------------------


def _sniff(text: str, name: str) -> str:
    """The delimiter of a CSV (',', ';' or tab, from its header line); refuses a missing header."""
    head = next(ln for ln in text.splitlines() if ln.strip())
    delimiter = max(",;\t", key=head.count)
    if looks_like_data(head.split(delimiter)):
        raise ScenarioError(f"{name}, line 1: {head[:60]!r} looks like data, not a header; the "
                            "first line must name the columns (with units in brackets)")
    return delimiter


def _decimal_points(frame: pd.DataFrame) -> pd.DataFrame:
    """Decimal commas -> points in every cell (for ';' or tab files)."""
    return frame.apply(lambda col: col.map(decimal_point))


#: Cells read beyond the header on each row, to find rows with more cells than the header;
#: a wider row switches the rest of the file to Python's csv reader (slower, no limit).
EXTRA_CELLS = 16
#: Column `read_table` adds to a chunk whose rows it could not align with the header: the
#: message per row ("" for good rows). The NUL cannot occur in a header of a readable file.
ROW_ERROR = "\x00row error"


def read_table(path, chunk_rows: int = CHUNK_ROWS) -> Iterator[pd.DataFrame]:
    """The candidate table in chunks of text cells (CSV streamed; Excel read whole).

    A CSV is UTF-8 (a BOM is allowed; Latin-1 is refused with the line of the first bad
    byte, not guessed), delimited by ``,``, ``;`` or a tab (found from the header line), and
    at most `MAX_TABLE_BYTES`. In a ``;`` or tab file, a decimal comma (``0,25``) reads as a
    decimal point. A row with more cells than the header (counting up to its last non-empty
    cell; often a text cell holding the delimiter without quotes) is not shifted or dropped:
    the chunk gets a `ROW_ERROR` column naming the row and both counts, and the screen
    reports the row as an error. Rows with fewer cells have the missing ones empty.
    """
    path = pathlib.Path(path)
    if not path.is_file():
        raise ScenarioError(f"candidate table {path} does not exist.")
    if path.suffix.lower() == ".parquet":
        yield from _read_parquet(path, chunk_rows)
        return
    if path.suffix.lower() in (".xlsx", ".xlsm"):
        try:
            frame = pd.read_excel(path, dtype=str, keep_default_na=False)
        except ImportError:
            raise ScenarioError("reading Excel needs openpyxl: pip install openpyxl.") from None
        except Exception as err:  # openpyxl raises many kinds for a broken file
            raise ScenarioError(f"{path.name} is not a readable Excel file ({err}).") from None
        frame = frame.astype(str).replace({"nan": "", "None": ""})
        for start in range(0, max(len(frame), 1), chunk_rows):
            yield frame.iloc[start:start + chunk_rows].reset_index(drop=True)
        return
    what = "a candidate table: a header row and candidate rows"
    size = path.stat().st_size
    if size > MAX_TABLE_BYTES:
        raise ScenarioError(f"{path.name} is {size / 1e6:.1f} MB, over the "
                            f"{MAX_TABLE_BYTES / 1e6:g} MB limit for a candidate table; is it "
                            "the right file?")
    with path.open("rb") as handle:
        start = handle.read(1 << 16)
    if len(start) == 1 << 16:  # cut at a line end, so a split character is not misreported
        start = start[:start.rfind(b"\n") + 1] or start[:-4]
    text = decode_text(start, path.name, what)
    delimiter = _sniff(text, path.name)
    lines = re.split(r"\r\n|\r|\n", text)
    header_line = next(i for i, ln in enumerate(lines) if ln.strip())
    options = dict(dtype=str, keep_default_na=False, skipinitialspace=True,
                   encoding="utf-8-sig", sep=delimiter)
    done = 0
    try:
        header = list(pd.read_csv(path, nrows=0, **options).columns)
        extra = [f"\x00extra {i}" for i in range(1, EXTRA_CELLS + 1)]
        # index_col=False: a first row wider than the names must not become an index (its
        # leading cells would be taken as row labels and the rest shifted).
        reader = pd.read_csv(path, header=None, skiprows=header_line + 1, names=header + extra,
                             chunksize=chunk_rows, index_col=False, **options)
        try:
            while (chunk := _next_chunk(reader)) is not None:
                filled = chunk[extra].to_numpy(dtype=object) != ""
                # cells up to the last non-empty extra one (rows without extras: the header's)
                counts = np.where(filled.any(axis=1), len(header) + EXTRA_CELLS
                                  - np.argmax(filled[:, ::-1], axis=1), len(header))
                chunk = _aligned(chunk.drop(columns=extra), counts, len(header), done,
                                 delimiter)
                done += len(chunk)
                yield chunk
            return
        except (pd.errors.ParserError, pd.errors.ParserWarning):
            pass   # a row beyond the extra cells: count with Python's csv reader
        for block in _csv_rows(path, delimiter, done, chunk_rows):
            counts = np.array([_cell_count(row) for row in block])
            block = [(row + [""] * len(header))[:len(header)] for row in block]
            chunk = _aligned(pd.DataFrame(block, columns=header, dtype=object), counts,
                             len(header), done, delimiter)
            done += len(chunk)
            yield chunk
    except pd.errors.EmptyDataError:
        raise ScenarioError(f"{path.name} is empty; expected a header row and "
                            "candidate rows.") from None
    except UnicodeDecodeError as err:
        raise ScenarioError(f"{path.name}: byte 0x{err.object[err.start]:02x} is not UTF-8 "
                            "(far into the file); save the table as UTF-8.") from None
    except pd.errors.ParserError as err:
        raise ScenarioError(f"{path.name} is not a readable CSV table ({err}).") from None


def _read_parquet(path: pathlib.Path, chunk_rows: int) -> Iterator[pd.DataFrame]:
    """A Parquet candidate table in chunks of `chunk_rows` rows (row groups streamed by
    pyarrow), every cell as text like a CSV cell (an empty or null cell is "")."""
    import pyarrow.parquet as pq

    try:
        handle = pq.ParquetFile(path)
    except Exception as err:  # pyarrow raises several kinds for a broken file
        raise ScenarioError(f"{path.name} is not a readable Parquet file ({err}).") from None
    if handle.metadata.num_rows == 0:
        yield pd.DataFrame(columns=handle.schema_arrow.names, dtype=object)
        return
    for block in handle.iter_batches(batch_size=chunk_rows):
        frame = block.to_pandas()
        yield frame.astype(object).where(frame.notna(), "").astype(str)


def _next_chunk(reader):
    """The next chunk of a pandas CSV reader, or None; a row wider than the names raises
    (pandas only warns, and drops cells, when that row is the first)."""
    with warnings_module.catch_warnings():
        warnings_module.simplefilter("error", pd.errors.ParserWarning)
        return next(reader, None)


def _cell_count(row: list[str]) -> int:
    """Cells of a row up to its last non-empty one."""
    for i in range(len(row), 0, -1):
        if row[i - 1].strip():
            return i
    return 0


def _aligned(chunk: pd.DataFrame, counts: np.ndarray, width: int, done: int,
             delimiter: str) -> pd.DataFrame:
    """`chunk` (header columns only), with `ROW_ERROR` where a row had more cells."""
    if delimiter != ",":
        chunk = _decimal_points(chunk)
    wide = counts > width
    if not wide.any():
        return chunk
    shown = {",": "comma", ";": "semicolon", "\t": "tab"}[delimiter]
    messages = np.full(len(chunk), "", dtype=object)
    for i in np.flatnonzero(wide):
        # row number as a spreadsheet shows it (the header is row 1)
        messages[i] = (f"row {done + i + 2} has {counts[i]} cells, the header has {width}; "
                       f"a text cell holding a {shown} needs quotes. The row is not read.")
    chunk = chunk.copy()
    chunk[ROW_ERROR] = messages
    return chunk


def _csv_rows(path: pathlib.Path, delimiter: str, skip: int, chunk_rows: int):
    """Blocks of rows (lists of cells) after the header and `skip` rows, by Python's csv."""
    import csv
    import itertools

    with path.open(newline="", encoding="utf-8-sig") as handle:
        rows = (row for row in csv.reader(handle, delimiter=delimiter, skipinitialspace=True)
                if row)
        next(rows, None)
        for _ in itertools.islice(rows, skip):
            pass
        while block := list(itertools.islice(rows, chunk_rows)):
            yield block


def count_rows(path) -> int | None:
    """Number of data rows of a CSV (lines after the header) or a Parquet file (its
    metadata), for the progress bar; None for other tables."""
    path = pathlib.Path(path)
    if path.suffix.lower() == ".parquet":
        import pyarrow.parquet as pq

        try:
            return pq.ParquetFile(path).metadata.num_rows
        except Exception:  # noqa: BLE001  a broken file is reported by read_table instead
            return None
    if path.suffix.lower() != ".csv":
        return None
    lines = 0
    with path.open("rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            lines += block.count(b"\n")
    return max(lines - 1, 0)


def read_size_table(path, field: str = "size table") -> sizes.SizeDistribution:
    """A measured size distribution from a CSV with a size column and an amount column.

    The size column is ``size [unit]`` (any length unit); the amount column is
    ``passing [vol%]`` (cumulative percent finer), ``amount [vol%]`` (per class) or
    ``retained [g]`` (any positive total, normalised); ``[wt%]`` is the same as vol% for one
    material, ``[num%]`` reads as a number basis. Other columns (notes) are ignored.

    The file is UTF-8 (a BOM is allowed; Latin-1 is refused with the line of the first bad
    byte, not guessed), delimited by ``,``, ``;`` or a tab, and at most
    `MAX_SIZE_TABLE_BYTES`; in a ``;`` or tab file a decimal comma (``0,25``) reads as a
    decimal point.
    """
    path = pathlib.Path(path)
    if not path.is_file():
        raise ScenarioError(f"{field}: file {path} does not exist.")
    what = "a size table: a header row and size classes"
    try:
        text = decode_text(read_bytes(path, path.name, "a size table", MAX_SIZE_TABLE_BYTES),
                           path.name, what)
        delimiter = _sniff(text, path.name)
    except ScenarioError as err:
        raise ScenarioError(f"{field}: {err}") from None
    try:
        frame = pd.read_csv(io.StringIO(text), dtype=str, keep_default_na=False,
                            skipinitialspace=True, sep=delimiter)
    except (pd.errors.ParserError, pd.errors.EmptyDataError) as err:
        raise ScenarioError(f"{field}: {path.name} is not a readable CSV ({err}).") from None
    if delimiter != ",":
        frame = _decimal_points(frame)
    size_col = amount_col = None
    cumulative = normalise = False
    basis = "volume"
    for header in frame.columns:
        match = _HEADER.match(str(header))
        name = (match.group("name") if match else str(header)).strip().lower()
        unit = ((match.group("unit") or "") if match else "").strip()
        if name in ("size", "diameter"):
            size_col = (header, unit)
        elif name in ("passing", "amount", "retained"):
            amount_col = (header, unit)
            cumulative, normalise = name == "passing", name == "retained"
            basis = "number" if unit.lower().startswith("num") else "volume"
    if size_col is None or amount_col is None:
        raise ScenarioError(f"{field}: {path.name} needs a 'size [um]' column and a "
                            "'passing [vol%]', 'amount [vol%]' or 'retained [g]' column.")
    if not size_col[1]:
        raise UnitError(f"{field}: column '{size_col[0]}' of {path.name} needs a unit, "
                        "e.g. 'size [um]'.")
    _check_amount_unit(amount_col, normalise,
                       field if path.name in field else f"{field}: {path.name}")
    scale = to_si(1.0, size_col[1], "length", f"unit of column '{size_col[0]}'")
    values = frame[size_col[0]].str.strip()
    amounts = frame[amount_col[0]].str.strip()
    keep = (values != "") | (amounts != "")
    sizes_m = []
    for i, cell in enumerate(values[keep]):
        try:
            sizes_m.append(float(cell) * scale)
        except ValueError:
            raise InputRangeError(f"{path.name} row {i + 2}, column {size_col[0]}", repr(cell),
                                  f"a plain number in the header's unit ({size_col[1]}); "
                                  "mixed units are not read") from None
    return sizes.SizeDistribution.from_table(
        sizes_m, list(amounts[keep]), basis=basis, cumulative=cumulative, normalise=normalise,
        columns=(str(size_col[0]), str(amount_col[0])), first_row=2).limit_classes(field=field)


#: Units of a size table's amount column: percent or fraction on some basis; a 'retained'
#: column may also be a mass or a volume (any total, normalised).
_AMOUNT_UNITS = re.compile(r"^(|-|%|(vol|v/v|volume|wt|w/w|mass|num|number|count)\s*%?|"
                           r"(vol|volume|mass|wt|number|num)?\s*fraction)$", re.IGNORECASE)


def _check_amount_unit(column: tuple[str, str], any_total: bool, where: str) -> None:
    """Refuse an amount column whose unit is not a share (or, for 'retained', an amount)."""
    header, unit = column
    if _AMOUNT_UNITS.match(unit.strip()):
        return
    if any_total:
        from .units import ureg

        try:
            dims = ureg.parse_units(unit).dimensionality
        except Exception:  # noqa: BLE001  pint raises many kinds on odd text
            dims = None
        if dims is not None and dims in (ureg.gram.dimensionality,
                                         ureg.liter.dimensionality):
            return
    allowed = ("a percent or fraction ([vol%], [wt%], [num%], [-])"
               + (", a mass ([g]) or a volume ([mL])" if any_total else ""))
    raise UnitError(f"{where}: column '{header}' has the unit [{unit}]; expected {allowed}.")


# -- one chunk --------------------------------------------------------------------------------


@dataclass
class _Rows:
    """SI arrays of one chunk, and the first error of each row."""

    n: int
    errors: np.ndarray
    numbers: dict = field(default_factory=dict)
    cells: dict = field(default_factory=dict)     # text columns: stripped pyarrow arrays
    lowered: dict = field(default_factory=dict)   # texts in lower case, made when asked

    def text(self, key) -> np.ndarray | None:
        """The stripped cells of a text column as an object array (None: no such column)."""
        cells = self.cells.get(key)
        return None if cells is None else cells.to_numpy(zero_copy_only=False).astype(object)

    def __post_init__(self):
        self._ok = pd.isna(self.errors)   # kept in step by `flag` and `flag_row`

    def flag(self, mask, message) -> None:
        """Keep the first error of each row where `mask`; `message` is a str or per-row array."""
        mask = np.asarray(mask, dtype=bool) & self._ok
        if not mask.any():
            return
        if isinstance(message, str):
            self.errors[mask] = message
        else:
            self.errors[mask] = np.asarray(message, dtype=object)[mask]
        self._ok[mask] = False

    def flag_row(self, i: int, message: str) -> None:
        """Keep the first error of row `i`."""
        if self._ok[i]:
            self.errors[i], self._ok[i] = message, False

    @property
    def ok(self) -> np.ndarray:
        """Rows without an error (a copy)."""
        return self._ok.copy()


def _read_cells(chunk: pd.DataFrame, layout: Layout, row_errors=None) -> _Rows:
    """The chunk's cells as SI arrays (numbers) and stripped texts, bad cells flagged.

    Vectorised per column: the cells are stripped and parsed in pyarrow's compute kernels
    (`_strip`, `_parse_numbers`); a message is built only for the rows that need one.
    """
    rows = _Rows(len(chunk), np.full(len(chunk), None, dtype=object))
    if row_errors is not None:   # from read_table: rows whose cells could not be aligned
        row_errors = np.asarray(row_errors, dtype=object)
        rows.flag(row_errors != "", row_errors)
    for col in layout.columns:
        raw = _strip(chunk[col.header])
        key = (col.field, col.index)
        if col.dimension == "text":
            rows.cells[key] = raw
            continue
        value, given = _parse_numbers(raw)
        bad = given & ~np.isfinite(value)
        if bad.any():
            rows.flag(bad, _messages(bad, raw, lambda c, col=col: (
                f"column '{col.header}' = {c!r} is not allowed; expected a finite number.")))
            value[bad] = np.nan
        with np.errstate(over="ignore", invalid="ignore"):
            si = col.offset + col.scale * value
        _check_cell_range(rows, raw, col, si)
        rows.numbers[key] = si
    return rows


def _strip(cells: pd.Series):
    """A column's cells as a pyarrow string array, surrounding whitespace removed."""
    import pyarrow as pa
    import pyarrow.compute as pc

    try:
        arr = pa.array(cells, type=pa.string(), from_pandas=True)
    except (pa.ArrowInvalid, pa.ArrowTypeError):     # cells that are not all text
        arr = pa.array(cells.astype(str).to_numpy(dtype=object), type=pa.string())
    if isinstance(arr, pa.ChunkedArray):
        arr = arr.combine_chunks()
    return pc.utf8_trim_whitespace(pc.fill_null(arr, ""))


def _parse_numbers(raw) -> tuple[np.ndarray, np.ndarray]:
    """Floats of stripped text cells (NaN where empty or not a number), and where given.

    pyarrow's parser for a clean column (the same doubles as `pandas.to_numeric`, checked
    in the tests); `pandas.to_numeric` with errors="coerce" when a cell is not a number.
    """
    import pyarrow as pa
    import pyarrow.compute as pc

    given = pc.not_equal(raw, "")
    try:
        value = pc.cast(pc.if_else(given, raw, None), pa.float64())
        value = value.to_numpy(zero_copy_only=False).astype(float, copy=True)
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        value = np.array(pd.to_numeric(pd.Series(raw.to_numpy(zero_copy_only=False)
                                                 .astype(object)), errors="coerce"),
                         dtype=float)
    return value, given.to_numpy(zero_copy_only=False).astype(bool)


def _messages(mask: np.ndarray, cells, make: Callable[[object], str]) -> np.ndarray:
    """`make(cell)` for the rows where `mask` (others empty): messages only where needed.

    `cells` is a pyarrow array or a numpy array over the rows.
    """
    out = np.full(len(mask), "", dtype=object)
    where = np.flatnonzero(mask)
    picked = cells.take(where).to_pylist() if hasattr(cells, "to_pylist") else \
        np.asarray(cells)[where].tolist()
    out[where] = [make(cell) for cell in picked]
    return out


#: Highest shear rate a window may ask for. Process shear rates reach about 1e6 to 1e7 1/s
#: (high-speed coating, spraying); 1e9 is generous and keeps stresses finite (common
#: practice, no source). [1/s]
MAX_SHEAR_RATE_1_PER_S = 1e9


def _check_cell_range(rows: _Rows, raw, col: Column, si: np.ndarray) -> None:
    """Flag cells whose SI value overflowed, and shear rates beyond any process, by column."""
    overflow = np.isinf(si)
    if overflow.any():
        rows.flag(overflow, _messages(overflow, raw, lambda c: (
            f"column '{col.header}' = {c!r} is too large once converted to SI units.")))
    if col.dimension == "shear_rate":
        high = np.isfinite(si) & (si > MAX_SHEAR_RATE_1_PER_S)
        if high.any():
            rows.flag(high, _messages(high, raw, lambda c: (
                f"column '{col.header}' = {c!r} is not allowed; expected a shear rate up to "
                f"{MAX_SHEAR_RATE_1_PER_S:g} 1/s.")))
        si[~np.isfinite(si) | (si > MAX_SHEAR_RATE_1_PER_S)] = np.nan
    else:
        si[overflow] = np.nan


def _num(rows: _Rows, field_name: str, index: int = 0, default=np.nan) -> np.ndarray:
    value = rows.numbers.get((field_name, index))
    if value is None:
        return np.full(rows.n, default, dtype=float)
    return np.where(np.isnan(value), default, value)


def _text(rows: _Rows, field_name: str, index: int = 0, default: str = "") -> np.ndarray:
    import pyarrow.compute as pc

    cells = rows.cells.get((field_name, index))
    if cells is None:
        return np.full(rows.n, default, dtype=object)
    lowered = rows.lowered.get((field_name, index))
    if lowered is None:    # str.lower once per distinct cell
        coded = pc.dictionary_encode(cells)
        uniques = [u.lower() for u in coded.dictionary.to_pylist()] or [""]
        lowered = np.array(uniques, dtype=object)[
            coded.indices.to_numpy(zero_copy_only=False)]
        rows.lowered[(field_name, index)] = lowered
    return np.where(lowered == "", default, lowered)


def _among(values: np.ndarray, options) -> np.ndarray:
    """`np.isin` for an object array of texts: one hash pass, each distinct text looked up once."""
    codes, uniques = pd.factorize(np.asarray(values, dtype=object).ravel(), use_na_sentinel=False)
    wanted = set(options)
    inside = np.array([u in wanted for u in uniques] or [False], dtype=bool)
    return inside[codes].reshape(np.shape(values))


def _check(rows: _Rows, bad, layout: Layout, field_name: str, index: int, value, allowed: str,
           fallback_header: str) -> None:
    """Flag rows where `bad`, naming the column, the value and the allowed range."""
    bad = np.asarray(bad, dtype=bool) & rows.ok
    if not bad.any():
        return
    col = layout.get(field_name, index)
    header = col.header if col else fallback_header
    scale = col.scale if col else 1.0
    offset = col.offset if col else 0.0
    shown = (np.asarray(value, dtype=float) - offset) / (scale or 1.0)
    rows.flag(bad, _messages(bad, shown, lambda v: (
        f"column '{header}' = {v:.6g} is not allowed; expected {allowed}.")))


@dataclass
class _Context:
    """State kept across the chunks of one run (parsed size tables, packing results)."""

    layout: Layout
    base_dir: pathlib.Path
    size_cache: dict = field(default_factory=dict)
    packing_cache: dict = field(default_factory=dict)
    base_cache: dict = field(default_factory=dict)


# -- the base scenario column -----------------------------------------------------------------

#: Prefix of the columns a base scenario adds to a chunk (cannot occur in a readable header).
_BASE = "\x00base "


def _read_base(ctx: _Context, name: str):
    """The Formulation of a base scenario file beside the table, or the error naming it."""
    if name not in ctx.base_cache:
        from .scenario import read_scenario

        try:
            base = ctx.base_dir.resolve()
            path = (base / name).resolve()
            if pathlib.Path(name).is_absolute() or base not in path.parents:
                raise InputRangeError(f"base scenario '{name}'", name,
                                      "a *.loadline.json file in the candidate table's own "
                                      "folder (or below it)")
            form = read_scenario(path)
            if form.model_params or form.droplet_model_params:
                raise InputRangeError(
                    f"base scenario '{name}'", "calibrated relation parameters "
                    f"({', '.join(sorted({**form.model_params, **form.droplet_model_params}))})",
                    "a scenario without them (the batch has no columns for them yet)")
            ctx.base_cache[name] = form
        except LoadlineError as err:
            message = str(err)
            ctx.base_cache[name] = ScenarioError(
                message if name in message else f"base scenario '{name}': {message}")
    return ctx.base_cache[name]


def _base_fields(form: formulation.Formulation, key: str, ctx: _Context) -> dict:
    """(field, index) -> (SI value or text, dimension, basis) of a base scenario."""
    liq = form.liquid
    kind = liq.preset or liq.law
    out = {("liquid", 0): (kind, "text", ""),
           ("temperature", 0): (liq.temperature_K, "temperature", ""),
           ("liquid density", 0): (liq.density_kg_per_m3, "density", ""),
           ("glycerol", 0): (liq.glycerol_mass_fraction, "loading", "mass"),
           ("liquid reference temperature", 0): (liq.reference_temperature_K, "temperature", ""),
           ("relation", 0): (form.model, "text", ""),
           ("droplet relation", 0): (form.droplet_model, "text", "")}
    if liq.activation_temperature_K is not None:
        out[("liquid activation temperature", 0)] = (liq.activation_temperature_K,
                                                     "temperature_difference", "")
    if not liq.preset:
        for name, value in liq.params.items():
            target = "liquid viscosity" if name == "viscosity_Pa_s" else f"liquid param {name}"
            out[(target, 0)] = (float(value), "number", "")
    if form.thickening_onset_stress_Pa is not None:
        out[("thickening onset", 0)] = (form.thickening_onset_stress_Pa, "stress", "")
    if form.phi_max_frictional is not None:
        out[("phi_max frictional", 0)] = (form.phi_max_frictional, "dimensionless", "")
    for k, ing in enumerate(form.ingredients, start=1):
        out[("ingredient", k)] = (ing.name, "text", "")
        out[("ingredient kind", k)] = (ing.kind, "text", "")
        out[("ingredient loading", k)] = (ing.loading, "loading", ing.basis)
        out[("ingredient basis", k)] = (ing.basis, "text", "")
        out[("ingredient density", k)] = (ing.density_kg_per_m3, "density", "")
        table = f"{_BASE}{key} #{k}"     # the base's own size distribution, by reference
        dist = ing.distribution()
        for spread in (None, 1.0):
            ctx.size_cache[(table, None, spread)] = dist
        out[("ingredient size table", k)] = (table, "text", "")
        out[("ingredient base d50", k)] = (dist.d50_m, "length", "")
        for name, value in (("aspect ratio", ing.aspect_ratio),
                            ("layer", ing.layer_thickness_m), ("phi_max", ing.phi_max),
                            ("intrinsic viscosity", ing.intrinsic_viscosity),
                            ("droplet viscosity", ing.droplet_viscosity_Pa_s)):
            if value is not None:
                out[(f"ingredient {name}", k)] = (float(value), "number", "")
    return out


def _with_base(chunk: pd.DataFrame, ctx: _Context, row_errors):
    """The chunk with each row's base scenario filled in where its own cells are empty.

    A row's non-empty cells override the base field by field; a row that gives its own
    d50 or size table for an ingredient replaces the base's size distribution (its own
    spread alone keeps the base's D50). Returns the chunk to compute, the context with the
    chunk's layout, and the row errors (a missing or malformed base names itself).
    """
    col = ctx.layout.get("base scenario")
    if col is None:
        return chunk, ctx, row_errors
    n = len(chunk)
    errors = (np.full(n, "", dtype=object) if row_errors is None
              else np.asarray(row_errors, dtype=object).copy())
    names = chunk[col.header].astype(str).str.strip().to_numpy(dtype=object)
    work = chunk.copy(deep=False)     # copy on write: `chunk` keeps its cells
    columns = list(ctx.layout.columns)
    known = {(c.field, c.index): c for c in columns}
    for name in pd.unique(names[names != ""]):
        rows = names == name
        form = _read_base(ctx, name)
        if isinstance(form, LoadlineError):
            errors[rows & (errors == "")] = str(form)
            continue
        fields = _base_fields(form, name, ctx)
        for (fname, index), (value, dimension, basis) in fields.items():
            if fname == "ingredient base d50":
                continue
            have = known.get((fname, index))
            if have is None:
                header = f"{_BASE}{fname} {index}"
                have = Column(header, fname, index, "text" if dimension == "text" else
                              "number", 1.0, 0.0, basis)
                known[(fname, index)] = have
                columns.append(have)
                work[header] = ""
            cells = work[have.header].astype(str).str.strip().to_numpy(dtype=object)
            if isinstance(value, str):
                text = value
            else:
                text = repr(float((value - have.offset) / (have.scale or 1.0)))
            empty = rows & (cells == "")
            if fname == "ingredient basis":
                own = known.get(("ingredient loading", index))
                given = own is not None and own.header in chunk.columns
                if given:     # a row's own loading keeps its column's basis
                    own_cells = chunk[own.header].astype(str).str.strip().to_numpy(object)
                    empty &= own_cells == ""
            work[have.header] = np.where(empty, text, cells)
        for k in range(1, len(form.ingredients) + 1):   # the row's own sizes replace the base's
            own = np.zeros(n, bool)
            for fname in ("ingredient d50", "ingredient size table"):
                c_own = ctx.layout.get(fname, k)
                if c_own is not None:
                    own |= chunk[c_own.header].astype(str).str.strip().to_numpy(object) != ""
            spread = ctx.layout.get("ingredient spread", k)
            own_spread = (chunk[spread.header].astype(str).str.strip().to_numpy(object) != ""
                          if spread is not None else np.zeros(n, bool))
            table = known[("ingredient size table", k)]
            cells = work[table.header].to_numpy(dtype=object)
            work[table.header] = np.where(rows & (own | own_spread) & np.char.startswith(
                cells.astype(str), _BASE), "", cells)
            d50 = known.get(("ingredient d50", k))
            if d50 is None:
                d50 = Column(f"{_BASE}ingredient d50 {k}", "ingredient d50", k, "length")
                known[("ingredient d50", k)] = d50
                columns.append(d50)
                work[d50.header] = ""
            base_d50 = fields[("ingredient base d50", k)][0]
            cells = work[d50.header].astype(str).str.strip().to_numpy(dtype=object)
            work[d50.header] = np.where(rows & own_spread & ~own,
                                        repr(float((base_d50 - d50.offset) / d50.scale)), cells)
    ingredients = tuple(sorted({c.index for c in columns if c.field.startswith("ingredient")}))
    layout = Layout(tuple(columns), ingredients, ctx.layout.windows, ctx.layout.unrecognised)
    for k in ingredients:
        for needed in ("loading", "density"):
            if layout.get(f"ingredient {needed}", k) is None:
                header = f"{_BASE}ingredient {needed} {k}"
                columns.append(Column(header, f"ingredient {needed}", k, "number"))
                work[header] = ""
    layout = Layout(tuple(columns), ingredients, ctx.layout.windows, ctx.layout.unrecognised)
    return work, dataclasses.replace(ctx, layout=layout), errors


def _distribution(ctx: _Context, table: str, d50: float, spread: float):
    # NaN as None: NaN != NaN, so a NaN in the key would miss the cache (and re-read files)
    key = (table, None if math.isnan(d50) else d50, None if math.isnan(spread) else spread)
    if key not in ctx.size_cache:
        try:
            if table:
                # Only files beside the candidate table: never a path that leaves its folder.
                base = ctx.base_dir.resolve()
                path = (base / table).resolve()
                if pathlib.Path(table).is_absolute() or base not in path.parents:
                    raise InputRangeError(f"size table '{table}'", table,
                                          "a file name in the candidate table's own folder")
                dist = read_size_table(path, field=f"size table '{table}'")
            elif math.isnan(spread) or spread == 1.0:
                dist = sizes.SizeDistribution.single(d50)
            else:
                dist = sizes.SizeDistribution.lognormal(d50, spread)
            ctx.size_cache[key] = dist
        except LoadlineError as err:
            ctx.size_cache[key] = err
    return ctx.size_cache[key]


@dataclass
class _Chunk:
    """Per-row SI inputs resolved from one chunk (arrays over rows, and rows x ingredients)."""

    rows: _Rows
    liquid: np.ndarray
    temperature_K: np.ndarray
    liquid_density: np.ndarray
    glycerol: np.ndarray
    liquid_viscosity: np.ndarray
    relation: np.ndarray
    droplet_relation: np.ndarray
    law_params: dict             # registry parameter -> (n,) SI, nan where not its law
    reference_K: np.ndarray      # Arrhenius reference temperature
    activation_K: np.ndarray     # Arrhenius activation temperature, nan: no shift
    onset: np.ndarray            # thickening onset stress, nan: no thickening
    frictional: np.ndarray       # frictional packing limit, nan: the default ratio
    present: np.ndarray          # (n, k) bool
    is_solid: np.ndarray         # (n, k)
    is_mass: np.ndarray          # (n, k)
    loading: np.ndarray          # (n, k) fraction on its basis
    density: np.ndarray          # (n, k)
    d50: np.ndarray
    spread: np.ndarray
    table: np.ndarray            # (n, k) object
    aspect: np.ndarray
    layer: np.ndarray
    phi_max_given: np.ndarray
    droplet_viscosity: np.ndarray
    names: np.ndarray            # (n, k) object
    intrinsic_given: np.ndarray  # (n, k), nan: from the aspect ratio


def _resolve(chunk: pd.DataFrame, ctx: _Context, row_errors=None) -> _Chunk:
    layout = ctx.layout
    rows = _read_cells(chunk, layout, row_errors)
    n, ks = rows.n, layout.ingredients
    liquid = _text(rows, "liquid", default="water")
    given_eta = _num(rows, "liquid viscosity")
    liquid = np.where((liquid == "water") & ~np.isnan(given_eta)
                      & (layout.get("liquid", 0) is None), "newtonian", liquid)
    law = _text(rows, "liquid law")
    liquid = np.where(law != "", law, liquid)
    from .registry import models

    laws = [s.name for s in models("liquid")]
    known = _among(liquid, ["water", "glycerol-water", "newtonian", *laws])
    rows.flag(~known, _messages(~known & rows.ok, liquid, lambda v: (
        f"column 'liquid' = {v!r} is not allowed; expected 'water', "
        f"'glycerol-water' or a liquid law: {', '.join(laws)}.")))
    law_params = {}
    for name in pd.unique(liquid[known & rows.ok]):
        if name in ("water", "glycerol-water", "newtonian"):
            continue
        spec = get_model(name, kind="liquid")
        on = liquid == name
        for p, default in ((p, spec.defaults()[p.name]) for p in spec.params):
            value = _num(rows, f"liquid param {p.name}", default=default)
            law_params.setdefault(p.name, np.full(n, np.nan))[on] = value[on]
        _check_params(rows, on, spec, {k: v for k, v in law_params.items()
                                       if k in spec.param_names()})
    temperature = _num(rows, "temperature", default=298.15)
    _check(rows, ~(temperature > 0), layout, "temperature", 0, temperature,
           "a temperature above absolute zero", "temperature [K]")
    rho_l = _num(rows, "liquid density")
    rows.flag(np.isnan(rho_l) & (liquid != "water"),
              "column 'liquid density [kg/m3]' is empty; it is required for a liquid other "
              "than water.")
    rho_l = np.where(np.isnan(rho_l) & (liquid == "water"), WATER_DENSITY_KG_PER_M3, rho_l)
    _check(rows, ~(rho_l > 0) & ~np.isnan(rho_l), layout, "liquid density", 0, rho_l,
           "a density > 0", "liquid density [kg/m3]")
    glycerol = _num(rows, "glycerol", default=0.0)
    _check(rows, (glycerol < 0) | (glycerol > 1), layout, "glycerol", 0, glycerol,
           "a share from 0 to 100 wt%", "glycerol [wt%]")
    reference = _num(rows, "liquid reference temperature", default=298.15)
    activation = _num(rows, "liquid activation temperature")
    onset = _num(rows, "thickening onset")
    frictional = _num(rows, "phi_max frictional")
    rows.flag((liquid == "newtonian") & np.isnan(given_eta),
              "column 'liquid viscosity [Pa*s]' is empty; it is required for a newtonian liquid.")
    _check(rows, (liquid == "newtonian") & ~(given_eta > 0) & ~np.isnan(given_eta), layout,
           "liquid viscosity", 0, given_eta, "a viscosity > 0", "liquid viscosity [Pa*s]")

    shape = (n, len(ks))
    out = {name: np.full(shape, np.nan) for name in (
        "loading", "density", "d50", "spread", "aspect", "layer", "phi_max", "eta_d",
        "intrinsic")}
    present = np.zeros(shape, bool)
    is_solid = np.ones(shape, bool)
    is_mass = np.zeros(shape, bool)
    table = np.full(shape, "", dtype=object)
    names = np.full(shape, "", dtype=object)
    for j, k in enumerate(ks):
        name = _text(rows, "ingredient", k)
        loading = _num(rows, "ingredient loading", k)
        present[:, j] = (name != "") | ~np.isnan(loading)
        names[:, j] = np.where(name == "", f"ingredient {k}", name)
        kind = _text(rows, "ingredient kind", k, default="solid")
        odd = present[:, j] & ~_among(kind, ["solid", "droplet"]) & rows.ok
        rows.flag(odd, _messages(odd, kind, lambda v, k=k: (
            f"column 'ingredient {k} kind' = {v!r} is not allowed; expected 'solid' or "
            "'droplet'.")))
        is_solid[:, j] = kind != "droplet"
        loading_col = layout.get("ingredient loading", k)
        header = loading_col.header if loading_col else f"ingredient {k} loading"
        basis = _text(rows, "ingredient basis", k,
                      default=loading_col.basis if loading_col else "mass")
        odd = present[:, j] & ~_among(basis, ["mass", "volume"]) & rows.ok
        rows.flag(odd, _messages(odd, basis, lambda v, k=k: (
            f"column 'ingredient {k} basis' = {v!r} is not allowed; expected 'mass' or "
            "'volume'.")))
        is_mass[:, j] = basis == "mass"
        rows.flag(present[:, j] & np.isnan(loading),
                  f"column '{header}' is empty for an "
                  f"ingredient {k} that is named; give its loading.")
        _check(rows, present[:, j] & ((loading < 0) | (loading > 1)), layout,
               "ingredient loading", k, loading, "a loading from 0 to 100 %",
               f"ingredient {k} loading")
        density = _num(rows, "ingredient density", k)
        density_col = layout.get("ingredient density", k)
        rows.flag(present[:, j] & np.isnan(density),
                  f"column '{density_col.header if density_col else f'ingredient {k} density'}'"
                  f" is empty; ingredient {k} needs its density.")
        _check(rows, present[:, j] & ~(density > 0) & ~np.isnan(density), layout,
               "ingredient density", k, density, "a density > 0", f"ingredient {k} density")
        d50 = _num(rows, "ingredient d50", k)
        tab = _text(rows, "ingredient size table", k)
        raw_tab = rows.text(("ingredient size table", k))
        if raw_tab is not None:   # keep the file name's case
            tab = np.where(tab == "", "", raw_tab)
        rows.flag(present[:, j] & is_solid[:, j] & np.isnan(d50) & (tab == ""),
                  f"ingredient {k}: give 'ingredient {k} d50 [um]' or 'ingredient {k} size "
                  "table' for a solid.")
        _check(rows, present[:, j] & ~(d50 > 0) & ~np.isnan(d50), layout, "ingredient d50", k,
               d50, "a size > 0", f"ingredient {k} d50")
        spread = _num(rows, "ingredient spread", k, default=1.0)
        _check(rows, present[:, j] & (spread < 1.0), layout, "ingredient spread", k, spread,
               "a geometric standard deviation >= 1 (1 = one size)", f"ingredient {k} spread")
        aspect = _num(rows, "ingredient aspect ratio", k, default=1.0)
        _check(rows, present[:, j] & ~(aspect > 0), layout, "ingredient aspect ratio", k,
               aspect, "an aspect ratio > 0", f"ingredient {k} aspect ratio")
        layer = _num(rows, "ingredient layer", k, default=0.0)
        _check(rows, present[:, j] & (layer < 0), layout, "ingredient layer", k, layer,
               "a thickness >= 0", f"ingredient {k} layer")
        phi_max = _num(rows, "ingredient phi_max", k)
        _check(rows, present[:, j] & ((phi_max <= 0) | (phi_max > 1)), layout,
               "ingredient phi_max", k, phi_max, "a packing fraction in (0, 1]",
               f"ingredient {k} phi_max")
        eta_d = _num(rows, "ingredient droplet viscosity", k)
        _check(rows, present[:, j] & (eta_d <= 0), layout, "ingredient droplet viscosity", k,
               eta_d, "a viscosity > 0", f"ingredient {k} droplet viscosity")
        intrinsic = _num(rows, "ingredient intrinsic viscosity", k)
        for name_, arr in (("loading", loading), ("density", density), ("d50", d50),
                           ("spread", spread), ("aspect", aspect), ("layer", layer),
                           ("phi_max", phi_max), ("eta_d", eta_d), ("intrinsic", intrinsic)):
            out[name_][:, j] = arr
        table[:, j] = tab
    rows.flag(~present.any(axis=1), "no ingredient: give at least one loading.")
    for column, kind, default in (("relation", "suspension", DEFAULT_RELATION),
                                  ("droplet relation", "emulsion", DEFAULT_DROPLET_RELATION)):
        chosen = _text(rows, column, default=default)
        for name in pd.unique(chosen):
            try:
                get_model(name, kind=kind)
            except LoadlineError as err:
                rows.flag(chosen == name, f"column '{column}': {err}")
    return _Chunk(rows, liquid, temperature, rho_l, glycerol, given_eta,
                  _text(rows, "relation", default=DEFAULT_RELATION),
                  _text(rows, "droplet relation", default=DEFAULT_DROPLET_RELATION),
                  law_params, reference, activation, onset, frictional,
                  present, is_solid, is_mass, np.where(present, out["loading"], 0.0),
                  np.where(present, out["density"], 1000.0), out["d50"], out["spread"], table,
                  out["aspect"], out["layer"], out["phi_max"], out["eta_d"], names,
                  out["intrinsic"])


def candidate_formulation(c: _Chunk, i: int, ctx: _Context) -> formulation.Formulation:
    """The Formulation of row `i` of a resolved chunk (the same inputs the batch uses)."""
    liquid_kind = c.liquid[i]
    preset = liquid_kind if liquid_kind in ("water", "glycerol-water") else ""
    law = "newtonian" if preset else liquid_kind
    if law == "newtonian":
        params = {} if preset else {"viscosity_Pa_s": float(c.liquid_viscosity[i])}
    else:
        spec = get_model(law, kind="liquid")
        params = {p: float(c.law_params[p][i]) for p in spec.param_names()}
    liquid = formulation.Liquid(
        name=liquid_kind, preset=preset, law=law, params=params,
        temperature_K=float(c.temperature_K[i]), density_kg_per_m3=float(c.liquid_density[i]),
        glycerol_mass_fraction=float(c.glycerol[i]),
        reference_temperature_K=float(c.reference_K[i]),
        activation_temperature_K=_given(c.activation_K[i]))
    ingredients = []
    for j in range(c.present.shape[1]):
        if not c.present[i, j]:
            continue
        size = None
        if c.table[i, j] or not math.isnan(c.d50[i, j]):
            dist = _distribution(ctx, c.table[i, j], float(c.d50[i, j]), float(c.spread[i, j]))
            if isinstance(dist, LoadlineError):
                raise dist
            size = dist
        ingredients.append(formulation.Ingredient(
            name=str(c.names[i, j]), density_kg_per_m3=float(c.density[i, j]),
            loading=float(c.loading[i, j]), basis="mass" if c.is_mass[i, j] else "volume",
            kind="solid" if c.is_solid[i, j] else "droplet",
            diameter_m=float(size.sauter_diameter_m) if size is not None else 1e-6,
            size=size, aspect_ratio=float(c.aspect[i, j]),
            layer_thickness_m=float(c.layer[i, j]),
            phi_max=_given(c.phi_max_given[i, j]),
            intrinsic_viscosity=_given(c.intrinsic_given[i, j]),
            droplet_viscosity_Pa_s=_given(c.droplet_viscosity[i, j])))
    return formulation.Formulation(liquid=liquid, ingredients=tuple(ingredients),
                                   model=str(c.relation[i]),
                                   droplet_model=str(c.droplet_relation[i]),
                                   thickening_onset_stress_Pa=_given(c.onset[i]),
                                   phi_max_frictional=_given(c.frictional[i]))


def _given(value) -> float | None:
    """None for NaN (an empty cell), else the float."""
    return None if math.isnan(value) else float(value)


def _guarded(func: Callable[[np.ndarray], object], index: np.ndarray, rows: _Rows,
             on_error: Callable[[int, LoadlineError], None] | None = None):
    """Call `func(index)`; on a LoadlineError split the rows until the bad ones are found.

    Returns [(positions, result), ...] for the parts that succeeded; a bad position gets the
    message as its row's error, or is passed to `on_error(position, error)` when given.
    """
    results = {}
    stack = [index]
    while stack:
        part = stack.pop()
        if part.size == 0:
            continue
        try:
            results[part[0]] = (part, func(part))
        except LoadlineError as err:
            if part.size > 1:
                half = part.size // 2
                stack.extend([part[:half], part[half:]])
            elif on_error is not None:
                on_error(int(part[0]), err)
            else:
                _flag_row(rows, int(part[0]), str(err))
    return list(results.values())


def _flag_row(rows: _Rows, i: int, message: str) -> None:
    rows.flag_row(i, message)


def _liquid_viscosity(c: _Chunk) -> np.ndarray:
    from . import liquids

    eta = np.full(c.rows.n, np.nan)
    for kind in ("water", "glycerol-water"):
        index = np.flatnonzero((c.liquid == kind) & c.rows.ok)

        def call(part, kind=kind):
            if kind == "water":
                return liquids.water_viscosity(c.temperature_K[part])
            return liquids.glycerol_water_viscosity(c.glycerol[part], c.temperature_K[part])

        for part, value in _guarded(call, index, c.rows):
            eta[part] = value
    shift = _shift(c)
    newtonian = c.liquid == "newtonian"
    eta[newtonian] = c.liquid_viscosity[newtonian] * shift[newtonian]
    for name, params in _laws(c, shift).items():   # apparent viscosity at 1 1/s
        on = np.flatnonzero((c.liquid == name) & c.rows.ok)

        def call(part, name=name, params=params):
            return liquids.liquid_viscosity(1.0, name, **{k: v[part] for k, v in
                                                          params.items()})

        for part, value in _guarded(call, on, c.rows):
            eta[part] = value
    return eta


def _shift(c: _Chunk) -> np.ndarray:
    """Arrhenius factor of each row's liquid (1 for presets and without an activation
    temperature), as `formulation.Liquid.shift_factor`."""
    from . import liquids

    out = np.ones(c.rows.n)
    on = (~np.isnan(c.activation_K) & ~_among(c.liquid, ["water", "glycerol-water"])
          & c.rows.ok)

    def call(part):
        return liquids.arrhenius_shift(c.temperature_K[part], c.reference_K[part],
                                       c.activation_K[part])

    for part, value in _guarded(call, np.flatnonzero(on), c.rows):
        out[part] = value
    return out


def _laws(c: _Chunk, shift: np.ndarray) -> dict:
    """Law name -> its parameters (n,) at each row's temperature, as
    `formulation.liquid_law_of` (viscosities and time constants times the shift)."""
    out = {}
    for name in pd.unique(c.liquid):
        if name in ("water", "glycerol-water", "newtonian"):
            continue
        try:
            spec = get_model(name, kind="liquid")
        except LoadlineError:
            continue
        out[spec.name] = {p.name: c.law_params[p.name] * (shift if p.unit in
                                                          formulation._SHIFTED_UNITS else 1.0)
                          for p in spec.params}
    return out


@dataclass
class _State:
    """Per-row results of the core calls, for one chunk."""

    eta_l: np.ndarray
    phi: np.ndarray             # (n, k) volume fractions
    phi_eff: np.ndarray         # (n, k) with adsorbed layers (solids), phi for droplets
    phi_solids: np.ndarray
    phi_solids_eff: np.ndarray
    phi_droplets: np.ndarray
    phi_max: np.ndarray
    intrinsic: np.ndarray


def _volume_fractions(c: _Chunk) -> np.ndarray:
    phi = np.full(c.present.shape, np.nan)
    index = np.flatnonzero(c.rows.ok)

    def call(part):
        return composition.volume_fractions(c.loading[part], c.is_mass[part], c.density[part],
                                            c.liquid_density[part])

    for part, value in _guarded(call, index, c.rows):
        phi[part] = value
    return phi


def _nan(value) -> float:
    return math.nan if value is None else float(value)


def _groups(columns: dict) -> list[tuple[tuple, np.ndarray]]:
    """The distinct rows of equal-length `columns` (name -> 1-D array): [(key tuple,
    positions), ...], by one hash pass per column and one sort.

    NaN in a key becomes None, so keys compare equal and can index a cache.
    """
    arrays = [np.asarray(v) for v in columns.values()]
    if not arrays or len(arrays[0]) == 0:
        return []
    combined = np.zeros(len(arrays[0]), dtype=np.int64)
    for values in arrays:
        codes, _ = pd.factorize(values, use_na_sentinel=False)
        combined, _ = pd.factorize(combined * (int(codes.max()) + 1) + codes)
    order = np.argsort(combined, kind="stable")
    cuts = np.flatnonzero(np.diff(combined[order])) + 1
    starts = np.concatenate([[0], cuts])
    ends = np.concatenate([cuts, [len(order)]])
    firsts = [values[order[starts]].tolist() for values in arrays]   # each group's first row

    def key(row):
        return tuple(None if isinstance(v, float) and math.isnan(v) else v for v in row)

    rows = zip(*firsts, strict=True)
    return [(key(row), order[a:b]) for row, a, b in zip(rows, starts, ends, strict=True)]


def _sizes(c: _Chunk, ctx: _Context) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Sauter diameter and smallest and largest class diameter per row and ingredient, from
    the (cached) size distributions; NaN where an ingredient has no size."""
    shape = c.present.shape
    sauter, smallest, largest = np.full(shape, np.nan), np.full(shape, np.nan), np.full(shape,
                                                                                       np.nan)
    for j in range(c.present.shape[1]):
        has_size = c.present[:, j] & c.rows.ok & ((c.table[:, j] != "") | ~np.isnan(c.d50[:, j]))
        if not has_size.any():
            continue
        keys = {"t": c.table[has_size, j], "d": c.d50[has_size, j],
                "s": c.spread[has_size, j]}
        where = np.flatnonzero(has_size)
        for (tab, d50, spread), pos in _groups(keys):
            dist = _distribution(ctx, str(tab), _nan(d50), _nan(spread))
            rows_u = where[pos]
            if isinstance(dist, LoadlineError):
                for i in rows_u:
                    _flag_row(c.rows, int(i), f"ingredient {ctx.layout.ingredients[j]}: {dist}")
            else:
                sauter[rows_u, j] = dist.sauter_diameter_m
                smallest[rows_u, j] = float(dist.diameters_m.min())
                largest[rows_u, j] = float(dist.diameters_m.max())
    return sauter, smallest, largest


def _texts(mask, make: Callable[..., str], *columns) -> np.ndarray:
    """`make(*values)` for each row where `mask`, called once per distinct tuple of values."""
    out = np.full(np.shape(mask), "", dtype=object)
    where = np.flatnonzero(mask)
    if where.size:
        for key, pos in _groups({i: np.asarray(col)[where] for i, col in enumerate(columns)}):
            out[where[pos]] = make(*key)
    return out


# Size classes allowed by formulation.Formulation (which writes these limits inline). [m]
_SIZE_CLASS_RANGE = (1e-9, 1e-2)


def _check_formulation(c: _Chunk, sauter, smallest, largest) -> None:
    """Flag the rows `formulation.Formulation` would refuse, with its message.

    The same limits (`formulation._INGREDIENT_RANGES` and `_LIQUID_RANGES`) checked in the
    same order, so that a row's first error is the one `predict` raises for its formulation.
    """
    rows = c.rows
    position = np.cumsum(c.present, axis=1) - 1    # index in Formulation.ingredients
    values = {"density_kg_per_m3": c.density, "loading": c.loading,
              "diameter_m": np.where(np.isnan(sauter), 1e-6, sauter),
              "aspect_ratio": c.aspect, "layer_thickness_m": c.layer,
              "phi_max": c.phi_max_given, "droplet_viscosity_Pa_s": c.droplet_viscosity}
    optional = ("phi_max", "droplet_viscosity_Pa_s")    # NaN means "not given" (None)

    def flag(mask, field_name, value, low, high, index=None):
        bad = mask & rows.ok & ~((value >= low) & (value <= high))    # NaN fails too
        if bad.any():
            rows.flag(bad, _texts(bad, lambda i, v: str(InputRangeError(
                field_name.format(i=i), v, f"a number from {low:g} to {high:g}")),
                index if index is not None else np.zeros(rows.n, int), value))

    for j in range(c.present.shape[1]):
        on = c.present[:, j]
        for name, (low, high) in formulation._INGREDIENT_RANGES.items():
            if name in values:
                value = values[name][:, j]
                given = on & ~np.isnan(value) if name in optional else on
                flag(given, f"ingredients[{{i}}].{name}", value, low, high, position[:, j])
        for what, value in (("smallest", smallest[:, j]), ("largest", largest[:, j])):
            flag(on & ~np.isnan(value), f"ingredients[{{i}}].size ({what} class)", value,
                 *_SIZE_CLASS_RANGE, position[:, j])
    liquid = {"temperature_K": c.temperature_K, "density_kg_per_m3": c.liquid_density,
              "glycerol_mass_fraction": c.glycerol, "reference_temperature_K": c.reference_K,
              "activation_temperature_K": c.activation_K}
    for name, (low, high) in formulation._LIQUID_RANGES.items():
        if name in liquid:
            given = ~np.isnan(liquid[name]) if name == "activation_temperature_K" else True
            flag(np.ones(rows.n, bool) & given, f"liquid.{name}", liquid[name], low, high)
    for name, value, (low, high) in (("thickening_onset_stress_Pa", c.onset, (1e-9, 1e7)),
                                     ("phi_max_frictional", c.frictional, (0.05, 1.0))):
        flag(~np.isnan(value), name, value, low, high)


def _check_params(rows: _Rows, mask, spec, values: dict) -> None:
    """Flag rows where `spec.check_params` would refuse one of `values`, with its message."""
    for p in spec.params:
        if p.name not in values:
            continue
        value = np.asarray(values[p.name], dtype=float)
        low, high = p.bounds
        bad = mask & rows.ok & ~((value >= low) & (value <= high))
        if bad.any():
            rows.flag(bad, _texts(bad, lambda v, p=p, low=low, high=high: str(InputRangeError(
                p.name, v, f"{low:g} to {high:g} [{p.unit}] for {spec.name}")), value))


def _packing(c: _Chunk, ctx: _Context, phi_eff: np.ndarray) -> tuple:
    """phi_max, intrinsic viscosity and the packing notes per row, as `formulation.mixture`.

    Rows are grouped by their powders (size distributions, shapes, given packing limits);
    the shares of the powders may differ in every row. Per group, each powder's shape
    factor, intrinsic viscosity and size distribution are resolved once, and the packing
    limits of all the group's blends come from one vectorised call,
    `packing.max_packing_blends` (the estimate `packing.max_packing` gives each blend). The
    validity warnings are kept as the notes.
    """
    n = c.rows.n
    phi_max = np.full(n, np.nan)
    intrinsic = np.full(n, np.nan)
    notes = np.full(n, "", dtype=object)
    solid = c.present & c.is_solid
    use = c.rows.ok & solid.any(axis=1)
    without = c.rows.ok & ~solid.any(axis=1)       # as `formulation.mixture` without solids
    phi_max[without], intrinsic[without] = formulation.RANDOM_CLOSE_SPHERES, 2.5
    keys = {}
    for j in range(c.present.shape[1]):
        on = solid[:, j]
        keys[f"p{j}"] = on
        keys[f"t{j}"] = np.where(on, c.table[:, j], "")
        for name, arr in (("d", c.d50), ("s", c.spread), ("a", c.aspect), ("m", c.phi_max_given),
                          ("i", c.intrinsic_given)):
            keys[f"{name}{j}"] = np.where(on, arr[:, j], -1.0)
    if not use.any():
        return phi_max, intrinsic, notes
    frame = {name: values[use] for name, values in keys.items()}
    where = np.flatnonzero(use)
    solid_eff = np.where(solid, np.nan_to_num(phi_eff), 0.0)
    for key, pos in _groups(frame):
        rows_u = where[pos]
        cols = [j for j in range(c.present.shape[1]) if solid[rows_u[0], j]]
        if key not in ctx.packing_cache:
            ctx.packing_cache[key] = _powders(c, ctx, int(rows_u[0]), cols)
        group = ctx.packing_cache[key]
        if isinstance(group, LoadlineError):
            for i in rows_u:
                _flag_row(c.rows, int(i), str(group))
            continue
        eff = solid_eff[np.ix_(rows_u, cols)]
        total = eff.sum(axis=1, keepdims=True)
        weights = np.where(total > 0, eff / np.where(total > 0, total, 1.0), 1.0 / len(cols))
        row_notes = np.full(len(rows_u), "", dtype=object)
        if group["own"] is not None:
            phi_max[rows_u] = weights @ group["own"]
        else:
            with warnings_module.catch_warnings():
                warnings_module.simplefilter("ignore", ValidityWarning)
                value, row_notes = packing.max_packing_blends(group["diameters"],
                                                              group["fractions"], weights)
            phi_max[rows_u] = (weights @ group["shape"]) * value
        eta = group["intrinsic"]
        intrinsic[rows_u] = np.clip(weights @ eta, eta.min(), eta.max())
        notes[rows_u] = _join([np.full(len(rows_u), group["notes"], dtype=object), row_notes])
    return phi_max, intrinsic, notes


def _powders(c: _Chunk, ctx: _Context, i: int, cols: list[int]):
    """What `formulation.mixture` resolves once per powder, for the solids `cols` of row i:
    shape factors, intrinsic viscosities, own packing limits (when any is given), the size
    distributions on one class grid, and the warnings given on the way; or the error."""
    try:
        with warnings_module.catch_warnings(record=True) as caught:
            warnings_module.simplefilter("always")
            dists = []
            for j in cols:
                dist = _distribution(ctx, c.table[i, j], float(c.d50[i, j]),
                                     float(c.spread[i, j]))
                if isinstance(dist, LoadlineError):
                    raise dist
                dists.append(dist)
            sphere = packing.phi_max_for_aspect_ratio(1.0)
            shape = np.array([packing.phi_max_for_aspect_ratio(float(c.aspect[i, j])) / sphere
                              for j in cols])
            eta = np.array([float(c.intrinsic_given[i, j]) if not math.isnan(
                c.intrinsic_given[i, j]) else packing.intrinsic_viscosity_for_aspect_ratio(
                float(c.aspect[i, j])) for j in cols])
            own = None
            if any(not math.isnan(c.phi_max_given[i, j]) for j in cols):
                own = np.array([float(c.phi_max_given[i, j]) if not math.isnan(
                    c.phi_max_given[i, j]) else shape[m] * packing.max_packing(
                    dists[m].diameters_m, dists[m].fractions) for m, j in enumerate(cols)])
            grid = np.unique(np.concatenate([x.diameters_m for x in dists]))
            fractions = np.zeros((len(dists), grid.size))
            for m, x in enumerate(dists):
                fractions[m, np.searchsorted(grid, x.diameters_m)] = x.fractions
        text = "; ".join(dict.fromkeys(str(w.message) for w in caught))
        return {"shape": shape, "intrinsic": eta, "own": own, "diameters": grid,
                "fractions": fractions, "notes": text}
    except LoadlineError as err:
        return err


def _by_relation(names: np.ndarray, kind: str, call: Callable) -> np.ndarray:
    """`call(spec, selection)` for each relation named in `names`, assembled over the rows."""
    out = np.empty(len(names))
    for name in pd.unique(names):
        sel = names == name
        out[sel] = call(get_model(name, kind=kind), sel)
    return out


class _Flow:
    """Row arrays of one chunk for the flow answers, as engine rows (`rows`) and notes.

    The inputs `engine.row_inputs` gives for a formulation, resolved for every row of the
    chunk at once: the droplets' viscosity ratio, the Sauter radius of all solids (the
    Brownian radius), the swelling of adsorbed layers. `plateaus` and `medium` serve the
    row notes only (the same wording as `shear.flow_curve`). Methods take row indices `k`
    (repeats allowed) and arrays over them.
    """

    def __init__(self, c: _Chunk, st: _State, sauter):
        self.relation, self.droplet_relation = c.relation, c.droplet_relation
        self.eta_l, self.phi_max, self.intrinsic = st.eta_l, st.phi_max, st.intrinsic
        self.phi_solids, self.phi_eff = st.phi_solids, st.phi_solids_eff
        self.phi_droplets = st.phi_droplets
        solid = c.present & c.is_solid
        drop = c.present & ~c.is_solid
        phi = np.nan_to_num(st.phi)
        with np.errstate(invalid="ignore", divide="ignore"):
            half = np.where(solid & np.isfinite(sauter), 0.5 * sauter, 1.0)
            self.swelling = np.where(solid, (1.0 + np.nan_to_num(c.layer) / half) ** 3, 1.0)
            self.mean_swelling = (np.where(solid, self.swelling, 0.0).sum(axis=1)
                                  / np.maximum(solid.sum(axis=1), 1))
            volume = np.where(solid, phi, 0.0)
            total = volume.sum(axis=1)
            radius = total / np.where(solid, volume / half, 0.0).sum(axis=1)
            self.radius = np.where(total > 0, radius, np.nan)      # formulation._solid_radius_m
            self.stress_scale = (shear.CRITICAL_REDUCED_STRESS * shear.BOLTZMANN_J_PER_K
                                 * c.temperature_K / self.radius**3)
            eta_d = np.where(np.isnan(c.droplet_viscosity), self.eta_l[:, None],
                             c.droplet_viscosity)
            dropped = np.where(drop, phi, 0.0)
            self.ratio = (np.where(drop, phi * eta_d, 0.0).sum(axis=1) / dropped.sum(axis=1)
                          / self.eta_l)
        self.has_droplets = drop.any(axis=1) & (self.phi_droplets > 0)
        self.phi = phi
        self.temperature_K = c.temperature_K
        self.onset = c.onset
        self.frictional = np.where(np.isnan(c.frictional),
                                   formulation.FRICTIONAL_RATIO * self.phi_max, c.frictional)
        # The liquid law of each row (presets are Newtonian at their viscosity).
        self.law = np.where(_among(c.liquid, ["water", "glycerol-water"]), "newtonian",
                            c.liquid).astype(object)
        self.law_params = {"viscosity_Pa_s": np.where(self.law == "newtonian", self.eta_l,
                                                      np.nan)}
        for name, params in _laws(c, _shift(c)).items():
            on = self.law == name
            for k, v in params.items():
                self.law_params.setdefault(k, np.full(c.rows.n, np.nan))[on] = v[on]
        has_phi_max = np.zeros(c.rows.n, bool)
        for name in pd.unique(c.relation[c.rows.ok]):
            spec = get_model(name, kind="suspension")
            has_phi_max[c.relation == name] = "phi_max" in spec.param_names()
        self.brownian = has_phi_max & np.isfinite(self.radius)

    def relation_at(self, k, phi, phi_max):
        """Relative viscosity of the solids' relation at phi and a packing limit."""
        def call(spec, sel):
            params = spec.defaults()
            known = {"phi_max": phi_max[sel], "intrinsic_viscosity": self.intrinsic[k][sel]}
            params.update({n: v for n, v in known.items() if n in params})
            return spec.func(phi[sel], **params)

        return _by_relation(self.relation[k], "suspension", call)

    def droplet_share(self, k, bare):
        """Droplets' volume fraction in liquid + droplets, as `formulation.droplet_factor`."""
        return np.minimum(self.phi_droplets[k] / np.maximum(1.0 - bare, 1e-12), 1.0)

    def emulsion_params(self, spec, sel, k):
        params = spec.defaults()
        if "viscosity_ratio" in params:
            params["viscosity_ratio"] = self.ratio[k][sel]
        return params

    def medium(self, k, bare):
        """Relative viscosity of the droplets in the liquid (1 without droplets)."""
        out = np.ones(len(k))
        on = self.has_droplets[k]
        if on.any():
            kk, share = k[on], self.droplet_share(k[on], bare[on])
            out[on] = _by_relation(self.droplet_relation[kk], "emulsion", lambda spec, sel: (
                spec.func(share[sel], **self.emulsion_params(spec, sel, kk))))
        return out

    def plateaus(self, k, phi):
        """High-shear and zero-shear relative viscosity of the solids (inf: no flow, and no
        Brownian term, respectively), and where the radius leaves the Brownian term out."""
        g_hs = np.full(len(k), np.inf)
        live = phi < 1.0
        g_hs[live] = self.relation_at(k[live], phi[live], self.phi_max[k][live])
        coarse = self.brownian[k] & (self.radius[k] > shear.BROWNIAN_RADIUS_LIMIT_m)
        brown = live & self.brownian[k] & ~coarse
        g0 = np.full(len(k), np.inf)
        g0[brown] = self.relation_at(k[brown], phi[brown],
                                     formulation.ZERO_SHEAR_RATIO * self.phi_max[k][brown])
        return g_hs, g0, coarse

    def rows(self, k) -> engine.FormulationSet:
        """Rows `k` as an engine `FormulationSet` (`engine.row_inputs` of each row)."""
        n = len(k)
        eff, bare = self.phi_eff[k], self.phi_solids[k]
        swelling = np.where(bare > 0, eff / np.where(bare > 0, bare, 1.0),
                            self.mean_swelling[k])
        nan = np.full(n, np.nan)
        return engine.FormulationSet(
            phi=eff, phi_solids=bare, swelling=swelling, phi_droplets=self.phi_droplets[k],
            phi_max=self.phi_max[k],
            phi_max_frictional=np.where(np.isnan(self.onset[k]), nan, self.frictional[k]),
            onset_stress_Pa=self.onset[k],
            radius_m=np.where(self.brownian[k], self.radius[k], np.nan),
            temperature_K=self.temperature_K[k], yield_stress_Pa=np.zeros(n),
            has_solids=np.ones(n, bool), liquid_law=self.law[k],
            liquid_params={p: v[k] for p, v in self.law_params.items()},
            relation=self.relation[k],
            relation_params={"intrinsic_viscosity": self.intrinsic[k]},
            droplet_model=self.droplet_relation[k],
            droplet_params={"viscosity_ratio": self.ratio[k]},
            network=np.full(n, None, dtype=object))

    def bare(self, k, phi):
        """Bare solids fraction when the solids are scaled to effective fraction `phi`."""
        eff = self.phi_eff[k]
        return np.where(eff > 0, self.phi_solids[k] * phi / np.where(eff > 0, eff, 1.0),
                        phi / self.mean_swelling[k])


def _flow_notes(f: _Flow, k: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The notes `shear.flow_curve` and `formulation.droplet_factor` give for rows `k` at
    their own loading (same wording), as (flow notes, droplet notes)."""
    phi, bare = f.phi_eff[k], f.phi_solids[k]
    medium = f.medium(k, bare)
    dispersed = (phi >= 1.0) | ~np.isfinite(medium)
    g_hs, g0, coarse = f.plateaus(k, phi)
    live = ~dispersed
    pm, scale = f.phi_max[k], f.stress_scale[k] / shear.CRITICAL_REDUCED_STRESS
    parts = []
    for name in pd.unique(f.relation[k]):
        spec = get_model(name, kind="suspension")
        on = live & (f.relation[k] == name)
        check = ("phi_max" in spec.param_names())
        x = phi / pm if spec.phi_range_relative else phi
        low, high = spec.phi_range
        parts.append(_texts(on & ((x < low) | (x > high)), lambda p, m, spec=spec, check=check: (
            spec.validity_message(p, {"phi_max": m} if check else {}) or ""), phi, pm))
    parts.append(_texts(live & coarse, lambda a, s: (
        f"Brownian shear thinning is negligible for particles of radius {a * 1e6:.3g} um "
        f"(stress scale k_B T/a^3 = {s:.2g} Pa) and is left out."), f.radius[k], scale))
    zero = live & f.brownian[k] & ~coarse & ~np.isfinite(g0)
    parts.append(_texts(zero, lambda p, m, s: (
        f"phi = {p:.3g} is at or above the zero-shear packing limit {m:.3g}: Krieger's "
        "interpolation has no zero-shear plateau there (a Brownian glass with a yield "
        f"stress of order k_B T/a^3 = {s:.3g} Pa); the Brownian term is left out."),
        phi, formulation.ZERO_SHEAR_RATIO * pm, scale))
    parts.append(_texts(live & ~np.isfinite(g_hs), lambda p, m: (
        f"phi = {p:.3g} is at or above the packing limit {m:.3g}: no flow is predicted at "
        "any shear rate."), phi, pm))
    parts.append(_texts(dispersed, lambda p, d: (
        f"phi = {p:.3g} of solids with droplets at {d:.3g}: the dispersed phases are "
        "jammed; no flow is predicted."), phi, f.phi_droplets[k]))
    drops = np.full(len(k), "", dtype=object)
    on = f.has_droplets[k]
    share = f.droplet_share(k, bare)
    for name in pd.unique(f.droplet_relation[k[on]]):
        spec = get_model(name, kind="emulsion")
        sel = on & (f.droplet_relation[k] == name)
        params = spec.defaults()
        x = share / params.get("phi_max", 1.0) if spec.phi_range_relative else share
        low, high = spec.phi_range
        drops = _join([drops, _texts(sel & ((x < low) | (x > high)), lambda s, r, spec=spec: (
            spec.validity_message(s, {**spec.defaults(), "viscosity_ratio": r}) or ""),
            share, f.ratio[k])])
    return _join(parts), drops


def _join(parts: list[np.ndarray]) -> np.ndarray:
    """Per-row texts joined with "; ", empty ones left out."""
    out = np.asarray(parts[0], dtype=object).copy()
    for part in parts[1:]:
        part = np.asarray(part, dtype=object)
        given = part != ""
        if not given.any():
            continue
        empty = out == ""
        both = given & ~empty
        out[both] = out[both] + "; " + part[both]
        out[given & empty] = part[given & empty]
    return out


def _max_loading(f: _Flow, k, rate, limit) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """`engine.max_loading` (the solver of `formulation.max_loading`) for many (row, window)
    pairs at once. Returns the fractions, their limiting reasons ("viscosity", "packing" or
    "liquid") and, per pair, the error that stopped its solve ("" if none; the fraction is
    then NaN and the reason ""), as `max_loading` would raise it.
    """
    errors = np.full(len(k), "", dtype=object)
    try:
        phi, reason = engine.max_loading(f.rows(k), limit, rate)
        return phi, np.asarray(reason, dtype=object), errors
    except LoadlineError:
        pass
    phi = np.full(len(k), np.nan)
    reason = np.full(len(k), "", dtype=object)
    for i in range(len(k)):          # isolate the pairs whose solve fails
        try:
            one, why = engine.max_loading(f.rows(k[i:i + 1]), limit[i], rate[i])
            phi[i], reason[i] = one[0], str(why[0])
        except LoadlineError as err:
            errors[i] = str(err)
    return phi, reason, errors


def _solid_mass_fraction(c: _Chunk, f: _Flow, k, phi_eff) -> np.ndarray:
    """`formulation.solid_mass_fraction` of rows `k` with their solids at `phi_eff`."""
    solid = (c.present & c.is_solid)[k]
    phi = f.phi[k]
    swelling = f.swelling[k]
    shares = np.where(solid, phi * swelling, 0.0)
    total = shares.sum(axis=1, keepdims=True)
    even = solid / np.maximum(solid.sum(axis=1, keepdims=True), 1)
    shares = np.where(total > 0, shares / np.where(total > 0, total, 1.0), even)
    bare = phi_eff[:, None] * shares / swelling
    drops = np.where((c.present & ~c.is_solid)[k], phi, 0.0)
    phi_all = np.clip(bare + drops, 0.0, None)
    phi_all = phi_all / np.maximum(phi_all.sum(axis=1, keepdims=True), 1.0)
    w = composition.mass_fractions(phi_all, c.density[k], c.liquid_density[k])
    return np.where(solid, w, 0.0).sum(axis=1)


def _flow_answers(c: _Chunk, ctx: _Context, st: _State, sauter, packing_notes, rates, limits):
    """Viscosity and regime at each row's window shear rates, the highest loadings, notes.

    Every row of the chunk is one row of the engine (`_Flow.rows`, `engine.evaluate`),
    with the checks and notes `predict` gives (rows it would refuse get its error). The
    highest loading under each window's max viscosity is `engine.max_loading` over rows
    and windows at once (`_max_loading`), its mass fraction
    `formulation.solid_mass_fraction`; a
    failed solve leaves NaN and a note. Returns arrays over rows and windows: viscosity
    [Pa*s], regime, max effective solids phi [-], max solids mass fraction [-], the
    limiting reason of each highest loading ("viscosity", "packing", "liquid"; "" where not
    solved), and the notes per row.
    """
    n, width = rates.shape
    eta = np.full((n, width), np.nan)
    regime = np.full((n, width), "", dtype=object)
    max_phi = np.full((n, width), np.nan)
    max_mass = np.full((n, width), np.nan)
    limited = np.full((n, width), "", dtype=object)
    notes = np.full(n, "", dtype=object)
    good = np.isfinite(rates) & (rates > 0)
    asked = c.rows.ok & good.any(axis=1)      # the rows `predict` is called for
    if not asked.any():
        return eta, regime, max_phi, max_mass, limited, notes
    f = _Flow(c, st, sauter)
    rows = c.rows
    # The checks `predict` makes beyond `mixture`, in its order: a newtonian liquid's law,
    # the solids' relation, the droplets' relation, the liquid law of flow_curve.
    newtonian = get_model("newtonian", kind="liquid")
    _check_params(rows, asked & (c.liquid == "newtonian"), newtonian,
                  {"viscosity_Pa_s": st.eta_l})
    for name in pd.unique(c.relation[asked]):
        _check_params(rows, asked & (c.relation == name), get_model(name, kind="suspension"),
                      {"phi_max": st.phi_max, "intrinsic_viscosity": st.intrinsic})
    for name in pd.unique(c.droplet_relation[asked & f.has_droplets]):
        _check_params(rows, asked & f.has_droplets & (c.droplet_relation == name),
                      get_model(name, kind="emulsion"), {"viscosity_ratio": f.ratio})
    _check_params(rows, asked & _among(c.liquid, ["water", "glycerol-water"]), newtonian,
                  {"viscosity_Pa_s": st.eta_l})

    def call(part):
        values = np.full((len(part), width), np.nan)
        kinds = np.full((len(part), width), "", dtype=object)
        on = good[part]
        with warnings_module.catch_warnings():
            warnings_module.simplefilter("ignore", ValidityWarning)
            res = engine.evaluate(f.rows(part), np.where(on, rates[part], 1.0))
        values[on], kinds[on] = res.viscosity_Pa_s[on], res.regime[on]
        return (values, kinds, *_flow_notes(f, part))

    flow_notes = np.full(n, "", dtype=object)
    drop_notes = np.full(n, "", dtype=object)
    for part, (values, kinds, texts, drops) in _guarded(call, np.flatnonzero(asked & rows.ok),
                                                        rows):
        eta[part], regime[part], flow_notes[part], drop_notes[part] = values, kinds, texts, drops

    # Highest loading under each window's max viscosity, for every (row, window) at once.
    solid = (c.present & c.is_solid).any(axis=1)
    wanted = (asked & rows.ok & solid)[:, None] & good & np.isfinite(limits) & (limits > 0)
    pair_row, pair_window = np.nonzero(wanted)

    def solve(sel):
        k = pair_row[sel]
        phi, reason, errors = _max_loading(f, k, rates[k, pair_window[sel]],
                                           limits[k, pair_window[sel]])
        mass = np.full(len(k), np.nan)
        done = np.isfinite(phi)
        mass[done] = _solid_mass_fraction(c, f, k[done], phi[done])
        return phi, mass, reason, errors

    pair_errors = np.full(len(pair_row), "", dtype=object)

    def failed(p, err):      # an error the solve did not foresee: isolated to its pair
        pair_errors[p] = str(err)

    for sel, (phi, mass, reason, errors) in _guarded(solve, np.arange(len(pair_row)), rows,
                                                     on_error=failed):
        max_phi[pair_row[sel], pair_window[sel]] = phi
        max_mass[pair_row[sel], pair_window[sel]] = mass
        limited[pair_row[sel], pair_window[sel]] = reason
        pair_errors[sel] = np.where(errors == "", pair_errors[sel], errors)
    window_notes = np.full(n, "", dtype=object)
    for p in np.flatnonzero(pair_errors != ""):   # as formulation.max_loading raising
        i, text = pair_row[p], (f"window {ctx.layout.windows[pair_window[p]]}: highest "
                                f"loading not computed ({pair_errors[p]})")
        window_notes[i] = f"{window_notes[i]}; {text}" if window_notes[i] else text
    notes[asked] = _join([flow_notes, window_notes, np.where(asked, packing_notes, ""),
                          drop_notes])[asked]
    return eta, regime, max_phi, max_mass, limited, notes


_DURATION_UNITS = (("years", 365.25 * 86400.0), ("days", 86400.0), ("h", 3600.0),
                   ("min", 60.0), ("s", 1.0))


def duration_text(seconds) -> str | np.ndarray:
    """A duration in the largest fitting unit, 3 significant digits ("2.5 h", "41 days");
    an array of them (object) for an array of durations.

    Examples
    --------
    >>> duration_text(9000.0)
    '2.5 h'
    >>> duration_text(np.array([41 * 86400.0, 0.5, np.inf])).tolist()
    ['41 days', '0.5 s', 'never']
    """
    x = np.asarray(seconds, dtype=float)
    flat = x.ravel()
    scale = np.ones(flat.shape)
    unit = np.full(flat.shape, "s", dtype=object)
    for name, size in reversed(_DURATION_UNITS[:-1]):     # the largest fitting unit wins
        fits = flat >= size
        scale[fits], unit[fits] = size, name
    numbers = np.array(list(map("{:.3g}".format, (flat / scale).tolist())), dtype=object)
    out = np.where(np.isfinite(flat), numbers + " " + unit, "never").astype(object)
    return str(out[0]) if x.ndim == 0 else out.reshape(x.shape)


#: Shear rate of settling at which a liquid law's viscosity is taken (the default of
#: `design.storage_check`; sedimentation is about 1e-6 to 1e-3 1/s, common practice).
SETTLING_SHEAR_RATE_1_PER_S = 1e-4


def _settling(c: _Chunk, st: _State, ctx: _Context) -> np.ndarray:
    """Storage verdict per row: `stability.storage_reasons` for each sized ingredient.

    The same inputs as `design.storage_check`: per ingredient its D90 (the coarse end), its
    density, the liquid's density, its viscosity at `SETTLING_SHEAR_RATE_1_PER_S` (the
    Newtonian viscosity, or the liquid law there), its yield stress and temperature, and
    the total dispersed volume fraction for hindrance. One vectorised call per ingredient column
    over all its rows (the D90 once per distinct size distribution). The row shows the
    first ingredient that separates, else "stable" with the reason.
    """
    from . import liquids, stability

    n = c.rows.n
    verdict = np.full(n, "", dtype=object)
    ok = c.rows.ok
    phi_total = np.minimum(st.phi_solids + st.phi_droplets, 0.99)
    eta = st.eta_l.copy()
    for name, params in _laws(c, _shift(c)).items():
        on = np.flatnonzero((c.liquid == name) & ok)

        def call(part, name=name, params=params):
            return liquids.liquid_viscosity(SETTLING_SHEAR_RATE_1_PER_S, name,
                                            **{k: v[part] for k, v in params.items()})

        for part, value in _guarded(call, on, c.rows):
            eta[part] = value
    stable_reason = np.full(n, "", dtype=object)
    for j in range(c.present.shape[1]):
        sized = ok & c.present[:, j] & ((c.table[:, j] != "") | ~np.isnan(c.d50[:, j]))
        if not sized.any():
            continue
        d90 = np.full(n, np.nan)
        keys = {"t": c.table[sized, j], "d": c.d50[sized, j], "s": c.spread[sized, j]}
        where = np.flatnonzero(sized)
        for (tab, d50, spread), pos in _groups(keys):
            dist = _distribution(ctx, str(tab), _nan(d50), _nan(spread))
            if not isinstance(dist, LoadlineError):
                d90[where[pos]] = dist.d90_m
        rows = np.flatnonzero(sized & np.isfinite(d90))
        if rows.size == 0:
            continue
        args = (d90[rows], c.density[rows, j], c.liquid_density[rows], eta[rows],
                phi_total[rows], np.nan_to_num(c.law_params.get("yield_stress_Pa",
                                                                np.zeros(n))[rows]))
        try:
            parts = [(rows, stability.storage_reasons(*args, temperature_K=c.temperature_K[rows]))]
        except (LoadlineError, ValueError):
            parts = []
            for i, row in enumerate(rows):        # isolate the cases that cannot be assessed
                try:
                    parts.append((rows[i:i + 1], stability.storage_reasons(
                        *(a[i:i + 1] for a in args),
                        temperature_K=c.temperature_K[rows[i:i + 1]])))
                except (LoadlineError, ValueError) as err:
                    if verdict[row] == "":
                        verdict[row] = f"not assessed ({err})"
        for sel, r in parts:
            stable = np.asarray(r["stable"], bool)
            keep = stable & (stable_reason[sel] == "")
            stable_reason[sel[keep]] = np.asarray(r["reason"])[keep]
            moving = sel[~stable & (verdict[sel] == "")]
            if moving.size:
                k = np.flatnonzero(~stable & (verdict[sel] == ""))
                times = np.asarray(r["clear_layer_time_s"])[k]
                direction = np.asarray(r["direction"])[k]
                verdict[moving] = (c.names[moving, j].astype(str).astype(object) + " "
                                   + direction.astype(str).astype(object) + ", 1 mm layer in "
                                   + duration_text(times))
    empty = verdict == ""
    verdict[empty & (stable_reason != "")] = "stable (" + stable_reason[
        empty & (stable_reason != "")] + ")"
    verdict[empty & (stable_reason == "")] = "not assessed (no sizes given)"
    return verdict


def _predict_chunk(chunk: pd.DataFrame, ctx: _Context, viscosity_unit: str,
                   row_errors: np.ndarray | None = None) -> pd.DataFrame:
    work, ctx, row_errors = _with_base(chunk, ctx, row_errors)
    c = _resolve(work, ctx, row_errors)
    rows = c.rows
    n = rows.n
    eta_l = _liquid_viscosity(c)
    phi = _volume_fractions(c)
    sauter, smallest, largest = _sizes(c, ctx)
    _check_formulation(c, sauter, smallest, largest)
    phi_eff = phi.copy()
    solid = c.present & c.is_solid
    use = solid & rows.ok[:, None] & (np.nan_to_num(c.layer) > 0) & np.isfinite(sauter)
    if use.any():
        phi_eff[use] = suspension.effective_volume_fraction(phi[use], c.layer[use],
                                                            0.5 * sauter[use])
    phi_max, intrinsic, packing_notes = _packing(c, ctx, phi_eff)
    st = _State(eta_l, phi, phi_eff,
                np.where(solid, np.nan_to_num(phi), 0.0).sum(axis=1),
                np.where(solid, np.nan_to_num(phi_eff), 0.0).sum(axis=1),
                np.where(c.present & ~c.is_solid, np.nan_to_num(phi), 0.0).sum(axis=1),
                phi_max, intrinsic)
    has_solid = solid.any(axis=1)
    phi_max = np.where(has_solid, phi_max, np.nan)
    windows = ctx.layout.windows
    rates = np.column_stack([_num(rows, "window shear rate", j) for j in windows]) \
        if windows else np.zeros((n, 0))
    limits = np.column_stack([_num(rows, "window max viscosity", j) for j in windows]) \
        if windows else np.zeros((n, 0))
    curve_eta, curve_regime, max_phi, max_mass, limited_by, curve_notes = _flow_answers(
        c, ctx, st, sauter, packing_notes, rates, limits)

    ok = rows.ok
    out = {}
    out["status"] = np.where(ok, "ok", "error")
    out["error"] = np.where(ok, "", rows.errors)
    mask = np.where(ok, 1.0, np.nan)
    out["phi solids [-]"] = st.phi_solids_eff * mask
    out["phi droplets [-]"] = st.phi_droplets * mask
    out["phi_max [-]"] = phi_max * mask
    with np.errstate(divide="ignore", invalid="ignore"):
        headroom = st.phi_solids_eff / phi_max * mask
    out["headroom phi/phi_max [-]"] = headroom
    vu = viscosity_unit
    out[f"liquid viscosity [{vu}]"] = from_si(np.atleast_1d(eta_l * mask), vu, "viscosity")
    warnings = np.full(n, "", dtype=object)

    def warn(mask, message):
        mask = np.asarray(mask, dtype=bool)
        if mask.any():
            head = warnings[mask]
            text = message[mask] if isinstance(message, np.ndarray) else message
            warnings[mask] = head + np.where(head == "", "", "; ") + text

    warn(ok & (headroom >= 1.0), "jammed: solids at or above phi_max, no flow predicted")
    warn(ok & (headroom >= CLOSE_TO_JAMMING) & (headroom < 1.0),
         f"within {100 * (1 - CLOSE_TO_JAMMING):.0f} % of phi_max: small loading errors "
         "change the viscosity a lot")
    for name in pd.unique(c.relation[ok & has_solid]):
        try:
            spec = get_model(name, kind="suspension")
        except LoadlineError:
            continue
        x = headroom if spec.phi_range_relative else st.phi_solids_eff
        low, high = spec.phi_range
        warn(ok & has_solid & (c.relation == name) & ((x < low) | (x > high)),
             f"{spec.name} used outside its validity range ({spec.validity})")

    warn(ok & (curve_notes != ""), curve_notes)
    for w, j in enumerate(windows):
        label = f"window {j}"
        rate = rates[:, w]
        lo = _num(rows, "window min viscosity", j)
        hi = _num(rows, "window max viscosity", j)
        bad_rate = ~(rate > 0)
        bad_limits = (lo <= 0) | (hi <= 0) | (lo > hi)
        eta = curve_eta[:, w] * mask
        out[f"{label} viscosity [{vu}]"] = from_si(np.atleast_1d(eta), vu, "viscosity")
        out[f"{label} regime"] = np.where(ok, curve_regime[:, w], "")
        if np.isfinite(hi).any():
            out[f"{label} max solids [vol%]"] = 100 * max_phi[:, w] * mask
            out[f"{label} max solids [wt%]"] = 100 * max_mass[:, w] * mask
            out[f"{label} limited by"] = np.where(ok, limited_by[:, w], "")
        passed = np.where(np.isnan(lo), True, eta >= lo) & np.where(np.isnan(hi), True, eta <= hi)
        verdict = np.where(ok & passed, "pass", np.where(ok, "fail", "error")).astype(object)
        verdict = np.where(ok & bad_rate, "error: shear rate missing or <= 0", verdict)
        verdict = np.where(ok & ~bad_rate & bad_limits,
                           "error: limits must be > 0 and min <= max", verdict)
        verdict = np.where(ok & ~bad_rate & ~bad_limits & np.isnan(lo) & np.isnan(hi),
                           "no limit", verdict)
        out[f"{label} verdict"] = verdict
    out["settling"] = np.where(ok, _settling(c, st, ctx), "")
    out["warnings"] = warnings
    result = chunk.copy(deep=False)     # copy on write: the chunk itself is never changed
    for name, values in out.items():
        if name in result.columns:
            name = f"{name} (result)"
        result[name] = values
    return result


def _predict_chunk_safe(chunk: pd.DataFrame, ctx: _Context, viscosity_unit: str) -> pd.DataFrame:
    """`_predict_chunk`, and if an unexpected error escapes it, the chunk row by row, so that
    one row that trips a defect loses only itself (its `error` says so) and never the run.

    A `ROW_ERROR` column (rows `read_table` could not align) becomes those rows' error."""
    row_errors = None
    if ROW_ERROR in chunk.columns:
        row_errors = chunk[ROW_ERROR].to_numpy(dtype=object)
        chunk = chunk.drop(columns=ROW_ERROR)
    try:
        return _predict_chunk(chunk, ctx, viscosity_unit, row_errors)
    except Exception:  # a defect, not bad input: isolate it to the rows that trip it
        if len(chunk) == 1:
            raise
    parts = []
    for i in range(len(chunk)):
        row = chunk.iloc[i:i + 1].reset_index(drop=True)
        try:
            parts.append(_predict_chunk(row, ctx, viscosity_unit,
                                        None if row_errors is None else row_errors[i:i + 1]))
        except Exception as err:  # noqa: BLE001 - reported in the row, run continues
            failed = row.copy()
            failed["status"] = "error"
            failed["error"] = f"internal error ({type(err).__name__}: {err}); please report it"
            parts.append(failed)
    return pd.concat(parts, ignore_index=True)


_MAX_SOLIDS = re.compile(r"^window (\d+) max solids \[vol%\]$")


def _note_liquid_fails(frame: pd.DataFrame) -> pd.DataFrame:
    """Say, in the `warnings` column, where a window's highest loading is 0 because even the
    liquid (with its droplets) is above the window's max viscosity: a bare 0 reads as an
    answer about the solids."""
    if "warnings" not in frame or "status" not in frame:
        return frame
    ok = frame["status"].to_numpy() == "ok"
    notes = frame["warnings"].astype(object).where(frame["warnings"].notna(), "").astype(str)
    for column in frame.columns:
        match = _MAX_SOLIDS.match(str(column))
        if not match:
            continue
        fails = ok & (pd.to_numeric(frame[column], errors="coerce").to_numpy() == 0.0)
        if fails.any():
            text = (f"window {match.group(1)}: even the liquid without solids (with its "
                    "droplets) is above the max viscosity; no solids loading meets it")
            joined = (notes + "; " + text).where(notes != "", text)
            notes = notes.where(~fails, joined)
    frame = frame.copy(deep=False)     # copy on write: the input frame is kept
    frame["warnings"] = notes.to_numpy(dtype=object)
    return frame


# -- public entry points ----------------------------------------------------------------------


@dataclass
class ScreenSummary:
    """Counts of one screening run."""

    rows: int = 0
    ok: int = 0
    errors: int = 0
    passed_all: int = 0
    windows: tuple[int, ...] = ()
    unrecognised: tuple[str, ...] = ()
    first_errors: list = field(default_factory=list)   # (line, candidate, message)

    def add(self, frame: pd.DataFrame, start: int) -> None:
        self.rows += len(frame)
        good = frame["status"].to_numpy() == "ok"
        self.ok += int(good.sum())
        self.errors += int((~good).sum())
        verdicts = [c for c in frame.columns if re.fullmatch(r"window \d+ verdict", c)]
        if verdicts:
            all_pass = np.all([frame[v].to_numpy() == "pass" for v in verdicts], axis=0)
            self.passed_all += int((all_pass & good).sum())
        names = frame["candidate"].to_numpy() if "candidate" in frame else None
        for i in np.flatnonzero(~good)[: max(0, 20 - len(self.first_errors))]:
            # line number as a spreadsheet shows it (the header is line 1)
            self.first_errors.append((start + i + 2, "" if names is None else str(names[i]),
                                      str(frame["error"].iat[i])))


def screen(table: pd.DataFrame, base_dir=".", viscosity_unit: str = "Pa*s",
           chunk_rows: int = CHUNK_ROWS) -> pd.DataFrame:
    """Predict every candidate of an in-memory table (text or numbers in the cells).

    Parameters
    ----------
    table : pandas.DataFrame
        Candidate rows in the column format of this module's docstring.
    base_dir : path-like
        Folder that size-table file names are relative to.
    viscosity_unit : str
        Unit of the viscosity columns of the result (any pint viscosity unit).
    chunk_rows : int
        Rows computed at once (bounds the memory).

    Returns
    -------
    pandas.DataFrame
        The input columns followed by the result columns; bad rows have status "error".
    """
    _check_unit(viscosity_unit)
    layout = parse_header([h for h in table.columns if h != ROW_ERROR])
    ctx = _Context(layout, pathlib.Path(base_dir))
    text = _as_text(table)
    parts = [_note_liquid_fails(_predict_chunk_safe(
        text.iloc[s:s + chunk_rows].reset_index(drop=True), ctx, viscosity_unit))
        for s in range(0, len(text), chunk_rows)]
    if not parts:
        return _predict_chunk(text, ctx, viscosity_unit)
    return pd.concat(parts, ignore_index=True)


def _as_text(table: pd.DataFrame) -> pd.DataFrame:
    """The table with every cell as text, missing ones empty; text columns kept as they are."""
    text_dtype = pd.Series([""], dtype=object).astype(str).dtype
    parts = []
    for i in range(table.shape[1]):
        col = table.iloc[:, i]
        if col.dtype == text_dtype:
            parts.append(col.fillna("") if col.hasnans else col)
        else:
            parts.append(col.astype(object).where(col.notna(), "").astype(str))
    if not parts:
        return table.astype(object).where(table.notna(), "").astype(str)
    out = pd.concat(parts, axis=1, ignore_index=True)
    out.columns = table.columns
    return out


def screen_file(path, out_path=None, viscosity_unit: str = "Pa*s",
                chunk_rows: int = CHUNK_ROWS, progress: Callable[[int], None] | None = None,
                keep: int = 0, dask=None) -> tuple[ScreenSummary, pd.DataFrame]:
    """Screen a CSV, Excel or Parquet table chunk by chunk, writing results as they come.

    Parameters
    ----------
    path : path-like
        The candidate table (.csv, .xlsx, .parquet).
    out_path : path-like, optional
        Where to write the result (.csv streamed; .xlsx, .parquet or .json written at the
        end).
    progress : callable, optional
        Called with the number of rows done after each chunk.
    keep : int
        Number of result rows to keep in memory and return (for printing); -1 keeps all.
    dask : str or distributed.Client, optional
        Compute the chunks on a Dask cluster (`screen_on_dask`): "" starts a local cluster,
        a scheduler address ("tcp://host:8786") or a Client uses that one. The table is
        still read here, with the same checks; the result is the same as in-process.

    Returns
    -------
    (ScreenSummary, pandas.DataFrame)
        The counts, and the first `keep` result rows.
    """
    _check_unit(viscosity_unit)
    path = pathlib.Path(path)
    summary = ScreenSummary()
    ctx = None
    kept, whole = [], []
    out_path = None if out_path is None else check_output(out_path, [path])
    streaming = out_path is not None and out_path.suffix.lower() == ".csv"
    with contextlib.ExitStack() as stack:
        handle = (stack.enter_context(open_atomic(out_path, [path], "w", encoding="utf-8",
                                                  newline=""))
                  if streaming else None)
        chunks = read_table(path, chunk_rows)
        pairs = ((chunk, None) for chunk in chunks) if dask is None else screen_on_dask(
            chunks, path.parent, viscosity_unit, dask)
        for chunk, result in pairs:
            if ctx is None:
                layout = parse_header([h for h in chunk.columns if h != ROW_ERROR])
                ctx = _Context(layout, path.parent)
                summary.windows = layout.windows
                summary.unrecognised = layout.unrecognised
            if result is None:     # (a Dask worker ran `screen`, which notes them itself)
                result = _note_liquid_fails(_predict_chunk_safe(chunk.reset_index(drop=True),
                                                                ctx, viscosity_unit))
            summary.add(result, summary.rows)
            if streaming:
                write_csv(result, handle, header=handle.tell() == 0)
            elif out_path is not None:
                whole.append(result)
            if keep < 0 or sum(len(k) for k in kept) < keep:
                kept.append(result if keep < 0 else result.head(keep))
            if progress:
                progress(summary.rows)
        if ctx is None:
            raise ScenarioError(f"{path.name} has no header row.")
        if out_path is not None:   # nor may it be a size table the rows named
            check_output(out_path, [path, *_size_table_paths(ctx)])
    if out_path is not None and not streaming:
        write_table(pd.concat(whole, ignore_index=True) if whole else pd.DataFrame(), out_path,
                    [path])
    shown = pd.concat(kept, ignore_index=True) if kept else pd.DataFrame()
    return summary, shown if keep < 0 else shown.head(keep)


def screen_on_dask(chunks, base_dir, viscosity_unit: str, cluster="") -> Iterator[
        tuple[pd.DataFrame, pd.DataFrame]]:
    """(chunk, result) pairs in table order, each result computed by `screen` on a Dask
    worker: the same vectorised function as in-process, one chunk per task.

    Parameters
    ----------
    chunks : iterable of pandas.DataFrame
        Text chunks of a candidate table (`read_table`); read here, computed remotely.
    base_dir : path-like
        Folder of the candidate table; size tables named in it must be readable at the same
        path on every worker.
    viscosity_unit : str
        Unit of the result's viscosity columns.
    cluster : str or distributed.Client
        "" starts a local cluster (worker processes on this machine, closed at the end); an
        address ("tcp://host:8786") connects to a running scheduler; a Client is used as is.

    At most two chunks per worker thread are in flight, so memory stays bounded.
    """
    import collections

    try:
        from distributed import Client, LocalCluster
    except ImportError:
        raise ScenarioError("--dask needs Dask: pip install 'loadline[dask]' (dask and "
                            "distributed).") from None
    owned = []
    if isinstance(cluster, Client):
        client = cluster
    elif cluster:
        try:
            client = Client(str(cluster), timeout="20s")
        except OSError as err:
            raise ScenarioError(f"no Dask scheduler answers at {cluster} ({err}).") from None
        owned.append(client)
    else:
        local = LocalCluster(dashboard_address=None)
        owned += [local, client := Client(local)]
    try:
        threads = max(1, sum(client.nthreads().values()))
        pending = collections.deque()
        for chunk in chunks:
            pending.append((chunk, client.submit(screen, chunk, base_dir, viscosity_unit,
                                                 chunk_rows=max(len(chunk), 1), pure=False)))
            while len(pending) > 2 * threads:
                chunk, future = pending.popleft()
                yield chunk, future.result()
        while pending:
            chunk, future = pending.popleft()
            yield chunk, future.result()
    finally:
        for item in reversed(owned):
            item.close()


def _size_table_paths(ctx: _Context) -> list[pathlib.Path]:
    """The size-table files a run has read (the first item of each size-cache key; a base
    scenario's own distributions are no files), and the base scenarios it read."""
    return [ctx.base_dir / key[0] for key in ctx.size_cache
            if isinstance(key, tuple) and key and isinstance(key[0], str) and key[0]
            and not key[0].startswith(_BASE)] + [ctx.base_dir / name for name in ctx.base_cache]


def _check_unit(viscosity_unit: str) -> None:
    try:
        from_si(1.0, viscosity_unit, "viscosity")
    except Exception:  # pint raises several kinds; one message for all
        raise UnitError(f"viscosity unit = {viscosity_unit!r} is not a viscosity unit; "
                        "write e.g. 'Pa*s', 'mPa*s' or 'cP'.") from None


# -- writing ----------------------------------------------------------------------------------

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def spreadsheet_safe(value):
    """A cell made safe for spreadsheets: text starting with = + - @ gets a leading quote.

    Plain numbers (such as -3.5) are left as they are; they cannot be formulas.

    Examples
    --------
    >>> spreadsheet_safe("=HYPERLINK(1)")
    "'=HYPERLINK(1)"
    >>> spreadsheet_safe("-2.5")
    '-2.5'
    """
    if isinstance(value, str) and value.startswith(_FORMULA_START) and not _NUMBER.match(value):
        return "'" + value
    return value


def safe_frame(frame: pd.DataFrame, digits: int = 6) -> pd.DataFrame:
    """A copy of `frame` fit for a spreadsheet: text cells and headers escaped with
    `spreadsheet_safe` (vectorised), floats rounded to `digits` significant digits."""
    out = frame.copy(deep=False)     # copy on write: `frame` itself is never changed
    out.columns = [spreadsheet_safe(str(c)) for c in out.columns]
    for col in out.columns:
        values = out[col]
        if pd.api.types.is_float_dtype(values):
            out[col] = round_significant(values.to_numpy(dtype=float), digits)
        elif not (pd.api.types.is_numeric_dtype(values) or pd.api.types.is_bool_dtype(values)):
            out[col] = _escape_column(values)
    return out


def _escape_column(values: pd.Series) -> pd.Series:
    """`spreadsheet_safe` over a column; in pyarrow's compute kernels when available."""
    text = values.astype(object).where(values.notna(), "").astype(str)
    try:
        import pyarrow as pa
        import pyarrow.compute as pc
    except ImportError:
        return text.map(spreadsheet_safe)
    arr = pa.array(text.to_numpy(dtype=object), type=pa.string())
    risky = pc.and_(pc.match_substring_regex(arr, r"^[=+\-@\t\r]"),
                    pc.invert(pc.match_substring_regex(arr, _NUMBER.pattern)))
    escaped = pc.if_else(risky, pc.binary_join_element_wise("'", arr, ""), arr)
    return pd.Series(escaped.to_numpy(zero_copy_only=False), index=values.index, dtype=object)


def round_significant(values, digits: int = 6) -> np.ndarray:
    """Floats rounded to `digits` significant digits (NaN and inf kept).

    Examples
    --------
    >>> round_significant([0.00152376079, 12345678.0, -2.0], 6).tolist()
    [0.00152376, 12345700.0, -2.0]
    """
    x = np.asarray(values, dtype=float)
    out = x.copy()
    fine = np.isfinite(x) & (x != 0)
    exponent = np.floor(np.log10(np.abs(x[fine]))).astype(int) - (digits - 1)
    # divide by an exact power of ten when rounding above the units, multiply otherwise
    up = exponent > 0
    y = x[fine]
    y = np.where(up, np.round(y / 10.0 ** np.where(up, exponent, 0)) * 10.0 ** np.where(
        up, exponent, 0), np.round(y * 10.0 ** np.where(up, 0, -exponent))
        / 10.0 ** np.where(up, 0, -exponent))
    out[fine] = y
    return out


def write_csv(frame: pd.DataFrame, handle_or_path, header: bool = True) -> None:
    """Write `frame` as spreadsheet-safe CSV (escaped cells, 6 significant digits).

    Uses pyarrow's CSV writer when present (a dependency of streamlit; about 10x faster than
    pandas for a million rows), pandas' otherwise.
    """
    safe = safe_frame(frame)
    try:
        import pyarrow as pa
        import pyarrow.csv as pa_csv
    except ImportError:
        safe.to_csv(handle_or_path, index=False, header=header)
        return
    table = pa.Table.from_pandas(safe, preserve_index=False)
    options = pa_csv.WriteOptions(include_header=header, quoting_style="needed")
    buffer = io.BytesIO()
    pa_csv.write_csv(table, buffer, write_options=options)
    data = buffer.getvalue()
    if isinstance(handle_or_path, str | pathlib.Path):
        atomic_write(handle_or_path, data)
    elif isinstance(handle_or_path, io.TextIOBase):
        handle_or_path.write(data.decode("utf-8"))
    else:
        handle_or_path.write(data)


def write_table(frame: pd.DataFrame, path, inputs=()) -> pathlib.Path:
    """Write a result table as .csv, .xlsx, .parquet or .json, chosen by the file name.

    Through `files.atomic_write`: `path` is refused when it is one of `inputs`, and it is
    replaced whole or not at all.
    """
    path = check_output(path, inputs)
    suffix = path.suffix.lower()
    if suffix == ".csv":
        buffer = io.BytesIO()
        write_csv(frame, buffer)
        data = buffer.getvalue()
    elif suffix == ".xlsx":
        buffer = io.BytesIO()
        try:
            safe_frame(frame).to_excel(buffer, index=False)
        except ImportError:
            raise ScenarioError("writing Excel needs openpyxl: pip install openpyxl.") from None
        data = buffer.getvalue()
    elif suffix == ".json":
        data = frame.to_json(orient="records", indent=1, double_precision=15)
    elif suffix == ".parquet":   # for machines: full precision, no spreadsheet escaping
        buffer = io.BytesIO()
        frame.to_parquet(buffer, index=False)
        data = buffer.getvalue()
    else:
        raise InputRangeError("output file", path.name,
                              "a name ending in .csv, .xlsx, .parquet or .json")
    return atomic_write(path, data, inputs)


def csv_text(frame: pd.DataFrame) -> str:
    """Spreadsheet-safe CSV text of `frame`."""
    buffer = io.StringIO()
    write_csv(frame, buffer)
    return buffer.getvalue()
