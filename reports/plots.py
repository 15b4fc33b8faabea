"""Vector drawings for the sheet, from the record's :class:`machines.record.Drawing` objects (reportlab graphics).

One function turns a record drawing into a reportlab ``Drawing`` of a given size: a ``LinePlot`` with logarithmic
axes where the record asks for them (time-current curves are read log-log), linear axes otherwise; an R-X drawing
keeps one scale on both axes so circles stay round, and shows the R and X axes through the origin.

Readable in black and white: every series has its own pen (solid, dashed or dotted line, and a marker when two
series share a line style), alternately black and the sheet's one accent colour, and the legend under the plot
draws each pen. Layout only: points outside the axis range are clipped (reportlab does not clip), values that a
log axis cannot show (zero, negative) are left out; nothing is calculated.
"""

from __future__ import annotations

import math
from typing import Iterable, NamedTuple

from reports.fonts import SANS, plain, register
from reports.formatting import number

ACCENT_HEX = "#0b5563"  # dark teal: the sheet's one accent colour
FONT_SIZE = 7.5
_DASH = {"line": None, "step": None, "dashed": [5.0, 2.5], "dotted": [1.0, 1.8], "points": None}
_MARKERS = ("FilledCircle", "Square", "FilledTriangle", "FilledDiamond", "Circle", "Triangle", "FilledSquare",
            "Cross")
_MARKERS_PER_CURVE = 5
_CIRCLE_POINTS = 145


class Pen(NamedTuple):
    """How one series is drawn: colour, width, dash pattern (None: solid), marker name (None: no marker)."""

    color: object
    width: float
    dash: list[float] | None
    marker: str | None
    line: bool


def accent():
    from reportlab.lib.colors import HexColor

    return HexColor(ACCENT_HEX)


def pens(styles: Iterable[str]) -> list[Pen]:
    """A distinct pen for each series style, in order: alternately black and accent; a marker on repeats.

    >>> [(p.dash, p.marker, p.line) for p in pens(["line", "line", "points", "dashed"])]
    [(None, None, True), (None, 'FilledCircle', True), (None, 'Square', False), ([5.0, 2.5], None, True)]
    """
    from reportlab.lib.colors import black

    out = []
    seen: dict[str, int] = {}
    markers_used = 0
    for i, style in enumerate(styles):
        key = "line" if style == "step" else style
        n = seen.get(key, 0)
        seen[key] = n + 1
        marker = None
        if style == "points" or n > 0:
            marker = _MARKERS[markers_used % len(_MARKERS)]
            markers_used += 1
        color = black if i % 2 == 0 else accent()
        out.append(Pen(color, 1.1 if style == "dotted" else 1.0, _DASH.get(style), marker, style != "points"))
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


def markers_along(pieces: list[list[tuple[float, float]]], axes: Axes, size: tuple[float, float],
                  count: int) -> list[tuple[float, float]]:
    """``count`` marker positions spread evenly along the drawn length of a curve (as it appears on paper).

    >>> markers_along([[(0.0, 0.0), (10.0, 0.0)]], Axes(0, 10, 0, 1, False, False), (100.0, 10.0), 2)
    [(2.5, 0.0), (7.5, 0.0)]
    """
    def paper(p):
        x, y = _fwd(p[0], axes.log_x), _fwd(p[1], axes.log_y)
        return ((x - x0) / (x1 - x0) * size[0], (y - y0) / (y1 - y0) * size[1])

    x0, x1 = _fwd(axes.x0, axes.log_x), _fwd(axes.x1, axes.log_x)
    y0, y1 = _fwd(axes.y0, axes.log_y), _fwd(axes.y1, axes.log_y)
    segments = []
    for piece in pieces:
        for a, b in zip(piece, piece[1:]):
            pa, pb = paper(a), paper(b)
            segments.append((a, b, math.hypot(pb[0] - pa[0], pb[1] - pa[1])))
    total = sum(length for _, _, length in segments)
    if total <= 0:
        return []
    out = []
    targets = [(k + 0.5) / count * total for k in range(count)]
    run = 0.0
    for a, b, length in segments:
        while targets and targets[0] <= run + length:
            f = (targets.pop(0) - run) / length if length else 0.0
            ta = (_fwd(a[0], axes.log_x), _fwd(a[1], axes.log_y))
            tb = (_fwd(b[0], axes.log_x), _fwd(b[1], axes.log_y))
            out.append((_back(ta[0] + f * (tb[0] - ta[0]), axes.log_x), _back(ta[1] + f * (tb[1] - ta[1]), axes.log_y)))
        run += length
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


