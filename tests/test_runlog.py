"""Tests for rigplan.files.runlog (on-site tally log) and rigplan.files.atomicio.

What the checks rest on:

* SQLite documentation, "Write-Ahead Logging" (sqlite.org/wal.html) and
  "PRAGMA synchronous" (sqlite.org/pragma.html#pragma_synchronous): in WAL
  mode with synchronous=FULL a transaction is durable once COMMIT returns,
  and a transaction that never committed is rolled back on the next open.
* POSIX rename(2): replacing a file by rename is atomic (the name points to
  the old or the new file, never neither).
* RFC 4180 (CSV: CRLF line ends, quoting of fields with commas or quotes).
* ISO 8601 timestamps in UTC.

The behaviour rules (undo appends and never deletes, one active entry per
joint) are the project's own; the crash tests kill a real writer process
with SIGKILL and then check every id it reported as committed.
"""

import csv
import io
import os
import signal
import sqlite3
import stat
import subprocess
import sys
import textwrap
import time
from datetime import datetime, timedelta
from pathlib import Path

import pytest

from rigplan.files.atomicio import atomic_write_text
from rigplan.errors import InputError
from rigplan.files.runlog import (
    SCHEMA_VERSION,
    Event,
    RunLog,
    RunState,
    SchemaVersionError,
    log_path_for,
)

ROOT = Path(__file__).resolve().parents[1]


