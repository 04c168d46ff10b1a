"""numba compilation on first use, cached on disk, with a quiet fall-back.

`import predictor` must not pay for numba (about half a second on the project's 2-core
machine class): a kernel decorated with `lazy_njit` is compiled when it is first called.
Compiled code is cached on disk (`cache=True`): numba writes it to the package's
``__pycache__`` folder, or, when that is read-only, to a per-user cache folder
(``NUMBA_CACHE_DIR`` overrides both). When no cache folder is writable the kernel is
compiled in memory only, without a warning: slower to start, same results.
"""

from __future__ import annotations

import functools
import threading


def compile_kernel(func, **options):
    """`numba.njit(cache=True, **options)(func)`, or without the disk cache if that fails.

    Kernels that `func` calls (module globals made by `lazy_njit`) are compiled first and
    put back into the module's namespace, since numba resolves them by name.
    """
    import numba

    namespace = func.__globals__
    for name in func.__code__.co_names:
        dependency = namespace.get(name)
        if hasattr(dependency, "compiled"):
            namespace[name] = dependency.compiled()
    try:
        return numba.njit(cache=True, **options)(func)
    except RuntimeError:   # "cannot cache function ...: no locator available": no writable dir
        return numba.njit(cache=False, **options)(func)


def lazy_njit(**options):
    """Decorator: the function becomes a numba kernel compiled on its first call.

    The wrapper's ``compiled()`` returns the numba dispatcher (compiling it once); the
    plain Python function stays available as ``py_func``.
    """
    def decorate(func):
        holder = {}
        lock = threading.Lock()   # the jamming simulation calls kernels from threads

        def compiled():
            if "kernel" not in holder:
                with lock:
                    if "kernel" not in holder:
                        holder["kernel"] = compile_kernel(func, **options)
            return holder["kernel"]

        @functools.wraps(func)
        def call(*args):
            return compiled()(*args)

        call.compiled = compiled
        call.py_func = func
        return call

    return decorate
