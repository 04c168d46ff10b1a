"""Files in and out: the one output writer and the one JSON loader of Loadline.

Every command and page that writes a file goes through `atomic_write` (or `open_atomic`
for a stream): the output is refused when it is one of the command's inputs (same file
after resolving links), the data go to a hidden temporary file in the same folder
(``.<name>.<pid>.loadline-tmp``), are flushed and fsynced, and replace the target by one
`os.replace`. On any failure, KeyboardInterrupt included, the temporary file is removed and
the target is untouched. An existing target keeps its permission bits; a new file gets the
mode the user's umask gives. Temporary files left by a killed process (its pid no longer
runs) are removed at the next write to the same target.

Every JSON document (scenario files, uploads, calibrations) is read by `load_json`: it
refuses nesting deeper than `MAX_JSON_DEPTH`, duplicate keys and (through `number`)
booleans where numbers belong, each with a message naming the place, never a
RecursionError.
"""

from __future__ import annotations

import contextlib
import json
import os
import pathlib
import re
import stat

from .errors import InputRangeError, ScenarioError

#: Suffix of the temporary files of `atomic_write` (recognisable, so stale ones can go).
TMP_SUFFIX = ".loadline-tmp"
#: Deepest nesting of arrays and objects in a JSON document. A scenario nests 5 levels deep;
#: 64 leaves room for hand-written extras and stays far below Python's recursion limit.
MAX_JSON_DEPTH = 64


# -- output paths ----------------------------------------------------------------------------


def _same_file(a: pathlib.Path, b: pathlib.Path) -> bool:
    if os.path.realpath(a) == os.path.realpath(b):
        return True
    try:
        return os.path.samefile(a, b)
    except OSError:     # one of them does not exist (yet): not the same file
        return False


def check_output(output, inputs=()) -> pathlib.Path:
    """`output` as a path, refused when it is one of `inputs` (after resolving links).

    Raises
    ------
    InputRangeError
        The output is an input of the same command (writing it would destroy the input),
        or it is an existing folder.

    Examples
    --------
    >>> check_output("result.csv", ["table.csv"]).name
    'result.csv'
    """
    path = pathlib.Path(output)
    for source in inputs:
        if source is not None and _same_file(path, pathlib.Path(source)):
            raise InputRangeError("output file", str(path),
                                  f"a file other than the input {source}",
                                  "Writing there would replace the input with the result; "
                                  "choose another name.")
    if path.is_dir():
        raise InputRangeError("output file", str(path), "a file name, not a folder")
    return path


def _temporary_name(path: pathlib.Path) -> pathlib.Path:
    return path.with_name(f".{path.name}.{os.getpid()}{TMP_SUFFIX}")


def remove_stale_temporaries(path) -> list[pathlib.Path]:
    """Remove temporary files of `path` left by processes that no longer run."""
    path = pathlib.Path(path)
    pattern = re.compile(rf"^\.{re.escape(path.name)}\.(\d+){re.escape(TMP_SUFFIX)}$")
    removed = []
    try:
        candidates = list(path.parent.iterdir())
    except OSError:
        return removed
    for other in candidates:
        match = pattern.match(other.name)
        if not match or int(match.group(1)) == os.getpid() or _running(int(match.group(1))):
            continue
        with contextlib.suppress(OSError):
            other.unlink()
            removed.append(other)
    return removed


def _running(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OSError):
        return True     # exists, owned by someone else (or cannot tell): leave its file
    return True


def _mode_for(path: pathlib.Path) -> int:
    """Permission bits for the result: the existing file's, else 0666 less the umask."""
    try:
        return stat.S_IMODE(path.stat().st_mode)
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


