"""Batch screen: a table of candidate formulations in, predictions, flags and limits out."""

import functools
import pathlib
import re
import tempfile

import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts

state.init()
ss = st.session_state
SUFFIXES = (".csv", ".xlsx")
DEMO_TABLE = state.DEMO_DIR / "candidates.csv"


def _uploaded() -> None:
    """Keep the uploaded candidate table (and any size tables it names) in the session."""
    files = ss.get("batch_upload") or []
    kept, problems = {}, []
    for upload in files:
        try:
            if upload.size > state.MAX_UPLOAD_BYTES:
                raise predictor.ScenarioError(
                    f"{upload.name} is {upload.size / 1e6:.1f} MB; the limit is "
                    f"{state.MAX_UPLOAD_BYTES / 1e6:.0f} MB.")
            if not upload.name.lower().endswith(SUFFIXES):
                raise predictor.ScenarioError(f"{upload.name} has the wrong type; expected a "
                                              ".csv or .xlsx file.")
            kept[compute.safe_file_name(upload.name, "table.csv")] = upload.getvalue()
        except predictor.LoadlineError as err:
            problems.append(str(err))
    ss["batch_files"] = kept
    ss["batch_message"] = " ".join(problems)
    ss["batch_result"] = None


def _use_demo() -> None:
    ss["batch_files"] = {p.name: p.read_bytes() for p in state.DEMO_DIR.glob("*.csv")
                         if p.name == DEMO_TABLE.name or p.name.startswith("sizes_")}
    ss["batch_table_name"] = DEMO_TABLE.name
    ss["batch_message"] = ""
    ss["batch_result"] = None


def _outside_size_tables(path: pathlib.Path) -> list[str]:
    """Size-table cells naming a file by a folder path (absolute, or with / \\ or ..).

    The candidate table comes from the user, and the core reads a size table relative to the
    table's folder or by an absolute path: only bare names of uploaded files are accepted.
    """
    from predictor import batch

    bad = []
    for chunk in batch.read_table(path):
        for column in chunk.columns:
            if "size table" not in str(column).lower():
                continue
            for cell in chunk[column].dropna().astype(str).str.strip():
                if cell and (cell != compute.safe_file_name(cell, "") or cell.startswith(".")):
                    bad.append(cell)
    return sorted(set(bad))


def run_screen(table_name: str, unit: str) -> None:
    """Screen the table with a progress bar; keep the result in the session."""
    from predictor import batch

    bar = st.progress(0.0, text="Screening…")
    with tempfile.TemporaryDirectory() as folder:
        for name, data in ss["batch_files"].items():
            (pathlib.Path(folder) / name).write_bytes(data)
        path = pathlib.Path(folder) / table_name
        try:
            with compute.reading(table_name):
                outside = _outside_size_tables(path)
                total = batch.count_rows(path) or 1
            if outside:
                raise predictor.ScenarioError(
                    f"{table_name} names size tables by a folder path ("
                    + ", ".join(outside[:3]) + "); here a size table must be one of the "
                    "files uploaded with the candidate table, named without a folder.")
        except predictor.LoadlineError as err:
            bar.empty()
            ss["batch_message"] = str(err)
            ss["batch_result"] = None
            return

        def progress(done: int) -> None:
            bar.progress(min(done / total, 1.0), text=f"Screening… {done} of {total} rows")

        try:
            with compute.reading(table_name):
                summary, result = batch.screen_file(path, viscosity_unit=unit, keep=-1,
                                                    progress=progress)
        except predictor.LoadlineError as err:
            bar.empty()
            ss["batch_message"] = str(err)
            ss["batch_result"] = None
            return
    bar.empty()
    ss["batch_result"] = result
    ss["batch_summary"] = {"rows": summary.rows, "ok": summary.ok, "errors": summary.errors,
                           "passed_all": summary.passed_all,
                           "unrecognised": list(summary.unrecognised),
                           "first_errors": [list(e) for e in summary.first_errors]}
    ss["batch_unit"] = unit


