"""Start-up (issue 19): how soon the command line and the app answer, against bare numpy.

All rows are measured in one run, side by side with the baseline, a fresh interpreter that
only imports numpy (``python -c "import numpy"``): the cheapest start any numeric Python tool
can have. The ratio column (speed-up) is baseline / ours, so 0.5 means twice numpy's start.

- ``loadline --help``, ``python -c "import predictor"`` and ``loadline predict`` on the demo
  are fresh processes, each the median of several runs (warm disk cache, as a user who runs
  the command many times a day has).
- First chart: a Streamlit server is started and waited for (its health check), then Debian's
  chromium (the browser test harness of tests/app/) opens the app; the time runs from
  ``page.goto`` to the first chart drawn on the opening page (a Vega-Lite chart with its
  canvas or SVG in the page). Measured for a fresh server (first session: imports and cold
  caches) and for a second session of the same server.
"""

from __future__ import annotations

import os
import pathlib
import shutil
import signal
import statistics
import subprocess
import sys
import tempfile
import time

from tests.benchmarks.common import row

REPO = pathlib.Path(__file__).resolve().parents[2]
BIN = pathlib.Path(sys.executable).parent
DEMO = str(REPO / "data_demo" / "mineral_coating.loadline.json")
REPEAT = 5


def _loadline() -> list[str]:
    exe = BIN / "loadline"
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "predictor.cli"]


def _wall(argv: list[str], repeat: int = REPEAT) -> float:
    """Median wall time of a fresh process (stdout discarded; a failure stops the bench)."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run(argv, cwd=REPO, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                       check=True, timeout=120)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


#: How the server is started: as `make run` does (imports warmed with the server), and the
#: plain Streamlit start for comparison.
LAUNCHERS = {"python -m app.serve": ["-m", "app.serve"],
             "streamlit run app/main.py": ["-m", "streamlit", "run", "app/main.py"]}


def _first_chart_s(launcher: list[str]) -> tuple[float, float] | None:
    """(first session, second session) seconds from opening the app to its first chart."""
    chromium = pathlib.Path("/usr/bin/chromium")
    if not chromium.exists():
        return None
    from playwright.sync_api import sync_playwright
    from streamlit import logger as streamlit_logger

    # The browser test harness imports the app's modules outside a server: quiet their
    # 'no runtime' notes (through Streamlit, which sets each of its loggers' level).
    streamlit_logger.set_log_level("error")
    from tests.app.test_browser import ARGS, _free_port, _healthy

    port = _free_port()
    url = f"http://127.0.0.1:{port}"
    env = {**os.environ, "LOADLINE_SCENARIO": "data_demo/mineral_coating.loadline.json"}
    log = tempfile.TemporaryFile()
    proc = subprocess.Popen(
        [sys.executable, *launcher, "--server.headless", "true",
         "--server.port", str(port), "--server.address", "127.0.0.1",
         "--browser.gatherUsageStats", "false", "--server.fileWatcherType", "none"],
        cwd=REPO, env=env, stdout=log, stderr=subprocess.STDOUT, start_new_session=True)
    profile = tempfile.mkdtemp(prefix="loadline-bench-")
    try:
        deadline = time.monotonic() + 60
        while not _healthy(url):
            if proc.poll() is not None or time.monotonic() > deadline:
                raise RuntimeError("streamlit did not start for the start-up benchmark")
            time.sleep(0.1)
        times = []
        with sync_playwright() as p:
            browser = p.chromium.launch(executable_path=str(chromium), headless=True,
                                        args=ARGS)
            for _ in range(2):
                context = browser.new_context(viewport={"width": 1440, "height": 1000})
                tab = context.new_page()
                start = time.perf_counter()
                tab.goto(url, wait_until="commit")
                tab.locator("[data-testid='stVegaLiteChart'] canvas, "
                            "[data-testid='stVegaLiteChart'] svg").first.wait_for(
                    state="visible", timeout=120_000)
                times.append(time.perf_counter() - start)
                context.close()
            browser.close()
        return times[0], times[1]
    finally:
        proc.send_signal(signal.SIGTERM)
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=10)
        log.close()
        shutil.rmtree(profile, ignore_errors=True)


def run() -> list[dict]:
    numpy_s = _wall([sys.executable, "-c", "import numpy"])
    base = 'bare start: python -c "import numpy"'
    rows = []
    for name, argv, goal in (
            ("start-up: loadline --help", _loadline() + ["--help"], "< 0.5 s (<= 3x numpy)"),
            ("start-up: import predictor", [sys.executable, "-c", "import predictor"],
             "< 1.5 s"),
            ("start-up: loadline predict (demo)", _loadline() + ["predict", DEMO], "< 2.5 s"),
            ("start-up: loadline models", _loadline() + ["models"], "no numeric stack")):
        ours = _wall(argv)
        rows.append(row(name, ours, numpy_s, base, goal,
                        note=f"{ours / numpy_s:.2f}x the numpy start, median of {REPEAT}"))
    for label, launcher in LAUNCHERS.items():
        chart = _first_chart_s(launcher)
        if chart is None:
            rows.append(row("start-up: app first chart", float("nan"), numpy_s, base, "< 4 s",
                            note="skipped: /usr/bin/chromium missing"))
            break
        first, second = chart
        rows.append(row(f"start-up: app first chart, new server ({label})", first, numpy_s,
                        base, "< 4 s", note="page.goto to the first chart drawn, first "
                        "session, opened as soon as the server answers"))
        rows.append(row(f"start-up: app first chart, second session ({label})", second,
                        numpy_s, base, "< 4 s", note="same server, a new browser session"))
    return rows