# ---------------------------------------------------------------------------------------------------- drawing


def render(d, width: float, height: float):
    """A reportlab graphics ``Drawing`` of ``width`` × at most ``height`` points for the record drawing ``d``.

    reportlab's check of every shape attribute as it is set is switched off while the drawing is built (the values
    come from this module, not from the user; the tests build every kind of drawing with the check on, see
    :data:`CHECK_SHAPES`): the same shapes, a good part of the build time saved.
    """
    from reportlab import rl_config

    checking, rl_config.shapeChecking = rl_config.shapeChecking, int(CHECK_SHAPES)
    try:
        return _render(d, width, height)
    finally:
        rl_config.shapeChecking = checking


CHECK_SHAPES = False  #: True: let reportlab validate each shape attribute while a drawing is built (for tests)


def _render(d, width: float, height: float):
    from reportlab.graphics.charts.axes import LogXValueAxis, LogYValueAxis, XValueAxis, YValueAxis
    from reportlab.graphics.charts.lineplots import LinePlot
    from reportlab.graphics.shapes import Drawing, Group, Line, String
    from reportlab.graphics.widgets.markers import makeMarker
    from reportlab.lib.colors import Color, black

    register()
    rx = d.kind == "r-x"
    log_x, log_y = (False, False) if rx else (bool(d.log_x), bool(d.log_y))
    entries = [(s.label, s.style) for s in d.series] + [(c.label, c.style) for c in d.circles if not (log_x or log_y)]
    all_pens = pens([style for _, style in entries])

    legend_rows = _legend_layout([label for label, _ in entries], width - 20)
    legend_h = 12.0 * len(legend_rows) + (6 if legend_rows else 0)
    left, right, top, bottom = 52.0, 14.0, 8.0, 34.0
    plot_w, plot_h = width - left - right, height - top - bottom - legend_h

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
    if rx:  # one scale on both axes: shrink the plot box to the ranges' aspect ratio
        scale = min(plot_w / (x1 - x0), plot_h / (y1 - y0))
        extra_w = plot_w - scale * (x1 - x0)
        plot_w, plot_h = scale * (x1 - x0), scale * (y1 - y0)
        left += extra_w / 2
        height = top + bottom + legend_h + plot_h
    axes = Axes(x0, x1, y0, y1, log_x, log_y)

    drawing = Drawing(width, height, initialFontName=SANS, initialFontSize=FONT_SIZE)
    lp = LinePlot()
    lp.x, lp.y, lp.width, lp.height = left, bottom + legend_h, plot_w, plot_h
    lp.xValueAxis = LogXValueAxis() if log_x else XValueAxis()
    lp.yValueAxis = LogYValueAxis() if log_y else YValueAxis()
    grid = Color(0.55, 0.55, 0.55)
    subgrid = Color(0.8, 0.8, 0.8)
    for axis, lo, hi, step, log in ((lp.xValueAxis, x0, x1, x_step, log_x), (lp.yValueAxis, y0, y1, y_step, log_y)):
        axis.valueMin, axis.valueMax = lo, hi
        if step and not log:
            axis.valueStep = step
        axis.labels.fontName = SANS
        axis.labels.fontSize = FONT_SIZE
        axis.labelTextFormat = _tick_label
        axis.visibleGrid = 1
        axis.gridStrokeColor = grid
        axis.gridStrokeWidth = 0.35
        axis.strokeWidth = 0.8
        axis.avoidBoundSpace = 0
        if log:
            axis.subTickNum = 10
            axis.visibleSubGrid = 1
            axis.visibleSubTicks = 1
            axis.subGridStrokeColor = subgrid
            axis.subGridStrokeWidth = 0.25
    lp.xValueAxis.labels.dy = -4
    lp.yValueAxis.labels.dx = -4

    data, styles = [], []
    for (label, style), pen, pts in zip(entries, all_pens, _entry_points(d, log_x, log_y)):
        if style == "step":
            pts = step_points(pts)
        pieces = [p for p in clip_polyline(pts, axes) if len(p) >= 2] if pen.line else []
        for piece in pieces:
            data.append(piece)
            styles.append((pen, False))
        if pen.marker:
            if pen.line:
                inside = markers_along(pieces, axes, (plot_w, plot_h), _MARKERS_PER_CURVE)
            else:
                inside = [(x, y) for x, y in pts if _inside(x, y, axes)]
            if inside:
                data.append(inside)
                styles.append((pen, True))
    if not data:  # an empty frame still needs one row; draw it invisibly
        data, styles = [[(x0, y0), (x0, y0)]], [(Pen(None, 0, None, None, True), False)]
    lp.data = data
    for i, (pen, markers_only) in enumerate(styles):
        line = lp.lines[i]
        if markers_only:
            line.lineStyle = "line"
            line.strokeColor = pen.color
            line.strokeWidth = 0
            line.symbol = _marker(makeMarker, pen)
        else:
            line.lineStyle = "joinedLine"
            line.strokeColor = pen.color
            line.strokeWidth = pen.width
            line.strokeDashArray = pen.dash
            line.symbol = None
    drawing.add(lp)

    # axes through the origin on an R-X plane
    if rx:
        def sx(v):
            return left + (v - x0) / (x1 - x0) * plot_w

        def sy(v):
            return bottom + legend_h + (v - y0) / (y1 - y0) * plot_h

        if x0 < 0 < x1:
            drawing.add(Line(sx(0), sy(y0), sx(0), sy(y1), strokeColor=black, strokeWidth=0.7))
        if y0 < 0 < y1:
            drawing.add(Line(sx(x0), sy(0), sx(x1), sy(0), strokeColor=black, strokeWidth=0.7))

    # axis titles
    plot_bottom = bottom + legend_h
    drawing.add(String(left + plot_w / 2, plot_bottom - 26, plain(d.x_label), fontName=SANS, fontSize=FONT_SIZE + 0.5,
                       textAnchor="middle"))
    ylab = Group(String(0, 0, plain(d.y_label), fontName=SANS, fontSize=FONT_SIZE + 0.5, textAnchor="middle"))
    ylab.transform = (0, 1, -1, 0, left - 40, plot_bottom + plot_h / 2)
    drawing.add(ylab)

    # legend
    y = legend_h - 12.0
    for row in legend_rows:
        for index, xpos in row:
            label, style = entries[index]
            pen = all_pens[index]
            ly = y + 3
            if pen.line:
                drawing.add(Line(xpos, ly, xpos + 22, ly, strokeColor=pen.color, strokeWidth=pen.width,
                                 strokeDashArray=pen.dash))
            if pen.marker:
                m = _marker(makeMarker, pen)
                m.x, m.y = xpos + 11, ly
                drawing.add(m)
            drawing.add(String(xpos + 27, y, plain(label), fontName=SANS, fontSize=FONT_SIZE))
        y -= 12.0
    return lean(drawing)


