"""Writes that fail lose nothing: a read-only folder and a full disk.

* A sound run log in a folder that cannot be written is read as it is by
  ``check --as-run`` (nothing created beside it); the app's writer is
  refused in one line; a report into such a folder is refused in one line.
  Root bypasses file modes, so under root these run in a forked child that
  has given up root (user and group 65534).
* A full disk (``os.write`` and ``os.fsync`` made to raise ENOSPC): the
  report and the tally export end in one line (exit 2) and the file already
  there is unchanged, with no temporary file left; the run log at its size
  limit (SQLite's ``max_page_count``, its "database or disk is full") refuses
  the entry as not recorded, keeps every entry before it, and takes the
  same entry once there is room again.

The requirement (nothing the user entered is lost or overwritten) is the
project's own (DEVELOPERS.md, "Errors and user data"); SQLite's behaviour
at a full disk is from its documentation ("PRAGMA max_page_count",
result code SQLITE_FULL).
"""

from __future__ import annotations

import errno
import json
import os
import pickle
import shutil
import stat
from pathlib import Path

import pytest

import fuzzlib as F
from rigplan.errors import InputError
from rigplan.files.runlog import RunLog, RunLogWriteError, log_path_for


def unprivileged(fn):
    """``fn()`` in a forked child that cannot bypass file modes; its result."""
    if os.geteuid() != 0:
        return fn()
    r, w = os.pipe()
    pid = os.fork()
    if pid == 0:                                      # the child
        try:
            os.close(r)
            os.setgroups([])
            os.setgid(65534)
            os.setuid(65534)
            data = pickle.dumps(("ok", fn()))
        except BaseException as exc:                  # report, never return to pytest
            data = pickle.dumps(("error", f"{type(exc).__name__}: {exc}"))
        try:
            os.write(w, data)
        finally:
            os._exit(0)
    os.close(w)
    chunks = []
    while True:
        chunk = os.read(r, 1 << 16)
        if not chunk:
            break
        chunks.append(chunk)
    os.close(r)
    os.waitpid(pid, 0)
    status, value = pickle.loads(b"".join(chunks))
    assert status == "ok", value
    return value


@pytest.fixture
def shared_job():
    """A demo job in a folder any user can read (not under root's own)."""
    work = F.scratch_dir("ro-job-")
    F.copy_demo(work)
    os.chmod(work, 0o755)
    yield work
    os.chmod(work, 0o755)
    shutil.rmtree(work, ignore_errors=True)


def test_sound_log_in_a_read_only_folder_is_read_as_it_is(shared_job):
    plan = shared_job / "cv7-16in-floated.toml"
    log = log_path_for(plan)
    F.good_log(log, entries=6)
    os.chmod(log, 0o644)
    F.run_cli(["check", str(plan), "--rig", "mw80", "--format", "json"])   # imports warmed
    before = sorted(p.name for p in shared_job.iterdir())
    os.chmod(shared_job, 0o555)
    code, out, err = unprivileged(lambda: F.run_cli(
        ["check", str(plan), "--rig", "mw80", "--as-run", "--format", "json"]))
    assert err == "" and code in (0, 1), err
    doc = json.loads(out)
    assert [j["label"] for j in doc["joints"]][:6] == [f"J{k}" for k in range(1, 7)]
    assert abs(doc["joints"][0]["length"] - 6.01) < 1e-12        # the log's own entry
    assert sorted(p.name for p in shared_job.iterdir()) == before


def test_writer_and_report_refused_in_one_line_in_a_read_only_folder(shared_job):
    plan = shared_job / "cv3-8in-a53b.toml"
    log = log_path_for(plan)
    F.good_log(log, entries=3)
    os.chmod(log, 0o644)
    F.run_cli(["report", str(plan), "--rig", "th30", "-o", str(shared_job / "warm.md")])
    os.chmod(shared_job, 0o555)

    def attempts():
        out = []
        try:
            RunLog(log).record_run("J9", 6.0)
            out.append("recorded")
        except (InputError, RunLogWriteError) as exc:
            out.append(str(exc))
        out.append(F.run_cli(["report", str(plan), "--rig", "th30", "-o",
                              str(shared_job / "new.md")]))
        return out

    writer, (code, _, err) = unprivileged(attempts)
    assert writer.startswith(f"{log}: ") and "\n" not in writer, writer
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert err.startswith(f"rigplan: {shared_job / 'new.md'}: cannot write the report")
    with RunLog(log, snapshot=True) as rl:
        assert [label for label, _ in rl.state().run] == ["J1", "J2", "J3"]


@pytest.fixture
def full_disk(monkeypatch):
    """Every os.write and os.fsync fails as on a full disk."""
    def no_space(*args, **kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
    monkeypatch.setattr(os, "write", no_space)
    monkeypatch.setattr(os, "fsync", no_space)


def test_report_onto_a_full_disk_keeps_the_old_report(tmp_path, request):
    F.copy_demo(tmp_path)
    out = tmp_path / "plan.md"
    code, _, _ = F.run_cli(["report", str(tmp_path / "cv3-8in-a53b.toml"), "--rig", "th30",
                            "-o", str(out)])
    assert code == 0
    old = out.read_bytes()
    request.getfixturevalue("full_disk")
    code, _, err = F.run_cli(["report", str(tmp_path / "cv3-8in-a53b.toml"), "--rig", "th30",
                              "--units", "si", "-o", str(out)])
    assert code == 2 and err.startswith(f"rigplan: {out}: cannot write the report (No space")
    assert len(err.strip().splitlines()) == 1
    assert out.read_bytes() == old
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")] == []


def test_tally_export_onto_a_full_disk_keeps_the_old_export(tmp_path, request):
    log = tmp_path / "p.rigrun.sqlite"
    F.good_log(log, entries=4)
    export = tmp_path / "p.tally-export.csv"
    with RunLog(log) as rl:
        rl.export_tally_csv(export)
        old = export.read_bytes()
        rl.record_run("J20", 6.5)
        request.getfixturevalue("full_disk")
        with pytest.raises(OSError) as err:
            rl.export_tally_csv(export)
        assert err.value.errno == errno.ENOSPC
    assert export.read_bytes() == old
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")] == []


def test_run_log_at_a_full_disk_keeps_every_entry_and_takes_the_retry(tmp_path):
    log = tmp_path / "p.rigrun.sqlite"
    F.good_log(log, entries=5)
    with RunLog(log) as rl:
        before = rl.events()
        conn = rl._conn
        pages = conn.execute("PRAGMA page_count").fetchone()[0]
        conn.execute(f"PRAGMA max_page_count = {pages}")
        refused = None
        for k in range(200):             # fill the last page, then the disk is "full"
            try:
                rl.record_run(f"K{k}", 6.0 + k / 1000, "x" * 400)
            except RunLogWriteError as exc:
                refused = (k, str(exc))
                break
        assert refused is not None, "the size limit was never reached"
        k, text = refused
        assert "full" in text and "NOT recorded" in text and "\n" not in text
        events = rl.events()
        assert events[:len(before)] == before
        assert f"K{k}" not in [e.label for e in events]        # nothing half-written
        conn.execute("PRAGMA max_page_count = 1073741823")       # room again
        rl.record_run(f"K{k}", 6.0 + k / 1000, "x" * 400)       # the same entry, retried
    with RunLog(log, snapshot=True) as rl:
        labels = [label for label, _ in rl.state().run]
    assert labels[:5] == [f"J{i}" for i in range(1, 6)] and labels[-1] == f"K{k}"
    assert len(labels) == 5 + k + 1
