"""The scenario report: one self-contained HTML file (and a PDF), opened and checked."""

from __future__ import annotations

import html.parser
import pathlib
import re

import pytest

from predictor import formulation as fm
from predictor.cli import CAUTIONS
from predictor.report import write_report
from predictor.scenario import read_scenario

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"
SECTIONS = ["Inputs", "Summary", "Flow curve", "Loading sweep and packing range",
            "Design map of the first two solids", "Process windows", "Process checks",
            "Uncertainty", "Storage (settling and creaming)",
            "Relations used and their sources", "Cautions"]


class _Collector(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags, self.h2, self._in_h2, self.refs = [], [], False, []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self._in_h2 = tag == "h2"
        for name, value in attrs:
            if name in ("src", "href") and value:
                self.refs.append(value)

    def handle_endtag(self, tag):
        self._in_h2 = False if tag == "h2" else self._in_h2

    def handle_data(self, data):
        if self._in_h2:
            self.h2.append(data)


@pytest.fixture(scope="module")
def coating(tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    paths = write_report(DEMO / "mineral_coating.loadline.json", folder / "coating.html",
                         pdf_path=folder / "coating.pdf", viscosity_unit="mPa*s")
    return paths


def test_sections_in_order(coating):
    parser = _Collector()
    parser.feed(coating[0].read_text(encoding="utf-8"))
    titles = [re.sub(r"^\d+\.\s*", "", t) for t in parser.h2]
    assert titles == SECTIONS


def test_self_contained_with_embedded_charts(coating):
    text = coating[0].read_text(encoding="utf-8")
    parser = _Collector()
    parser.feed(text)
    assert parser.tags.count("svg") >= 2            # flow curve and loading sweep
    assert "script" not in parser.tags and "link" not in parser.tags
    assert parser.refs == []                        # nothing fetched from anywhere
    assert "Flow curve" in text and "Loading sweep" in text


def test_inputs_echoed_with_units(coating):
    text = coating[0].read_text(encoding="utf-8")
    form = read_scenario(DEMO / "mineral_coating.loadline.json")
    for ing in form.ingredients:
        assert ing.name in text
        assert f"{100 * ing.loading:.4g} wt%" in text
    for unit in ("degC", "kg/m3", "D50 [um]", "layer [nm]", "mPa*s"):
        assert unit in text


def test_numbers_match_the_core(coating):
    # The summary's viscosity at 1 1/s is the core's value (in mPa*s, 4 digits).
    form = read_scenario(DEMO / "mineral_coating.loadline.json")
    eta = float(fm.predict(form, 1.0)["viscosity_Pa_s"].iloc[0]) * 1e3
    assert f"{eta:.4g}" in coating[0].read_text(encoding="utf-8")


def test_cautions_models_and_sources(coating):
    text = coating[0].read_text(encoding="utf-8").replace("&#x27;", "'")
    assert text.count(CAUTIONS) == 2                # top box and last section
    assert "krieger-dougherty" in text and "Krieger &amp; Dougherty" in text


def test_process_checks_match_the_core(coating):
    # The pipe table is process.pipe_flow_of at the reference conditions, with its caution.
    from predictor import process
    from predictor.report import PROCESS_REFERENCE, _g

    text = coating[0].read_text(encoding="utf-8").replace("&#x27;", "'")
    form = read_scenario(DEMO / "mineral_coating.loadline.json")
    ref = PROCESS_REFERENCE
    flow = process.pipe_flow_of(form, ref["flows_L_per_min"][1] / 60e3, ref["diameter_m"],
                                ref["length_m"])
    assert f"<td class='n'>{_g(flow.pressure_drop_Pa / 1e5)}</td>" in text
    assert process.CAUTION in text


def test_pdf_written(coating):
    data = coating[1].read_bytes()
    assert data.startswith(b"%PDF") and len(data) > 10_000


def test_emulsion_only_scenario(tmp_path):
    (path,) = write_report(DEMO / "hand_cream.loadline.json", tmp_path / "cream.html")
    text = path.read_text(encoding="utf-8")
    assert "No solids: there is no solids loading to sweep." in text
    assert "phan-thien-pham" in text


def test_report_shows_particle_forces_when_a_solid_carries_them(tmp_path):
    import dataclasses

    from predictor.scenario import write_scenario

    form = read_scenario(DEMO / "ceramic_slip.loadline.json")
    ing = dataclasses.replace(form.ingredients[0], surface_potential_V=0.03, hamaker_J=4.8e-20)
    form = dataclasses.replace(form, ingredients=(ing,), liquid=dataclasses.replace(
        form.liquid, ionic_strength_mol_per_L=0.5))
    path = write_scenario(form, tmp_path / "slip.loadline.json")
    html_path, = write_report(path, tmp_path / "slip.html")[:1]
    text = html_path.read_text(encoding="utf-8")
    parser = _Collector()
    parser.feed(text)
    titles = [re.sub(r"^\d+\.\s*", "", t) for t in parser.h2]
    assert "Particle forces (dispersed or flocculated)" in titles
    tau = fm.flocculation_yield_stress(form)
    assert f"Network yield stress at this loading: {tau:.4g} Pa" in text
    assert "flocculated" in text and "rule of thumb" in text


def test_report_charts_are_the_app_charts_and_fit_the_pdf_page():
    # One chart module (issue 13): the report draws predictor.charts' flow-curve panels and
    # loading sweep, and their SVG fits the PDF page with its 40 px margin.
    from predictor import charts, report

    built = report.build_report(read_scenario(DEMO / "ceramic_slip.loadline.json"))
    specs = [c for sec in built.sections for c in sec.charts]
    assert len(specs) == 2 and all(s["$schema"] == charts.alt.SCHEMA_URL for s in specs)
    assert "vconcat" in specs[0]                       # the app's stacked flow-curve panels
    for spec in specs:
        svg = charts.to_svg(spec, report.CHART_WIDTH)
        width = float(re.search(r'width="([\d.]+)"', svg).group(1))
        assert width <= report._PAGE_W - 40
