"""Test-set files (``relaywright comtrade``), read back with an independent COMTRADE reader (the ``comtrade``
package from PyPI) and checked against the record they were written from.

Reference checks: the RMS value of a sampled sine over whole cycles, its phase by a least-squares fit at the known
frequency, and the symmetrical components by Fortescue's definition (C. L. Fortescue, "Method of symmetrical
co-ordinates applied to the solution of polyphase networks", AIEE Trans. 37, 1918): X0 = (Xa + Xb + Xc)/3,
X1 = (Xa + a·Xb + a²·Xc)/3, X2 = (Xa + a²·Xb + a·Xc)/3, a = 1∠120°, computed here with numpy, not with the
project's own function. File layout: IEEE Std C37.111-2013 (as the reader implements it).
"""

from __future__ import annotations

import copy
import csv
import math
from pathlib import Path

import numpy as np
import pytest

comtrade = pytest.importorskip("comtrade")  # the test extra

from machines.errors import InputError  # noqa: E402
from machines.files import load_case  # noqa: E402
from machines.protection.base import balanced, from_sequence, single  # noqa: E402
from machines.study import run_study  # noqa: E402
from reports import waveforms  # noqa: E402
from reports.comtrade import cfg_text, dat_bytes  # noqa: E402
from wizard.comtrade_command import PLAN_NAME, make_comtrade  # noqa: E402

from conftest import EXAMPLES, run_cli  # noqa: E402

A = np.exp(2j * np.pi / 3)
SMALL_FILE = 2_500_000  # .dat files up to this size are read in full (the others: .cfg and size, and a sample)


# ---------------------------------------------------------------------------------------------------- reading


def load(cfg: Path):
    c = comtrade.Comtrade(use_numpy_arrays=True, use_double_precision=True, ignore_warnings=True)
    c.load(str(cfg))
    return c


def window(c, start: float, seconds: float) -> slice:
    """Samples from ``start`` for ``seconds`` [s] (uniformly sampled: inside one rate segment)."""
    t = np.asarray(c.time)
    i0 = int(np.searchsorted(t, start - 1e-9))
    i1 = int(np.searchsorted(t, start + seconds - 1e-9))
    return slice(i0, i1)


def rms(c, ch: int, sl: slice) -> float:
    x = np.asarray(c.analog[ch])[sl]
    return float(np.sqrt(np.mean(x * x)))


def fitted(c, ch: int, sl: slice, f: float) -> complex:
    """RMS phasor of channel ``ch`` at frequency ``f``: least-squares fit of a·cos(ωt) + b·sin(ωt)."""
    t = np.asarray(c.time)[sl]
    x = np.asarray(c.analog[ch])[sl]
    m = np.column_stack([np.cos(2 * np.pi * f * t), np.sin(2 * np.pi * f * t)])
    (a, b), *_ = np.linalg.lstsq(m, x, rcond=None)
    return complex(a, -b) / math.sqrt(2.0)


def fortescue(xa: complex, xb: complex, xc: complex) -> np.ndarray:
    return np.array([(xa + xb + xc) / 3, (xa + A * xb + A * A * xc) / 3, (xa + A * A * xb + A * xc) / 3])


def phasors(items) -> list[complex]:
    return [complex(np.exp(1j * np.radians(p["angle"])) * p["magnitude"]) for p in items]


def ratio(text: str) -> tuple[float, float]:
    primary, secondary = text.split()[0].split("/")
    return float(primary), float(secondary)


def angle_diff(a: float, b: float) -> float:
    return abs((a - b + 180.0) % 360.0 - 180.0)


# ---------------------------------------------------------------------------------------------------- the five examples


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    """Every example's record and its test-set folder, written by the command."""
    out = {}
    for path in sorted(EXAMPLES.glob("*.toml")):
        case, warnings = load_case(path)
        record = run_study(case, warnings).to_json()
        folder = tmp_path_factory.mktemp(path.stem)
        make_comtrade(path, output=folder)
        out[path.stem] = (record, folder)
    return out


def _test_points(record):
    return [(f["id"], tp) for f in record["functions"] for tp in f["test_points"]]


