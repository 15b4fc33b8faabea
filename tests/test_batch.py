"""`relaywright batch`: many machine files into sheets, records and an index, in a spawn process pool.

These are behaviour tests of the batch (what is written, kept, skipped and reported); the settings themselves are
checked against their standards in the study tests.
"""

from __future__ import annotations

import copy
import json
import os
import re
import signal
import subprocess
import sys
import time
import tomllib
import unicodedata
from pathlib import Path

import pytest

from machines.errors import InputError
from machines.files import dumps
from machines.files import safe_file_stem as safe_name
from wizard.batch import OUTCOMES, Outcome, output_names, run_batch, summary_line

pytest.importorskip("reports.sheet", reason="reports.sheet (build_sheet) is not in this checkout yet: the batch "
                                            "writes a sheet for every machine")

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"


@pytest.fixture(autouse=True)
def wide_terminal(monkeypatch):
    monkeypatch.setenv("COLUMNS", "250")  # rich folds long cells at the 80 columns of a pipe


def example(name: str) -> dict:
    return tomllib.loads((EXAMPLES / name).read_text("utf-8"))


def write(path: Path, data: dict) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(dumps(data), "utf-8")
    return path


@pytest.fixture
def plant(tmp_path) -> Path:
    """Five TOML files: three machines (two share a tag and revision), one broken, one that is not a machine."""
    src = tmp_path / "plant"
    chiller = example("chiller-compressor-motor.toml")
    pump = example("condenser-pump-motor.toml")
    pump["sheet"]["tag"] = "CW-P-201 <spare> & co"  # markup characters must print as written
    write(src / "north" / "chiller.toml", chiller)
    write(src / "south" / "chiller.toml", copy.deepcopy(chiller))  # same tag and revision as north/
    write(src / "pump.toml", pump)
    broken = copy.deepcopy(chiller)
    broken["sheet"]["tag"] = "CH-M-102"
    broken["machine"]["frequency"] = "60 V"
    write(src / "broken.toml", broken)
    (src / "tools.toml").write_text('[tool.something]\nname = "not a machine"\n', "utf-8")
    return src


def outputs(out: Path) -> list[str]:
    """The sheets, records and index in OUT (the hidden cache for the next run left out)."""
    return sorted(p.name for p in out.iterdir() if not p.name.startswith("."))


def test_batch_in_a_spawn_pool(plant, tmp_path, capsys):
    out = tmp_path / "out"
    code = run_batch(plant, out, workers=2)
    captured = capsys.readouterr()
    assert code == 2  # the worst outcome: one file with bad input
    assert outputs(out) == ["CH-M-101-rev1--north_chiller.json", "CH-M-101-rev1--north_chiller.pdf",
                            "CH-M-101-rev1--south_chiller.json", "CH-M-101-rev1--south_chiller.pdf",
                            "CW-P-201_spare_co-rev2.json", "CW-P-201_spare_co-rev2.pdf", "index.pdf"]
    text = captured.out
    assert "broken.toml" in text and "bad input" in text and "machine.frequency" in text
    assert "tools.toml" in text and "not a machine file" in text
    assert "3 machine files" not in text and "4 machine files" in text
    assert "Traceback" not in captured.out + captured.err
    record = json.loads((out / "CW-P-201_spare_co-rev2.json").read_text("utf-8"))
    assert record["tag"] == "CW-P-201 <spare> & co" and record["format"] == "relaywright.settings/1"
    assert (out / "CH-M-101-rev1--north_chiller.pdf").read_bytes()[:5] == b"%PDF-"


def index_text(out: Path) -> str:
    from pypdf import PdfReader

    text = " ".join(page.extract_text() for page in PdfReader(out / "index.pdf").pages)
    return " ".join(unicodedata.normalize("NFKC", text).split())


