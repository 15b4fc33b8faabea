"""IEEE Std C37.111-2013 (COMTRADE) files: the configuration text (``.cfg``) and the binary data (``.dat``).

This module knows the file format only; what the channels carry is built in ``reports.waveforms``. The layout
written here (IEEE Std C37.111-2013, clauses 7 and 8; the same text as IEC 60255-24:2013):

``.cfg`` (text, one item per line, fields separated by commas)::

    station_name,rec_dev_id,rev_year            rev_year 2013
    TT,##A,##D                                   channels in total, analog (A), status (D)
    An,ch_id,ph,ccbm,uu,a,b,skew,min,max,primary,secondary,PS     one line per analog channel
    lf                                           nominal line frequency [Hz]
    nrates                                       number of sampling rates
    samp,endsamp                                 one line per rate: rate [Hz], number of the last sample at it
    dd/mm/yyyy,hh:mm:ss.ssssss                   time of the first sample
    dd/mm/yyyy,hh:mm:ss.ssssss                   time of the trigger (here: the start of the injection)
    ft                                           BINARY (16-bit samples) or BINARY32 (32-bit samples)
    timemult                                     multiplier of the time stamps in the .dat [-]
    time_code,local_code                         offset of the time stamps from UTC, of local time from UTC
    tmq_code,leapsec                             time quality (F: no clock, the record is synthesised), leap second

``.dat`` (binary, little-endian): for every sample the sample number (uint32, from 1), the time stamp (uint32, in
µs × timemult from the first sample), then every analog value (int16, or int32 for BINARY32); no status channels.
A channel's value is ``a·x + b`` in its unit ``uu``; ``PS`` = ``S`` says the values are relay-side (secondary),
``primary``/``secondary`` give the instrument transformer's ratio. The raw value −32768 (−2³¹ for BINARY32) means
"no data" and is never written, so the data range is ±32767 (±2147483647).

Several rates: sample 1 is at t = 0; each further sample lies 1/samp after the one before it, samp being the rate
of the segment the sample belongs to (clause 7.4.5).
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, field

import numpy as np

REV_YEAR = "2013"
MAX_16 = 32767  #: largest 16-bit data value (−32768 marks missing data)
MAX_32 = 2147483647  #: largest 32-bit data value (−2³¹ marks missing data)
#: a level uses at least this many counts in 16-bit form, else the samples are written 32-bit (BINARY32):
#: a quantisation step of at most 0.5 % of the smallest level's peak (our choice of resolution)
MIN_COUNTS = 200
_TIME_LIMIT = 0xFFFFFFFE  #: largest time stamp (0xFFFFFFFF marks a missing one)


@dataclass
class Channel:
    """One analog channel: identifier, phase (A, B, C, N), circuit monitored, unit, the instrument transformer's
    primary and secondary rating, and the relay-side samples."""

    name: str
    phase: str
    circuit: str
    unit: str
    primary: float
    secondary: float
    values: np.ndarray


@dataclass
class Recording:
    """Everything one COMTRADE pair holds: who recorded it, the sampling, the trigger and the channels."""

    station: str
    device: str
    frequency: float  #: nominal line frequency [Hz]
    rates: list[tuple[float, int]]  #: (rate [Hz], number of the last sample at that rate), in order
    times: np.ndarray  #: time of every sample from the first [s]
    trigger: float  #: time of the trigger (start of the injection) from the first sample [s]
    channels: list[Channel] = field(default_factory=list)
    start: dt.datetime = dt.datetime(2000, 1, 1)  #: date and time given to the first sample
    wide: bool = False  #: 32-bit samples (BINARY32) instead of 16-bit (BINARY)


def sample_times(segments: list[tuple[float, float]]) -> tuple[np.ndarray, list[tuple[float, int]]]:
    """Sample times and the ``(samp, endsamp)`` lines for consecutive segments ``(rate [Hz], end time [s])``.

    Sample 1 is at t = 0; in each segment the samples follow 1/rate apart up to its end time (C37.111-2013 §7.4.5).

    >>> t, rates = sample_times([(4.0, 1.0), (2.0, 2.0)])
    >>> t.tolist(), rates
    ([0.0, 0.25, 0.5, 0.75, 1.0, 1.5, 2.0], [(4.0, 5), (2.0, 7)])
    """
    parts = [np.zeros(1)]
    rates: list[tuple[float, int]] = []
    t_last, count = 0.0, 1
    for rate, t_end in segments:
        k = int(math.floor((t_end - t_last) * rate + 1e-6))
        if k > 0:
            parts.append(t_last + np.arange(1, k + 1) / rate)
            t_last = float(parts[-1][-1])
        count += k
        if k > 0 or not rates:  # the first segment holds sample 1 even when it adds no further sample
            rates.append((float(rate), count))
    return np.concatenate(parts), rates


def _number(x: float) -> str:
    """A real field without an exponent, at most 10 significant figures (fits the 32 characters allowed)."""
    return np.format_float_positional(float(f"{x:.10g}"), unique=True, trim="-")


def _text(s: str, limit: int = 64) -> str:
    """A text field: no commas or line breaks (they separate fields and lines), at most ``limit`` characters."""
    return " ".join(str(s).replace(",", " ").split())[:limit]


def _timestamp(t: dt.datetime) -> str:
    return t.strftime("%d/%m/%Y,%H:%M:%S.") + f"{t.microsecond:06d}"


def _scale(ch: Channel, full: int) -> float:
    """The multiplier ``a`` of a channel: its peak at ``full`` counts, as written in the .cfg."""
    peak = float(np.max(np.abs(ch.values))) if ch.values.size else 0.0
    return float(_number(peak / full)) if peak > 0 else 1.0


def needs_32_bit(smallest: float, peak: float) -> bool:
    """True when a channel whose peak is ``peak`` would give its smallest non-zero RMS level ``smallest`` fewer
    than ``MIN_COUNTS`` counts of peak in 16-bit samples.

    >>> needs_32_bit(1.0, 141.0), needs_32_bit(0.1, 141.0)
    (False, True)
    """
    return peak > 0 and smallest > 0 and smallest * math.sqrt(2.0) / (peak / MAX_16) < MIN_COUNTS


def _time_multiplier(rec: Recording) -> float:
    """1, or the smallest whole multiplier that keeps every time stamp (µs) within 32 bits."""
    span_us = float(rec.times[-1]) * 1e6 if rec.times.size else 0.0
    return 1.0 if span_us <= _TIME_LIMIT else float(math.ceil(span_us / _TIME_LIMIT))


def cfg_text(rec: Recording) -> str:
    """The ``.cfg`` text of ``rec`` (lines end in CR LF)."""
    wide = rec.wide
    full = MAX_32 if wide else MAX_16
    n = len(rec.channels)
    lines = [f"{_text(rec.station)},{_text(rec.device)},{REV_YEAR}", f"{n},{n}A,0D"]
    for i, ch in enumerate(rec.channels, 1):
        lines.append(",".join([str(i), _text(ch.name), _text(ch.phase, 2), _text(ch.circuit), _text(ch.unit, 32),
                               _number(_scale(ch, full)), "0", "0", str(-full), str(full), _number(ch.primary),
                               _number(ch.secondary), "S"]))
    lines.append(_number(rec.frequency))
    lines.append(str(len(rec.rates)))
    lines += [f"{_number(rate)},{end}" for rate, end in rec.rates]
    lines.append(_timestamp(rec.start))
    lines.append(_timestamp(rec.start + dt.timedelta(microseconds=round(rec.trigger * 1e6))))
    lines.append("BINARY32" if wide else "BINARY")
    lines.append(_number(_time_multiplier(rec)))
    lines.append("0,0")  # the time stamps are given as if in UTC, and local time is UTC
    lines.append("F,0")  # no clock: the record is synthesised; no leap second in it
    return "\r\n".join(lines) + "\r\n"


def dat_bytes(rec: Recording) -> bytes:
    """The binary ``.dat`` of ``rec``, scaled exactly as :func:`cfg_text` states."""
    wide = rec.wide
    full = MAX_32 if wide else MAX_16
    n = rec.times.size
    kind = "<i4" if wide else "<i2"
    rows = np.zeros(n, dtype=[("n", "<u4"), ("t", "<u4"), ("x", kind, (len(rec.channels),))])
    rows["n"] = np.arange(1, n + 1, dtype=np.uint32)
    rows["t"] = np.rint(rec.times * 1e6 / _time_multiplier(rec)).astype(np.uint32)
    for j, ch in enumerate(rec.channels):
        rows["x"][:, j] = np.clip(np.rint(ch.values / _scale(ch, full)), -full, full)
    return rows.tobytes()


def record_size(channels: int, wide: bool = False) -> int:
    """Bytes per sample in the ``.dat``: sample number, time stamp and the analog values."""
    return 8 + channels * (4 if wide else 2)
