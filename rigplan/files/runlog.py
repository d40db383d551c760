"""On-site tally log: every joint run, set aside or weighed, never lost.

Formats layer, standard library only.  The log is an append-only table of
events in a SQLite file beside the plan (:func:`log_path_for`).  Each event
is committed in its own ``BEGIN IMMEDIATE`` ... ``COMMIT`` transaction in
write-ahead-log mode with ``synchronous=FULL``, so once a call returns its
event id the entry survives a killed process or a power cut, and an entry
whose commit did not finish leaves no trace.

Nothing is ever updated or deleted (triggers in the file refuse it): an undo
is an event of its own that points at the entry it cancels.  The state of
the run (what is in the hole, what was set aside, the weight readings) is
replayed from the events; opening an existing log resumes where it stopped.

Event kinds:

``run``      a joint went in the hole: ``label``, ``value`` = its length [m]
             or none, ``basis`` = ``measured`` (typed from the tape) or
             ``planned`` (the planned length accepted, nothing measured),
             ``note``;
``reject``   a joint was set aside: ``label``, ``note`` = reason;
``undo``     cancels the latest run, reject or reading not yet undone:
             ``ref`` = its id, ``label`` copied from it;
``observe``  a weight-indicator reading: ``step`` (joints in the hole),
             ``value`` = hook load [N], ``predicted`` = planned hook load [N]
             at the time of entry (kept for the record; a reading is judged
             against the plan as it stands now).

One writer per job: :meth:`RunLog.open_writer` takes an exclusive lock
(``flock``) on a sidecar file ``<log>.lock`` for as long as the log is open.
The kernel releases it when the process ends, however it ends (a SIGKILL
included), so a stale lock never blocks the crew.  A second program on the
same job gets :class:`RunLogLocked` (naming the holder) and may open the log
read-only (``read_only=True``) and follow the writer's entries
(:meth:`RunLog.changed`).

Schema version 2 added ``basis`` and undoable readings; a version-1 log is
upgraded in place when a writer opens it (a column and a trigger are added,
no entry is touched).
"""

from __future__ import annotations

import csv
import io
import json
import math
import numbers
import os
import socket
import sqlite3
import threading
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

from rigplan import __version__
from rigplan.files.atomicio import atomic_write_text
from rigplan.errors import InputError

__all__ = [
    "SCHEMA_VERSION",
    "Event",
    "Observation",
    "RunLog",
    "RunLogDamaged",
    "RunLogLocked",
    "RunLogReadOnly",
    "RunLogWriteError",
    "RunState",
    "SchemaVersionError",
    "log_path_for",
    "set_aside_damaged",
]

#: Schema version written to ``PRAGMA user_version``.
SCHEMA_VERSION = 2

#: ``PRAGMA application_id`` marking a rigplan run log (ASCII "RGPL").
APPLICATION_ID = 0x5247504C

#: Suffix of a run-log file.
LOG_SUFFIX = ".rigrun.sqlite"

#: Suffix of the writer's lock file beside the log.
LOCK_SUFFIX = ".lock"

#: How a run's length was obtained.
BASES = ("measured", "planned")

#: Note of a version-1 entry that accepted the planned length.
_V1_PLANNED_NOTE = "planned length accepted"

#: Columns of the exported tally (lengths in metres; readable as a tally).
TALLY_COLUMNS = ("seq", "label", "status", "measured_length [m]", "planned_length [m]",
                 "length_source", "note", "time")


_SCHEMA = """
CREATE TABLE meta (
    key   TEXT PRIMARY KEY,
    value TEXT NOT NULL
);
CREATE TABLE events (
    id        INTEGER PRIMARY KEY AUTOINCREMENT,
    ts        TEXT NOT NULL,
    kind      TEXT NOT NULL CHECK (kind IN ('run', 'reject', 'undo', 'observe')),
    label     TEXT,
    value     REAL,
    note      TEXT NOT NULL DEFAULT '',
    ref       INTEGER REFERENCES events(id),
    step      INTEGER,
    predicted REAL,
    basis     TEXT CHECK (basis IS NULL OR basis IN ('measured', 'planned')),
    CHECK (kind NOT IN ('run', 'reject') OR (label IS NOT NULL AND label <> '')),
    CHECK ((kind = 'undo') = (ref IS NOT NULL)),
    CHECK (kind <> 'observe' OR (step IS NOT NULL AND value IS NOT NULL))
);
CREATE UNIQUE INDEX events_undone_once ON events(ref) WHERE kind = 'undo';
CREATE INDEX events_by_label ON events(label);
CREATE TRIGGER events_no_update BEFORE UPDATE ON events
BEGIN SELECT RAISE(ABORT, 'the run log is append-only'); END;
CREATE TRIGGER events_no_delete BEFORE DELETE ON events
BEGIN SELECT RAISE(ABORT, 'the run log is append-only'); END;
"""

_UNDO_TRIGGER = """
CREATE TRIGGER events_undo_target BEFORE INSERT ON events
WHEN NEW.kind = 'undo'
 AND (SELECT kind FROM events WHERE id = NEW.ref) IS NOT 'run'
 AND (SELECT kind FROM events WHERE id = NEW.ref) IS NOT 'reject'
 AND (SELECT kind FROM events WHERE id = NEW.ref) IS NOT 'observe'
BEGIN SELECT RAISE(ABORT, 'an undo must point at a run, reject or reading entry'); END;
"""