def _env():
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def _spawn(code: str, *args) -> subprocess.Popen:
    return subprocess.Popen(
        [sys.executable, "-c", textwrap.dedent(code), *map(str, args)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=_env(), cwd=str(ROOT))


def _read_lines_then_kill(proc: subprocess.Popen, wanted, timeout=60.0):
    """Read stdout lines until ``wanted(lines)`` is true, SIGKILL the child,
    then collect every complete line it had written.  Returns the lines."""
    lines = []
    deadline = time.monotonic() + timeout
    while not wanted(lines):
        line = proc.stdout.readline()
        if not line:
            proc.wait()
            pytest.fail(f"writer exited early (rc {proc.returncode}): {proc.stderr.read()}")
        if time.monotonic() > deadline:
            proc.kill()
            pytest.fail("writer too slow")
        lines.append(line)
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    rest = proc.stdout.read()
    proc.stdout.close()
    proc.stderr.close()
    assert proc.returncode == -signal.SIGKILL
    # a line cut short by the kill was not reported as committed
    full = [ln for ln in (lines + rest.splitlines(keepends=True)) if ln.endswith("\n")]
    return [ln.rstrip("\n") for ln in full]


@pytest.fixture
def log(tmp_path):
    with RunLog(tmp_path / "well.rigrun.sqlite") as lg:
        yield lg


# ---------------------------------------------------------------------------
# file name


def test_log_path_for_is_beside_the_plan(tmp_path):
    plan = tmp_path / "sites" / "well-7.toml"
    assert log_path_for(plan) == tmp_path / "sites" / "well-7.rigrun.sqlite"
    assert log_path_for("plan").name == "plan.rigrun.sqlite"


def test_for_plan_opens_the_log_beside_it(tmp_path):
    plan = tmp_path / "w.toml"
    with RunLog.for_plan(plan) as lg:
        lg.record_run("J1", 6.1)
    assert (tmp_path / "w.rigrun.sqlite").exists()


# ---------------------------------------------------------------------------
# record / reject / undo / observe


def test_record_reject_observe_and_state(log):
    a = log.record_run("J1", 6.096, "first joint, shoe on")
    b = log.record_run(" J2 ", None, "tape lost")
    c = log.reject("J3", "bent pin end")
    d = log.observe(2, 14_250.0, 13_900.0, "indicator")
    assert a < b < c < d

    st = log.state()
    assert isinstance(st, RunState)
    assert st.run == [("J1", 6.096), ("J2", None)]   # label blanks dropped
    assert st.rejected == {"J3": "bent pin end"}
    assert st.next_index == 2
    (obs,) = st.observations
    assert (obs.step, obs.hook_load_n, obs.predicted_n, obs.note) == (2, 14_250.0, 13_900.0, "indicator")

    ev = log.events()
    assert all(isinstance(e, Event) for e in ev)
    assert [e.kind for e in ev] == ["run", "run", "reject", "observe"]
    assert [e.id for e in ev] == [a, b, c, d]
    assert ev[0].note == "first joint, shoe on" and ev[2].note == "bent pin end"
    # ISO 8601, UTC (offset zero), recent
    for e in ev:
        t = datetime.fromisoformat(e.ts)
        assert t.utcoffset() == timedelta(0)
        assert abs((datetime.now(t.tzinfo) - t).total_seconds()) < 60


def test_undo_appends_an_event_and_deletes_nothing(log):
    r1 = log.record_run("J1", 6.1)
    r2 = log.record_run("J2", 6.2)
    rj = log.reject("J9", "split coupling")
    ob = log.observe(2, 1000.0)

    u0 = log.undo()                     # cancels the reading (latest entry)
    ev = log.events()
    assert (ev[-1].kind, ev[-1].ref) == ("undo", ob) and ev[-1].id == u0
    assert log.state().observations == []
    u1 = log.undo()                     # then the reject
    ev = log.events()
    assert len(ev) == 6
    assert (ev[-1].kind, ev[-1].ref, ev[-1].label) == ("undo", rj, "J9")
    assert ev[-1].id == u1
    assert log.state().rejected == {}
    assert log.state().run == [("J1", 6.1), ("J2", 6.2)]

    log.undo()                          # then J2
    assert log.state().run == [("J1", 6.1)]
    log.undo()                          # then J1
    assert log.state().run == []
    assert log.undo() is None           # nothing left; no row written
    ev = log.events()
    assert len(ev) == 8
    assert [e.ref for e in ev if e.kind == "undo"] == [ob, rj, r2, r1]
    # the original entries are all still there, unchanged
    assert [(e.id, e.label) for e in ev if e.kind == "run"] == [(r1, "J1"), (r2, "J2")]
    assert [e.id for e in ev if e.kind == "observe"] == [ob]


def test_planned_length_is_recorded_as_planned_not_measured(log):
    # a length nobody measured is never a measurement (project rule)
    log.record_run("J1", 6.096, basis="planned")
    log.record_run("J2", 6.1)                       # typed: measured
    log.record_run("J3", None)                      # nothing given: planned
    st = log.state()
    assert st.run == [("J1", None), ("J2", 6.1), ("J3", None)]
    assert st.basis == {"J1": "planned", "J2": "measured", "J3": "planned"}
    assert st.planned_at_entry == {"J1": 6.096, "J3": None}
    assert [e.basis for e in log.events()] == ["planned", "measured", "planned"]
    with pytest.raises(InputError, match="basis"):
        log.record_run("J4", 6.1, basis="guessed")
    with pytest.raises(InputError, match="measured length"):
        log.record_run("J4", None, basis="measured")


def test_negative_reading_is_refused(log):
    with pytest.raises(InputError, match=">= 0"):
        log.observe(1, -500.0)
    assert log.events() == []


def test_version_1_log_is_upgraded_without_touching_an_entry(tmp_path):
    # A log written by the version-1 schema (no basis column; readings not
    # undoable): the writer upgrades it in place, every entry kept as it
    # was; a planned length accepted then is read as planned.
    p = tmp_path / "old.rigrun.sqlite"
    conn = sqlite3.connect(p, isolation_level=None)
    conn.executescript("""
        CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
        CREATE TABLE events (id INTEGER PRIMARY KEY AUTOINCREMENT, ts TEXT NOT NULL,
            kind TEXT NOT NULL, label TEXT, value REAL, note TEXT NOT NULL DEFAULT '',
            ref INTEGER, step INTEGER, predicted REAL);
        CREATE TRIGGER events_undo_target BEFORE INSERT ON events
        WHEN NEW.kind = 'undo' AND (SELECT kind FROM events WHERE id = NEW.ref) IS NOT 'run'
         AND (SELECT kind FROM events WHERE id = NEW.ref) IS NOT 'reject'
        BEGIN SELECT RAISE(ABORT, 'no'); END;
        INSERT INTO events (ts, kind, label, value, note) VALUES
            ('2026-01-01T00:00:00.000+00:00', 'run', 'J1', 6.1, 'planned length accepted'),
            ('2026-01-01T00:01:00.000+00:00', 'run', 'J2', 6.2, '');
        INSERT INTO events (ts, kind, value, step, predicted) VALUES
            ('2026-01-01T00:02:00.000+00:00', 'observe', 9000.0, 2, 8800.0);
        PRAGMA application_id=1380405324;
        PRAGMA user_version=1;
    """)
    conn.close()
    with RunLog(p, read_only=True) as ro:       # a reader reads it as it is
        assert ro.state().basis == {"J1": "planned", "J2": "measured"}
    before = [(e.id, e.ts, e.kind, e.label, e.value, e.note) for e in RunLog(p).events()]
    with RunLog(p) as lg:
        assert lg.state().run == [("J1", None), ("J2", 6.2)]
        lg.undo()                                 # the reading, now undoable
        assert lg.state().observations == []
        after = [(e.id, e.ts, e.kind, e.label, e.value, e.note) for e in lg.events()]
    assert after[:3] == before[:3]
    assert sqlite3.connect(p).execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION


def test_one_writer_lock_and_read_only_follower(tmp_path):
    from rigplan.files.runlog import RunLogLocked, RunLogReadOnly
    p = tmp_path / "w.rigrun.sqlite"
    writer = RunLog.open_writer(p)
    try:
        with pytest.raises(RunLogLocked, match="another rigplan records this job") as err:
            RunLog.open_writer(p)
        assert err.value.holder["pid"] == os.getpid()
        reader = RunLog(p, read_only=True)
        assert reader.changed()                   # first call
        assert not reader.changed()
        writer.record_run("J1", 6.0)
        assert reader.changed()                   # follows the writer's entries
        assert reader.state().run == [("J1", 6.0)]
        with pytest.raises(RunLogReadOnly):
            reader.record_run("J2", 6.0)
        assert not reader.try_lock()
    finally:
        writer.close()
    assert reader.try_lock()                      # the writer went: take over
    reader.record_run("J2", 6.0)
    reader.close()
    with RunLog.open_writer(p) as again:          # lock released on close
        assert [lab for lab, _ in again.state().run] == ["J1", "J2"]


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL (POSIX)")
def test_lock_is_released_when_the_writer_is_killed(tmp_path):
    # flock(2): the lock goes with the last descriptor, which the kernel
    # closes when the process dies, however it dies.
    p = tmp_path / "w.rigrun.sqlite"
    proc = _spawn("""
        import sys, time
        from rigplan.files.runlog import RunLog
        log = RunLog.open_writer(sys.argv[1])
        print("locked", flush=True)
        time.sleep(60)
        """, p)
    try:
        assert proc.stdout.readline().strip() == "locked"
        from rigplan.files.runlog import RunLogLocked
        with pytest.raises(RunLogLocked):
            RunLog.open_writer(p)
    finally:
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait()
        proc.stdout.close()
        proc.stderr.close()
    with RunLog.open_writer(p) as lg:
        lg.record_run("J1", 6.0)


def test_undo_then_rerun_with_corrected_length(log):
    log.record_run("J1", 6.1)
    log.record_run("J2", 61.0)           # typo
    log.undo()
    log.record_run("J2", 6.1)
    assert log.state().run == [("J1", 6.1), ("J2", 6.1)]
    assert log.state().next_index == 2


def test_one_active_entry_per_joint(log):
    log.record_run("J1", 6.1)
    n = len(log.events())
    with pytest.raises(InputError, match="already in the hole"):
        log.record_run("J1", 6.1)
    with pytest.raises(InputError, match="in the hole"):
        log.reject("J1", "thread damage")
    log.reject("J5", "dented")
    with pytest.raises(InputError, match="set aside"):
        log.record_run("J5", 6.0)
    with pytest.raises(InputError, match="already set aside"):
        log.reject("J5", "again")
    # refused entries wrote nothing (the failed transactions rolled back)
    assert len(log.events()) == n + 1
    log.undo()                           # un-reject J5
    log.record_run("J5", 6.0)
    assert log.state().run == [("J1", 6.1), ("J5", 6.0)]


@pytest.mark.parametrize("call, match", [
    (lambda lg: lg.record_run("", 6.0), "label"),
    (lambda lg: lg.record_run(None, 6.0), "label"),
    (lambda lg: lg.record_run("J1", -6.0), "measured length"),
    (lambda lg: lg.record_run("J1", 0.0), "measured length"),
    (lambda lg: lg.record_run("J1", float("nan")), "measured length"),
    (lambda lg: lg.record_run("J1", True), "measured length"),
    (lambda lg: lg.record_run("J1", "6.1"), "measured length"),
    (lambda lg: lg.record_run("J1", 6.0, note=3), "note"),
    (lambda lg: lg.reject("J1", None), "text"),
    (lambda lg: lg.observe(-1, 100.0), "step"),
    (lambda lg: lg.observe(1.5, 100.0), "step"),
    (lambda lg: lg.observe(1, float("inf")), "hook load"),
    (lambda lg: lg.observe(1, 100.0, float("nan")), "predicted"),
])
def test_bad_input_is_refused_with_file_named(log, call, match):
    with pytest.raises(InputError, match=match) as err:
        call(log)
    assert str(log.path) in str(err.value)
    assert log.events() == []


def test_step_zero_is_an_empty_hook_reading(log):
    log.observe(0, 9_800.0, note="block and elevator only")
    assert log.state().observations[0].step == 0


# ---------------------------------------------------------------------------
# reopen, file settings, append-only


def test_reopen_after_close_finds_everything(tmp_path):
    p = tmp_path / "w.rigrun.sqlite"
    with RunLog(p) as lg:
        lg.record_run("J1", 6.1, "n1")
        lg.reject("J2", "ovality")
        lg.record_run("J3", None)
        lg.undo()
        lg.observe(1, 500.0, 480.0)
        before_events = lg.events()
        before_state = lg.state()
    with RunLog(p) as lg:
        assert lg.events() == before_events
        assert lg.state() == before_state
        nxt = lg.record_run("J4", 6.0)
        assert nxt == before_events[-1].id + 1      # numbering continues
        assert lg.state().run == [("J1", 6.1), ("J4", 6.0)]


def test_file_settings(tmp_path):
    p = tmp_path / "w.rigrun.sqlite"
    with RunLog(p) as lg:
        lg.record_run("J1", 6.1)
        # SQLite docs: synchronous FULL = 2; WAL is kept in the file header
        assert lg._conn.execute("PRAGMA synchronous").fetchone()[0] == 2
        assert lg._conn.isolation_level is None
    raw = sqlite3.connect(p)
    try:
        assert raw.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        assert raw.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        assert raw.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    finally:
        raw.close()


def test_rows_cannot_be_changed_or_deleted(tmp_path):
    p = tmp_path / "w.rigrun.sqlite"
    with RunLog(p) as lg:
        lg.record_run("J1", 6.1)
    raw = sqlite3.connect(p)
    try:
        with pytest.raises(sqlite3.DatabaseError, match="append-only"):
            raw.execute("UPDATE events SET value = 99 WHERE id = 1")
        with pytest.raises(sqlite3.DatabaseError, match="append-only"):
            raw.execute("DELETE FROM events")
        with pytest.raises(sqlite3.DatabaseError, match="undo"):
            raw.execute("INSERT INTO events (ts, kind, ref) VALUES ('t', 'undo', 99)")
        raw.rollback()
    finally:
        raw.close()
    with RunLog(p) as lg:
        assert lg.state().run == [("J1", 6.1)]


def test_newer_schema_version_is_refused_and_file_left_alone(tmp_path):
    p = tmp_path / "w.rigrun.sqlite"
    with RunLog(p) as lg:
        lg.record_run("J1", 6.1)
    raw = sqlite3.connect(p)
    raw.execute(f"PRAGMA user_version={SCHEMA_VERSION + 1}")
    raw.close()
    with pytest.raises(SchemaVersionError, match=f"schema version {SCHEMA_VERSION + 1}") as err:
        RunLog(p)
    assert str(p) in str(err.value) and "newer rigplan" in str(err.value)
    assert isinstance(err.value, InputError)
    raw = sqlite3.connect(p)
    try:
        assert raw.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION + 1
        assert raw.execute("SELECT label FROM events").fetchall() == [("J1",)]
    finally:
        raw.close()


def test_other_sqlite_database_is_refused(tmp_path):
    p = tmp_path / "other.sqlite"
    raw = sqlite3.connect(p)
    raw.execute("CREATE TABLE t (x)")
    raw.commit()
    raw.close()
    with pytest.raises(InputError, match="expected a rigplan run log"):
        RunLog(p)


def test_non_database_file_is_refused_and_kept(tmp_path):
    p = tmp_path / "w.rigrun.sqlite"
    content = b"seq,label\n1,J1\n" * 20
    p.write_bytes(content)
    with pytest.raises(InputError, match="run log"):
        RunLog(p)
    assert p.read_bytes() == content


def test_missing_directory_is_a_clear_error(tmp_path):
    with pytest.raises(InputError, match="cannot open"):
        RunLog(tmp_path / "nowhere" / "w.rigrun.sqlite")


def test_closed_log_refuses_writes(tmp_path):
    lg = RunLog(tmp_path / "w.rigrun.sqlite")
    lg.close()
    with pytest.raises(RuntimeError, match="closed"):
        lg.record_run("J1", 6.0)


def test_two_handles_on_one_file_share_the_record(tmp_path):
    # e.g. the live screen and a second terminal; SQLite serialises writers
    p = tmp_path / "w.rigrun.sqlite"
    with RunLog(p) as a, RunLog(p) as b:
        a.record_run("J1", 6.0)
        with pytest.raises(InputError, match="already in the hole"):
            b.record_run("J1", 6.0)
        b.record_run("J2", 6.0)
        assert a.state().run == b.state().run == [("J1", 6.0), ("J2", 6.0)]


def test_threads_share_one_log(log):
    import threading

    ids = []

    def worker(k):
        for i in range(10):
            ids.append(log.record_run(f"T{k}-{i}", 6.0))

    threads = [threading.Thread(target=worker, args=(k,)) for k in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert sorted(ids) == [e.id for e in log.events()]
    assert len(set(ids)) == 40


# ---------------------------------------------------------------------------
# crashes


_WRITER = """
import sys
from rigplan.files.runlog import RunLog
log = RunLog(sys.argv[1])
prefix = sys.argv[2]
i = 0
while True:
    i += 1
    label = f"{prefix}-{i}"
    eid = log.record_run(label, 6.0 + i / 1000.0)
    print(eid, label, flush=True)
"""


def test_sigkill_loses_no_committed_entry(tmp_path):
    # SQLite WAL + synchronous=FULL: a committed transaction survives the
    # writer being killed at any moment (sqlite.org/wal.html).
    p = tmp_path / "w.rigrun.sqlite"
    reported = {}
    for round_no, wanted in enumerate((25, 40, 15)):
        proc = _spawn(_WRITER, p, f"R{round_no}")
        lines = _read_lines_then_kill(proc, lambda ls, n=wanted: len(ls) >= n)
        assert len(lines) >= wanted
        for ln in lines:
            eid, label = ln.split(" ")
            reported[int(eid)] = label
    with RunLog(p) as lg:
        ev = {e.id: e for e in lg.events()}
        for eid, label in reported.items():
            assert eid in ev, f"committed entry {eid} ({label}) lost"
            assert ev[eid].kind == "run" and ev[eid].label == label
        # no holes, no torn rows: every row complete; ids 1..N
        assert sorted(ev) == list(range(1, len(ev) + 1))
        for e in ev.values():
            prefix, i = e.label.split("-")
            assert abs(e.value - (6.0 + int(i) / 1000.0)) < 1e-12
        assert lg._conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        # at most one entry per round committed but not yet printed
        assert len(ev) - len(reported) <= 3
        # the log takes new entries after the crashes
        lg.record_run("after", 6.0)


_TORN = """
import sys, time
from rigplan.files.runlog import RunLog
log = RunLog(sys.argv[1])
for i in range(5):
    print(log.record_run(f"T{i}", 6.0), flush=True)
c = log._conn
c.execute("BEGIN IMMEDIATE")
c.execute("INSERT INTO events (ts, kind, label, value, note) VALUES ('x', 'run', 'TORN', 1.0, '')")
print("pending", flush=True)
time.sleep(120)
"""


def test_uncommitted_entry_leaves_no_trace(tmp_path):
    # SQLite docs: a transaction that never committed is rolled back when the
    # database is next opened; the write lock dies with the process.
    p = tmp_path / "w.rigrun.sqlite"
    proc = _spawn(_TORN, p)
    lines = _read_lines_then_kill(proc, lambda ls: bool(ls) and ls[-1] == "pending\n")
    committed = [int(x) for x in lines[:-1]]
    assert len(committed) == 5
    with RunLog(p) as lg:
        ev = lg.events()
        assert [e.id for e in ev] == committed
        assert [lbl for lbl, _ in lg.state().run] == [f"T{i}" for i in range(5)]
        assert all(e.label != "TORN" for e in ev)
        lg.record_run("T5", 6.0)             # not locked out
        assert lg.state().next_index == 6


# ---------------------------------------------------------------------------
# tally export


def test_export_tally_csv_to_path(log, tmp_path):
    log.record_run("J1", 6.096, 'shoe, "float"')     # comma and quotes: RFC 4180 quoting
    log.reject("J2", "bent")
    log.record_run("J3", 6.1, basis="planned")
    log.record_run("J4", 6.2)
    log.undo()                                          # J4 not in the hole
    out = tmp_path / "tally.csv"
    log.export_tally_csv(out, planned={"J1": 6.1, "J2": 6.1, "J3": 6.1, "J4": 6.1, "J5": None})
    raw = out.read_bytes()
    assert raw.startswith(b"seq,label,status,measured_length [m],planned_length [m],"
                          b"length_source,note,time\r\n")  # RFC 4180 CRLF
    assert raw.count(b"\r\n") == 6 and b"\n" not in raw.replace(b"\r\n", b"")
    rows = list(csv.DictReader(io.StringIO(raw.decode("utf-8"), newline="")))
    got = [(r["seq"], r["label"], r["status"], r["measured_length [m]"], r["planned_length [m]"],
            r["length_source"], r["note"]) for r in rows]
    assert got == [
        ("1", "J1", "run", "6.0960", "6.1000", "measured", 'shoe, "float"'),
        ("2", "J3", "run", "", "6.1000", "planned", ""),
        ("", "J2", "rejected", "", "6.1000", "", "bent"),
        ("", "J4", "not run", "", "6.1000", "", ""),
        ("", "J5", "not run", "", "", "", ""),
    ]
    times = {e.label: e.ts for e in log.events() if e.kind in ("run", "reject")}
    assert rows[0]["time"] == times["J1"] and rows[2]["time"] == times["J2"]
    assert rows[3]["time"] == ""
    # atomic write leaves no temporary file behind
    assert sorted(x.name for x in tmp_path.iterdir() if x.name.startswith(".")) == []
    # and it reads back as a tally sheet
    from rigplan.files.formats.tally import read_tally
    back = {r.label: r for r in read_tally(out)}
    assert back["J1"].measured_length == pytest.approx(6.096, rel=1e-12)
    assert back["J3"].measured_length is None and back["J3"].length_source == "planned"
    assert back["J2"].status == "rejected" and back["J5"].status == "not run"


def test_export_tally_csv_to_open_file_and_without_plan(log):
    log.record_run("A1", 5.8)
    buf = io.StringIO(newline="")
    log.export_tally_csv(buf)
    rows = list(csv.reader(io.StringIO(buf.getvalue(), newline="")))
    assert rows[0][:4] == ["seq", "label", "status", "measured_length [m]"]
    assert rows[1][:6] == ["1", "A1", "run", "5.8000", "", "measured"]
    assert len(rows) == 2


def test_export_rejects_bad_planned_length(log, tmp_path):
    with pytest.raises(InputError, match="planned length"):
        log.export_tally_csv(tmp_path / "t.csv", planned={"J1": -2.0})
    assert not (tmp_path / "t.csv").exists()


# ---------------------------------------------------------------------------
# atomic_write_text


def test_atomic_write_creates_and_replaces(tmp_path):
    p = tmp_path / "plan.toml"
    atomic_write_text(p, "a = 1\n")
    assert p.read_text() == "a = 1\n"
    os.chmod(p, 0o640)
    atomic_write_text(p, "a = 2\r\nb = 'é'\n")
    assert p.read_bytes() == "a = 2\r\nb = 'é'\n".encode("utf-8")   # no newline translation
    assert stat.S_IMODE(os.stat(p).st_mode) == 0o640                 # mode kept
    assert [x.name for x in tmp_path.iterdir()] == ["plan.toml"]


def test_atomic_write_failure_keeps_the_old_file(tmp_path, monkeypatch):
    p = tmp_path / "plan.toml"
    p.write_text("old\n")

    def broken_replace(src, dst):
        raise OSError("disk gone")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(OSError, match="disk gone"):
        atomic_write_text(p, "new\n")
    monkeypatch.undo()
    assert p.read_text() == "old\n"
    assert [x.name for x in tmp_path.iterdir()] == ["plan.toml"]


def test_atomic_write_follows_symlink(tmp_path):
    real = tmp_path / "real.toml"
    real.write_text("old\n")
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    atomic_write_text(link, "new\n")
    assert link.is_symlink() and real.read_text() == "new\n"


def test_atomic_write_refuses_non_text(tmp_path):
    with pytest.raises(TypeError):
        atomic_write_text(tmp_path / "x", b"bytes")


_REWRITER = """
import sys
from rigplan.files.atomicio import atomic_write_text
p = sys.argv[1]
a = "A" * 400000 + "\\n"
b = "B" * 400000 + "\\n"
i = 0
while True:
    atomic_write_text(p, a if i % 2 == 0 else b)
    i += 1
    print(i, flush=True)
"""


def test_atomic_write_killed_midway_leaves_old_or_new(tmp_path):
    # POSIX rename(2) is atomic: after a kill the file is one whole version.
    # Temporary files of an interrupted write may remain (they start with ".").
    p = tmp_path / "plan.toml"
    proc = _spawn(_REWRITER, p)
    _read_lines_then_kill(proc, lambda ls: len(ls) >= 4)
    text = p.read_text()
    assert text in ("A" * 400000 + "\n", "B" * 400000 + "\n")


# ---------------------------------------------------------------------------
# layering


def test_runlog_imports_no_ui_or_units_library():
    # Project layering rule: the tally log is stdlib only.
    code = ("import sys, rigplan.files.runlog, rigplan.files.atomicio; "
            "bad = [m for m in ('textual', 'rich', 'pint', 'numpy') if m in sys.modules]; "
            "print(bad); sys.exit(1 if bad else 0)")
    r = subprocess.run([sys.executable, "-c", code], env=_env(), cwd=str(ROOT),
                       capture_output=True, text=True)
    assert r.returncode == 0, r.stdout + r.stderr
