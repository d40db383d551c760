"""Each class of bad input found by fuzzing ends in one line, exit 2.

One test per class: the line names the file, the key or row, and what was
expected (with units and the allowed range where there is one), and no
file the command reads is written over.  The requirement is the project's
own (README "Exit codes", DEVELOPERS.md "Errors and user data"); the ranges
are those of ``rigplan.files.ranges`` (each with its reason there).
"""

from __future__ import annotations

import shutil
import sqlite3
import time
from pathlib import Path

import pytest

import fuzzlib as F
from rigplan.files.runlog import RunLog, RunLogDamaged, log_path_for, set_aside_damaged

REPO = F.ROOT


@pytest.fixture
def job(tmp_path):
    """The bundled demo copied into a scratch folder."""
    F.copy_demo(tmp_path)
    return tmp_path


def one_line(code, out, err):
    assert code == 2, (code, out[-500:], err)
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith("rigplan"), lines[0]
    return lines[0]


def edited(path: Path, old: str, new: str, dest: Path | None = None) -> Path:
    text = path.read_text()
    assert old in text, old
    dest = dest or path
    dest.write_text(text.replace(old, new, 1))
    return dest


def check(*args):
    return F.run_cli(["check", *args])


# -- tracebacks that became one line ------------------------------------------------


@pytest.mark.parametrize("which", ["plan", "rig", "materials"])
def test_deeply_nested_toml(job, which):
    deep = "x = " + "[" * 3000 + "]" * 3000 + "\n"
    plan, rig = job / "cv7-16in-floated.toml", job / "mw80.toml"
    args = [str(plan), "--rig", str(rig)]
    if which == "plan":
        plan.write_text(plan.read_text() + deep)
        named = str(plan)
    elif which == "rig":
        rig.write_text(deep + rig.read_text())
        named = str(rig)
    else:
        mats = job / "m.toml"
        mats.write_text(deep)
        args += ["--materials", str(mats)]
        named = str(mats)
    line = one_line(*check(*args))
    assert line.startswith(f"rigplan: {named}: ") and "nested too deeply" in line


@pytest.mark.parametrize("file, old, new, key", [
    ("cv7-16in-floated.toml", "burst = 1.1", "burst = 1" + "0" * 400, "design_factors.burst"),
    ("mw80.toml", 'mast_rating = "120000 lbf"', "mast_rating = 1" + "0" * 400, "path[1].mast_rating"),
    ("mw80.toml", "lines = 4", "lines = 1" + "0" * 400, "path[1].lines"),
])
def test_huge_integers(job, file, old, new, key):
    edited(job / file, old, new)
    line = one_line(*check(str(job / "cv7-16in-floated.toml"), "--rig", str(job / "mw80.toml")))
    assert f"{job / file}: {key}: expected" in line and "401-digit" in line or "401 digits" in line


def test_huge_integer_in_a_materials_file(job):
    mats = job / "m.toml"
    mats.write_text(F.MATERIALS_TEXT.replace('"290 MPa"', "1" + "0" * 400))
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", "th30",
                           "--materials", str(mats)))
    assert f"{mats}: material[1].yield_strength: expected" in line


def test_tally_field_of_200000_characters(job):
    tally = job / "long.csv"
    tally.write_text("label,measured_length [ft],note\nJ1,20.1,\"" + "x" * 200_000 + "\"\n")
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", "th30", "--tally", str(tally)))
    assert f"{tally}: row 2: not a readable CSV row (field larger than field limit" in line


def test_empty_section_list(job):
    import re
    plan = job / "cv5-18in-thinwall.toml"
    text = re.sub(r"\[\[section\]\][^\[]*", "", plan.read_text())
    plan.write_text("section = []\n" + text)
    line = one_line(*check(str(plan), "--rig", "th30"))
    assert f"{plan}: section: expected at least one [[section]] table" in line


@pytest.mark.parametrize("where", ["tally key", "--rig", "--tally", "--materials", "-o"])
def test_file_names_of_300_characters(job, where):
    long = "n" * 300 + ".csv"
    plan = job / "cv3-8in-a53b.toml"
    args = ["check", str(plan), "--rig", "th30", "--format", "json"]
    if where == "tally key":
        edited(plan, 'tally = "cv3-8in-a53b.tally.csv"', f'tally = "{long}"')
        named = f"{plan}: tally"
    elif where == "--rig":
        args[3] = long
        named = long
    elif where == "--tally":
        args += ["--tally", str(job / long)]
        named = str(job / long)
    elif where == "--materials":
        args += ["--materials", str(job / long)]
        named = str(job / long)
    else:
        args = ["report", str(plan), "--rig", "th30", "-o", str(job / long)]
        named = str(job / long)
    line = one_line(*F.run_cli(args))
    assert line.startswith(f"rigplan: {named}"), line
    assert "name too long" in line.lower() or "not a usable" in line


