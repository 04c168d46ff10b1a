"""Shared helpers of the app tests: AppTest of one page seeded with a demo scenario."""

from __future__ import annotations

import json
import pathlib

import pytest
from streamlit.testing.v1 import AppTest

from app import state, widgets
from predictor import scenario as sc

REPO = pathlib.Path(__file__).resolve().parents[2]
DEMOS = {p.name.split(".")[0]: p for p in (REPO / "data_demo").glob("*.loadline.json")}
TIMEOUT = 60


def demo(name: str = "mineral_coating"):
    return sc.read_scenario(DEMOS[name])


def seed_values(name: str = "mineral_coating") -> dict:
    """Session-state values of a demo scenario, in the default units."""
    values = {k: (list(v) if isinstance(v, list) else v) for k, v in state.DEFAULTS.items()}
    values.update(state.values_from_formulation(demo(name), values))
    values["scenario_loaded"] = True
    values["sc_source"] = DEMOS[name].name
    return values


def page(view: str, scenario: str = "mineral_coating", **overrides) -> AppTest:
    """AppTest of app/views/<view>.py with the session seeded by a demo scenario."""
    at = AppTest.from_file(str(REPO / "app" / "views" / f"{view}.py"), default_timeout=TIMEOUT)
    for key, value in {**seed_values(scenario), **overrides}.items():
        at.session_state[key] = value
    return at


def metric(at: AppTest, label_start: str) -> str:
    """Value shown by the metric whose label starts with `label_start`."""
    found = [m.value for m in at.metric if m.label.startswith(label_start)]
    assert found, f"no metric {label_start!r}; have {[m.label for m in at.metric]}"
    return found[0]


def delta(at: AppTest, label_start: str) -> str:
    """The note shown under the metric whose label starts with `label_start`."""
    found = [m.delta for m in at.metric if m.label.startswith(label_start)]
    assert found, f"no metric {label_start!r}; have {[m.label for m in at.metric]}"
    return found[0]


def chart_specs(at: AppTest) -> list[dict]:
    return [json.loads(el.proto.spec) for el in at.get("vega_lite_chart")]


def messages(at: AppTest) -> str:
    return " ".join(e.value for e in [*at.error, *at.warning, *at.info])


@pytest.fixture
def formulation_of():
    """The Formulation the app builds from an AppTest's session state."""
    def build(at: AppTest):
        values = {k: at.session_state[k] for k in state.all_keys(_Proxy(at))
                  if k in at.session_state}
        return sc.loads(sc.dumps(sc.scenario_from_dict(state.document(values))))
    return build


class _Proxy(dict):
    def __init__(self, at):
        super().__init__(n_ing=at.session_state["n_ing"])


@pytest.hookimpl(wrapper=True, tryfirst=True)
def pytest_runtest_makereport(item, call):
    """Make each phase's report available to fixtures (for failure screenshots)."""
    report = yield
    setattr(item, f"rep_{report.when}", report)
    return report


def open_sections(at: AppTest, n_ing: int = 4) -> AppTest:
    """Open every sidebar section (they draw their fields only while open)."""
    names = ["files", "units", "liquid"] + [f"ing{i}" for i in range(n_ing)]
    for key, value in opened(*names).items():
        at.session_state[key] = value
    return at


def opened(*names: str) -> dict:
    """Session-state values that open the named sections (`widgets.section`)."""
    keys = [widgets.SECTION_PREFIX + name for name in names]
    return {**dict.fromkeys(keys, True), **dict.fromkeys(["_" + k for k in keys], True)}