#: Version 1 -> 2: the basis column, and readings may be undone.
_UPGRADE_1_TO_2 = (
    "ALTER TABLE events ADD COLUMN basis TEXT "
    "CHECK (basis IS NULL OR basis IN ('measured', 'planned'))",
    "DROP TRIGGER events_undo_target",
    _UNDO_TRIGGER.strip(),
)

_ACTIVE_FOR_LABEL = """
SELECT e.id, e.kind, e.note FROM events AS e
WHERE e.label = ? AND e.kind IN ('run', 'reject')
  AND NOT EXISTS (SELECT 1 FROM events AS u WHERE u.kind = 'undo' AND u.ref = e.id)
ORDER BY e.id
"""

_LATEST_UNDOABLE = """
SELECT e.id, e.label FROM events AS e
WHERE e.kind IN ('run', 'reject', 'observe')
  AND NOT EXISTS (SELECT 1 FROM events AS u WHERE u.kind = 'undo' AND u.ref = e.id)
ORDER BY e.id DESC LIMIT 1
"""

_COLUMNS = "id, ts, kind, label, value, note, ref, step, predicted, basis"
_COLUMNS_V1 = "id, ts, kind, label, value, note, ref, step, predicted, NULL"
#: Kinds of event a log holds (the CHECK of the events table).
_EVENT_KINDS = ("run", "reject", "undo", "observe")

#: Columns every readable log has (``basis`` came with version 2).
_REQUIRED_COLUMNS = ("id", "ts", "kind", "label", "value", "note", "ref", "step", "predicted")


class SchemaVersionError(InputError):
    """The log was written by a newer rigplan with a schema this one cannot read."""


class RunLogWriteError(OSError):
    """An entry could not be committed; it was NOT recorded (keep it and retry)."""


class RunLogLocked(InputError):
    """Another program holds the job's run log for writing.

    ``holder`` is what the writer wrote in the lock file (``pid``, ``host``,
    ``since``), empty when unreadable.
    """

    def __init__(self, where: str, message: str, holder: dict | None = None):
        super().__init__(where, message)
        self.holder = dict(holder or {})


class RunLogReadOnly(InputError):
    """The log was opened read-only (another program records this job)."""


class RunLogDamaged(InputError):
    """The run log file is damaged (not readable as a rigplan run log).

    The file is never changed or deleted by rigplan.  ``path`` is the file;
    :func:`set_aside_damaged` renames it (and its ``-wal``/``-shm``
    companions) so that a new log can be started, keeping the old one.
    """

    def __init__(self, path, detail: str):
        self.path = Path(path)
        self.detail = detail
        super().__init__(str(path), (
            f"the run log is damaged ({detail}); it was left unchanged. To go on, open the job "
            f"in the app, which offers to set it aside (renamed to "
            f"{Path(path).stem}.damaged-<time>.sqlite, kept) and start a new log; its entries "
            "may be recovered with the sqlite3 tool's .recover command"))


@dataclass(frozen=True)
class Event:
    """One row of the log.

    id : sequence number (increasing, never reused)
    ts : time recorded, ISO 8601 in UTC
    kind : 'run', 'reject', 'undo' or 'observe'
    label : joint label (run, reject; copied from the target for undo)
    value : measured length [m] (run, or None), hook load [N] (observe)
    note : free text; the reason for a reject
    ref : id of the entry an undo cancels
    step : joints in the hole at a weight reading (observe)
    predicted : planned hook load [N] at that step when entered (observe,
        or None)
    basis : 'measured' or 'planned' (run; None in a version-1 log)
    """

    id: int
    ts: str
    kind: str
    label: str | None
    value: float | None
    note: str
    ref: int | None
    step: int | None = None
    predicted: float | None = None
    basis: str | None = None

    @property
    def length_basis(self) -> str | None:
        """How a run's length was obtained: 'measured', 'planned' or None.

        Version-1 entries carry no basis: an entry with no length or with
        the note the app wrote when the planned length was accepted counts
        as planned.
        """
        if self.kind != "run":
            return None
        if self.basis is not None:
            return self.basis
        if self.value is None or self.note == _V1_PLANNED_NOTE:
            return "planned"
        return "measured"


@dataclass(frozen=True)
class Observation:
    """A weight-indicator reading at a running step.

    step : joints in the hole [-] (0 = empty hook)
    hook_load_n : hook load read [N]
    predicted_n : planned hook load [N] when the reading was entered, None
        when not given (kept for the record: judge the reading against the
        plan as it stands now)
    """

    id: int
    ts: str
    step: int
    hook_load_n: float
    predicted_n: float | None
    note: str = ""


