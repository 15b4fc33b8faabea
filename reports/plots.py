"""Vector drawings for the sheet: a record's :class:`machines.record.Drawing` laid out as a list of drawing operations.

:func:`figure` turns a record drawing into plain data: paths (grid, axes, curves), marker sets and text runs, in
points, with the origin at the drawing's lower-left corner. :func:`draw_ops` replays them on a reportlab canvas with
its public drawing calls (one path per grid, per curve and per marker set). Time-current curves are read log-log; an
R-X drawing keeps one scale on both axes so that circles stay round, with the R and X axes through the origin.

Readable in black and white: every series has its own dash pattern (solid, dashed, dotted, dash-dot, long dash …),
point sets their own marker shape, and a number printed on each curve ties it to the legend, so nothing depends on
the accent colour. Series that lie on top of each other are said to coincide in the legend; a series wholly off the
scale (a fault current beyond the axis) is marked at the edge with its value. A time-current drawing in primary
amperes gets a second current axis in relay-side amperes when the phase CT ratio is known.

Layout only: points outside the axis range are clipped, values a log axis cannot show are left out; nothing is
calculated beyond placing what the record holds.
"""

from __future__ import annotations

import math
import re
from typing import NamedTuple

from reports.fonts import FALLBACK, SANS, SANS_BOLD, SUB, formula_segments, in_fallback, plain, register
from reports.formatting import number, quantity

ACCENT_HEX = "#0b5563"  # dark teal: the sheet's one accent colour
BLACK, GRID_HEX, SUBGRID_HEX, LABEL_HEX = "#000000", "#8f8f8f", "#d4d4d4", "#333333"
FONT_SIZE = 7.5
#: dash patterns, in the order they are handed out: solid, dashed, dotted, dash-dot, long dash, short dash, dash-dot-dot
DASHES: tuple[tuple[float, ...] | None, ...] = (None, (6.0, 3.0), (1.2, 2.2), (7.0, 2.5, 1.2, 2.5), (13.0, 3.5),
                                                  (3.0, 2.0), (7.0, 2.0, 1.2, 2.0, 1.2, 2.0))
_STYLE_DASH = {"line": 0, "step": 0, "dashed": 1, "dotted": 2}
MARKERS = ("circle", "square", "triangle", "diamond", "cross", "plus", "circle-open", "square-open",
           "triangle-open", "diamond-open")
_CIRCLE_POINTS = 145
_COINCIDE_PT = 2.0  # two curves closer than this on paper over most of their length coincide


class Pen(NamedTuple):
    """How one series is drawn: colour, width, dash pattern (None: solid), marker (None: none), whether a line."""

    color: str
    width: float
    dash: tuple[float, ...] | None
    marker: str | None
    line: bool


def pens(styles) -> list[Pen]:
    """A distinct pen for each series style, in order: distinct dash patterns for lines, marker shapes for points.

    Colours alternate black and the accent; they never carry the difference alone. When the dash patterns run out
    a line also gets markers along it.

    >>> [(p.dash, p.marker, p.line) for p in pens(["line", "line", "points", "dashed"])]
    [(None, None, True), ((13.0, 3.5), None, True), (None, 'circle', False), ((6.0, 3.0), None, True)]
    """
    out: list[Pen] = []
    used: set[int] = set()
    markers = 0
    for i, style in enumerate(styles):
        color = BLACK if i % 2 == 0 else ACCENT_HEX
        if style == "points":
            out.append(Pen(color, 0.9, None, MARKERS[markers % len(MARKERS)], False))
            markers += 1
            continue
        want = _STYLE_DASH.get(style, 0)
        order = [want] + [k for k in (4, 3, 5, 6, 1, 2, 0) if k != want]
        free = [k for k in order if k not in used]
        marker = None
        if free:
            k = free[0]
        else:  # more lines than patterns: markers along the line tell it apart
            k = order[len(out) % len(order)]
            marker = MARKERS[markers % len(MARKERS)]
            markers += 1
        used.add(k)
        out.append(Pen(color, 1.3 if k == 2 else 1.0, DASHES[k], marker, True))
    return out