def results() -> None:
    result, summary = ss["batch_result"], ss["batch_summary"]
    widgets.metric_row([
        ("Candidates", str(summary["rows"]), None),
        ("Predicted", str(summary["ok"]), None),
        ("With input errors", str(summary["errors"]), "Each row's error names the column."),
        ("Pass every window", str(summary["passed_all"]),
         "Viscosity inside every target window of the row."),
    ])
    if summary["unrecognised"]:
        st.warning("Columns not recognised (left unused): " + ", ".join(summary["unrecognised"]),
                   icon=":material/warning:")
    for line, name, message in summary["first_errors"][:5]:
        st.error(f"Line {line} ({name}): {message}", icon=":material/error:")
    flagged = result.copy()
    head = "headroom phi/phi_max [-]"
    if head in flagged:
        plot = pd.DataFrame({"candidate": flagged.get("candidate", flagged.index.astype(str)),
                             "headroom": pd.to_numeric(flagged[head], errors="coerce"),
                             "verdict": _verdicts(flagged)}).dropna(subset=["headroom"])
        if len(plot):
            widgets.chart_block(charts.headroom_bars(plot, big=ss["presentation"]), plot,
                                "batch-headroom", "batch")
    shown = [c for c in flagged.columns if c in ("candidate", "status", "error")
             or re.search(r"\] *$", c) and not c.startswith(("ingredient", "liquid ", "glycerol",
                                                              "temperature"))
             or c.endswith(("verdict", "regime")) or c in ("settling", "warnings")]
    table = widgets.table_words(flagged[shown])
    st.dataframe(table, hide_index=True, width="stretch",
                 column_config={c: st.column_config.NumberColumn(format="%.4g")
                                for c in shown if table[c].dtype.kind == "f"})
    st.download_button("Results (CSV)", data=functools.partial(widgets.csv_bytes, result),
                       file_name="batch-screen-results.csv", mime="text/csv",
                       key="batch_download", on_click="ignore", icon=":material/download:")


def _verdicts(frame: pd.DataFrame) -> list[str]:
    cols = [c for c in frame.columns if re.fullmatch(r"window \d+ verdict", c)]
    out = []
    for _, row in frame.iterrows():
        if row.get("status") != "ok":
            out.append("input error")
        elif cols and all(row[c] == "pass" for c in cols):
            out.append("passes every window")
        elif cols:
            out.append("fails a window")
        else:
            out.append("no window given")
    return out


@widgets.page_body
def body() -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        st.file_uploader("Candidate table (.csv or .xlsx), with any size tables it names",
                         type=["csv", "xlsx"], accept_multiple_files=True, key="batch_upload",
                         on_change=_uploaded)
        st.button("Use the demo candidates", key="batch_demo", on_click=_use_demo,
                  icon=":material/science:")
        names = [n for n in ss["batch_files"] if n.lower().endswith(SUFFIXES)]
        if ss["batch_table_name"] not in names:
            ss["batch_table_name"] = next((n for n in names if not n.startswith("sizes_")),
                                          names[0] if names else "")
        if names:
            st.selectbox("Table to screen", names, key="batch_table_name")
        go = st.button("Screen the candidates", key="batch_run", type="primary",
                       disabled=not names, icon=":material/play_arrow:")
        st.caption("Columns: candidate, liquid, temperature [degC], ingredient k, ingredient k "
                   "loading [wt%], ingredient k density [kg/m3], ingredient k d50 [um], window "
                   "j shear rate [1/s], window j max viscosity [Pa*s] … (see the CLI help).")
    with right:
        if ss.get("batch_message"):
            st.error(ss["batch_message"], icon=":material/error:")
        if go:
            run_screen(ss["batch_table_name"], ss["unit_viscosity"])
            if ss.get("batch_message"):
                st.error(ss["batch_message"], icon=":material/error:")
        if ss.get("batch_result") is not None:
            results()
        elif not names:
            st.info("Upload a table of candidate formulations, one per row, or try the demo "
                    "candidates.", icon=":material/upload_file:")


widgets.page_header("Batch screen", "Many candidate formulations at once: predictions, flags "
                    "and the highest loading per row")
body()
widgets.footer()