@dataclass
class RunState:
    """The run as replayed from the log.

    run : joints in the hole in running order, ``(label, measured length [m]
        or None)``, undone entries left out; None when nothing was measured
        (the planned length was accepted)
    rejected : label -> reason for joints set aside (not undone)
    observations : weight readings in the order taken (undone ones left out)
    withdrawn : weight readings later undone, ``(Observation, time of the
        undo)``, in the order taken (kept for the record)
    next_index : 0-based running-order index of the next joint (the number of
        joints in the hole; array index 0 is joint 1)
    basis : label -> 'measured' or 'planned' for each joint in the hole
    planned_at_entry : label -> the planned length [m] accepted for a joint
        run on its planned length (None when not recorded)
    last_id : id of the latest event (0 for an empty log)
    """

    run: list = field(default_factory=list)
    rejected: dict = field(default_factory=dict)
    observations: list = field(default_factory=list)
    withdrawn: list = field(default_factory=list)
    next_index: int = 0
    basis: dict = field(default_factory=dict)
    planned_at_entry: dict = field(default_factory=dict)
    last_id: int = 0


def log_path_for(plan_path: str | os.PathLike) -> Path:
    """Run-log file of a plan: ``<plan stem>.rigrun.sqlite`` in its directory.

    >>> log_path_for("plans/well-7.toml").as_posix()
    'plans/well-7.rigrun.sqlite'
    """
    p = Path(plan_path)
    if not p.name or p.name in (".", ".."):
        raise InputError(str(plan_path), "expected the file name of a string plan, got a folder")
    return p.with_name(p.stem + LOG_SUFFIX)


def _utc_now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="milliseconds")


def _is_real(value) -> bool:
    return isinstance(value, numbers.Real) and not isinstance(value, bool)


def _event(row) -> Event:
    return Event(*row)


def _format_length(value) -> str:
    return "" if value is None else f"{value:.4f}"