# ---------------------------------------------------------------------------------------------------- geometry


class Axes(NamedTuple):
    x0: float
    x1: float
    y0: float
    y1: float
    log_x: bool
    log_y: bool


def _fwd(v: float, log: bool) -> float | None:
    if log:
        return math.log10(v) if v > 0 and math.isfinite(v) else None
    return v if math.isfinite(v) else None


def _back(t: float, log: bool) -> float:
    return 10.0 ** t if log else t


def clip_polyline(points: list[tuple[float, float]], axes: Axes) -> list[list[tuple[float, float]]]:
    """The parts of a polyline inside the axis box (in value units), clipped in the axes' own (log) space.

    >>> clip_polyline([(0.0, 0.0), (2.0, 2.0)], Axes(0, 1, 0, 1, False, False))
    [[(0.0, 0.0), (1.0, 1.0)]]
    """
    box = tuple(_fwd(v, log) for v, log in ((axes.x0, axes.log_x), (axes.x1, axes.log_x),
                                               (axes.y0, axes.log_y), (axes.y1, axes.log_y)))
    if None in box:
        return []
    bx0, bx1, by0, by1 = box
    inside = [(float(x), float(y)) for x, y in points]
    fx, fy = [_fwd(x, axes.log_x) for x, _ in inside], [_fwd(y, axes.log_y) for _, y in inside]
    if all(v is not None and bx0 <= v <= bx1 for v in fx) and all(v is not None and by0 <= v <= by1 for v in fy):
        return [inside] if inside else []  # the whole line lies in the box: nothing to clip
    pieces: list[list[tuple[float, float]]] = []
    current: list[tuple[float, float]] = []
    prev = None
    for x, y in points:
        p = (_fwd(float(x), axes.log_x), _fwd(float(y), axes.log_y))
        if None in p:
            prev = None
            if current:
                pieces.append(current)
                current = []
            continue
        if prev is None:
            if bx0 <= p[0] <= bx1 and by0 <= p[1] <= by1:
                current = [p]
            prev = p
            continue
        seg = _clip_segment(prev, p, bx0, bx1, by0, by1)
        if seg is None:
            if current:
                pieces.append(current)
                current = []
        else:
            a, b = seg
            if not current or current[-1] != a:
                if current:
                    pieces.append(current)
                current = [a]
            current.append(b)
            if b != p:
                pieces.append(current)
                current = []
        prev = p
    if current:
        pieces.append(current)
    return [[(_back(x, axes.log_x), _back(y, axes.log_y)) for x, y in piece] for piece in pieces]


def _clip_segment(a, b, x0, x1, y0, y1):
    """Liang-Barsky: the part of segment a-b inside the box, or None."""
    dx, dy = b[0] - a[0], b[1] - a[1]
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, a[0] - x0), (dx, x1 - a[0]), (-dy, a[1] - y0), (dy, y1 - a[1])):
        if p == 0:
            if q < 0:
                return None
            continue
        r = q / p
        if p < 0:
            if r > t1:
                return None
            t0 = max(t0, r)
        else:
            if r < t0:
                return None
            t1 = min(t1, r)
    start = a if t0 == 0.0 else (a[0] + t0 * dx, a[1] + t0 * dy)
    end = b if t1 == 1.0 else (a[0] + t1 * dx, a[1] + t1 * dy)
    return start, end


def along(path: list[tuple[float, float]], fractions) -> list[tuple[float, float]]:
    """Points at the given fractions of a paper polyline's length.

    >>> along([(0.0, 0.0), (10.0, 0.0)], (0.25, 0.75))
    [(2.5, 0.0), (7.5, 0.0)]
    """
    lengths = [math.hypot(b[0] - a[0], b[1] - a[1]) for a, b in zip(path, path[1:])]
    total = sum(lengths)
    if total <= 0:
        return [path[0]] * len(fractions) if path else []
    out = []
    for f in fractions:
        target, run = f * total, 0.0
        for (a, b), length in zip(zip(path, path[1:]), lengths):
            if run + length >= target and length > 0:
                u = (target - run) / length
                out.append((a[0] + u * (b[0] - a[0]), a[1] + u * (b[1] - a[1])))
                break
            run += length
        else:
            out.append(path[-1])
    return out


