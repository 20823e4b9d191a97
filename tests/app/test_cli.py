"""The command line: exit codes and messages (user errors → one line on stderr, exit 2)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from app.cli import main
from core.resources import demo_path

ROOT = Path(__file__).resolve().parents[2]


def test_missing_file_exits_2_with_one_line(capsys, tmp_path):
    assert main(["evaluate", str(tmp_path / "absent.json")]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "file not found" in err[0]


def test_malformed_file_exits_2_naming_the_field(capsys, tmp_path):
    doc = json.loads(demo_path().read_text())
    doc["study"]["bands"][1]["f_high_ghz"] = 1.0
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps(doc))
    assert main(["evaluate", str(bad)]) == 2
    err = capsys.readouterr().err
    assert "bands[1].f_high_ghz" in err and "Traceback" not in err
    (tmp_path / "junk.json").write_text("{not json")
    assert main(["evaluate", str(tmp_path / "junk.json")]) == 2
    assert "not valid JSON" in capsys.readouterr().err


def test_valid_file_prints_and_exits_0(capsys):
    assert main(["evaluate", str(demo_path())]) == 0
    out = capsys.readouterr().out
    assert "n257" in out and "n260" in out


def test_bad_option_and_version(capsys):
    assert main(["evaluate"]) == 2
    assert "bandwright" in capsys.readouterr().err
    assert main(["--version"]) == 0
    assert "bandwright" in capsys.readouterr().out


def test_console_script_runs_without_traceback(tmp_path):
    out = subprocess.run(
        [sys.executable, "-m", "app.cli", "evaluate", str(tmp_path / "x.json")],
        capture_output=True,
        text=True,
        cwd=ROOT,
    )
    assert out.returncode == 2
    assert out.stderr.count("\n") == 1 and "Traceback" not in out.stderr


def test_snapshot_writes_one_png_per_page(tmp_path, qapp):
    assert main(["snapshot", str(demo_path()), "--out", str(tmp_path)]) == 0
    pngs = sorted(tmp_path.glob("*.png"))
    assert pngs and pngs[0].name == "01-band-plan.png"
    assert all(p.stat().st_size > 10_000 for p in pngs)


@pytest.mark.parametrize("size", ["big", "10x"])
def test_snapshot_bad_size(size, capsys, tmp_path):
    assert main(["snapshot", "--out", str(tmp_path), "--size", size]) == 2
    assert "--size" in capsys.readouterr().err


def test_icon_and_demo_ship_with_the_package():
    from app.main import icon_path
    from core.resources import demo_studies

    assert icon_path().read_text().startswith("<svg")
    assert "harbour-small-cell" in demo_studies()