def _check_injection(c, tp, record):
    """RMS, angles and sequence components of the injection against the test point."""
    f = tp.get("frequency") or (tp["applied"] if tp["applied_unit"] == "Hz" else c.frequency)
    t0 = c.trigger_time
    sl = window(c, t0 + 0.05, min(30.0 / f, c.time[-1] - t0 - 0.06))
    names = list(c.analog_channel_ids)
    sets = [(tp.get("phases"), None), (tp.get("voltage_phases"), "V"), (tp.get("current_phases"), "I")]
    checked = 0
    for items, kind in sets:
        if items is None:
            continue
        if kind is None:
            unit = tp["applied_unit"]
            if unit not in ("A", "V"):  # a power or impedance test: phases are the currents (record convention)
                unit = "A"
            if tp["input"] in ("ground", "neutral"):
                chans = [names.index("IN" if unit == "A" else "VN")]
                items = items[:1]
            else:
                chans = [names.index(("I" if unit == "A" else "V") + p) for p in "ABC"]
        else:
            first = [n for n in names if n in (kind + "A", kind + "A2")]
            chans = [names.index(first[-1].replace("A", p, 1)) for p in "ABC"] if len(first) else []
        # a harmonic is on the quantity under test only; a frequency change moves every channel
        at = f if kind is None or round(f / c.frequency) < 2 else c.frequency
        expected = phasors(items)
        got = [fitted(c, ch, sl, at) for ch in chans]
        top = max(abs(x) for x in expected)
        for ch, x, g in zip(chans, expected, got):
            # RMS of the samples over the window (about 30 whole cycles) = the test point's magnitude, within 1 %
            assert rms(c, ch, sl) == pytest.approx(abs(x), rel=0.01, abs=0.01 * top), (tp["id"], names[ch])
            if abs(x) > 0.01 * top:
                ref = next(i for i, v in enumerate(expected) if abs(v) > 0.01 * top)
                want = np.degrees(np.angle(x) - np.angle(expected[ref]))
                have = np.degrees(np.angle(g) - np.angle(got[ref]))
                assert angle_diff(have, want) < 1.0, (tp["id"], names[ch])
        if len(chans) == 3:
            seq_want, seq_got = np.abs(fortescue(*expected)), np.abs(fortescue(*got))
            assert seq_got == pytest.approx(seq_want, abs=0.01 * top), tp["id"]
            if "negative-sequence" in tp["quantity"] and kind is None:  # the quantity under test only
                assert seq_got[2] == pytest.approx(tp["applied"], rel=0.01), tp["id"]
        checked += 1
    assert checked, tp["id"]


def test_every_file_of_the_five_examples_loads_and_plays_its_test_point(written):
    loaded = 0
    for stem, (record, folder) in written.items():
        instruments = record["inputs"]["instruments"]
        rows = list(csv.reader((folder / PLAN_NAME).open(encoding="utf-8", newline="")))
        by_id = {r[0]: r for r in rows[1:]}
        file_col = rows[0].index("file")
        for fid, tp in _test_points(record):
            name = by_id[tp["id"]][file_col]
            if not name:
                continue
            cfg = comtrade.Cfg(ignore_warnings=True)
            cfg.load(str(folder / name))
            assert (cfg.station_name, cfg.rev_year) == (record["tag"], "2013")
            assert cfg.rec_dev_id.startswith("relaywright")
            assert cfg.ft in ("BINARY", "BINARY32")
            dat = folder / name.replace(".cfg", ".dat")
            per_sample = 8 + cfg.analog_count * (4 if cfg.ft == "BINARY32" else 2)
            assert dat.stat().st_size == cfg.sample_rates[-1][1] * per_sample <= 20_000_000
            # every rate at least 20 samples a cycle of the injection frequency
            f = tp.get("frequency") or cfg.frequency
            assert min(r for r, _ in cfg.sample_rates) >= 20 * max(f, cfg.frequency)
            for ch in cfg.analog_channels:
                key = {"I": "phase_ct", "V": "vt"}.get(ch.name[0]) if tp["input"] in ("phase", None) else None
                if key and key in instruments and ch.name[1:] in ("A", "B", "C"):
                    assert (ch.primary, ch.secondary) == ratio(instruments[key]) and ch.pors == "S"
            if dat.stat().st_size > SMALL_FILE:
                continue
            c = load(folder / name)
            loaded += 1
            assert c.trigger_time >= 1.0
            te = tp["expected_time"]
            played = c.time[-1] - c.trigger_time
            if te is not None:
                assert played >= te + max(1.0, 0.2 * te) - 1e-3, tp["id"]
            elif tp.get("duration"):
                assert played >= tp["duration"] - 1e-3
            _check_injection(c, tp, record)
    assert loaded >= 5 * len(written)  # the smaller files in full; the rest: .cfg, size and the long-test sample