def step_points(points: list[tuple[float, float]]) -> list[tuple[float, float]]:
    """A staircase through the points: each value holds until the next x.

    >>> step_points([(1, 5), (2, 4), (3, 3)])
    [(1, 5), (2, 5), (2, 4), (3, 4), (3, 3)]
    """
    out: list[tuple[float, float]] = []
    for i, (x, y) in enumerate(points):
        if i:
            out.append((x, points[i - 1][1]))
        out.append((x, y))
    return out


def circle_points(center: tuple[float, float], radius: float, n: int = _CIRCLE_POINTS) -> list[tuple[float, float]]:
    """A circle as a closed polyline (layout only)."""
    cx, cy = center
    return [(cx + radius * math.cos(2 * math.pi * k / (n - 1)), cy + radius * math.sin(2 * math.pi * k / (n - 1)))
            for k in range(n)]


def _nice_step(span: float, ticks: int = 6) -> float:
    raw = span / ticks
    mag = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 2.5, 5, 10):
        if m * mag >= raw:
            return m * mag
    return 10 * mag


def _linear_range(lo: float, hi: float, include_zero: bool = False) -> tuple[float, float, float]:
    if include_zero:
        lo, hi = min(lo, 0.0), max(hi, 0.0)
    if hi <= lo:
        pad = abs(lo) * 0.1 or 1.0
        lo, hi = lo - pad, hi + pad
    step = _nice_step(hi - lo)
    return math.floor(lo / step + 1e-9) * step, math.ceil(hi / step - 1e-9) * step, step


def _log_range(lo: float, hi: float) -> tuple[float, float]:
    a, b = math.floor(math.log10(lo) + 1e-9), math.ceil(math.log10(hi) - 1e-9)
    if b <= a:
        b = a + 1
    return 10.0 ** a, 10.0 ** b


def _extent(d, log_x: bool, log_y: bool):
    xs, ys = [], []
    for s in d.series:
        for x, y in s.points:
            if _fwd(float(x), log_x) is not None and _fwd(float(y), log_y) is not None:
                xs.append(float(x))
                ys.append(float(y))
    if not (log_x or log_y):
        for c in d.circles:
            xs += [c.center[0] - c.radius, c.center[0] + c.radius]
            ys += [c.center[1] - c.radius, c.center[1] + c.radius]
    return xs, ys


def _usable_range(r, log: bool) -> bool:
    """A given axis range that can be drawn (else the range is taken from the data)."""
    if not r or len(r) != 2:
        return False
    lo, hi = float(r[0]), float(r[1])
    return math.isfinite(lo) and math.isfinite(hi) and hi > lo and (lo > 0 or not log)


def _log_ticks(lo: float, hi: float, multiples=(1,)) -> list[float]:
    out = []
    for e in range(math.floor(math.log10(lo)) - 1, math.ceil(math.log10(hi)) + 1):
        for m in multiples:
            v = m * 10.0 ** e
            if lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9):
                out.append(v)
    return out


def _linear_ticks(lo: float, hi: float, step: float) -> list[float]:
    n0, n1 = math.ceil(lo / step - 1e-9), math.floor(hi / step + 1e-9)
    return [round(k * step, 12) for k in range(n0, n1 + 1)]


# ---------------------------------------------------------------------------------------------------- text


def text_runs(text: object, size: float = FONT_SIZE, bold: bool = False, formulas: bool = True) -> list[list]:
    """Text as runs ``[text, font, size, rise]``: formulas with sub- and superscripts (unless ``formulas`` is
    False: user text), characters the sheet font lacks in the fallback font."""
    register()
    runs: list[list] = []
    main = SANS_BOLD if bold else SANS
    for seg, level in (formula_segments(text) if formulas else [(plain(text), ())]):
        scale = 0.72 ** len(level)
        rise = 0.0
        for tag in level:
            rise += -0.28 * size if tag == SUB else 0.42 * size
        piece, fb = "", None
        for ch in seg:
            f = in_fallback(ch)
            if fb is not None and f != fb and piece:
                runs.append([piece, FALLBACK if fb else main, round(size * scale, 2), round(rise, 2)])
                piece = ""
            fb = f
            piece += ch
        if piece:
            runs.append([piece, FALLBACK if fb else main, round(size * scale, 2), round(rise, 2)])
    return runs