def test_file_names_of_300_characters_at_the_app_prompts(job):
    from rigplan.errors import InputError
    from rigplan.tui.session import JobSession
    s = JobSession(job / "cv3-8in-a53b.toml", job / "th30.toml")
    try:
        long = "n" * 300 + ".toml"
        with pytest.raises(InputError) as err:
            s.change_rig(long)
        assert str(err.value).startswith(long + ": not a usable rig profile name")
        with pytest.raises(InputError) as err:
            s.import_tally(long)
        assert str(err.value).startswith(f"{job / long}: cannot read the tally CSV")
        assert s.rig.name.startswith("TH-30") and not s.dirty     # nothing changed
    finally:
        s.close()


# -- damaged run logs -----------------------------------------------------------------


def _damage(log: Path, how: str) -> None:
    if how == "malformed":
        data = bytearray(log.read_bytes())
        data[1500:4500] = b"\xff" * 3000
        log.write_bytes(bytes(data))
    elif how == "no such column":
        c = sqlite3.connect(log)
        c.executescript("ALTER TABLE events RENAME COLUMN predicted TO guessed;")
        c.close()
    elif how == "not UTF-8":
        c = sqlite3.connect(log)
        c.executescript("DROP TRIGGER events_no_update; UPDATE events SET label = "
                        "CAST(X'FFFE41' AS TEXT) WHERE id = 1;")
        c.close()
    else:
        log.write_bytes(b"label,measured_length\nJ1,20\n")


@pytest.mark.parametrize("how", ["malformed", "no such column", "not UTF-8", "not a database"])
def test_damaged_run_log_is_named_with_the_way_out_and_left_unchanged(job, how):
    plan = job / "cv7-16in-floated.toml"
    log = log_path_for(plan)
    F.good_log(log, entries=5)
    _damage(log, how)
    before = log.read_bytes()
    line = one_line(*check(str(plan), "--rig", "mw80", "--as-run"))
    assert line.startswith(f"rigplan: {log}: the run log is damaged (")
    assert "set it aside" in line and ".recover" in line
    assert log.read_bytes() == before and sorted(p.name for p in job.glob("*.sqlite")) == [log.name]


def test_sound_log_read_with_as_run_is_left_unchanged(job):
    plan = job / "cv7-16in-floated.toml"
    log = log_path_for(plan)
    F.good_log(log, entries=5)
    before = log.read_bytes()
    code, out, err = check(str(plan), "--rig", "mw80", "--as-run", "--format", "json")
    assert code in (0, 1) and err == ""
    assert log.read_bytes() == before


def test_set_aside_keeps_every_byte_and_frees_the_name(job):
    log = job / "p.rigrun.sqlite"
    F.good_log(log)
    _damage(log, "malformed")
    data = log.read_bytes()
    with pytest.raises(RunLogDamaged):
        RunLog(log)
    moved = set_aside_damaged(log)
    assert moved.parent == job and moved.name.startswith("p.rigrun.damaged-")
    assert moved.read_bytes() == data and not log.exists()
    with RunLog(log) as rl:                       # a new log under the old name
        assert rl.state().run == []
    again = log.with_name("q.rigrun.sqlite")
    again.write_bytes(data)
    second = set_aside_damaged(again)
    assert second != moved and second.read_bytes() == data


async def test_app_offers_to_set_a_damaged_log_aside(job):
    from rigplan.tui.dialogs import DamagedLogApp
    plan = job / "cv7-16in-floated.toml"
    log = log_path_for(plan)
    F.good_log(log, entries=3)
    _damage(log, "malformed")
    data = log.read_bytes()
    with pytest.raises(RunLogDamaged) as err:
        RunLog(log)
    offer = DamagedLogApp(err.value)
    async with offer.run_test(size=(120, 30)) as pilot:
        await pilot.pause()
        await pilot.press("n")                     # "Stop": nothing is touched
    assert offer.return_value is None and log.read_bytes() == data
    offer = DamagedLogApp(err.value)
    async with offer.run_test(size=(120, 30)) as pilot:
        await pilot.pause()
        await pilot.press("y")
    moved = offer.return_value
    assert moved is not None and moved.read_bytes() == data and not log.exists()
    from rigplan.tui.app import build_app
    app = build_app(plan, job / "mw80.toml")       # opens on a new, empty log
    try:
        assert app.session.state.run == []
    finally:
        app.session.close()