def test_a_long_thermal_test_uses_a_lower_rate_in_the_middle_and_stays_under_20_mb(written):
    record, folder = written["chiller-compressor-motor"]
    tp = next(tp for fid, tp in _test_points(record) if tp["id"] == "49.1")
    name = folder / "CH-M-101-rev1-49.1.cfg"
    c = load(name)
    rates = [r for r, _ in c.cfg.sample_rates]
    assert len(rates) == 3 and rates[1] < rates[0] == rates[2] and rates[1] >= 20 * c.frequency
    assert name.with_suffix(".dat").stat().st_size <= 20_000_000
    te, tol = tp["expected_time"], tp["tolerance_time"]
    assert c.time[-1] - c.trigger_time >= te + max(1.0, 0.2 * te) - 1e-3
    # the middle segment and the operate window both carry the test point's magnitude
    for start in (c.trigger_time + 100.0, c.trigger_time + te - tol):
        sl = window(c, start, 0.5)
        for ch in range(3):
            assert rms(c, ch, sl) == pytest.approx(tp["phases"][ch]["magnitude"], rel=0.01)


def test_pre_test_is_the_initial_state(written):
    record, folder = written["chiller-compressor-motor"]
    healthy = 4160.0 / math.sqrt(3.0) * 120.0 / 4200.0  # nominal 4.16 kV on a 4200/120 V VT, phase-to-neutral
    c = load(folder / "CH-M-101-rev1-27.2.cfg")
    sl = window(c, 0.1, 0.5)
    for ch in range(3):
        assert rms(c, ch, sl) == pytest.approx(healthy, rel=0.01)
    c = load(folder / "CH-M-101-rev1-51LR.2.cfg")  # no prefault in the record: no current before the test
    assert max(rms(c, ch, window(c, 0.0, 0.99)) for ch in range(3)) == 0.0


def test_starts_follow_the_start_profile_and_the_stall_holds_past_the_51lr_delay(written):
    for stem, (record, folder) in written.items():
        profiles = record["start_profiles"]
        if not profiles:
            continue
        ct = ratio(record["inputs"]["instruments"]["phase_ct"])
        for p in profiles:
            c = load(folder / f"{record['tag']}-rev{record['revision']}-start-{p['label']}.cfg")
            t, i = np.asarray(p["time"]), np.asarray(p["current"]) * ct[1] / ct[0]
            cycle = 1.0 / c.frequency
            for at in np.linspace(0.05, 0.95, 10) * t[-1]:
                sl = window(c, c.trigger_time + at - cycle / 2, cycle)
                tt = np.asarray(c.time)[sl] - c.trigger_time
                want = math.sqrt(float(np.mean(np.interp(tt, t, i) ** 2)))  # the profile's RMS over the cycle
                for ch in range(3):
                    assert rms(c, ch, sl) == pytest.approx(want, rel=0.02), (stem, p["label"], at)
        lowest = min(profiles, key=lambda p: p["voltage"])
        c = load(folder / f"{record['tag']}-rev{record['revision']}-stall.cfg")
        delay = next(f for f in record["functions"] if f["id"] == "51LR")["settings"]["time_delay"]["value"]
        assert c.time[-1] - c.trigger_time >= delay + max(1.0, 0.2 * delay) - 1e-3
        sl = window(c, c.trigger_time + delay, 10 * cycle)
        for ch in range(3):
            assert rms(c, ch, sl) == pytest.approx(lowest["current"][0] * ct[1] / ct[0], rel=0.01)