def runs_width(runs: list[list]) -> float:
    from reportlab.pdfbase.pdfmetrics import stringWidth

    return sum(stringWidth(t, font, size) for t, font, size, _ in runs)


def _text(ops: list, x: float, y: float, text: object, size: float = FONT_SIZE, anchor: str = "start",
          color: str = BLACK, angle: int = 0, bold: bool = False) -> tuple[float, float]:
    """Add a text op; returns its (x start, width)."""
    runs = text_runs(text, size, bold)
    w = runs_width(runs)
    shift = {"start": 0.0, "middle": w / 2, "end": w}[anchor]
    if angle:
        ops.append(["text", round(x, 2), round(y - shift, 2), runs, color, angle])
    else:
        ops.append(["text", round(x - shift, 2), round(y, 2), runs, color, 0])
    return x - shift, w


def _wrap(text: str, width: float, size: float) -> list[str]:
    words, lines, line = plain(text).split(), [], ""
    for w in words:
        trial = f"{line} {w}".strip()
        if line and runs_width(text_runs(trial, size)) > width:
            lines.append(line)
            line = w
        else:
            line = trial
    return lines + ([line] if line else [])


# ---------------------------------------------------------------------------------------------------- figure


def _entry_points(d, log_x: bool, log_y: bool):
    for s in d.series:
        pts = [(float(x), float(y)) for x, y in s.points]
        yield step_points(pts) if s.style == "step" else pts
    if not (log_x or log_y):
        for c in d.circles:
            yield circle_points(tuple(map(float, c.center)), float(c.radius))


def _unit_of(label: str) -> str:
    """The unit of an axis from its title: ``Current [A primary]`` → ``A``."""
    m = re.search(r"[\[(]([^\]), ]+)", label or "")
    return m.group(1) if m else ""