def test_index_lists_every_machine_file(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    text = index_text(out)
    record = json.loads((out / "CH-M-101-rev1--north_chiller.json").read_text("utf-8"))
    assert "CW-P-201 <spare> & co" in text
    assert text.count("CH-M-101") >= 2
    assert record["inputs_fingerprint"] in text.replace(" ", "")
    assert "broken.toml" in text and "bad input" in text
    assert "tools.toml" not in text
    assert "licensed engineer" in text  # the caution is on the index too
    assert b"/BaseFont /Helvetica" not in (out / "index.pdf").read_bytes()  # every font is embedded


def test_current_sheets_are_kept_unless_forced(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    before = {p: (out / p).stat().st_ino for p in outputs(out)}
    capsys.readouterr()
    assert run_batch(plant, out, workers=1) == 2
    again = {p: (out / p).stat().st_ino for p in outputs(out)}
    kept = {k: v for k, v in again.items() if k != "index.pdf"}
    assert kept == {k: v for k, v in before.items() if k != "index.pdf"}  # not one sheet or record rewritten
    assert "3 already current" in capsys.readouterr().out

    run_batch(plant, out, workers=1, force=True)
    forced = {p: (out / p).stat().st_ino for p in outputs(out)}
    assert all(forced[name] != before[name] for name in before)  # every file written anew (atomic rename)
    assert "already current" not in capsys.readouterr().out


def test_changed_machine_is_rebuilt_alone(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    before = {p: (out / p).stat().st_ino for p in outputs(out)}
    pump = tomllib.loads((plant / "pump.toml").read_text("utf-8"))
    pump["machine"]["rated_current"] = "54 A"
    write(plant / "pump.toml", pump)
    run_batch(plant, out, workers=1)
    after = {p: (out / p).stat().st_ino for p in outputs(out)}
    changed = sorted(name for name in before if after[name] != before[name])
    assert changed == ["CW-P-201_spare_co-rev2.json", "CW-P-201_spare_co-rev2.pdf", "index.pdf"]


def test_new_revision_keeps_the_earlier_sheet(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    pump = tomllib.loads((plant / "pump.toml").read_text("utf-8"))
    pump["sheet"]["revision"] = 3
    write(plant / "pump.toml", pump)
    run_batch(plant, out, workers=1)
    assert {"CW-P-201_spare_co-rev2.pdf", "CW-P-201_spare_co-rev3.pdf"} <= set(outputs(out))


def test_only_the_newest_revision_of_a_tag_is_built(tmp_path, capsys):
    src, out = tmp_path / "plant", tmp_path / "out"
    pump = example("condenser-pump-motor.toml")
    write(src / "pump.rev2.toml", pump)  # the file `relaywright revise` keeps beside revision 3
    pump["sheet"]["revision"] = 3
    write(src / "pump.toml", pump)
    assert run_batch(src, out, workers=1) == 0
    assert outputs(out) == ["CW-P-201-rev3.json", "CW-P-201-rev3.pdf", "index.pdf"]
    text = capsys.readouterr().out
    assert "pump.rev2.toml" in text and "older revision" in text and "revision 3 is in pump.toml" in text


def test_bad_input_keeps_the_previous_sheet(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    sheet = (out / "CW-P-201_spare_co-rev2.pdf").read_bytes()
    record = (out / "CW-P-201_spare_co-rev2.json").read_bytes()
    pump = tomllib.loads((plant / "pump.toml").read_text("utf-8"))
    pump["machine"]["rated_current"] = "52 V"
    write(plant / "pump.toml", pump)
    capsys.readouterr()
    assert run_batch(plant, out, workers=1) == 2
    assert "pump.toml" in capsys.readouterr().out
    assert (out / "CW-P-201_spare_co-rev2.pdf").read_bytes() == sheet
    assert (out / "CW-P-201_spare_co-rev2.json").read_bytes() == record
    assert not [p for p in out.iterdir() if p.name.endswith(".tmp")]


def test_issued_revision_is_not_replaced_by_other_inputs(plant, tmp_path, capsys):
    out = tmp_path / "out"
    pump = tomllib.loads((plant / "pump.toml").read_text("utf-8"))
    pump["sheet"].update(status="issued", checked_by="L. Brandt", checked_on="2026-11-25", approved_by="M. Sato",
                         approved_on="2026-11-26")  # issued: checked and approved, by whom and when
    write(plant / "pump.toml", pump)
    run_batch(plant, out, workers=1)
    sheet = (out / "CW-P-201_spare_co-rev2.pdf").read_bytes()
    pump["machine"]["rated_current"] = "54 A"
    write(plant / "pump.toml", pump)
    capsys.readouterr()
    assert run_batch(plant, out, workers=1, force=True) == 2
    assert "raise sheet.revision" in capsys.readouterr().out
    assert (out / "CW-P-201_spare_co-rev2.pdf").read_bytes() == sheet


def test_all_good_exits_zero(tmp_path, capsys):
    src = tmp_path / "plant"
    write(src / "pump.toml", example("condenser-pump-motor.toml"))
    (src / "other.toml").write_text('title = "a file of another tool"\n', "utf-8")
    assert run_batch(src, tmp_path / "out", workers=2) == 0  # one job: run in this process
    assert "1 other TOML file skipped" in capsys.readouterr().out


def test_unreadable_toml_is_bad_input_only_when_it_looks_like_a_machine_file(tmp_path, capsys):
    src = tmp_path / "plant"
    write(src / "pump.toml", example("condenser-pump-motor.toml"))
    (src / "cut.toml").write_text('format = "relaywright.machine/1"\n[sheet\ntag = "X"\n', "utf-8")
    (src / "other.toml").write_text("this is = = not toml\n", "utf-8")
    (src / "latin1.toml").write_bytes(b'name = "caf\xe9"\n')
    assert run_batch(src, tmp_path / "out", workers=1) == 2
    rows = {line.split()[0]: line for line in capsys.readouterr().out.splitlines() if ".toml" in line}
    assert "bad input" in rows["cut.toml"] and "not valid TOML" in rows["cut.toml"]
    assert "not a machine file" in rows["other.toml"] and "not a machine file" in rows["latin1.toml"]


def test_folder_without_toml_is_bad_input(tmp_path):
    with pytest.raises(InputError, match="no .toml files found"):
        run_batch(tmp_path, tmp_path / "out")
    with pytest.raises(InputError, match="expected a folder of machine files"):
        run_batch(tmp_path / "missing", tmp_path / "out")


def test_exit_code_is_the_worst_outcome():
    # README, exit codes: 0 done (warnings included), 1 a check failed, 2 bad input
    assert {s: code for s, (_, code, _) in OUTCOMES.items()} == {"skipped": 0, "older": 0, "ok": 0, "warn": 0,
                                                                  "fail": 1, "bad": 2}
    outcomes = [Outcome("a", "ok"), Outcome("b", "fail", failures=1), Outcome("c", "warn", warnings=2)]
    assert max(o.exit_code for o in outcomes) == 1
    assert summary_line(outcomes) == "3 machine files: 1 ok, 1 with warnings, 1 with failed checks, 0 bad input"


@pytest.mark.parametrize("tag", ["../../etc/passwd", "..", "a/b\\c", "C:\\x", "\x00evil", "..\u2024..", "/abs"])
def test_names_stay_inside_the_output_folder(tag):
    name = safe_name(tag)
    assert name and "/" not in name and "\\" not in name and ".." not in name and not name.startswith(".")
    assert Path("/out", f"{name}.pdf").resolve().parent == Path("/out")


def test_names_never_clash():
    items = [("a.toml", "M-1", 1), ("b.toml", "m-1", 1), ("c.toml", "index", 0), ("index.toml", "", 0),
             ("d.toml", "M-1/x", 1), ("e.toml", "M-1_x", 1)]
    names = output_names(items)
    assert len({n.lower() for n in names.values()}) == len(items)
    assert "index" not in {n.lower() for n in names.values()}


def make_many(src: Path, n: int) -> None:
    base = example("chiller-compressor-motor.toml")
    for i in range(n):
        data = copy.deepcopy(base)
        data["sheet"]["tag"] = f"CH-M-{200 + i}"
        write(src / f"m{i:03d}.toml", data)


def test_cli_batch_and_ctrl_c(tmp_path):
    src, out = tmp_path / "many", tmp_path / "out"
    make_many(src, 300)  # a whole run takes over a minute: Ctrl-C lands in the middle
    cmd = [sys.executable, "-m", "wizard.cli", "batch", str(src), "-o", str(out), "--workers", "2"]
    started = time.monotonic()
    # Ctrl-C as in a terminal: started from a shell without job control (`ci &`, nohup, cron) this test would
    # inherit an ignored SIGINT, which Python keeps ignored, as it should; the batch gets the default disposition.
    proc = subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            start_new_session=True, preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    deadline = started + 60
    while time.monotonic() < deadline and proc.poll() is None and not (out.is_dir() and any(out.glob("*.json"))):
        time.sleep(0.02)
    assert proc.poll() is None, f"the batch ended before Ctrl-C: {proc.communicate()[1]}"
    sent = time.monotonic() - started
    os.killpg(proc.pid, signal.SIGINT)  # what Ctrl-C in a terminal does: the whole process group
    stdout, stderr = proc.communicate(timeout=60)
    assert proc.returncode == 130, f"Ctrl-C sent {sent:.1f} s after the start; {stderr}"
    stopped = re.search(r"stopped: (\d+) of 300 machine files were done", stderr)
    assert stopped and int(stopped[1]) < 300, stderr
    assert "Traceback" not in stderr + stdout and "exception" not in stderr
    assert not list(out.glob(".*.tmp"))
    for record in out.glob("*.json"):  # every record written stands beside its finished sheet
        assert json.loads(record.read_text("utf-8"))["tag"].startswith("CH-M-")
        assert record.with_suffix(".pdf").read_bytes()[-6:].strip().endswith(b"%%EOF")
    assert no_process_left(proc.pid)


def no_process_left(session: int, wait: float = 5.0) -> bool:
    """No process of the session is left (the pool's resource tracker ends just after the main process)."""
    deadline = time.monotonic() + wait
    while time.monotonic() < deadline:
        if subprocess.run(["pgrep", "-s", str(session)], capture_output=True).stdout == b"":
            return True
        time.sleep(0.05)
    return False


def test_cli_batch_reports_in_one_line(plant, tmp_path):
    result = subprocess.run([sys.executable, "-m", "wizard.cli", "batch", str(plant / "pump.toml"), "-o",
                             str(tmp_path / "out")], cwd=ROOT, capture_output=True, text=True, timeout=60)
    assert result.returncode == 2
    assert result.stderr.strip().splitlines()[0].startswith("error: ")
    assert "expected a folder of machine files" in result.stderr and "Traceback" not in result.stderr


def die_on_pump(task):
    """A job for the pool that kills its own worker on one file, as the out-of-memory killer would."""
    from wizard.batch import process_machine

    if task.path == "pump.toml":
        os._exit(9)
    return process_machine(task)


def test_a_dying_worker_is_reported_not_waited_for(plant, tmp_path):
    from wizard.batch import _run_pool, plan_batch

    out = tmp_path / "out"
    out.mkdir()
    plan = plan_batch(plant, out)
    outcomes = []
    started = time.monotonic()
    _run_pool(plan.tasks, 2, outcomes.append, job=die_on_pump)
    assert time.monotonic() - started < 30
    by_path = {o.path: o for o in outcomes}
    assert sorted(by_path) == sorted(t.path for t in plan.tasks)
    assert by_path["pump.toml"].status == "bad" and "worker process stopped" in by_path["pump.toml"].message
    assert by_path["north/chiller.toml"].status in ("ok", "warn")
    assert not (out / "CW-P-201_spare_co-rev2.pdf").exists()



def die_once_on_pump(task):
    """A job whose worker dies the first time it takes pump.toml (a marker file remembers), then works."""
    from wizard.batch import process_machine

    marker = Path(task.out) / ".died-once"
    if task.path == "pump.toml" and not marker.exists():
        marker.write_text("x")
        os._exit(9)
    return process_machine(task)


def test_a_file_whose_worker_died_is_tried_once_more(plant, tmp_path):
    from wizard.batch import _run_pool, plan_batch

    out = tmp_path / "out"
    out.mkdir()
    plan = plan_batch(plant, out)
    outcomes = []
    _run_pool(plan.tasks, 2, outcomes.append, job=die_once_on_pump)
    by_path = {o.path: o for o in outcomes}
    assert len(outcomes) == len(plan.tasks) == len(by_path)  # one outcome per file, none twice
    assert by_path["pump.toml"].status in ("ok", "warn") and (out / "CW-P-201_spare_co-rev2.pdf").is_file()


def test_a_worker_killed_from_outside_loses_no_file(tmp_path):
    # issue: every replaced worker was counted as a lost task, so a healthy file was dropped; a worker killed at
    # any moment (idle, starting, or holding a file) now costs at most one retry of the file it held
    import threading
    from multiprocessing import active_children

    from wizard.batch import _run_pool, plan_batch

    src, out = tmp_path / "many", tmp_path / "out"
    make_many(src, 6)
    out.mkdir()
    plan = plan_batch(src, out)
    outcomes = []

    def kill_one():
        children = [p for p in active_children() if p.name.startswith("SpawnProcess")]
        if children:
            os.kill(children[0].pid, signal.SIGKILL)

    for delay in (0.05, 1.5):  # while starting, and while studying
        outcomes.clear()
        timer = threading.Timer(delay, kill_one)
        timer.start()
        _run_pool(plan.tasks, 2, outcomes.append)
        timer.cancel()
        assert sorted(o.path for o in outcomes) == sorted(t.path for t in plan.tasks)
        assert all(o.status != "bad" for o in outcomes), [(o.path, o.status, o.message) for o in outcomes]


def test_names_keep_the_revision_of_a_long_tag():
    # issue: names were cut at 80 characters, so revision 2 of a long tag took revision 1's name
    long = "HARBOURSIDE-NORTH-HALL-CHILLER-PLANT-" * 5
    names = output_names([("a.toml", long, 1), ("b.toml", long, 2), ("c.toml", long + "X", 1)])
    assert names["a.toml"].endswith("-rev1") and names["b.toml"].endswith("-rev2")
    assert len(set(names.values())) == 3 and all(len(n.encode()) <= 150 for n in names.values())
    twins = output_names([("x/a.toml", long, 1), ("y/a.toml", long, 1)])
    assert len(set(twins.values())) == 2 and all("-rev1--" in n for n in twins.values())


def test_a_re_run_reads_no_unchanged_file_and_keeps_the_index(plant, tmp_path, capsys, monkeypatch):
    import wizard.batch as batch

    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    index = (out / "index.pdf").stat().st_ino
    parsed = []
    real = batch.Task

    def spy(*args, **kwargs):
        parsed.append(args[0])
        return real(*args, **kwargs)

    monkeypatch.setattr(batch, "Task", spy)
    capsys.readouterr()
    assert run_batch(plant, out, workers=1) == 2  # the broken file is still bad input
    assert parsed == ["broken.toml"]  # only the bad file is read again: the cache knew the others
    assert (out / "index.pdf").stat().st_ino == index  # nothing changed: the index is not rebuilt
    assert "3 already current" in capsys.readouterr().out
    # a changed file is studied again, alone, and the index follows
    pump = tomllib.loads((plant / "pump.toml").read_text("utf-8"))
    pump["machine"]["rated_current"] = "54 A"
    write(plant / "pump.toml", pump)
    run_batch(plant, out, workers=1)
    assert parsed[1:] == ["broken.toml", "pump.toml"] and (out / "index.pdf").stat().st_ino != index


def test_a_deleted_output_is_rebuilt_even_when_its_file_is_unchanged(plant, tmp_path, capsys):
    out = tmp_path / "out"
    run_batch(plant, out, workers=1)
    (out / "CW-P-201_spare_co-rev2.pdf").unlink()
    run_batch(plant, out, workers=1)
    assert (out / "CW-P-201_spare_co-rev2.pdf").is_file()


def test_a_full_disk_names_the_file_and_keeps_the_summary(plant, tmp_path, capsys, monkeypatch):
    # issue: "error: : No space left on device", and the per-file summary was lost
    import errno

    out = tmp_path / "out"

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    assert run_batch(plant, out, workers=1) == 2
    text = capsys.readouterr().out
    assert "No space left on device" in text and "north/chiller.toml" in text and "pump.toml" in text
    assert "CW-P-201_spare_co-rev2.pdf: cannot write (No space left on device)" in " ".join(text.split())
    assert "index not written" in text
    assert not [p for p in out.iterdir() if p.name.endswith(".tmp")]


def test_a_read_only_output_folder_keeps_the_summary(plant, tmp_path, capsys, monkeypatch):
    # issue: a read-only output folder lost the per-file summary (simulated: the tests may run as root, for
    # whom no folder is read-only; tests/test_data_safety.py has the real one for other users)
    import errno
    import tempfile

    def refused(*args, **kwargs):
        raise PermissionError(errno.EACCES, "Permission denied")

    out = tmp_path / "out"
    out.mkdir()
    monkeypatch.setattr(tempfile, "mkstemp", refused)
    assert run_batch(plant, out, workers=1) == 2
    text = " ".join(capsys.readouterr().out.split())
    for name in ("north/chiller.toml", "south/chiller.toml", "pump.toml", "broken.toml"):
        assert name in text
    assert "cannot write here (Permission denied); nothing was written" in text and "index not written" in text
    assert outputs(out) == []