def test_the_plan_has_one_row_per_test_point(written):
    for stem, (record, folder) in written.items():
        raw = (folder / PLAN_NAME).read_bytes()
        assert not raw.startswith(b"\xef\xbb\xbf") and b"\r\n" in raw  # UTF-8 without BOM, CRLF rows (RFC 4180)
        rows = list(csv.DictReader(raw.decode("utf-8").splitlines()))
        points = _test_points(record)
        assert [r["id"] for r in rows] == [tp["id"] for _, tp in points]
        for r, (fid, tp) in zip(rows, points):
            assert r["function"] == fid
            assert (r["file"] == "") == (r["note"] != "")
            if r["file"]:
                assert (folder / r["file"]).is_file() and (folder / r["file"]).with_suffix(".dat").is_file()
                assert float(r["A magnitude"] or r["VA [V]"] or r["IA [A]"]) >= 0
            if tp["expected_time"] is not None:
                assert float(r["accepted from [s]"]) <= tp["expected_time"] <= float(r["accepted to [s]"])


def test_no_file_over_20_mb_and_headers_carry_the_caution(written):
    for stem, (record, folder) in written.items():
        for dat in folder.glob("*.dat"):
            assert dat.stat().st_size <= 20_000_000
        for hdr in folder.glob("*.hdr"):
            assert "licensed engineer" in hdr.read_text("utf-8")


# ---------------------------------------------------------------------------------------------------- the command


def test_command_refuses_to_replace_and_leaves_the_machine_file_alone(tmp_path):
    machine = EXAMPLES / "small-hydro-generator.toml"
    before = machine.read_bytes()
    out = tmp_path / "out"
    first = run_cli("comtrade", str(machine), "-o", str(out))
    assert first.returncode in (0, 1), first.stderr
    assert "licensed engineer" in first.stdout
    names = sorted(p.name for p in out.iterdir())
    assert PLAN_NAME in names and any(n.endswith(".cfg") for n in names)
    stamps = {p.name: p.stat().st_mtime_ns for p in out.iterdir()}
    with pytest.raises(InputError, match="already exists.*nothing was written.*--force"):  # the CLI: exit 2
        make_comtrade(machine, output=out)
    assert {p.name: p.stat().st_mtime_ns for p in out.iterdir()} == stamps
    assert make_comtrade(machine, output=out, force=True) == first.returncode
    assert sorted(p.name for p in out.iterdir()) == names
    assert machine.read_bytes() == before


def test_output_that_is_a_file_is_refused(tmp_path):
    target = tmp_path / "plan"
    target.write_text("keep me")
    with pytest.raises(InputError, match="expected a folder"):
        make_comtrade(EXAMPLES / "small-hydro-generator.toml", output=target)
    assert target.read_text() == "keep me"


def test_the_record_is_not_changed():
    case, warnings = load_case(EXAMPLES / "chiller-compressor-motor.toml")
    record = run_study(case, warnings).to_json()
    kept = copy.deepcopy(record)
    entries, extras, _ = waveforms.waveform_set(record)
    for d in [e.design for e in entries if e.design] + extras:
        assert d.stem.startswith("CH-M-101-rev1-")
    assert record == kept


# ---------------------------------------------------------------------------------------------------- any test point


@pytest.fixture(scope="module")
def base_record():
    case, warnings = load_case(EXAMPLES / "chiller-compressor-motor.toml")
    return run_study(case, warnings).to_json()


def tp_of(**kw) -> dict:
    out = {"quantity": "current", "applied": 1.0, "applied_unit": "A", "expected_time": 2.0, "tolerance_time": 0.1,
           "secondary": True, "initial_state": "", "description": "made-up test", "id": "99.1", "input": "phase",
           "phases": balanced(1.0), "voltage_phases": None, "current_phases": None, "frequency": None,
           "duration": None, "prefault": None, "tolerance_rule": ""}
    out.update(kw)
    return out


