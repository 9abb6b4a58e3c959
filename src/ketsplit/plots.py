"""Pictures of exact expressions across the range of one real parameter.

A :class:`Chart` holds sampled curves (values from ball arithmetic, so a
sample is either trustworthy to far better than a pixel or left out) and the
parameter values worth marking (where the Schmidt rank drops).  It is drawn
as Unicode text for the terminal (80 columns) or as SVG written by this
module; PNG goes through matplotlib when that optional extra is installed.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from typing import Mapping, Sequence
from xml.sax.saxutils import escape

import sympy
from flint import acb, arb, fmpq

from .base.files import write_atomic
from .figures import without_extrema
from .base.errors import InputError
from .numeric.enclose import Encloser
from .language.printer import text as expr_text

GLYPHS = "●○◆◇■□+x"  # ▲ is kept for the strata markers
COLOURS = ("#1f4e79", "#c0392b", "#27ae60", "#8e44ad", "#d68910", "#148f77", "#7b241c", "#2e4053")
SAMPLE_BITS = 64
WIDTH, HEIGHT = 64, 16          # terminal plot area in characters
MARGIN = 8                      # columns for the y tick labels
LINE = 80                       # the terminal width the plot must fit


@dataclass(frozen=True)
class Curve:
    label: str
    ys: tuple[float | None, ...]   # None where the value could not be enclosed


@dataclass(frozen=True)
class Marker:
    x: sympy.Expr                  # exact parameter value
    label: str


@dataclass(frozen=True)
class Chart:
    title: str
    xname: str
    lo: sympy.Expr
    hi: sympy.Expr
    xs: tuple[float, ...]
    curves: tuple[Curve, ...]
    markers: tuple[Marker, ...] = ()

    def y_range(self) -> tuple[float, float]:
        values = [y for c in self.curves for y in c.ys if y is not None]
        if not values:
            raise InputError("nothing to plot: no value could be evaluated across the range")
        low, high = nice(min(0.0, min(values)), -1), nice(max(values), 1)
        return (low, high) if high > low else (low, low + 1.0)


def nice(value: float, direction: int) -> float:
    """``value`` rounded outwards (direction 1 up, -1 down) to two significant digits,
    so that an axis ends at 1 rather than at a sample's 0.998."""
    if value == 0:
        return 0.0
    step = 10.0 ** (math.floor(math.log10(abs(value))) - 1)
    rounded = (math.ceil if direction > 0 else math.floor)(value / step - direction * 1e-9) * step
    return float(f"{rounded:.12g}")


def sample_points(lo: sympy.Expr, hi: sympy.Expr, count: int) -> list[sympy.Rational]:
    """Midpoints of ``count`` equal cells of [lo, hi], as rationals near the exact ones
    (open cells keep away from the endpoints, where figures such as p log p are 0 log 0)."""
    lo_f, hi_f = float(lo), float(hi)
    return [sympy.Rational(lo_f + (k + 0.5) * (hi_f - lo_f) / count) for k in range(count)]


def _value(expr: sympy.Expr, symbol: sympy.Symbol, x: sympy.Rational) -> float | None:
    """The sample at x: the midpoint of a ball narrower than 1e-9 of the value, else a gap."""
    encloser = Encloser(SAMPLE_BITS)
    encloser.memo[symbol] = acb(arb(fmpq(int(x.p), int(x.q))))  # the parameter's value
    try:
        ball = encloser(expr)
    except (InputError, ArithmeticError, ZeroDivisionError):
        return None
    if not ball.is_finite() or not ball.imag.contains(0):
        return None
    real = ball.real
    if float(real.rad()) > 1e-9 * (1 + abs(float(real.mid()))):
        return None
    return float(real.mid())


def sample(curves: Mapping[str, sympy.Expr], symbol: sympy.Symbol, lo: sympy.Expr, hi: sympy.Expr,
           count: int) -> tuple[tuple[float, ...], tuple[Curve, ...]]:
    points = sample_points(lo, hi, count)
    xs = tuple(float(x) for x in points)
    return xs, tuple(Curve(label, tuple(_value(without_extrema(e), symbol, x) for x in points))
                     for label, e in curves.items())