@contextlib.contextmanager
def open_atomic(output, inputs=(), mode: str = "wb", **kwargs):
    """Open a temporary file beside `output`; on success it replaces `output` atomically.

    The output is checked with `check_output` first. On any exception (KeyboardInterrupt
    included) the temporary file is removed and `output` is left as it was.

    Examples
    --------
    >>> import tempfile
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> with open_atomic(folder / "a.txt", mode="w", encoding="utf-8") as handle:
    ...     _ = handle.write("hello")
    >>> (folder / "a.txt").read_text(encoding="utf-8")
    'hello'
    """
    # A link is written through (the link stays, its target gets the data).
    path = pathlib.Path(os.path.realpath(check_output(output, inputs)))
    path.parent.mkdir(parents=True, exist_ok=True)
    remove_stale_temporaries(path)
    tmp = _temporary_name(path)
    file_mode = _mode_for(path)
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
        with os.fdopen(fd, mode, **kwargs) as handle:
            yield handle
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp, file_mode)
        os.replace(tmp, path)
    finally:
        with contextlib.suppress(OSError):
            tmp.unlink()


def atomic_write(output, data: bytes | str, inputs=()) -> pathlib.Path:
    """Write `data` (bytes, or text as UTF-8) to `output` atomically; see `open_atomic`."""
    payload = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    with open_atomic(output, inputs) as handle:
        handle.write(payload)
    return pathlib.Path(output)


# -- JSON ------------------------------------------------------------------------------------

_STRING = re.compile(rb'"(?:[^"\\]|\\.)*"', re.DOTALL)


def json_depth(text: str) -> int:
    """Deepest nesting of arrays and objects in JSON text (strings skipped), without recursion.

    Examples
    --------
    >>> json_depth('{"a": [1, {"b": "[[["}]}')
    3
    """
    import numpy as np

    raw = _STRING.sub(b'""', text.encode("utf-8", "surrogatepass"))
    codes = np.frombuffer(raw, dtype=np.uint8)
    steps = (np.isin(codes, (ord("["), ord("{"))).astype(np.int64)
             - np.isin(codes, (ord("]"), ord("}"))))
    return int(np.cumsum(steps).max(initial=0))


def _no_duplicates(pairs):
    doc = {}
    for key, value in pairs:
        if key in doc:
            raise ScenarioError(f"the key {key!r} appears twice in one object; JSON objects "
                                "must not repeat a key (which one was meant?).")
        doc[key] = value
    return doc


def load_json(text: str, what: str = "the document"):
    """Parse JSON text, refusing deep nesting and duplicate keys; `ScenarioError` says why.

    Examples
    --------
    >>> load_json('{"a": 1}')
    {'a': 1}
    >>> load_json('{"a": 1, "a": 2}')  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    predictor.errors.ScenarioError: the key 'a' appears twice in one object; ...
    """
    depth = json_depth(text)
    if depth > MAX_JSON_DEPTH:
        raise ScenarioError(f"{what} nests arrays or objects {depth} levels deep; at most "
                            f"{MAX_JSON_DEPTH} are read (a scenario needs 5).")
    return json.loads(text, object_pairs_hook=_no_duplicates)


def number(value, field: str, integer: bool = False) -> float:
    """A JSON number as float; `ScenarioError` for true/false, text, null or lists.

    Examples
    --------
    >>> number(2, "aspect_ratio")
    2.0
    >>> number(True, "aspect_ratio")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    predictor.errors.ScenarioError: aspect_ratio = true is not a number ...
    """
    if isinstance(value, bool):
        raise ScenarioError(f"{field} = {str(value).lower()} is not a number (JSON true/false "
                            "are not read as 1 or 0).")
    if not isinstance(value, int | float) or (integer and not isinstance(value, int)):
        kind = "a whole number" if integer else "a number"
        raise ScenarioError(f"{field} = {value!r} is not {kind}.")
    return float(value)


__all__ = ["MAX_JSON_DEPTH", "TMP_SUFFIX", "atomic_write", "check_output", "json_depth",
           "load_json", "number", "open_atomic", "remove_stale_temporaries"]