def figure(d, width: float, height: float, ct_ratio: tuple[float, str] | None = None) -> dict:
    """The record drawing ``d`` laid out in ``width`` × at most ``height`` points: ``{"w", "h", "ops"}``.

    ``ct_ratio`` (primary amperes per relay-side ampere, and the ratio as written) adds a relay-side current axis
    along the top of a time-current drawing in primary amperes.
    """
    register()
    rx = d.kind == "r-x"
    log_x, log_y = (False, False) if rx else (bool(d.log_x), bool(d.log_y))
    entries = [(s.label, s.style) for s in d.series] + [(c.label, c.style) for c in d.circles
                                                         if not (log_x or log_y)]
    all_pens = pens([style for _, style in entries])
    xs, ys = _extent(d, log_x, log_y)
    if not xs:
        xs, ys = [1.0, 10.0], [1.0, 10.0]
    x_step = y_step = None
    if _usable_range(d.x_range, log_x):
        x0, x1 = float(d.x_range[0]), float(d.x_range[1])
    elif log_x:
        x0, x1 = _log_range(min(xs), max(xs))
    else:
        x0, x1, x_step = _linear_range(min(xs), max(xs), include_zero=rx)
    if _usable_range(d.y_range, log_y):
        y0, y1 = float(d.y_range[0]), float(d.y_range[1])
    elif log_y:
        y0, y1 = _log_range(min(ys), max(ys))
    else:
        y0, y1, y_step = _linear_range(min(ys), max(ys), include_zero=rx)
    axes = Axes(x0, x1, y0, y1, log_x, log_y)
    points = list(_entry_points(d, log_x, log_y))
    secondary = ct_ratio if (ct_ratio and log_x and d.kind == "time-current" and
                             "primary" in (d.x_label or "").lower()) else None

    # legend text (tags tie the curves to it), wrapped to the width
    legend_w = width - 10
    off_scale = [_off_scale(pts, axes) for pts in points]
    legend_lines: list[tuple[int, list[str]]] = []
    coincide = _coincidences(points, axes, all_pens)
    for i, (label, _) in enumerate(entries):
        text = plain(label)
        if off_scale[i]:
            text += f" (off the scale at {quantity(off_scale[i][1], _unit_of(d.x_label))})"
        if i in coincide:
            text += f"; coincides with {coincide[i] + 1}"
        legend_lines.append((i, _wrap(text, legend_w - 48, FONT_SIZE) or [""]))
    legend_h = sum(10.0 * len(lines) + 2.0 for _, lines in legend_lines) + 8.0

    left, right, bottom = 50.0, 14.0, 30.0
    top = 30.0 if secondary else 10.0
    plot_w, plot_h = width - left - right, height - top - bottom - legend_h
    if rx:  # one scale on both axes: shrink the plot box to the ranges' aspect ratio
        scale = min(plot_w / (x1 - x0), plot_h / (y1 - y0))
        extra = plot_w - scale * (x1 - x0)
        plot_w, plot_h = scale * (x1 - x0), scale * (y1 - y0)
        left += extra / 2
        height = top + bottom + legend_h + plot_h
    plot_h = max(plot_h, 60.0)
    height = top + bottom + legend_h + plot_h
    px0, py0 = left, bottom + legend_h

    fx0, fx1 = _fwd(x0, log_x), _fwd(x1, log_x)
    fy0, fy1 = _fwd(y0, log_y), _fwd(y1, log_y)

    def sx(v: float) -> float:
        return px0 + (_fwd(v, log_x) - fx0) / (fx1 - fx0) * plot_w

    def sy(v: float) -> float:
        return py0 + (_fwd(v, log_y) - fy0) / (fy1 - fy0) * plot_h

    ops: list = []
    # grid: minor, then major, then the box
    minor, major = [], []
    for lo, hi, log, step, vertical in ((x0, x1, log_x, x_step, True), (y0, y1, log_y, y_step, False)):
        if log:
            minor += [(vertical, v) for v in _log_ticks(lo, hi, range(2, 10))]
            ticks = _log_ticks(lo, hi)
        else:
            ticks = _linear_ticks(lo, hi, step or _nice_step(hi - lo))
        major += [(vertical, v) for v in ticks]
    _grid(ops, minor, SUBGRID_HEX, 0.25, sx, sy, px0, py0, plot_w, plot_h)
    _grid(ops, major, GRID_HEX, 0.4, sx, sy, px0, py0, plot_w, plot_h)
    ops.append(["path", BLACK, 0.8, None, [[px0, py0, px0 + plot_w, py0, px0 + plot_w, py0 + plot_h, px0,
                                            py0 + plot_h, px0, py0]], None])
    if rx:
        axis = []
        if x0 < 0 < x1:
            axis.append([sx(0), py0, sx(0), py0 + plot_h])
        if y0 < 0 < y1:
            axis.append([px0, sy(0), px0 + plot_w, sy(0)])
        if axis:
            ops.append(["path", BLACK, 0.7, None, axis, None])

    # tick labels and axis titles
    for vertical, v in major:
        if vertical:
            _text(ops, sx(v), py0 - 10, _tick(v), anchor="middle")
        else:
            _text(ops, px0 - 4, sy(v) - 2.6, _tick(v), anchor="end")
    _text(ops, px0 + plot_w / 2, py0 - 22, d.x_label, FONT_SIZE + 0.5, anchor="middle")
    _text(ops, px0 - 36, py0 + plot_h / 2, d.y_label, FONT_SIZE + 0.5, anchor="middle", angle=90)
    if secondary:
        _secondary_axis(ops, secondary, x0, x1, sx, px0, py0 + plot_h, plot_w)

    # curves, markers, off-scale marks
    paper_paths: dict[int, list[list[tuple[float, float]]]] = {}
    for i, ((label, style), pen, pts) in enumerate(zip(entries, all_pens, points)):
        if pen.line:
            pieces = [p for p in clip_polyline(pts, axes) if len(p) >= 2]
            paper = [[(sx(x), sy(y)) for x, y in piece] for piece in pieces]
            paper_paths[i] = paper
            if paper:
                ops.append(["path", pen.color, pen.width, list(pen.dash) if pen.dash else None,
                            [[round(c, 2) for pt in piece for c in pt] for piece in paper], None])
            if pen.marker and paper:
                at = [p for piece in paper for p in along(piece, (0.1, 0.3, 0.5, 0.7, 0.9))]
                ops.append(_markers(pen, at))
        else:
            inside = [(sx(x), sy(y)) for x, y in pts if _inside(x, y, axes)]
            paper_paths[i] = [inside] if inside else []
            if inside:
                ops.append(_markers(pen, inside))
    _off_scale_marks(ops, off_scale, px0, py0, plot_w, plot_h, d.x_label)

    # numbers on the curves: each entry's number where it is clear of the others
    _curve_tags(ops, paper_paths, all_pens, (px0, py0, px0 + plot_w, py0 + plot_h), coincide)

    # legend
    y = legend_h - 12.0
    for i, lines in legend_lines:
        pen = all_pens[i]
        if pen.line:
            ops.append(["path", pen.color, pen.width, list(pen.dash) if pen.dash else None,
                        [[10.0, y + 2.6, 34.0, y + 2.6]], None])
        if pen.marker:
            ops.append(_markers(pen, [(22.0, y + 2.6)]))
        _text(ops, 47.0, y, str(i + 1), bold=True, anchor="end")  # right-aligned: "10" keeps clear of its text
        for k, line in enumerate(lines):
            _text(ops, 52.0, y - 10.0 * k, line)
        y -= 10.0 * len(lines) + 2.0
    return {"w": round(width, 2), "h": round(height, 2), "ops": ops}