# ---------------------------------------------------------------------------------------------------- lean tree


_IDENTITY = (1, 0, 0, 1, 0, 0)


def lean(drawing):
    """The same picture with fewer PDF operators: widgets expanded, plain groups dissolved, lines merged.

    reportlab writes every node with its own save/restore, transform and pen: a LinePlot is a tree of groups with
    identity or translate-only transforms (each tick label in its own group), and every grid line is a node. Here a
    group that sets nothing but a translation is dissolved (its shapes moved by the translation), and consecutive
    solid lines drawn with the same pen become one path of separate strokes. Draw order, pens and coordinates stay
    as they were, so the page looks the same; a group with any other state or transform is kept as it is.
    """
    from reportlab.graphics.shapes import Drawing

    contents = _lean_nodes(drawing.contents, 0.0, 0.0)
    out = Drawing(drawing.width, drawing.height, *contents, initialFontName=drawing.initialFontName,
                  initialFontSize=drawing.initialFontSize)
    out.transform = drawing.transform
    return out


def _expanded(node):
    while hasattr(node, "provideNode"):
        node = node.provideNode()
    return node


def _lean_nodes(nodes, dx: float, dy: float) -> list:
    from reportlab.graphics.shapes import Group, Line

    flat: list = []
    for node in nodes:
        node = _expanded(node)
        if node is None:
            continue
        if isinstance(node, Group):
            t = tuple(node.transform)
            if _group_state_free(node) and t[:4] == _IDENTITY[:4]:
                flat += _lean_nodes(node.contents, dx + t[4], dy + t[5])
                continue
            if dx or dy:  # a kept group moves as a whole
                if t[:4] != _IDENTITY[:4]:
                    flat.append(_wrapped(node, dx, dy))
                    continue
                node.transform = (1, 0, 0, 1, t[4] + dx, t[5] + dy)
            node.contents = _lean_nodes(node.contents, 0.0, 0.0)
            flat.append(node)
            continue
        if (dx or dy) and not _moved(node, dx, dy):
            flat.append(_wrapped(node, dx, dy))
            continue
        flat.append(node)
    return _merge_lines(flat, Line)