class RunLog:
    """Append-only tally log in a SQLite file; opening an existing log resumes.

    Parameters
    ----------
    path : str or path-like
        The log file (see :func:`log_path_for`); created when missing, its
        directory must exist.
    lock : bool
        Take the job's writer lock (see :meth:`open_writer`); raises
        :class:`RunLogLocked` when another program holds it.
    read_only : bool
        Open for reading only: every method that records raises
        :class:`RunLogReadOnly`.  The file is not created or upgraded.

    Raises
    ------
    SchemaVersionError
        The file was written by a newer rigplan.
    RunLogLocked
        ``lock`` was asked and another program holds the log.
    rigplan.errors.InputError
        The file cannot be opened or is not a rigplan run log.

    Every method that records returns the new event id once the entry is on
    disk; if it raises, the entry was not recorded.  A ``RunLog`` may be used
    from several threads (calls are serialised) and several processes may
    open the same file.
    """

    def __init__(self, path: str | os.PathLike, *, lock: bool = False,
                 read_only: bool = False, snapshot: bool = False):
        self.path = Path(path)
        self._lock = threading.RLock()
        self._conn = None
        self._lock_fd = None
        self.read_only = bool(read_only or snapshot)
        self._snapshot = bool(snapshot)
        self._events = []
        self._has_basis = True
        self._data_version = None
        where = str(self.path)
        try:
            if self.path.is_dir():
                raise InputError(where, "expected a run-log file, found a directory")
            if self.read_only and not self.path.exists():
                raise InputError(where, "no run log to read (the job has not been run)")
        except (OSError, ValueError) as exc:
            raise InputError(where, f"cannot open the run log "
                                    f"({getattr(exc, 'strerror', None) or exc})") from None
        if self._snapshot:
            self._conn = self._open_snapshot()
            return
        if lock and not self.read_only:
            self._lock_fd = _take_lock(self.lock_path)
        try:
            try:
                conn = sqlite3.connect(where, isolation_level=None, timeout=10.0,
                                       check_same_thread=False)
            except sqlite3.Error as exc:
                raise InputError(where, f"cannot open the run log ({_one_line(exc)}): "
                                        "expected a folder beside the plan that can be "
                                        "written") from None
            try:
                self._open(conn)
            except sqlite3.DatabaseError as exc:
                conn.close()
                if self.read_only and not _damage_text(exc):
                    # a sound log in a folder that cannot be written: read it as it is
                    self._snapshot = True
                    self._conn = self._open_snapshot()
                    return
                raise self._open_error(exc) from None
            except UnicodeDecodeError as exc:
                conn.close()
                raise RunLogDamaged(self.path, f"text that is not UTF-8 ({exc.reason})") from None
            except BaseException:
                conn.close()
                raise
        except BaseException:
            self._release_lock()
            raise
        self._conn = conn

    def _open_error(self, exc: sqlite3.Error) -> InputError:
        """The one-line error for a log that cannot be opened."""
        text = _one_line(exc)
        if _damage_text(exc):
            return RunLogDamaged(self.path, text)
        return InputError(str(self.path), f"cannot write the run log ({text}): the folder "
                                          "beside the plan must be writable to record the "
                                          "run; rigplan check --as-run reads it as it is")

    def _open_snapshot(self) -> sqlite3.Connection:
        """A read-only connection that creates and changes no file: a sound
        log in a read-only folder is read as it is.

        At rest (no -wal file: no writer has it open, nothing waits to be
        checkpointed) the file is the whole log and is read as immutable,
        which leaves no -wal/-shm behind.  A -wal beside it (the app has it
        open, or was killed) is read through SQLite's read-only WAL mode,
        then as immutable when the folder cannot be written.
        """
        from urllib.parse import quote
        base = "file:" + quote(str(self.path.resolve()))
        last = None
        at_rest = not Path(str(self.path) + "-wal").exists()
        tries = ("?mode=ro&immutable=1",) if at_rest else ("?mode=ro", "?mode=ro&immutable=1")
        for options in tries:
            try:
                conn = sqlite3.connect(base + options, uri=True, isolation_level=None,
                                       timeout=10.0, check_same_thread=False)
            except sqlite3.Error as exc:
                last = exc
                continue
            try:
                version, app_id, n_tables = self._header(conn)
                if version == 0 and n_tables == 0:
                    raise RunLogDamaged(self.path, "an empty file, not a run log")
                self._check_header(version, app_id, n_tables)
                self._check_tables(conn)
                self._has_basis = _has_column(conn, "events", "basis")
                return conn
            except sqlite3.DatabaseError as exc:
                conn.close()
                last = exc
                if _damage_text(exc):
                    break
            except UnicodeDecodeError as exc:
                conn.close()
                raise RunLogDamaged(self.path, f"text that is not UTF-8 ({exc.reason})") from None
            except BaseException:
                conn.close()
                raise
        if last is not None and _damage_text(last):
            raise RunLogDamaged(self.path, _one_line(last))
        raise InputError(str(self.path), f"cannot read the run log "
                                          f"({_one_line(last) if last else 'cannot open'})")

    def _check_tables(self, conn) -> None:
        """The events table has the columns this rigplan reads, and the file
        passes SQLite's quick check; else RunLogDamaged."""
        columns = tuple(r[1] for r in conn.execute("PRAGMA table_info(events)"))
        missing = [c for c in _REQUIRED_COLUMNS if c not in columns]
        if missing:
            raise RunLogDamaged(self.path, f"the events table lacks the column"
                                           f"{'s' if len(missing) > 1 else ''} "
                                           f"{', '.join(missing)}")
        problems = [r[0] for r in conn.execute("PRAGMA quick_check(3)")]
        if problems != ["ok"]:
            raise RunLogDamaged(self.path, f"SQLite quick check: {_one_line(problems[0])}")

    @classmethod
    def open_writer(cls, path: str | os.PathLike) -> "RunLog":
        """Open the log as the job's one writer (exclusive lock held until
        :meth:`close`); raises :class:`RunLogLocked` when another program
        records this job."""
        return cls(path, lock=True)

    @property
    def lock_path(self) -> Path:
        """The writer's lock file: ``<log>.lock`` beside the log."""
        return self.path.with_name(self.path.name + LOCK_SUFFIX)

    @property
    def holds_lock(self) -> bool:
        return self._lock_fd is not None

    def holder(self) -> dict:
        """What the writer holding the lock wrote about itself (may be empty)."""
        return _read_holder(self.lock_path)

    def try_lock(self) -> bool:
        """Become the writer if nobody else is (a read-only log turns writable).

        Returns True when this log now holds the lock.
        """
        with self._lock:
            if self._lock_fd is not None:
                return True
            if self._snapshot:          # a file read as it is is never written
                return False
            try:
                fd = _take_lock(self.lock_path)
            except RunLogLocked:
                return False
            self._lock_fd = fd
            if self.read_only:
                self.read_only = False
                try:
                    self._upgrade(self._connection())
                except BaseException:
                    self.read_only = True
                    self._release_lock()
                    raise
            return True

    def _release_lock(self) -> None:
        fd, self._lock_fd = self._lock_fd, None
        if fd is not None:
            try:
                os.close(fd)   # closing the descriptor releases the flock
            except OSError:
                pass

    @classmethod
    def for_plan(cls, plan_path: str | os.PathLike) -> "RunLog":
        """Open (or start) the log that belongs to a plan file."""
        return cls(log_path_for(plan_path))

    # -- opening -----------------------------------------------------------

    def _open(self, conn: sqlite3.Connection) -> None:
        where = str(self.path)
        conn.execute("PRAGMA synchronous=FULL")
        conn.execute("PRAGMA foreign_keys=ON")
        version, app_id, n_tables = self._header(conn)
        self._check_header(version, app_id, n_tables)
        if version >= 1:
            self._check_tables(conn)
        if self.read_only:
            if version == 0:
                raise InputError(where, "the run log is empty and not yet set up by its writer")
            self._has_basis = _has_column(conn, "events", "basis")
            return
        mode = conn.execute("PRAGMA journal_mode=WAL").fetchone()[0]
        if str(mode).lower() != "wal":
            raise InputError(where, f"cannot use write-ahead logging for the run log "
                                    f"(journal mode {mode!r}); keep the plan on a local disk")
        if version == 0:
            conn.execute("BEGIN IMMEDIATE")
            try:
                version, app_id, n_tables = self._header(conn)  # another process may have won
                self._check_header(version, app_id, n_tables)
                if version == 0:
                    # one by one: executescript() would COMMIT first
                    for statement in _split_sql(_SCHEMA + _UNDO_TRIGGER):
                        conn.execute(statement)
                    conn.execute("INSERT INTO meta (key, value) VALUES ('created', ?)", (_utc_now(),))
                    conn.execute("INSERT INTO meta (key, value) VALUES ('created_by', ?)",
                                 (f"rigplan {__version__}",))
                    conn.execute(f"PRAGMA application_id={APPLICATION_ID}")
                    conn.execute(f"PRAGMA user_version={SCHEMA_VERSION}")
                conn.execute("COMMIT")
            except BaseException:
                if conn.in_transaction:
                    conn.execute("ROLLBACK")
                raise
        self._upgrade(conn)

    def _upgrade(self, conn: sqlite3.Connection) -> None:
        """Bring a version-1 log to version 2 (adds a column and a trigger;
        no entry is changed).  Readers of either version keep working."""
        self._events = []
        if conn.execute("PRAGMA user_version").fetchone()[0] >= SCHEMA_VERSION:
            self._has_basis = True
            return
        conn.execute("BEGIN IMMEDIATE")
        try:
            if conn.execute("PRAGMA user_version").fetchone()[0] < 2:
                for statement in _UPGRADE_1_TO_2:
                    conn.execute(statement)
                conn.execute("INSERT OR REPLACE INTO meta (key, value) VALUES ('upgraded', ?)",
                             (f"{_utc_now()} to version 2 by rigplan {__version__}",))
                conn.execute("PRAGMA user_version=2")
            conn.execute("COMMIT")
        except BaseException:
            if conn.in_transaction:
                conn.execute("ROLLBACK")
            raise
        self._has_basis = True

    @staticmethod
    def _header(conn):
        version = conn.execute("PRAGMA user_version").fetchone()[0]
        app_id = conn.execute("PRAGMA application_id").fetchone()[0]
        n_tables = conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
        return version, app_id, n_tables

    def _check_header(self, version, app_id, n_tables) -> None:
        where = str(self.path)
        if version > SCHEMA_VERSION:
            raise SchemaVersionError(
                where, f"run log has schema version {version}, this rigplan "
                       f"{__version__} reads up to version {SCHEMA_VERSION}: "
                       f"open it with a newer rigplan (the file was not changed)")
        if version == 0 and n_tables == 0 and app_id in (0, APPLICATION_ID):
            return  # new, empty file
        if app_id != APPLICATION_ID or version < 1:
            raise InputError(where, "expected a rigplan run log, found another SQLite "
                                    "database (the file was not changed)")

    # -- writing -----------------------------------------------------------

    def _connection(self) -> sqlite3.Connection:
        if self._conn is None:
            raise RuntimeError(f"{self.path}: the run log is closed")
        return self._conn

    def _append(self, kind, label=None, value=None, note="", ref=None, step=None,
                predicted=None, check=None, basis=None) -> int:
        """Commit one event in its own immediate transaction; return its id."""
        with self._lock:
            conn = self._connection()
            if self.read_only:
                raise RunLogReadOnly(str(self.path), "opened read-only: another program "
                                                     "records this job (nothing was recorded)")
            try:
                conn.execute("BEGIN IMMEDIATE")
                try:
                    if check is not None:
                        extra = check(conn)
                        if extra is not None:  # undo: the checker resolves target
                            ref, label = extra
                    cur = conn.execute(
                        "INSERT INTO events (ts, kind, label, value, note, ref, step, predicted,"
                        " basis) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                        (_utc_now(), kind, label, value, note, ref, step, predicted, basis))
                    event_id = cur.lastrowid
                    conn.execute("COMMIT")
                except BaseException:
                    if conn.in_transaction:
                        conn.execute("ROLLBACK")
                    raise
            except (sqlite3.Error, UnicodeDecodeError) as exc:
                raise RunLogWriteError(
                    f"{self.path}: could not save the {kind} entry"
                    f"{f' for {label!r}' if label else ''} ({_one_line(exc)}); it was NOT "
                    "recorded") from exc
            return event_id

    def _where(self, what: str) -> str:
        return f"{self.path}: {what}"

    def _check_label(self, label, what: str) -> str:
        if not isinstance(label, str) or not label.strip():
            raise InputError(self._where(what), f"expected a joint label (text), got {label!r}")
        return label.strip()

    @staticmethod
    def _check_note(where: str, note) -> str:
        if not isinstance(note, str):
            raise InputError(where, f"expected the note as text, got {type(note).__name__}")
        return note

    def record_run(self, label: str, measured_length_m: float | None, note: str = "",
                   basis: str | None = None) -> int:
        """Record that joint ``label`` went in the hole; return the event id.

        Parameters
        ----------
        label : str
            Joint label (surrounding blanks are dropped).
        measured_length_m : float or None
            Tally length [m], > 0: measured on site, or with
            ``basis="planned"`` the planned length accepted; None when not
            measured and not given.
        note : str
            Free text kept with the entry.
        basis : 'measured', 'planned' or None
            How the length was obtained; default 'measured' with a length,
            'planned' without one.

        Raises
        ------
        rigplan.errors.InputError
            Bad value, or the joint is already in the hole or set aside
            (undo that entry first).
        RunLogWriteError
            The entry could not be saved.
        """
        label = self._check_label(label, "run label")
        where = self._where(f"run {label!r}")
        if measured_length_m is not None:
            if not _is_real(measured_length_m) or not math.isfinite(measured_length_m) \
                    or measured_length_m <= 0.0:
                raise InputError(f"{where}.measured_length_m",
                                 f"expected a measured length > 0 m or none, got {measured_length_m!r}")
            measured_length_m = float(measured_length_m)
        if basis is None:
            basis = "planned" if measured_length_m is None else "measured"
        if basis not in BASES:
            raise InputError(f"{where}.basis", f"expected one of {', '.join(BASES)}, got {basis!r}")
        if basis == "measured" and measured_length_m is None:
            raise InputError(f"{where}.basis", "a measured run needs its measured length")
        note = self._check_note(f"{where}.note", note)

        def check(conn):
            for eid, kind, reason in conn.execute(_ACTIVE_FOR_LABEL, (label,)):
                if kind == "run":
                    raise InputError(where, f"joint {label!r} is already in the hole "
                                            f"(entry {eid}); undo that entry first")
                raise InputError(where, f"joint {label!r} was set aside (entry {eid}: "
                                        f"{reason!r}); undo the rejection first")

        return self._append("run", label=label, value=measured_length_m, note=note, check=check,
                            basis=basis)

    def reject(self, label: str, reason: str) -> int:
        """Record that joint ``label`` was set aside, with the reason; return the id."""
        label = self._check_label(label, "reject label")
        where = self._where(f"reject {label!r}")
        reason = self._check_note(f"{where}.reason", reason)

        def check(conn):
            for eid, kind, _ in conn.execute(_ACTIVE_FOR_LABEL, (label,)):
                if kind == "run":
                    raise InputError(where, f"joint {label!r} is in the hole (entry {eid}); "
                                            f"undo the run first")
                raise InputError(where, f"joint {label!r} is already set aside (entry {eid})")

        return self._append("reject", label=label, note=reason, check=check)

    def undo(self, note: str = "") -> int | None:
        """Cancel the latest run, reject or reading entry not yet undone.

        Appends an ``undo`` event pointing at it (nothing is deleted) and
        returns the undo's id; returns None when there is nothing to undo.
        Repeated calls walk further back.
        """
        note = self._check_note(self._where("undo.note"), note)

        def check(conn):
            row = conn.execute(_LATEST_UNDOABLE).fetchone()
            if row is None:
                raise _NothingToUndo  # rolls the empty transaction back
            return row  # (ref, label) of the entry to cancel

        try:
            return self._append("undo", note=note, check=check)
        except _NothingToUndo:
            return None

    def observe(self, step: int, hook_load_n: float, predicted_n: float | None = None,
                note: str = "") -> int:
        """Record a weight-indicator reading; return the event id.

        Parameters
        ----------
        step : int
            Joints in the hole when read [-], >= 0 (0 = empty hook).
        hook_load_n : float
            Hook load read [N].
        predicted_n : float or None
            Planned hook load at that step [N].
        note : str
            Free text.
        """
        where = self._where(f"observe step {step!r}")
        if not isinstance(step, numbers.Integral) or isinstance(step, bool) or step < 0:
            raise InputError(where, f"expected the step as a whole number of joints >= 0, got {step!r}")
        if not _is_real(hook_load_n) or not math.isfinite(hook_load_n) or hook_load_n < 0:
            raise InputError(f"{where}.hook_load_n",
                             f"expected a hook load >= 0 N, got {hook_load_n!r}")
        if predicted_n is not None:
            if not _is_real(predicted_n) or not math.isfinite(predicted_n):
                raise InputError(f"{where}.predicted_n",
                                 f"expected a predicted hook load in N or none, got {predicted_n!r}")
            predicted_n = float(predicted_n)
        note = self._check_note(f"{where}.note", note)
        return self._append("observe", value=float(hook_load_n), note=note, step=int(step),
                            predicted=predicted_n)

    # -- reading -----------------------------------------------------------

    def events(self) -> list:
        """Every event in the order recorded (RunLogDamaged when the file
        cannot be read back).

        The log is append-only, so only the events after the last one read
        are fetched (a re-read after each entry costs one row, not all)."""
        cols = _COLUMNS if self._has_basis else _COLUMNS_V1
        with self._lock:
            last = self._events[-1].id if self._events else 0
            try:
                rows = self._connection().execute(
                    f"SELECT {cols} FROM events WHERE id > ? ORDER BY id", (last,)).fetchall()
            except sqlite3.DatabaseError as exc:
                raise RunLogDamaged(self.path, _one_line(exc)) from None
            except UnicodeDecodeError as exc:
                raise RunLogDamaged(self.path, f"text that is not UTF-8 ({exc.reason})") from None
            new = [_event(r) for r in rows]
            for e in new:
                _check_event(e, self.path)
            self._events.extend(new)
            return list(self._events)

    def state(self) -> RunState:
        """Replay the log into the present state of the run."""
        return _replay(self.events())

    def changed(self) -> bool:
        """True when another connection committed since the last call (the
        first call returns True).  Cheap: for following a writer."""
        with self._lock:
            conn = self._connection()
            if not self._has_basis:
                self._has_basis = _has_column(conn, "events", "basis")
                if self._has_basis:
                    self._events = []       # re-read with the basis column
            v = conn.execute("PRAGMA data_version").fetchone()[0]
        changed = v != self._data_version
        self._data_version = v
        return changed

    def tally_entries(self, planned=None) -> list:
        """The tally as rows, in the order of the exported sheet.

        Each row is a dict: ``seq`` (running order, None when not run),
        ``label``, ``status`` (``run``, ``rejected`` or ``not run``),
        ``length`` [m] (the length recorded, measured or accepted, None when
        none), ``basis`` (``measured``, ``planned`` or None), ``planned``
        [m] (from ``planned`` or the length accepted, None when unknown),
        ``note``, ``time`` (UTC, ISO 8601; empty when not run).  Joints in
        the hole come first in running order, then those set aside, then,
        when ``planned`` (label -> planned length [m] or None, in running
        order) is given, the planned joints not yet run.
        """
        plan_items = []
        if planned is not None:
            try:
                plan_items = list(planned.items())
            except AttributeError:
                raise InputError("planned", "expected a mapping of label -> planned length m") from None
            for label, length in plan_items:
                if length is not None and (not _is_real(length) or not math.isfinite(length)
                                           or length <= 0):
                    raise InputError(f"planned[{label!r}]",
                                     f"expected a planned length > 0 m or none, got {length!r}")
        plan_len = {str(k).strip(): v for k, v in plan_items}
        events = self.events()
        undone = {e.ref for e in events if e.kind == "undo"}
        out = []
        done = set()
        seq = 0
        for e in events:
            if e.kind == "run" and e.id not in undone:
                seq += 1
                done.add(e.label)
                basis = e.length_basis
                planned_len = plan_len.get(e.label)
                if planned_len is None and basis == "planned":
                    planned_len = e.value
                out.append(dict(seq=seq, label=e.label, status="run", length=e.value,
                                basis=basis, planned=planned_len, note=e.note, time=e.ts))
        for e in events:
            if e.kind == "reject" and e.id not in undone:
                done.add(e.label)
                out.append(dict(seq=None, label=e.label, status="rejected", length=None,
                                basis=None, planned=plan_len.get(e.label), note=e.note,
                                time=e.ts))
        for label, length in plan_items:
            label = str(label).strip()
            if label in done:
                continue
            out.append(dict(seq=None, label=label, status="not run", length=None, basis=None,
                            planned=length, note="", time=""))
        return out

    def export_tally_csv(self, path_or_file, planned=None) -> None:
        """Write the tally as CSV in metres (RFC 4180, CRLF line ends).

        The sheet reads back as a tally (:mod:`rigplan.files.formats.tally`;
        ``rigplan check --tally``).  Columns: ``seq`` (running order, 1 =
        first joint in the hole), ``label``, ``status`` (``run``,
        ``rejected`` or ``not run``), ``measured_length [m]`` (blank unless
        measured on site), ``planned_length [m]``, ``length_source``
        (``measured`` or ``planned``: the planned length accepted, nothing
        measured), ``note``, ``time`` (UTC, ISO 8601); rows as in
        :meth:`tally_entries`.  The app writes the same sheet in the job's
        units (:func:`rigplan.files.formats.tally.run_tally_text`).

        Parameters
        ----------
        path_or_file : str, path-like or text file
            A path is written atomically (temporary file, fsync, rename,
            directory fsync); an open text file (opened with ``newline=""``)
            is written as is.
        planned : mapping, optional
            Planned joints in running order, label -> planned length [m] (or
            None).
        """
        rows = self.tally_entries(planned)
        buf = io.StringIO()
        writer = csv.writer(buf, lineterminator="\r\n")
        writer.writerow(TALLY_COLUMNS)
        for r in rows:
            measured = r["length"] if r["basis"] == "measured" else None
            writer.writerow(["" if r["seq"] is None else r["seq"], r["label"], r["status"],
                             _format_length(measured), _format_length(r["planned"]),
                             r["basis"] or "", r["note"], r["time"]])
        text = buf.getvalue()
        if hasattr(path_or_file, "write"):
            path_or_file.write(text)
            if hasattr(path_or_file, "flush"):
                path_or_file.flush()
        else:
            atomic_write_text(path_or_file, text)

    # -- life cycle ----------------------------------------------------------

    def close(self) -> None:
        """Close the file (everything recorded is already on disk) and let
        go of the writer's lock."""
        with self._lock:
            if self._conn is not None:
                self._conn.close()
                self._conn = None
            self._release_lock()

    def __enter__(self) -> "RunLog":
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def __repr__(self) -> str:
        return f"RunLog({str(self.path)!r})"


def _one_line(exc) -> str:
    return " ".join(str(exc).split())


def _damage_text(exc) -> bool:
    """Whether an SQLite error says the file itself is damaged."""
    low = str(exc).lower()
    return "malformed" in low or "not a database" in low or "no such" in low


def _check_event(e: Event, path) -> None:
    """An event read back has the types and values the writer gives it."""
    ok = (isinstance(e.id, int) and e.kind in _EVENT_KINDS
          and (e.label is None or isinstance(e.label, str))
          and (e.value is None or (isinstance(e.value, (int, float))
                                   and math.isfinite(e.value)))
          and isinstance(e.note, str)
          and (e.ref is None or isinstance(e.ref, int))
          and (e.step is None or (isinstance(e.step, int) and e.step >= 0))
          and (e.predicted is None or (isinstance(e.predicted, (int, float))
                                       and math.isfinite(e.predicted))))
    if ok and e.kind == "run" and e.value is not None and not e.value > 0:
        ok = False
    if ok and e.kind in ("run", "reject") and not (e.label and e.label.strip()):
        ok = False
    if ok and e.kind == "undo" and e.ref is None:
        ok = False
    if ok and e.kind == "observe" and (e.step is None or e.value is None):
        ok = False
    if ok and e.basis is not None and e.basis not in ("measured", "planned"):
        ok = False
    if not ok:
        raise RunLogDamaged(path, f"entry {e.id!r} holds values no rigplan writes")


def set_aside_damaged(path: str | os.PathLike) -> Path:
    """Rename a damaged run log (and its ``-wal`` and ``-shm`` files) out of
    the way, keeping every byte; return the new path of the log.

    The new name is ``<stem>.damaged-<UTC time>.sqlite`` beside it (with
    ``-2``, ``-3`` ... when taken).  Nothing is deleted or overwritten, so a
    new log can be started under the old name and the old one recovered
    later (e.g. with the sqlite3 tool's ``.recover``).
    """
    src = Path(path)
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%SZ")
    stem = src.name[:-len(".sqlite")] if src.name.endswith(".sqlite") else src.name
    n = 1
    while True:
        name = f"{stem}.damaged-{stamp}{'' if n == 1 else f'-{n}'}.sqlite"
        dst = src.with_name(name)
        if not any(Path(str(dst) + sfx).exists() for sfx in ("", "-wal", "-shm")):
            break
        n += 1
    try:
        # the companions first: the log itself moves last, so a crash in
        # between leaves it under its own name
        for sfx in ("-wal", "-shm"):
            if Path(str(src) + sfx).exists():
                os.rename(str(src) + sfx, str(dst) + sfx)
        os.rename(src, dst)
        from rigplan.files.atomicio import fsync_directory
        fsync_directory(src.parent)
    except OSError as exc:
        raise InputError(str(src), f"cannot set the damaged run log aside "
                                   f"({exc.strerror or exc}): rename it yourself") from None
    return dst


class _NothingToUndo(Exception):
    """Internal: raised inside the undo transaction to roll it back."""


def _split_sql(script: str) -> list:
    """Split the schema script into statements (triggers kept whole)."""
    statements, current = [], []
    for line in script.strip().splitlines():
        current.append(line)
        text = "\n".join(current)
        if sqlite3.complete_statement(text):
            statements.append(text.strip())
            current = []
    if current and "".join(current).strip():
        raise ValueError("incomplete statement in the run-log schema")
    return statements


def _replay(events) -> RunState:
    undone = {e.ref: e.ts for e in events if e.kind == "undo"}
    state = RunState()
    for e in events:
        if e.kind == "observe" and e.id in undone:
            state.withdrawn.append((Observation(
                id=e.id, ts=e.ts, step=e.step, hook_load_n=e.value,
                predicted_n=e.predicted, note=e.note), undone[e.id]))
        if e.kind == "run" and e.id not in undone:
            basis = e.length_basis
            state.run.append((e.label, e.value if basis == "measured" else None))
            state.basis[e.label] = basis
            if basis == "planned":
                state.planned_at_entry[e.label] = e.value
        elif e.kind == "reject" and e.id not in undone:
            state.rejected[e.label] = e.note
        elif e.kind == "observe" and e.id not in undone:
            state.observations.append(Observation(
                id=e.id, ts=e.ts, step=e.step, hook_load_n=e.value,
                predicted_n=e.predicted, note=e.note))
    state.next_index = len(state.run)
    state.last_id = events[-1].id if events else 0
    return state


def _has_column(conn, table: str, column: str) -> bool:
    return any(row[1] == column for row in conn.execute(f"PRAGMA table_info({table})"))


def _take_lock(lock_path: Path) -> int:
    """Exclusive, non-blocking ``flock`` on the lock file; return its descriptor.

    Writes who holds it (pid, host, time) into the file for the message a
    second program shows.  Raises :class:`RunLogLocked` when held elsewhere.
    """
    try:
        import fcntl
    except ImportError:  # pragma: no cover - no flock on Windows: no lock
        return os.open(os.devnull, os.O_RDONLY)
    where = str(lock_path)
    try:
        fd = os.open(where, os.O_RDWR | os.O_CREAT, 0o666)
    except OSError as exc:
        raise InputError(where, f"cannot create the run log's lock file ({exc.strerror})") from exc
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        os.close(fd)
        holder = _read_holder(lock_path)
        who = (f" (program {holder.get('pid', '?')} on {holder.get('host', '?')}, since "
               f"{holder.get('since', '?')})") if holder else ""
        raise RunLogLocked(str(lock_path.with_name(lock_path.name[:-len(LOCK_SUFFIX)])),
                           f"another rigplan records this job{who}; open it read-only or "
                           "close the other one first", holder) from None
    try:
        info = json.dumps({"pid": os.getpid(), "host": socket.gethostname(),
                           "since": _utc_now()}).encode("utf-8")
        os.ftruncate(fd, 0)
        os.pwrite(fd, info, 0)
    except OSError:
        pass  # the lock holds without the note
    return fd


def _read_holder(lock_path: Path) -> dict:
    try:
        data = json.loads(Path(lock_path).read_text(encoding="utf-8") or "{}")
    except (OSError, ValueError):
        return {}
    return data if isinstance(data, dict) else {}
