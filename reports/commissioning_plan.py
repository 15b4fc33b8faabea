"""The commissioning test plan as CSV: one row per test point of the record, with the file that plays it.

UTF-8 without a byte-order mark, comma-separated, fields quoted where needed and rows ended by CR LF (RFC 4180),
written with Python's ``csv`` module. Magnitudes and angles are relay-side (CT/VT secondary), angles in degrees,
A-B-C; times in seconds after the start of the injection.
"""

from __future__ import annotations

import csv
import io

from reports.waveforms import Entry

_SETS = (("phases", ("A", "B", "C"), "{p} magnitude", "{p} angle [deg]"),
         ("voltage_phases", ("VA", "VB", "VC"), "{p} [V]", "{p} angle [deg]"),
         ("current_phases", ("IA", "IB", "IC"), "{p} [A]", "{p} angle [deg]"))

HEADER = (["id", "function", "description", "quantity", "applied", "applied unit", "input", "initial state",
           "pre-test"]
          + [fmt.format(p=p) for _, names, mag, ang in _SETS for p in names for fmt in (mag, ang)]
          + ["frequency [Hz]", "expected time [s]", "accepted from [s]", "accepted to [s]", "tolerance rule",
             "injection [s]", "file", "note"])


def _num(x) -> str:
    """A number as plain text, 6 significant figures; empty for none.

    >>> _num(7.44), _num(None), _num(-120.0), _num(388.3712)
    ('7.44', '', '-120', '388.371')
    """
    if x is None or isinstance(x, bool):
        return ""
    try:
        return f"{float(x):.6g}"
    except (TypeError, ValueError):
        return str(x)


def _phasor_cells(phasors) -> list[str]:
    cells = []
    for k in range(3):
        p = phasors[k] if phasors and k < len(phasors) else None
        cells += ["", ""] if p is None else [_num(p.get("magnitude")), _num(p.get("angle"))]
    return cells


def plan_csv(entries: list[Entry], system_frequency: float) -> str:
    """The CSV text: a header row, then one row per test point in the order of the record."""
    out = io.StringIO(newline="")
    w = csv.writer(out, lineterminator="\r\n")
    w.writerow(HEADER)
    for e in entries:
        tp, d = e.tp, e.design
        te = tp.get("expected_time")
        tol = float(tp.get("tolerance_time") or 0.0)
        band = ("", "") if te is None else (_num(max(0.0, float(te) - tol)), _num(float(te) + tol))
        freq = tp.get("frequency") or (tp.get("applied") if tp.get("applied_unit") == "Hz" else None)
        note = "" if e.skip is None else (f"no waveform: {e.skip.reason}" if e.skip.kind != "none" else
                                          e.skip.reason)
        row = [tp.get("id", ""), e.fid, tp.get("description", ""), tp.get("quantity", ""), _num(tp.get("applied")),
               tp.get("applied_unit", ""), tp.get("input", ""), tp.get("initial_state", ""),
               d.pre_text if d else ""]
        for fld, *_ in _SETS:
            row += _phasor_cells(tp.get(fld))
        row += [_num(freq or (system_frequency if d else None)), _num(te), band[0], band[1],
                tp.get("tolerance_rule", ""), _num(d.injection) if d else "", f"{d.stem}.cfg" if d else "", note]
        w.writerow(row)
    return out.getvalue()