def _wrapped(node, dx: float, dy: float):
    from reportlab.graphics.shapes import Group

    g = Group(node)
    g.transform = (1, 0, 0, 1, dx, dy)
    return g


def _group_state_free(group) -> bool:
    from reportlab.graphics.renderbase import getStateDelta

    return all(key == "transform" for key in getStateDelta(group))


def _moved(node, dx: float, dy: float) -> bool:
    """Shift a shape by (dx, dy) in place; False for a kind of shape this does not know how to move."""
    from reportlab.graphics.shapes import Circle, Line, PolyLine, Polygon, Rect, String

    if isinstance(node, Line):
        node.x1 += dx
        node.x2 += dx
        node.y1 += dy
        node.y2 += dy
    elif isinstance(node, (String, Rect)):
        node.x += dx
        node.y += dy
    elif isinstance(node, Circle):
        node.cx += dx
        node.cy += dy
    elif isinstance(node, (PolyLine, Polygon)):
        pts = list(node.points)
        node.points = [v + (dx if i % 2 == 0 else dy) for i, v in enumerate(pts)]
    else:
        return False
    return True


def _merge_lines(nodes: list, line_class) -> list:
    """Runs of solid lines with the same pen as one path (each line its own stroke)."""
    from reportlab.graphics.renderbase import getStateDelta
    from reportlab.graphics.shapes import Path

    out: list = []
    run: list = []
    pen = None

    def flush():
        if len(run) == 1:
            out.append(run[0])
        elif run:
            path = Path(fillColor=None, **{k: v for k, v in pen.items() if k != "fillColor"})
            for ln in run:
                path.moveTo(ln.x1, ln.y1)
                path.lineTo(ln.x2, ln.y2)
            out.append(path)
        run.clear()

    for node in nodes:
        if type(node) is line_class:
            delta = getStateDelta(node)
            if not delta.get("strokeDashArray"):
                if run and delta == pen:
                    run.append(node)
                    continue
                flush()
                run.append(node)
                pen = delta
                continue
        flush()
        out.append(node)
    flush()
    return out


def _usable_range(r, log: bool) -> bool:
    """A given axis range that can be drawn (else the range is taken from the data)."""
    if not r or len(r) != 2:
        return False
    lo, hi = float(r[0]), float(r[1])
    return math.isfinite(lo) and math.isfinite(hi) and hi > lo and (lo > 0 or not log)


def _inside(x: float, y: float, axes: Axes) -> bool:
    return axes.x0 <= x <= axes.x1 and axes.y0 <= y <= axes.y1


def _entry_points(d, log_x: bool, log_y: bool):
    for s in d.series:
        yield [(float(x), float(y)) for x, y in s.points]
    if not (log_x or log_y):
        for c in d.circles:
            yield circle_points(tuple(map(float, c.center)), float(c.radius))


def _marker(make, pen: Pen):
    from reportlab.lib.colors import white

    m = make(pen.marker)
    m.size = 5.5
    m.strokeColor = pen.color
    m.strokeWidth = 0.8
    m.fillColor = pen.color if pen.marker.startswith("Filled") or pen.marker == "Cross" else white
    return m


def _tick_label(value: float) -> str:
    return number(value, 3)


def _legend_layout(labels: list[str], width: float) -> list[list[tuple[int, float]]]:
    """Legend entries placed left to right in rows: [[(entry index, x position), ...], ...]."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    rows: list[list[tuple[int, float]]] = []
    row: list[tuple[int, float]] = []
    x = 10.0
    for i, label in enumerate(labels):
        w = 27 + stringWidth(plain(label), SANS, FONT_SIZE) + 14
        if row and x + w > width:
            rows.append(row)
            row, x = [], 10.0
        row.append((i, x))
        x += w
    if row:
        rows.append(row)
    return rows