# -- hangs ------------------------------------------------------------------------


@pytest.mark.parametrize("count", ["100000", "1000000000000000000", "20001"])
def test_joint_counts_past_the_stated_maximum(job, count):
    plan = edited(job / "cv7-16in-floated.toml", "count = 75", f"count = {count}")
    t0 = time.perf_counter()
    line = one_line(*check(str(plan), "--rig", "mw80"))
    assert time.perf_counter() - t0 < 5.0
    assert f"{plan}: section[3].count: expected a whole number of joints between 1 and 20,000" \
        in line


def test_joint_count_summed_over_sections(job):
    plan = edited(job / "cv7-16in-floated.toml", "count = 75", "count = 19999")
    line = one_line(*check(str(plan), "--rig", "mw80"))
    assert f"{plan}: section[3].count: 20,004 joints in the string: expected at most 20,000" \
        in line


# -- silent accepts that are now refused -----------------------------------------------


@pytest.mark.parametrize("old, new, key, fragment", [
    ("lines = 4", "lines = 20000", "path[1].lines", "between 1 and 24, got 20000"),
    ("sheave_factor = 1.04", "sheave_factor = 1e100", "path[1].sheave_factor",
     "between 1 and 1.2 [-]"),
    ("rope_design_factor = 3.0", "rope_design_factor = 0.5", "path[1].rope_design_factor",
     "between 1 and 20 [-]"),
    ('dead_load = "3500 lbf"', 'dead_load = "1e308 lbf"', "path[1].dead_load", "too large to use"),
    ('winch_line_pull = "28000 lbf"', 'winch_line_pull = "2e9 lbf"', "path[1].winch_line_pull",
     "in (0, 11,240,000] lbf (0 to 50,000 kN)"),
])
def test_rig_values_outside_their_range(job, old, new, key, fragment):
    rig = edited(job / "mw80.toml", old, new)
    line = one_line(*check(str(job / "cv7-16in-floated.toml"), "--rig", str(rig)))
    assert f"{rig}: {key}: expected" in line and fragment in line, line


def test_collapse_rating_that_overflows(job):
    plan = edited(job / "cv7-16in-floated.toml", 'collapse_rating = "210 psi"',
                  'collapse_rating = "1e308 psi"')
    line = one_line(*check(str(plan), "--rig", "mw80"))
    assert f"{plan}: section[2].collapse_rating: expected a pressure" in line
    assert "too large to use" in line


def test_unquoted_decimal_comma_in_a_tally_row(job):
    tally = job / "comma.csv"
    tally.write_text("label,measured_length [ft],note\nJ1,20,04\n")
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", "th30", "--tally", str(tally)))
    assert f"{tally}: row 2, measured_length: '20' followed by '04'" in line
    assert "write 20.04" in line


@pytest.mark.parametrize("value", ["0.0001", "2006", "0.0001 ft"])
def test_absurd_measured_lengths(job, value):
    tally = job / "slip.csv"
    tally.write_text(f"label,measured_length [ft]\nJ4,{value}\n")
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", "th30", "--tally", str(tally)))
    assert f"{tally}: row 2, measured_length: expected a joint length between 0.3281 and " \
           "98.43 ft (0.1 to 30 m)" in line


@pytest.mark.parametrize("tally", ["missing.csv", "empty.csv", "binary.csv"])
def test_open_tally_is_not_ignored(job, tally):
    (job / "empty.csv").write_bytes(b"")
    (job / "binary.csv").write_bytes(bytes(range(256)))
    with F.app_stubbed():
        line = one_line(*F.run_cli(["open", str(job / "cv3-8in-a53b.toml"), "--rig", "th30",
                                    "--tally", str(job / tally)]))
    assert line.startswith(f"rigplan: {job / tally}: ")