def play(record: dict, tp: dict, tmp_path: Path):
    """Design, write and read back one test point of a record."""
    system = waveforms.system_of(record)
    d = waveforms.design_test(record, "99", tp, system, "x-rev1-99.1")
    rec = waveforms.render(d, record["tag"], "relaywright test", waveforms.start_date(record), system.frequency)
    (tmp_path / "x.dat").write_bytes(dat_bytes(rec))
    (tmp_path / "x.cfg").write_text(cfg_text(rec), encoding="utf-8", newline="")
    return load(tmp_path / "x.cfg"), d


def test_a_negative_sequence_test_carries_its_i2(base_record, tmp_path):
    # I1 = FLC (3.1 A secondary) plus I2 = 0.93 A, as a 46 test consistent with every stage injects
    tp = tp_of(quantity="negative-sequence current", applied=0.93, phases=from_sequence(3.1, 0.93))
    c, _ = play(base_record, tp, tmp_path)
    _check_injection(c, tp, base_record)
    sl = window(c, c.trigger_time + 0.5, 0.5)
    seq = np.abs(fortescue(*[fitted(c, ch, sl, 60.0) for ch in range(3)]))
    assert seq == pytest.approx([0.0, 3.1, 0.93], abs=0.01 * 3.1)


def test_a_ground_input_is_one_channel_through_the_core_balance_ct(base_record, tmp_path):
    tp = tp_of(quantity="earth-fault current", applied=8.0, input="ground", phases=single(8.0), expected_time=0.1)
    c, _ = play(base_record, tp, tmp_path)
    assert c.analog_channel_ids == ["IN"]
    ch = c.cfg.analog_channels[0]
    assert (ch.primary, ch.secondary, ch.ph) == (50.0, 5.0, "N")  # ground_ct = "50/5 A"
    _check_injection(c, tp, base_record)


def test_a_frequency_test_keeps_the_phase_and_injects_at_its_frequency(base_record, tmp_path):
    tp = tp_of(quantity="frequency", applied=58.45, applied_unit="Hz", phases=None, voltage_phases=balanced(66.0),
               expected_time=0.3, tolerance_time=0.03)
    c, d = play(base_record, tp, tmp_path)
    assert c.analog_channel_ids == ["VA", "VB", "VC"]
    _check_injection(c, tp, base_record)
    x = np.asarray(c.analog[0])
    step = np.max(np.abs(np.diff(x)))  # no jump at the change of frequency: every step is a normal sample step
    assert step <= 2 * math.pi * 60.0 / 3840.0 * math.sqrt(2) * 69.0 * 1.05


def test_a_prefault_is_played_before_the_injection(base_record, tmp_path):
    tp = tp_of(applied=6.2, prefault={"phases": balanced(3.1, 10.0)}, phases=balanced(6.2, -20.0))
    c, d = play(base_record, tp, tmp_path)
    sl = window(c, 0.2, 0.5)
    assert [rms(c, ch, sl) for ch in range(3)] == pytest.approx([3.1] * 3, rel=0.01)
    assert "3.1 A" in d.pre_text
    _check_injection(c, tp, base_record)


def test_a_small_level_beside_a_large_one_is_written_in_32_bits(base_record, tmp_path):
    tp = tp_of(quantity="current", applied=0.01, prefault={"phases": balanced(20.0)}, phases=balanced(0.01))
    c, d = play(base_record, tp, tmp_path)
    assert c.cfg.ft == "BINARY32" and d.wide
    _check_injection(c, tp, base_record)


def test_a_test_too_long_for_20_mb_gets_no_file_and_says_why(base_record):
    tp = tp_of(expected_time=5000.0, tolerance_time=250.0)
    with pytest.raises(waveforms.NoWaveform) as e:
        waveforms.design_test(base_record, "99", tp, waveforms.system_of(base_record), "x")
    assert e.value.kind == "size" and "state sequence" in e.value.reason


