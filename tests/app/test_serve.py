"""`python -m app.serve`: Streamlit's own `run` of app/main.py, with imports warmed once."""

from __future__ import annotations

import subprocess
import sys

from app import serve
from tests.app.conftest import REPO


def test_serve_passes_its_options_to_streamlit_run(mocker):
    run = mocker.patch("streamlit.web.cli.main", return_value=0)
    warm = mocker.patch.object(serve, "warm")
    assert serve.main(["--server.port", "8599"]) == 0
    run.assert_called_once_with(args=["run", str(REPO / "app" / "main.py"), "--server.port",
                                      "8599"], prog_name="streamlit")
    for thread in serve.threading.enumerate():
        if thread.name == "loadline-warm":
            thread.join(timeout=60)
    warm.assert_called_once_with()   # in its own thread, started with the server


def test_warm_up_loads_what_the_opening_page_needs():
    probe = ("import sys\nfrom app import serve\nserve.warm()\n"
             "print(sorted(m for m in ('pandas', 'altair', 'pint', 'predictor.design', "
             "'predictor.charts', 'scipy.optimize') if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                          cwd=REPO, timeout=120, check=True)
    assert done.stdout.split("\n")[-2] == str(
        ["altair", "pandas", "pint", "predictor.charts", "predictor.design", "scipy.optimize"])