def _grid(ops, lines, color, width, sx, sy, px0, py0, plot_w, plot_h) -> None:
    sub = []
    for vertical, v in lines:
        if vertical:
            x = round(sx(v), 2)
            if px0 + 0.5 < x < px0 + plot_w - 0.5:
                sub.append([x, py0, x, py0 + plot_h])
        else:
            y = round(sy(v), 2)
            if py0 + 0.5 < y < py0 + plot_h - 0.5:
                sub.append([px0, y, px0 + plot_w, y])
    if sub:
        ops.append(["path", color, width, None, sub, None])


def _tick(v: float) -> str:
    return number(v, 3)


def _inside(x: float, y: float, axes: Axes) -> bool:
    return axes.x0 <= x <= axes.x1 and axes.y0 <= y <= axes.y1


def _markers(pen: Pen, at) -> list:
    filled = not pen.marker.endswith("-open")
    return ["markers", pen.marker.replace("-open", ""), 5.0, pen.color, filled,
            [round(c, 2) for p in at for c in p]]


def _secondary_axis(ops, ct: tuple[float, str], x0, x1, sx, left, top, plot_w) -> None:
    """Relay-side amperes along the top edge: primary / (CT ratio)."""
    factor, written = ct
    lo, hi = x0 / factor, x1 / factor
    ticks = _log_ticks(lo, hi, (1, 2, 5))
    marks = []
    for v in ticks:
        x = round(sx(v * factor), 2)
        marks.append([x, top, x, top + 4])
        _text(ops, x, top + 6, _tick(v), anchor="middle")
    if marks:
        ops.append(["path", BLACK, 0.6, None, marks, None])
    _text(ops, left + plot_w / 2, top + 16, f"Current [A relay side, CT {written}]", FONT_SIZE + 0.5,
          anchor="middle")


def _off_scale(pts, axes: Axes) -> tuple[str, float] | None:
    """('right' or 'left', x) when every drawable point of a series lies beyond one end of the current axis."""
    xs = [x for x, y in pts if _fwd(x, axes.log_x) is not None and _fwd(y, axes.log_y) is not None]
    if not xs:
        return None
    if min(xs) > axes.x1:
        return "right", min(xs)
    if max(xs) < axes.x0:
        return "left", max(xs)
    return None


