"""The shared output writer (`predictor.files`) and the commands that write through it.

Issue 20: `loadline screen T.csv -o T.csv` read its own output back and destroyed the
input; `loadline report X.loadline.json -o X.loadline.json` replaced the scenario with HTML;
saving a scenario made an 0664 file 0600; interrupted saves left hidden temporary files.
Every test here failed on the code before that issue. The expected modes follow POSIX
open(2) and umask(2) (common practice, no source).
"""

from __future__ import annotations

import os
import pathlib
import shutil
import stat
import subprocess
import sys

import pytest

from predictor import files
from predictor.cli import main
from predictor.errors import InputRangeError
from predictor.scenario import read_scenario, write_scenario

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"


def _mode(path) -> int:
    return stat.S_IMODE(pathlib.Path(path).stat().st_mode)


def _leftovers(folder) -> list[str]:
    return [p.name for p in pathlib.Path(folder).iterdir() if files.TMP_SUFFIX in p.name]


@pytest.fixture
def table(tmp_path):
    for name in ("candidates.csv", "sizes_filler_coarse.csv", "sizes_pigment_fine.csv"):
        shutil.copyfile(DEMO / name, tmp_path / name)
    return tmp_path / "candidates.csv"


@pytest.mark.parametrize("how", ["same", "relative", "symlink", "hardlink"])
def test_screen_refuses_to_write_over_its_input(table, capsys, monkeypatch, how):
    monkeypatch.chdir(table.parent)
    before = table.read_bytes()
    target = {"same": str(table), "relative": "./candidates.csv"}.get(how)
    if how == "symlink":
        target = str(table.parent / "link.csv")
        os.symlink(table, target)
    elif how == "hardlink":
        target = str(table.parent / "hard.csv")
        os.link(table, target)
    assert main(["screen", str(table), "-o", target]) == 1
    err = capsys.readouterr().err
    assert "output file" in err and "other than the input" in err and "Traceback" not in err
    assert table.read_bytes() == before
    assert _leftovers(table.parent) == []


def test_screen_refuses_to_write_over_a_size_table_it_read(table, capsys):
    size_table = table.parent / "sizes_filler_coarse.csv"
    before = size_table.read_bytes()
    assert main(["screen", str(table), "-o", str(size_table)]) == 1
    assert "sizes_filler_coarse.csv" in capsys.readouterr().err
    assert size_table.read_bytes() == before
    assert _leftovers(table.parent) == []


def test_report_refuses_to_write_over_its_scenario(tmp_path, capsys):
    scenario = tmp_path / "x.loadline.json"
    shutil.copyfile(DEMO / "ceramic_slip.loadline.json", scenario)
    before = scenario.read_bytes()
    assert main(["report", str(scenario), "-o", str(scenario)]) == 1
    assert "other than the input" in capsys.readouterr().err
    assert scenario.read_bytes() == before
    assert main(["report", str(scenario), "-o", str(tmp_path / "r.html"),
                 "--pdf", str(tmp_path / "r.html")]) == 1


def test_existing_file_keeps_its_mode_and_new_file_gets_the_umask(tmp_path):
    form = read_scenario(DEMO / "ceramic_slip.loadline.json")
    old = tmp_path / "shared.loadline.json"
    old.write_text("{}", encoding="utf-8")
    os.chmod(old, 0o664)
    write_scenario(form, old)
    assert _mode(old) == 0o664                     # was 0600 before issue 20
    umask = os.umask(0o027)
    try:
        new = write_scenario(form, tmp_path / "new.loadline.json")
        assert _mode(new) == 0o640                  # 0666 & ~0027, not 0600
        report = files.atomic_write(tmp_path / "r.html", "<p>x</p>")
        assert _mode(report) == 0o640
    finally:
        os.umask(umask)
    assert _leftovers(tmp_path) == []


class _Boom(Exception):
    pass


@pytest.mark.parametrize("error", [_Boom, KeyboardInterrupt])
def test_failure_mid_write_keeps_the_old_file_and_leaves_no_temporary(tmp_path, error):
    target = tmp_path / "out.csv"
    target.write_text("old\n", encoding="utf-8")
    with pytest.raises(error):
        with files.open_atomic(target, mode="w", encoding="utf-8") as handle:
            handle.write("half of the new ")
            raise error()
    assert target.read_text(encoding="utf-8") == "old\n"
    assert _leftovers(tmp_path) == []


def test_stale_temporary_of_a_dead_process_is_removed_at_the_next_write(tmp_path):
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"],
                          capture_output=True, text=True, check=True)
    pid = int(dead.stdout)                      # that process has ended
    stale = tmp_path / f".out.csv.{pid}{files.TMP_SUFFIX}"
    stale.write_text("partial", encoding="utf-8")
    live = tmp_path / f".out.csv.{os.getppid()}{files.TMP_SUFFIX}"   # a running process
    live.write_text("in progress", encoding="utf-8")
    files.atomic_write(tmp_path / "out.csv", "new\n")
    assert not stale.exists() and live.exists()
    assert (tmp_path / "out.csv").read_text(encoding="utf-8") == "new\n"


def test_a_link_is_written_through(tmp_path):
    real = tmp_path / "real.csv"
    real.write_text("old", encoding="utf-8")
    link = tmp_path / "link.csv"
    os.symlink(real, link)
    files.atomic_write(link, "new")
    assert link.is_symlink() and real.read_text(encoding="utf-8") == "new"


def test_check_output_refuses_a_folder(tmp_path):
    with pytest.raises(InputRangeError, match="not a folder"):
        files.check_output(tmp_path)
