"""Machine files: validation errors name the key path; round trips keep model and fingerprint; writes are safe."""

from __future__ import annotations

import tomllib

import pytest

from machines.errors import InputError
from machines.files import case_from_dict, dumps, load_case, write_machine_file
from machines.record import inputs_fingerprint

from conftest import EXAMPLES

MOTOR = EXAMPLES / "chiller-compressor-motor.toml"


def motor_data() -> dict:
    return tomllib.loads(MOTOR.read_text("utf-8"))


def edited(path: str, value=..., delete: bool = False) -> dict:
    """The example motor with one key changed (``a.b.c``) or deleted."""
    data = motor_data()
    *parents, last = path.split(".")
    table = data
    for p in parents:
        table = table.setdefault(p, {})
    if delete:
        del table[last]
    else:
        table[last] = value
    return data


def test_every_example_reads_and_validates():
    files = sorted(EXAMPLES.glob("*.toml"))
    assert len(files) >= 3
    for f in files:
        case, warnings = load_case(f)
        assert case.sheet.tag


@pytest.mark.parametrize("path, value, key, message", [
    ("machine.rated_current", "96 V", "machine.rated_current", r"is a voltage; expected a current"),
    ("machine.rated_voltage", "4,16 kV", "machine.rated_voltage", r"commas are not accepted"),
    ("machine.rated_speed", "1788 Hz", "machine.rated_speed", r"not Hz"),
    ("machine.rated_speed", "1830 rpm", "machine.rated_speed", r"below synchronous speed \(1800 rpm"),
    ("machine.rated_voltage", "4.16 MV", "machine.rated_voltage", r"not plausible"),
    ("machine.locked_rotor_current", "1.5 pu", "machine.locked_rotor_current", r"at least 2 pu"),
    ("machine.safe_stall_time_hot", "30 s", "machine.safe_stall_time_hot", r"at most the cold safe stall time"),
    ("machine.kind", "induction-moter", "machine.kind", r"did you mean 'induction-motor'"),
    ("machine.rated_curent", "96 A", "machine.rated_curent", r"unknown key \(did you mean 'rated_current'\?\)"),
    ("supply.starter", "contactor", "supply.starter", r"expected one of breaker, fused-contactor"),
    ("instruments.phase_ct", "0/5 A", "instruments.phase_ct", r"positive primary and secondary"),
    ("instruments.phase_ct", "250-5", "instruments.phase_ct", r"expected a ratio such as '200/1 A'"),
    ("instruments.vt", "4200/120 A", "instruments.vt", r"ratio in V"),
    ("machine.starts_cold", 2.5, "machine.starts_cold", r"expected a whole number"),
    ("machine.locked_rotor_code", "I", "machine.locked_rotor_code", r"NEMA MG 1 code letter"),
    ("instruments.phase_ct_class", "50/5", "instruments.phase_ct_class", r"IEEE C57.13 relaying class"),
    # IEEE C57.13: C-class voltages are 10, 20, 50, 100, 200, 400 and 800 V only
    ("instruments.phase_ct_class", "C250", "instruments.phase_ct_class", r"IEEE C57.13 relaying class"),
    ("sheet.tag", 101, "sheet.tag", r"expected text"),
    ("machine.efficiency", "nan", "machine.efficiency", r"not a finite number"),
    ("load.inertia", "-3 kg*m^2", "load.inertia", r"negative value is impossible"),
    ("format", "relaywright.machine/2", "format", r'expected "relaywright.machine/1"'),
    ("colour", "red", "colour", r"unknown key"),
    ("overrides", {"49.pickup current": "100 A"}, "overrides.49.pickup current", r"expected a key like"),
])
def test_each_error_names_its_key(path, value, key, message):
    with pytest.raises(InputError, match=message) as err:
        case_from_dict(edited(path, value))
    assert str(err.value).startswith(key + ":")
    assert "\n" not in str(err.value)