@pytest.mark.parametrize("tp, words", [
    (dict(quantity="negative-sequence current", applied=0.9), "negative-sequence current of 0 A"),
    (dict(quantity="phase-to-phase voltage", applied_unit="V", applied=100.0, phases=balanced(100.0)),
     "phase-to-phase voltage of 173.2 V"),
    (dict(quantity="neutral voltage", applied_unit="V", applied=5.0, input="neutral", phases=balanced(5.0)),
     "single-channel input"),
    (dict(quantity="third-harmonic neutral voltage", applied_unit="V", applied=1.0, input="neutral",
          phases=single(1.0)), "third-harmonic"),
    (dict(quantity="reverse active power", applied_unit="W", applied=4.0, phases=None), "no phasors"),
])
def test_a_test_point_that_contradicts_itself_gets_no_file(base_record, tp, words):
    with pytest.raises(waveforms.NoWaveform) as e:
        waveforms.design_test(base_record, "99", tp_of(**tp), waveforms.system_of(base_record), "x")
    assert e.value.kind == "record" and words in e.value.reason


def test_a_third_harmonic_neutral_voltage_through_the_grounding_transformer(tmp_path):
    case, warnings = load_case(EXAMPLES / "gas-engine-generator.toml")
    record = run_study(case, warnings).to_json()
    tp = tp_of(quantity="third-harmonic neutral voltage", applied_unit="V", applied=1.28, input="neutral",
               phases=single(1.28), frequency=180.0, voltage_phases=balanced(69.28), expected_time=5.0)
    c, _ = play(record, tp, tmp_path)
    assert c.analog_channel_ids == ["VN", "VA", "VB", "VC"]
    vn = c.cfg.analog_channels[0]
    assert (vn.primary, vn.secondary) == (13800.0, 240.0)  # grounding.transformer_ratio
    assert min(r for r, _ in c.cfg.sample_rates) >= 20 * 180.0
    sl = window(c, c.trigger_time + 0.5, 0.5)
    assert abs(fitted(c, 0, sl, 180.0)) == pytest.approx(1.28, rel=0.01)
    assert abs(fitted(c, 1, sl, 60.0)) == pytest.approx(69.28, rel=0.01)


def test_start_labels_of_any_kind_give_safe_unique_names(base_record):
    record = copy.deepcopy(base_record)
    p = record["start_profiles"][0]
    record["start_profiles"] = [dict(p, label="rated"), dict(p, label="80 %/weak bus"), dict(p, label="rated")]
    _, extras, _ = waveforms.waveform_set(record)
    stems = [d.stem for d in extras]
    assert stems == ["CH-M-101-rev1-start-rated", "CH-M-101-rev1-start-80_weak_bus",
                     "CH-M-101-rev1-start-rated-2", "CH-M-101-rev1-stall"]


def test_a_differential_input_is_fed_through_the_differential_cts(tmp_path):
    case, warnings = load_case(EXAMPLES / "gas-engine-generator.toml")
    record = run_study(case, warnings).to_json()
    tp = tp_of(quantity="differential current", applied=0.36, input="differential", phases=balanced(0.36),
               expected_time=0.03, tolerance_time=0.03)
    c, _ = play(record, tp, tmp_path)
    assert [(ch.name, ch.ccbm, ch.primary, ch.secondary) for ch in c.cfg.analog_channels] == [
        (n, "differential CT", 300.0, 5.0) for n in ("IA", "IB", "IC")]  # differential_ct = "300/5 A"
    _check_injection(c, tp, record)


def test_a_ground_input_without_a_core_balance_ct_is_the_residual_of_the_phase_cts(base_record, tmp_path):
    record = copy.deepcopy(base_record)
    del record["inputs"]["instruments"]["ground_ct"]
    tp = tp_of(quantity="earth-fault current", applied=2.0, input="ground", phases=single(2.0))
    c, _ = play(record, tp, tmp_path)
    ch = c.cfg.analog_channels[0]
    assert (ch.name, ch.ccbm, ch.primary, ch.secondary) == ("IN", "residual of the phase CTs", 300.0, 5.0)
    _check_injection(c, tp, record)