def make_chart(title: str, curves: Mapping[str, sympy.Expr], symbol: sympy.Symbol,
               bounds: tuple[sympy.Expr, sympy.Expr], markers: Sequence[Marker] = (),
               count: int = WIDTH) -> Chart:
    lo, hi = bounds
    if not bool(hi > lo):
        raise InputError(f"the range of {symbol.name} is the single point {expr_text(lo)}: "
                         "nothing to plot across")
    xs, sampled = sample(curves, symbol, lo, hi, count)
    return Chart(title, symbol.name, lo, hi, xs, sampled, tuple(markers))


# -- terminal ----------------------------------------------------------------
def _tick(value: float) -> str:
    return f"{value:.3g}"


def _column(x: float, chart: Chart, width: int) -> int:
    lo, hi = float(chart.lo), float(chart.hi)
    return min(width - 1, max(0, round((x - lo) / (hi - lo) * (width - 1))))


def terminal_lines(chart: Chart, width: int = WIDTH, height: int = HEIGHT) -> tuple[str, ...]:
    """The chart (without its title, which the report carries) as lines of at most
    LINE characters."""
    low, high = chart.y_range()
    grid = [[" "] * width for _ in range(height)]
    for marker in chart.markers:
        column = _column(float(marker.x), chart, width)
        for row in grid:
            row[column] = "┊"
    for k, curve in enumerate(chart.curves):
        glyph = GLYPHS[k % len(GLYPHS)]
        for x, y in zip(chart.xs, curve.ys):
            if y is not None:
                row = round((y - low) / (high - low) * (height - 1))
                grid[height - 1 - row][_column(x, chart, width)] = glyph
    ticks = {0: high, (height - 1) // 2: (low + high) / 2, height - 1: low}
    lines = []
    for r, row in enumerate(grid):
        label = _tick(ticks[r]).rjust(MARGIN - 1) + " ┤" if r in ticks else " " * MARGIN + "│"
        lines.append(label + "".join(row).rstrip())
    lines.extend(_x_axis(chart, width))
    return tuple(lines)


def _x_axis(chart: Chart, width: int) -> list[str]:
    axis = ["─"] * width
    room = max(width + 2, LINE - MARGIN - 1 - len(chart.xname) - 2)
    labels = [" "] * room
    for k in range(5):
        value = chart.lo + (chart.hi - chart.lo) * sympy.Rational(k, 4)
        column = round(k * (width - 1) / 4)
        axis[column] = "┬"
        word = expr_text(sympy.nsimplify(value) if value.is_Float else value)
        start = max(0, min(column - len(word) // 2, room - len(word)))
        labels[start:start + len(word)] = list(word)
    lines = [" " * MARGIN + "└" + "".join(axis),
             " " * (MARGIN + 1) + "".join(labels).ljust(room) + f"  {chart.xname}"]
    if len(chart.curves) > 1:
        lines.extend(_legend([f"{GLYPHS[k % len(GLYPHS)]} {c.label}" for k, c in enumerate(chart.curves)]))
    if chart.markers:
        marks = [" "] * width
        for marker in chart.markers:
            marks[_column(float(marker.x), chart, width)] = "▲"
        lines.append(" " * (MARGIN + 1) + "".join(marks).rstrip())
        lines.extend(" " * MARGIN + f"▲ {m.label}" for m in chart.markers)
    return lines


def _legend(entries: list[str]) -> list[str]:
    """Legend entries on as many lines of at most LINE characters as they need."""
    lines, current = [], ""
    for entry in entries:
        if current and len(" " * MARGIN + current + "  " + entry) > LINE:
            lines.append(" " * MARGIN + current)
            current = entry
        else:
            current = f"{current}  {entry}" if current else entry
    return lines + [" " * MARGIN + current]


# -- SVG -----------------------------------------------------------------------
SVG_W, SVG_H = 720, 440
PLOT_X0, PLOT_X1, PLOT_Y0, PLOT_Y1 = 70, 690, 40, 370


def svg_text(chart: Chart) -> str:
    """A standalone SVG document of the chart."""
    low, high = chart.y_range()
    lo, hi = float(chart.lo), float(chart.hi)

    def px(x: float) -> float:
        return PLOT_X0 + (x - lo) / (hi - lo) * (PLOT_X1 - PLOT_X0)

    def py(y: float) -> float:
        return PLOT_Y1 - (y - low) / (high - low) * (PLOT_Y1 - PLOT_Y0)

    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{SVG_W}" height="{SVG_H}" '
             f'viewBox="0 0 {SVG_W} {SVG_H}" font-family="sans-serif" font-size="12">',
             f'<rect width="{SVG_W}" height="{SVG_H}" fill="white"/>',
             f'<text x="{SVG_W / 2}" y="22" text-anchor="middle" font-size="14">'
             f'{escape(chart.title)}</text>',
             f'<path d="M{PLOT_X0},{PLOT_Y0} V{PLOT_Y1} H{PLOT_X1}" fill="none" stroke="black"/>']
    for k in range(5):
        y = low + (high - low) * k / 4
        parts.append(f'<line x1="{PLOT_X0 - 5}" y1="{py(y):.1f}" x2="{PLOT_X0}" y2="{py(y):.1f}" '
                     f'stroke="black"/><text x="{PLOT_X0 - 8}" y="{py(y) + 4:.1f}" '
                     f'text-anchor="end">{_tick(y)}</text>')
        value = chart.lo + (chart.hi - chart.lo) * sympy.Rational(k, 4)
        x = px(float(value))
        parts.append(f'<line x1="{x:.1f}" y1="{PLOT_Y1}" x2="{x:.1f}" y2="{PLOT_Y1 + 5}" stroke="black"/>'
                     f'<text x="{x:.1f}" y="{PLOT_Y1 + 20}" text-anchor="middle">'
                     f'{escape(expr_text(value))}</text>')
    parts.append(f'<text x="{(PLOT_X0 + PLOT_X1) / 2}" y="{PLOT_Y1 + 40}" text-anchor="middle">'
                 f'{escape(chart.xname)}</text>')
    for marker in chart.markers:
        x = px(float(marker.x))
        parts.append(f'<line x1="{x:.1f}" y1="{PLOT_Y0}" x2="{x:.1f}" y2="{PLOT_Y1}" stroke="grey" '
                     f'stroke-dasharray="4 3"><title>{escape(marker.label)}</title></line>')
    for k, curve in enumerate(chart.curves):
        colour = COLOURS[k % len(COLOURS)]
        for run in _runs(chart.xs, curve.ys):
            points = " ".join(f"{px(x):.1f},{py(y):.1f}" for x, y in run)
            parts.append(f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="2"/>')
        parts.append(f'<text x="{PLOT_X1 - 150}" y="{PLOT_Y0 + 16 * (k + 1)}" fill="{colour}">'
                     f'{escape(curve.label)}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def _runs(xs: Sequence[float], ys: Sequence[float | None]) -> list[list[tuple[float, float]]]:
    """Consecutive samples without gaps."""
    runs: list[list[tuple[float, float]]] = [[]]
    for x, y in zip(xs, ys):
        if y is None:
            runs.append([])
        else:
            runs[-1].append((x, y))
    return [r for r in runs if r]


# -- files ---------------------------------------------------------------------
def write_chart(chart: Chart, path: str) -> str:
    """Write the chart to ``path`` (.svg, or .png with matplotlib); the absolute path."""
    extension = os.path.splitext(path)[1].lower()
    if extension not in (".svg", ".png"):
        raise InputError(f"plot files end in .svg (or .png), found {path!r}")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise InputError(f"no folder {folder!r} to write the plot into")
    if extension == ".png":
        _write_png(chart, path)
    else:
        write_atomic(path, svg_text(chart))
    return os.path.abspath(path)


def _write_png(chart: Chart, path: str) -> None:
    try:
        import matplotlib
        matplotlib.use("Agg")
        from matplotlib import pyplot
    except ImportError:
        raise InputError("PNG output needs matplotlib (pip install 'ketsplit[plot]'); "
                         "write an .svg file instead") from None
    figure, axes = pyplot.subplots(figsize=(7.2, 4.4))
    for curve in chart.curves:
        axes.plot(chart.xs, [float("nan") if y is None else y for y in curve.ys], label=curve.label)
    for marker in chart.markers:
        axes.axvline(float(marker.x), linestyle="--", color="grey")
    axes.set_xlabel(chart.xname)
    axes.set_title(chart.title)
    if len(chart.curves) > 1:
        axes.legend()
    figure.savefig(path)
    pyplot.close(figure)