@pytest.mark.parametrize("path, key", [
    ("machine.rated_voltage", "machine.rated_voltage"),
    ("sheet.tag", "sheet.tag"),
    ("instruments.phase_ct", "instruments.phase_ct"),
    ("grounding", "grounding"),
])
def test_missing_required_key_is_named(path, key):
    with pytest.raises(InputError, match="missing") as err:
        case_from_dict(edited(path, delete=True))
    assert str(err.value).startswith(key + ":")


def test_no_locked_rotor_data_at_all():
    data = edited("machine.locked_rotor_current", delete=True)
    with pytest.raises(InputError, match=r"^machine.locked_rotor_current: .*neither"):
        case_from_dict(data)


def test_rated_current_far_from_computed_is_a_warning():
    case, warnings = case_from_dict(edited("machine.rated_current", "240 A"))
    assert any("machine.rated_current" in w and "differs" in w for w in warnings)


def test_same_machine_in_other_units_has_the_same_fingerprint():
    a, _ = case_from_dict(motor_data())
    other = edited("machine.rated_voltage", "4160 V")
    other["machine"]["rated_output"] = "1118.549807 kW"
    other["load"]["inertia"] = "67.42417615 kg*m^2"
    other["supply"]["fault_level"] = "250000 kVA"
    other["machine"]["locked_rotor_current"] = "1153.2 A"  # 6.2 pu of 186 A
    b, _ = case_from_dict(other)
    assert inputs_fingerprint(a) == inputs_fingerprint(b)


def test_key_order_does_not_change_the_fingerprint():
    data = motor_data()
    shuffled = {k: (dict(reversed(list(v.items()))) if isinstance(v, dict) else v)
                for k, v in reversed(list(data.items()))}
    assert inputs_fingerprint(case_from_dict(data)[0]) == inputs_fingerprint(case_from_dict(shuffled)[0])


def test_sheet_names_do_not_change_the_fingerprint_but_inputs_do():
    base = inputs_fingerprint(case_from_dict(motor_data())[0])
    assert inputs_fingerprint(case_from_dict(edited("sheet.checked_by", "Someone Else"))[0]) == base
    assert inputs_fingerprint(case_from_dict(edited("machine.rated_current", "187 A"))[0]) != base


def test_round_trip_write_read_gives_the_same_model_and_fingerprint(tmp_path):
    data = motor_data()
    target = tmp_path / "m.toml"
    write_machine_file(target, data)
    a, _ = case_from_dict(data)
    b, _ = load_case(target)
    assert a == b
    assert inputs_fingerprint(a) == inputs_fingerprint(b)


def test_write_refuses_to_replace_a_higher_revision(tmp_path):
    target = tmp_path / "m.toml"
    newer = edited("sheet.revision", 5)
    write_machine_file(target, newer)
    before = target.read_bytes()
    with pytest.raises(InputError, match="holds revision 5, newer than the revision 1"):
        write_machine_file(target, motor_data())
    assert target.read_bytes() == before


def test_invalid_data_is_never_written(tmp_path):
    target = tmp_path / "m.toml"
    write_machine_file(target, motor_data())
    before = target.read_bytes()
    with pytest.raises(InputError):
        write_machine_file(target, edited("machine.rated_current", "96 V"))
    assert target.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["m.toml"]  # no temporary file left behind


@pytest.mark.parametrize("content, message", [
    (b"format = \"relaywright.machine/1\"\n[machine\n", r"not valid TOML"),
    (b"\xff\xfe garbage", r"expected UTF-8 text"),
    (b"", r"bad.toml: format: expected"),
    (b'format = "relaywright.machine/1"\n[[machine]]\nkind = 1\n', r"machine: expected a table"),
])
def test_broken_files(tmp_path, content, message):
    p = tmp_path / "bad.toml"
    p.write_bytes(content)
    with pytest.raises(InputError, match=message):
        load_case(p)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_case(tmp_path / "none.toml")
    with pytest.raises(InputError, match="got a folder"):
        load_case(tmp_path)


def test_dumps_is_readable_toml():
    text = dumps(motor_data())
    assert tomllib.loads(text) == motor_data()