def _off_scale_marks(ops, off, px0, py0, plot_w, plot_h, x_label) -> None:
    """An arrow at the edge for each series off the scale, with its number and value."""
    k = 0
    for i, where in enumerate(off):
        if not where:
            continue
        side, x = where
        y = py0 + plot_h - 14 - 12 * k
        k += 1
        edge = px0 + plot_w if side == "right" else px0
        d = 1 if side == "right" else -1
        ops.append(["path", BLACK, 0.9, None, [[edge - d * 4, y + 3, edge + d * 3, y + 3]], None])
        ops.append(["path", None, 0, None, [[edge + d * 3, y, edge + d * 3, y + 6, edge + d * 8, y + 3]], BLACK])
        text = f"{i + 1}: {quantity(x, _unit_of(x_label))}"
        _text(ops, edge - d * 6, y + 0.5, text, anchor="end" if side == "right" else "start", bold=True)


def _sample(path: list[tuple[float, float]], n: int) -> list[tuple[float, float]]:
    return along(path, [(k + 0.5) / n for k in range(n)])


def _distances_to(points, segments):
    """The distance of each point to the nearest of the segments ((ax, ay), (bx, by)), as a numpy array."""
    import numpy as np

    p = np.asarray(points, dtype=float)[:, None, :]
    seg = np.asarray(segments, dtype=float)
    a, d = seg[:, 0, :], seg[:, 1, :] - seg[:, 0, :]
    length2 = np.einsum("ij,ij->i", d, d)
    along_ = np.einsum("nmj,mj->nm", p - a, d) / np.where(length2 == 0.0, 1.0, length2)
    u = np.clip(np.where(length2 == 0.0, 0.0, along_), 0.0, 1.0)
    nearest = a + u[:, :, None] * d
    return np.sqrt(((nearest - p) ** 2).sum(axis=2)).min(axis=1)


def _coincidences(points, axes: Axes, all_pens) -> dict[int, int]:
    """Entry index → the earlier entry it lies on (in the axes' own space, on a 500 × 400 pt plot)."""
    fx0, fx1 = _fwd(axes.x0, axes.log_x), _fwd(axes.x1, axes.log_x)
    fy0, fy1 = _fwd(axes.y0, axes.log_y), _fwd(axes.y1, axes.log_y)
    if None in (fx0, fx1, fy0, fy1):
        return {}

    def paper(pts):
        out = []
        for piece in clip_polyline(pts, axes):
            out.append([((_fwd(x, axes.log_x) - fx0) / (fx1 - fx0) * 500.0,
                         (_fwd(y, axes.log_y) - fy0) / (fy1 - fy0) * 400.0) for x, y in piece])
        return [p for p in out if len(p) >= 2]

    paths = [paper(pts) if pen.line else [] for pts, pen in zip(points, all_pens)]
    found: dict[int, int] = {}
    for b in range(len(paths)):
        if not paths[b]:
            continue
        samples = [p for piece in paths[b] for p in _sample(piece, 12)]
        for a in range(b):
            if not paths[a]:
                continue
            segs = [(p, q) for piece in paths[a] for p, q in zip(piece, piece[1:])]
            if len(segs) > 80:
                segs = segs[::math.ceil(len(segs) / 80)] + [segs[-1]]
            close = int((_distances_to(samples, segs) <= _COINCIDE_PT).sum()) if samples else 0
            if samples and close >= 0.8 * len(samples):
                found[b] = a
                break
    return found


def _curve_tags(ops, paper_paths, all_pens, box, coincide) -> None:
    """Each entry's number on its curve, placed clear of the other numbers, on a white patch."""
    placed: list[tuple[float, float, float, float]] = []
    bx0, by0, bx1, by1 = box
    for i in sorted(paper_paths):
        pieces = paper_paths[i]
        if not pieces:
            continue
        tag = str(i + 1) if i not in coincide else f"{coincide[i] + 1}={i + 1}"
        w = runs_width(text_runs(tag, FONT_SIZE, True)) + 3
        path = max(pieces, key=len)
        candidates = along(path, (0.82, 0.62, 0.42, 0.22, 0.08, 0.95)) if len(path) > 1 else list(path)
        choice = None
        for cx, cy in candidates:
            r = (cx + 2, cy + 2, cx + 2 + w, cy + 11)
            if r[0] < bx0 or r[2] > bx1 - 1 or r[1] < by0 or r[3] > by1 - 1:
                continue
            if any(not (r[2] < q[0] or r[0] > q[2] or r[3] < q[1] or r[1] > q[3]) for q in placed):
                continue
            choice = r
            break
        if choice is None:
            cx, cy = candidates[0]
            choice = (min(max(cx + 2, bx0 + 1), bx1 - w - 1), min(max(cy + 2, by0 + 1), by1 - 12),
                      0.0, 0.0)
            choice = (choice[0], choice[1], choice[0] + w, choice[1] + 9)
        placed.append(choice)
        x, y = choice[0], choice[1]
        ops.append(["path", None, 0, None, [[x, y, x + w, y, x + w, y + 9, x, y + 9]], "#ffffff"])
        _text(ops, x + 1.5, y + 2, tag, color=all_pens[i].color, bold=True)


