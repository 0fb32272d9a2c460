"""The atomic writer: all or nothing, the user's permissions, only our own files replaced."""

from __future__ import annotations

import json
import os
import re
import stat

import pytest

import growthplan as gp
from growthplan.io.atomic import MANIFEST, atomic_file, atomic_files, atomic_folder


@pytest.fixture
def umask_022():
    old = os.umask(0o022)
    try:
        yield
    finally:
        os.umask(old)


def mode(path) -> int:
    return stat.S_IMODE(os.stat(path).st_mode)


def test_file_appears_on_success_with_umask_permissions(tmp_path, umask_022):
    target = tmp_path / "new" / "out.xlsx"
    with atomic_file(target) as tmp:
        assert tmp.parent == target.parent and tmp.suffix == ".xlsx" and not target.exists()
        tmp.write_text("x")
    assert target.read_text() == "x"
    assert mode(target) == 0o644  # 0o666 & ~0o022, not mkstemp's private 0o600
    assert [p.name for p in target.parent.iterdir()] == ["out.xlsx"]


@pytest.mark.parametrize("error", [RuntimeError, KeyboardInterrupt])
def test_file_left_untouched_on_any_error(tmp_path, error):
    target = tmp_path / "out.csv"
    target.write_text("old")
    with pytest.raises(error), atomic_file(target, overwrite=True, force=True) as tmp:
        tmp.write_text("half")
        raise error
    assert target.read_text() == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


def test_file_refusals_name_the_path(tmp_path):
    (tmp_path / "exists.csv").write_text("x")
    (tmp_path / "folder.csv").mkdir()
    (tmp_path / "input.csv").write_text("x")
    cases = [(tmp_path / "exists.csv", {}, "overwrite"),
             (tmp_path / "folder.csv", {"overwrite": True}, "not an existing folder"),
             (tmp_path / "input.csv", {"overwrite": True, "protect": [tmp_path / "input.csv"]},
              "input files"),
             (tmp_path / "exists.csv" / "below.csv", {}, "inside a folder")]
    for target, kw, match in cases:
        with pytest.raises(gp.InvalidInput, match=match) as err:
            with atomic_file(target, **kw) as tmp:
                tmp.write_text("y")
        assert target.name in str(err.value)
    assert (tmp_path / "exists.csv").read_text() == "x"


def test_files_appear_together(tmp_path):
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    b.write_text("old")
    with pytest.raises(gp.InvalidInput, match="b.csv"), atomic_files([a, b]) as (ta, tb):
        ta.write_text("1")
        tb.write_text("2")
    assert not a.exists() and b.read_text() == "old"
    with pytest.raises(gp.InvalidInput, match="force=True"), \
            atomic_files([a, b], overwrite=True) as (ta, tb):
        pass  # b.csv was not written by the library
    with atomic_files([a, b], overwrite=True, force=True) as (ta, tb):
        ta.write_text("1")
        tb.write_text("2")
    assert a.read_text() == "1" and b.read_text() == "2"


def test_new_folder_appears_whole_with_umask_permissions(tmp_path, umask_022):
    target = tmp_path / "out"
    with atomic_folder(target) as tmp:
        (tmp / "a.csv").write_text("1")
        (tmp / "b.csv").write_text("2")
        assert not target.exists()
    assert sorted(p.name for p in target.iterdir()) == [MANIFEST, "a.csv", "b.csv"]
    assert mode(target) == 0o755 and mode(target / "a.csv") == 0o644
    assert json.loads((target / MANIFEST).read_text())["files"] == {"files": ["a.csv",
                                                                               "b.csv"]}


@pytest.mark.parametrize("error", [RuntimeError, KeyboardInterrupt])
def test_folder_error_leaves_nothing(tmp_path, error):
    with pytest.raises(error), atomic_folder(tmp_path / "out") as tmp:
        (tmp / "a.csv").write_text("1")
        raise error
    assert list(tmp_path.iterdir()) == []


