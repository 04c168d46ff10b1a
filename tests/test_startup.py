"""Start-up stays quick (issue 19): what `import predictor` and the light commands load.

Each check runs a fresh interpreter and reads its `sys.modules`, so a heavy import that
creeps back at module level fails here, not only in the start-up benchmark rows.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

#: Heavy parts `import predictor` must not load (issue 19): the compiled code, scipy.stats,
#: the unit registry (pint), chart export, Excel support, the numeric stack itself.
NOT_ON_IMPORT = ("numba", "scipy.stats", "scipy.optimize", "pint", "altair", "vl_convert",
                 "openpyxl", "pandas", "numpy", "dask", "tqdm")
#: The numeric stack `loadline --help` and `loadline models` must not load.
NUMERIC = ("numpy", "scipy", "pandas", "pint", "numba")


def _loaded(code: str, names) -> list[str]:
    probe = (f"import sys\n{code}\n"
             f"print('@@' + repr([m for m in {tuple(names)!r} if m in sys.modules]))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                          timeout=120, check=True)
    return eval(done.stdout.rsplit("@@", 1)[1])   # our own repr of a list of str


def test_import_predictor_loads_nothing_heavy():
    assert _loaded("import predictor", NOT_ON_IMPORT) == []


def test_public_names_still_resolve_lazily():
    # A cheap name loads only its own module: the registry alone does not load pint/numba.
    loaded = _loaded("import predictor\nassert predictor.InputRangeError\n"
                     "assert len(predictor.models()) > 20", ("numba", "pint", "scipy.stats"))
    assert loaded == []
    import predictor

    assert set(predictor.__all__) <= set(dir(predictor))
    for name in predictor.__all__:
        assert getattr(predictor, name) is not None
    with pytest.raises(AttributeError):
        predictor.no_such_name   # noqa: B018


@pytest.mark.parametrize("argv", [["--help"], ["predict", "--help"], ["screen", "--help"],
                                  ["models"], ["models", "--json"], ["models", "--csv"]])
def test_light_commands_load_no_numeric_stack(argv):
    code = ("from predictor.cli import main\nimport contextlib, io\n"
            f"with contextlib.redirect_stdout(io.StringIO()):\n    main({argv!r})")
    assert _loaded(code, NUMERIC) == []


def test_kernels_compile_on_first_use():
    # numba loads with the first call of a compiled kernel (the jamming simulation's), not
    # with the module that defines it nor with the packing estimates of every prediction.
    code = ("import numpy as np\nfrom predictor import packing\nimport sys\n"
            "packing.packing_estimates([1e-6, 3e-6], [0.5, 0.5])\n"
            "assert 'numba' not in sys.modules\n"
            "x = np.zeros((2, 3)); x[1, 0] = 0.5\n"
            "packing._forces(x, np.array([0.3, 0.3]), np.array([0]), np.array([1]), 10.0,"
            " np.zeros_like(x))")
    assert _loaded(code, ("numba",)) == ["numba"]


def test_models_json_is_the_registry_snapshot():
    from predictor.registry import snapshot

    done = subprocess.run([sys.executable, "-m", "predictor.cli", "models", "--json"],
                          capture_output=True, text=True, timeout=120, check=True)
    assert json.loads(done.stdout)["rows"] == json.loads(json.dumps(snapshot()))


def test_kernel_without_a_cache_folder_still_compiles():
    # Source numba cannot place a cache for (here: code with no file) falls back quietly.
    from predictor._jit import compile_kernel, lazy_njit

    namespace = {}
    exec(compile("def add_one(x):\n    return x + 1.0\n", "<no file>", "exec"), namespace)
    kernel = compile_kernel(namespace["add_one"])
    assert kernel(2.0) == 3.0
    lazy = lazy_njit()(namespace["add_one"])
    assert lazy(1.5) == 2.5 and lazy.compiled() is lazy.compiled()


@pytest.mark.slow
def test_second_process_loads_the_kernel_from_the_disk_cache(tmp_path):
    probe = ("import numpy as np\nfrom predictor import packing\n"
             "x = np.zeros((2, 3)); x[1, 0] = 0.5\n"
             "packing._forces(x, np.array([0.3, 0.3]), np.array([0]), np.array([1]), 10.0,"
             " np.zeros_like(x))\n"
             "stats = packing._forces.compiled().stats\n"
             "print(sum(stats.cache_hits.values()), sum(stats.cache_misses.values()))")
    env = {**os.environ, "NUMBA_CACHE_DIR": str(tmp_path)}

    def hits_misses():
        done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                              timeout=300, check=True, env=env)
        return tuple(int(v) for v in done.stdout.split()[-2:])

    assert hits_misses() == (0, 1)        # compiled and written to the cache folder
    assert any(tmp_path.rglob("*.nbi"))
    assert hits_misses() == (1, 0)        # loaded from disk: no second compilation