# ---------------------------------------------------------------------------------------------------- replay


def draw_ops(canv, ops) -> None:
    """Replay a figure's operations on a reportlab canvas at its current origin (public canvas calls only)."""
    from reportlab.lib.colors import HexColor

    colors: dict[str, object] = {}

    def color(hexa):
        c = colors.get(hexa)
        if c is None:
            c = colors[hexa] = HexColor(hexa)
        return c

    canv.saveState()
    canv.setLineJoin(1)
    for op in ops:
        kind = op[0]
        if kind == "path":
            _, stroke, width, dash, subpaths, fill = op
            p = canv.beginPath()
            for sp in subpaths:
                p.moveTo(sp[0], sp[1])
                for k in range(2, len(sp), 2):
                    p.lineTo(sp[k], sp[k + 1])
                if fill:
                    p.close()
            if stroke:
                canv.setStrokeColor(color(stroke))
                canv.setLineWidth(width)
                if dash:
                    canv.setDash(dash, 0)
                else:
                    canv.setDash()
            if fill:
                canv.setFillColor(color(fill))
            canv.drawPath(p, stroke=1 if stroke else 0, fill=1 if fill else 0)
        elif kind == "markers":
            _, shape, size, col, filled, flat = op
            p = canv.beginPath()
            r = size / 2
            for k in range(0, len(flat), 2):
                _marker_path(p, shape, flat[k], flat[k + 1], r)
            canv.setStrokeColor(color(col))
            canv.setLineWidth(0.8)
            canv.setDash()
            if filled:
                canv.setFillColor(color(col))
            elif shape not in ("cross", "plus"):
                canv.setFillColor(color("#ffffff"))
            canv.drawPath(p, stroke=1, fill=0 if shape in ("cross", "plus") else 1)
        elif kind == "text":
            _, x, y, runs, col, angle = op
            canv.setFillColor(color(col))
            if angle:
                canv.saveState()
                canv.translate(x, y)
                canv.rotate(angle)
                t = canv.beginText(0, 0)
            else:
                t = canv.beginText(x, y)
            for text, font, size, rise in runs:
                t.setFont(font, size)
                t.setRise(rise)
                t.textOut(text)
            canv.drawText(t)
            if angle:
                canv.restoreState()
    canv.restoreState()


def _marker_path(p, shape: str, x: float, y: float, r: float) -> None:
    if shape == "circle":
        p.circle(x, y, r)
    elif shape == "square":
        p.rect(x - r * 0.85, y - r * 0.85, 1.7 * r, 1.7 * r)
    elif shape == "triangle":
        p.moveTo(x, y + r * 1.1)
        p.lineTo(x - r, y - r * 0.7)
        p.lineTo(x + r, y - r * 0.7)
        p.close()
    elif shape == "diamond":
        p.moveTo(x, y + r * 1.15)
        p.lineTo(x + r, y)
        p.lineTo(x, y - r * 1.15)
        p.lineTo(x - r, y)
        p.close()
    elif shape == "cross":
        p.moveTo(x - r, y - r)
        p.lineTo(x + r, y + r)
        p.moveTo(x - r, y + r)
        p.lineTo(x + r, y - r)
    else:  # plus
        p.moveTo(x - r, y)
        p.lineTo(x + r, y)
        p.moveTo(x, y - r)
        p.lineTo(x, y + r)