def test_written_files_have_ordinary_permissions(tmp_path):
    target = tmp_path / "m.toml"
    write_machine_file(target, motor_data())
    assert target.stat().st_mode & 0o044  # readable by group/others as the umask allows, not 0600
    target.chmod(0o640)
    write_machine_file(target, motor_data())
    assert target.stat().st_mode & 0o777 == 0o640  # an existing file keeps its mode


def test_ct_classes_of_both_families_are_read_and_normalised():
    # IEEE C57.13 relaying classes and IEC 61869-2 protective classes (accuracy class P, accuracy limit factor)
    assert case_from_dict(edited("instruments.phase_ct_class", "c 400"))[0].instruments.phase_ct_class == "C400"
    iec = case_from_dict(edited("instruments.phase_ct_class", "5p20 15 VA"))[0]
    assert iec.instruments.phase_ct_class == "5P20 15 VA"


def test_an_iec_ct_class_gives_a_warning_not_an_error():
    from machines.study import run_study

    case, warnings = case_from_dict(edited("instruments.phase_ct_class", "5P20"))
    record = run_study(case, warnings)
    assert any("IEC 61869-2" in c.message and c.status == "warn" for _, c in record.all_checks())


# ---------------------------------------------------------------------------------------------------- reading and
# writing files safely: regular files only, a size limit before reading, links written through, errors naming the
# file


def test_only_regular_files_are_read(tmp_path):
    import os

    from machines.files import read_bytes

    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    with pytest.raises(InputError, match=r"pipe.toml: expected a machine file \(.toml\), got a named pipe"):
        read_bytes(fifo)  # would block for ever if it were opened
    with pytest.raises(InputError, match="got a device; only regular files are read"):
        read_bytes("/dev/zero")
    dangling = tmp_path / "gone.toml"
    dangling.symlink_to(tmp_path / "nowhere.toml")
    with pytest.raises(InputError, match=r"no such file \(a symbolic link to nothing\)"):
        read_bytes(dangling)
    big = tmp_path / "big.toml"
    big.write_bytes(b"#" * 2_000)
    with pytest.raises(InputError, match="of at most 1 kB, got 2000 bytes"):
        read_bytes(big, limit=1_000)


def test_a_full_disk_names_the_file_and_leaves_it_as_it_was(tmp_path, monkeypatch):
    # issue: "error: : No space left on device" named no file
    import errno
    import os

    from machines.files import write_atomic

    target = tmp_path / "m.toml"
    target.write_text("old", "utf-8")

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    with pytest.raises(InputError) as err:
        write_atomic(target, "new")
    assert str(err.value) == f"{target}: cannot write (No space left on device); it was left as it was"
    assert target.read_text("utf-8") == "old" and [p.name for p in tmp_path.iterdir()] == ["m.toml"]


def test_a_link_is_written_through_or_refused(tmp_path):
    from machines.files import write_atomic

    real = tmp_path / "store" / "m.toml"
    real.parent.mkdir()
    real.write_text("old", "utf-8")
    link = tmp_path / "m.toml"
    link.symlink_to(real)
    write_atomic(link, "new")
    assert link.is_symlink() and real.read_text("utf-8") == "new"
    with pytest.raises(InputError, match="is a symbolic link; it is not replaced"):
        write_atomic(link, "other", follow_symlinks=False)
    assert real.read_text("utf-8") == "new"


def test_a_pipe_is_never_written_over(tmp_path):
    import os

    from machines.files import write_atomic

    fifo = tmp_path / "x.pdf"
    os.mkfifo(fifo)
    with pytest.raises(InputError, match="is a named pipe .FIFO., not a regular file"):
        write_atomic(fifo, b"%PDF-")


def test_write_machine_file_through_a_link_keeps_the_link(tmp_path):
    real = tmp_path / "store" / "m.toml"
    real.parent.mkdir()
    write_machine_file(real, motor_data())
    link = tmp_path / "m.toml"
    link.symlink_to(real)
    write_machine_file(link, edited("sheet.revision", 2))
    assert link.is_symlink() and load_case(real)[0].sheet.revision == 2