def test_overwrite_replaces_only_our_files(tmp_path):
    target = tmp_path / "out"
    with atomic_folder(target, kind="tables") as tmp:
        for name in ("a.csv", "stale.csv"):
            (tmp / name).write_text("old")
    (target / "notes.txt").write_text("mine")
    with pytest.raises(gp.InvalidInput, match="overwrite"), atomic_folder(target) as tmp:
        (tmp / "a.csv").write_text("new")
    with atomic_folder(target, overwrite=True, kind="charts") as tmp:
        (tmp / "c.png").write_text("chart")
    with atomic_folder(target, overwrite=True, kind="tables") as tmp:
        (tmp / "a.csv").write_text("new")
    assert (target / "a.csv").read_text() == "new"
    assert not (target / "stale.csv").exists()  # ours, from the last export of tables
    assert (target / "notes.txt").read_text() == "mine"  # not ours: never touched
    assert (target / "c.png").read_text() == "chart"  # another export's file: kept
    with pytest.raises(gp.InvalidInput, match="notes.txt"):
        with atomic_folder(target, overwrite=True) as tmp:
            (tmp / "notes.txt").write_text("clobber")
    assert (target / "notes.txt").read_text() == "mine"
    assert not [p for p in target.iterdir() if p.name.startswith(".out.tmp")]


def test_manifest_cannot_point_outside(tmp_path):
    target = tmp_path / "out"
    target.mkdir()
    victim = tmp_path / "victim.txt"
    victim.write_text("keep")
    (target / MANIFEST).write_text(json.dumps({"files": {"files": ["../victim.txt",
                                                                   str(victim)]}}))
    with atomic_folder(target, overwrite=True) as tmp:
        (tmp / "a.csv").write_text("1")
    assert victim.read_text() == "keep"


def test_folder_refusals(tmp_path, monkeypatch):
    inputs = tmp_path / "inputs"
    inputs.mkdir()
    (inputs / "plan.yaml").write_text("x")
    (tmp_path / "file").write_text("x")
    monkeypatch.chdir(inputs)
    cases = [(".", {}, "current folder"), (inputs, {"overwrite": True}, "current folder"),
             (tmp_path, {"overwrite": True}, "current folder or one above"),
             (tmp_path / "file", {"overwrite": True}, "not an existing file")]
    for target, kw, match in cases:
        with pytest.raises(gp.InvalidInput, match=match):
            with atomic_folder(target, **kw) as tmp:
                (tmp / "a.csv").write_text("1")
    monkeypatch.chdir(tmp_path / "..")
    for target in (inputs, tmp_path):
        with pytest.raises(gp.InvalidInput, match="input files"):
            with atomic_folder(target, overwrite=True, protect=[inputs / "plan.yaml"]):
                pass
    assert sorted(p.name for p in inputs.iterdir()) == ["plan.yaml"]


def test_charts_all_or_none(tmp_path, monkeypatch):
    pytest.importorskip("matplotlib")
    from conftest import one_sector
    from matplotlib.figure import Figure

    from growthplan.results.charts import save_charts

    result = gp.Plan(economy=one_sector(), years=range(2030, 2034),
                     terminal={"rate": 0.02}).solve(progress=False)
    saved = Figure.savefig
    calls = []

    def interrupted(self, *args, **kwargs):
        calls.append(1)
        if len(calls) == 3:
            raise KeyboardInterrupt
        return saved(self, *args, **kwargs)

    monkeypatch.setattr(Figure, "savefig", interrupted)
    with pytest.raises(KeyboardInterrupt):
        save_charts(result, tmp_path / "charts")
    assert len(calls) == 3 and list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("name, rule", [
    ("a\0b.csv", "be a valid path (no NUL character)"),  # was a bare ValueError
    ("a" * 300 + ".csv", "be a path the system accepts"),
    ("a" * 300 + "/b.csv", "be a path the system accepts"),
])
def test_paths_the_system_refuses_are_invalid_input(tmp_path, name, rule):
    for write in (lambda p: atomic_file(p), lambda p: atomic_files([p]),
                  lambda p: atomic_folder(p)):
        with pytest.raises(gp.InvalidInput, match=re.escape(f"must {rule}. Got")):
            with write(tmp_path / name):
                pass
    assert list(tmp_path.iterdir()) == []