def test_open_tally_is_applied(job):
    tally = job / "t.csv"
    tally.write_text("label,measured_length [ft],status\nJ4,20.5,run\nJ5,,rejected\n")
    seen = {}
    import rigplan.tui.app as A
    real = A.build_app

    def spy(*a, **k):
        app = real(*a, **k)
        seen["plan"] = app.session.base_plan
        return app
    A.build_app = spy
    try:
        with F.app_stubbed():
            code, out, err = F.run_cli(["open", str(job / "cv3-8in-a53b.toml"), "--rig", "th30",
                                        "--tally", str(tally)])
    finally:
        A.build_app = real
    assert code == 0 and err == ""
    j = {x.label: x for x in seen["plan"].joints}
    assert j["J5"].rejected and abs(j["J4"].measured_length - 20.5 * 0.3048) < 1e-12  # NIST SP 811


def test_open_as_run_without_a_log(job):
    with F.app_stubbed():
        line = one_line(*F.run_cli(["open", str(job / "cv3-8in-a53b.toml"), "--rig", "th30",
                                    "--as-run"]))
    assert f"{log_path_for(job / 'cv3-8in-a53b.toml')}: --as-run: no run log" in line


@pytest.mark.parametrize("role", ["plan", "rig", "tally", "plan's tally", "materials", "run log"])
def test_report_never_writes_onto_a_file_it_reads(job, role):
    plan = job / "cv3-8in-a53b.toml"
    mats = job / "m.toml"
    mats.write_text(F.MATERIALS_TEXT)
    tally = job / "other.tally.csv"
    shutil.copy(job / "cv3-8in-a53b.tally.csv", tally)
    log = log_path_for(plan)
    F.good_log(log, entries=3)
    target = {"plan": plan, "rig": job / "th30.toml", "tally": tally,
              "plan's tally": job / "cv3-8in-a53b.tally.csv", "materials": mats,
              "run log": log}[role]
    before = {p.name: p.read_bytes() for p in job.iterdir() if p.is_file()}
    line = one_line(*F.run_cli(["report", str(plan), "--rig", str(job / "th30.toml"),
                                "--tally", str(tally), "--materials", str(mats), "--as-run",
                                "-o", str(target)]))
    assert line.startswith(f"rigplan: -o {target}: this is the ") and str(target) in line[20:] and "an input" in line
    after = {p.name: p.read_bytes() for p in job.iterdir() if p.is_file()}
    assert after == before


# -- messages that name the right file ------------------------------------------------


def test_tally_setting_the_float_collar_aside_names_the_tally(job):
    plan = job / "cv7-16in-floated.toml"
    text = plan.read_text()
    assert 'collar_joint = ' in text
    tally = job / "t.csv"
    import re
    collar = re.search(r"collar_joint = (\S+)", text).group(1).strip('"')
    label = collar if not collar.isdigit() else f"J{collar}"
    tally.write_text(f"label,status\n{label},rejected\n")
    line = one_line(*check(str(plan), "--rig", "mw80", "--tally", str(tally)))
    assert line.startswith(f"rigplan: {tally}: joint {label}: the float collar joint is set aside")


def test_tally_setting_every_joint_aside_names_the_tally(job):
    tally = job / "all.csv"
    tally.write_text("label,status\n" + "".join(f"J{k},rejected\n" for k in range(1, 23)))
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", "th30", "--tally", str(tally)))
    assert line.startswith(f"rigplan: {tally}: every joint of the plan is set aside")


def test_rig_without_paths_names_the_rig(job):
    rig = job / "empty-paths.toml"
    rig.write_text('version = 1\nname = "no paths"\npath = []\n')
    line = one_line(*check(str(job / "cv3-8in-a53b.toml"), "--rig", str(rig)))
    assert line.startswith(f"rigplan: {rig}: path: expected at least one [[path]] table")


def test_material_without_density_names_its_file(job):
    mats = job / "m.toml"
    mats.write_text(F.MATERIALS_TEXT.replace('density = "7870 kg/m3"', 'density = "unknown"')
                    .replace('"yard_steel"', '"yard_steel_no_density"'))
    plan = edited(job / "cv3-8in-a53b.toml", 'material = "a53b"',
                  'material = "yard_steel_no_density"')
    line = one_line(*check(str(plan), "--rig", "th30", "--materials", str(mats)))
    assert line.startswith(f"rigplan: {plan}: ") and "has no density" in line
    assert f"comes from the materials file {mats}" in line
