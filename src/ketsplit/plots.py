"""Pictures of exact expressions across the range of one or two real parameters.

A :class:`Chart` holds sampled curves and the parameter values worth marking
(where the Schmidt rank drops); a :class:`Map` holds one figure over a grid of
two parameters and the curves where the rank drops.  Samples come from the
closed forms through :mod:`ketsplit.sweep` (float64 with an error bound; a
sample whose bound exceeds a millionth of the value's scale, or that is not
finite, is left out rather than drawn wrong).  A chart is drawn as Unicode
text for the terminal (80 columns), and both are drawn by matplotlib through
its object API (a ``Figure`` with its own Agg canvas: never pyplot, never the
user's backend) as svg, pdf or png; in a notebook they show themselves inline.
"""

from __future__ import annotations

import csv
import io
import math
import os
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable, Mapping, Sequence

import numpy
import sympy

from .base.errors import InputError
from .cuts import Cut
from .decomposition import decompose
from .figures import LOGARITHMIC, Spectrum, renyi_of, spectrum_figures, without_extrema
from .language.printer import text as expr_text
from .states import State
from .strata import strata
from .sweep import NotVectorised, ball_value, compiled

GLYPHS = "●○◆◇■□+x"  # ▲ is kept for the strata markers
WIDTH, HEIGHT = 64, 16          # terminal plot area in characters
MARGIN = 8                      # columns for the y tick labels
LINE = 80                       # the terminal width the plot must fit
FILE_SAMPLES = 401              # samples of a curve drawn to a file
MAP_SAMPLES = 81                # samples along each axis of a map
TRUSTED = 1e-6                  # a sample is drawn when its error bound is below this (relative to 1 + |y|)
FORMATS = (".svg", ".pdf", ".png")
SHADES = " .:-=+*#%@"
BALL_RETRIES = 200              # untrusted float samples tried again in balls (the rest stay gaps)


@dataclass(frozen=True)
class Curve:
    label: str
    ys: tuple[float | None, ...]   # None where the value could not be evaluated with trust


@dataclass(frozen=True)
class Marker:
    x: sympy.Expr                  # exact parameter value
    label: str
    owner: str = ""                # the label prefix of the curves it belongs to ('' : all)


@dataclass(frozen=True)
class Chart:
    title: str
    xname: str
    lo: sympy.Expr
    hi: sympy.Expr
    xs: tuple[float, ...]
    curves: tuple[Curve, ...]
    markers: tuple[Marker, ...] = ()
    ylabel: str = ""

    def y_range(self) -> tuple[float, float]:
        values = [y for c in self.curves for y in c.ys if y is not None]
        if not values:
            raise InputError("nothing to plot: no value could be evaluated across the range")
        low, high = nice(min(0.0, min(values)), -1), nice(max(values), 1)
        return (low, high) if high > low else (low, low + 1.0)

    def __repr__(self) -> str:
        curves = ", ".join(c.label for c in self.curves)
        return (f"Chart({self.title!r}, {self.xname} in [{expr_text(self.lo)}, {expr_text(self.hi)}], "
                f"{len(self.xs)} samples of {curves}, {len(self.markers)} marks)")

    def _repr_png_(self) -> bytes:
        return figure_bytes(self, "png")

    def _repr_svg_(self) -> str:
        return figure_bytes(self, "svg").decode()


@dataclass(frozen=True, eq=False)
class Map:
    """``values[i][j]`` is the figure at (xs[j], ys[i]); ``loci`` are rank-drop sets drawn on top:
    (label, values of an expression that vanishes on the set, over the same grid) or
    (label, exact points)."""

    title: str
    names: tuple[str, str]
    bounds: tuple[tuple[sympy.Expr, sympy.Expr], tuple[sympy.Expr, sympy.Expr]]
    xs: numpy.ndarray
    ys: numpy.ndarray
    values: numpy.ndarray
    label: str
    loci: tuple[tuple[str, object], ...] = field(default=())

    # -- a value: numpy grids compared entry by entry (a gap, NaN, equals a gap) --
    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Map):
            return NotImplemented
        plain = ("title", "names", "bounds", "label")
        return (all(getattr(self, n) == getattr(other, n) for n in plain)
                and all(same_grid(getattr(self, n), getattr(other, n)) for n in ("xs", "ys", "values"))
                and len(self.loci) == len(other.loci)
                and all(a[0] == b[0] and same_grid(a[1], b[1]) for a, b in zip(self.loci, other.loci)))

    __hash__ = None  # type: ignore[assignment]  # holds numpy arrays

    def __repr__(self) -> str:
        (xlo, xhi), (ylo, yhi) = self.bounds
        return (f"Map({self.title!r}, {self.names[0]} in [{expr_text(xlo)}, {expr_text(xhi)}], "
                f"{self.names[1]} in [{expr_text(ylo)}, {expr_text(yhi)}], "
                f"{self.values.shape[1]}x{self.values.shape[0]} samples of {self.label})")

    def _repr_png_(self) -> bytes:
        return figure_bytes(self, "png")

    def _repr_svg_(self) -> str:
        return figure_bytes(self, "svg").decode()


def same_grid(a, b) -> bool:
    """Equal samples (numpy arrays, NaN equal to NaN) or equal lists of exact points."""
    if isinstance(a, numpy.ndarray) or isinstance(b, numpy.ndarray):
        return (isinstance(a, numpy.ndarray) and isinstance(b, numpy.ndarray)
                and numpy.array_equal(a, b, equal_nan=True))
    return a == b


def nice(value: float, direction: int) -> float:
    """``value`` rounded outwards (direction 1 up, -1 down) to two significant digits,
    so that an axis ends at 1 rather than at a sample's 0.998."""
    if value == 0:
        return 0.0
    step = 10.0 ** (math.floor(math.log10(abs(value))) - 1)
    rounded = (math.ceil if direction > 0 else math.floor)(value / step - direction * 1e-9) * step
    return float(f"{rounded:.12g}")


# -- sampling -------------------------------------------------------------------
def sample_points(lo: sympy.Expr, hi: sympy.Expr, count: int,
                  extra: Sequence[sympy.Expr] = ()) -> list[float]:
    """``count`` equally spaced points from lo to hi (ends included) and the ``extra`` points
    (rank drops), sorted: the curve is drawn through every point it marks."""
    lo_f, hi_f = float(lo), float(hi)
    points = {lo_f + k * (hi_f - lo_f) / (count - 1) for k in range(count)}
    points |= {float(x) for x in extra}
    return sorted(points)


def evaluate(expr: sympy.Expr, inputs: Mapping[sympy.Symbol, numpy.ndarray]) -> numpy.ndarray:
    """The real values of ``expr`` over the arrays; NaN where a value is not trusted to
    TRUSTED of its scale (then tried once more in balls at that point)."""
    expr = without_extrema(expr)
    shape = numpy.broadcast(*inputs.values()).shape if inputs else ()
    try:
        with numpy.errstate(all="ignore"):
            value, error = compiled(expr)({s: numpy.asarray(a, dtype=float) for s, a in inputs.items()})
        value = numpy.broadcast_to(value, shape)
        error = numpy.broadcast_to(error, shape)
        good = numpy.isfinite(value) & (error <= TRUSTED * (1 + abs(value)))
        if numpy.iscomplexobj(value):
            good &= abs(numpy.imag(value)) <= error
        out = numpy.where(good, numpy.real(value), numpy.nan)
    except NotVectorised:
        out, good = numpy.full(shape, numpy.nan), numpy.zeros(shape, dtype=bool)
    arrays = dict(zip(inputs, numpy.broadcast_arrays(*inputs.values())))
    for index in list(zip(*numpy.nonzero(~good)))[:BALL_RETRIES]:
        mid, radius = ball_value(expr, {s: float(a[index]) for s, a in arrays.items()}, 64)
        if radius <= TRUSTED * (1 + abs(mid)):
            out[index] = mid
    return out


def make_chart(title: str, curves: Mapping[str, sympy.Expr], symbol: sympy.Symbol,
               bounds: tuple[sympy.Expr, sympy.Expr], markers: Sequence[Marker] = (),
               count: int = WIDTH, ylabel: str = "",
               exact_at: Callable[[str, sympy.Expr], float | None] | None = None) -> Chart:
    """Curves sampled at ``count`` points and at every marker; ``exact_at(label, x)`` gives a
    value at a marked point where the closed form cannot be evaluated there (0 log 0)."""
    lo, hi = bounds
    if not bool(hi > lo):
        raise InputError(f"the range of {symbol.name} is the single point {expr_text(lo)}: "
                         "nothing to plot across")
    xs = sample_points(lo, hi, count, [m.x for m in markers])
    grid = numpy.array(xs)
    sampled = []
    for label, expr in curves.items():
        ys = evaluate(expr, {symbol: grid})
        for marker in markers if exact_at else ():
            k = xs.index(float(marker.x))
            if numpy.isnan(ys[k]):
                value = exact_at(label, marker.x)
                ys[k] = numpy.nan if value is None else value
        sampled.append(Curve(label, tuple(None if numpy.isnan(y) else float(y) for y in ys)))
    return Chart(title, symbol.name, lo, hi, tuple(xs), tuple(sampled), tuple(markers), ylabel)


def make_map(title: str, expr: sympy.Expr, symbols: tuple[sympy.Symbol, sympy.Symbol],
             bounds, label: str, loci: Sequence[tuple[str, object]] = (),
             count: int = MAP_SAMPLES) -> Map:
    """The figure over a count x count grid of the two ranges; ``loci``: (label, expression
    vanishing on a rank-drop set) or (label, list of exact points)."""
    (xlo, xhi), (ylo, yhi) = bounds
    xs = numpy.linspace(float(xlo), float(xhi), count)
    ys = numpy.linspace(float(ylo), float(yhi), count)
    gx, gy = numpy.meshgrid(xs, ys)
    values = evaluate(expr, {symbols[0]: gx, symbols[1]: gy})
    if numpy.all(numpy.isnan(values)):
        raise InputError("nothing to map: no value could be evaluated across the ranges")
    drawn = []
    for name, locus in loci:
        if isinstance(locus, sympy.Expr):
            with numpy.errstate(all="ignore"):
                level = evaluate(locus, {symbols[0]: gx, symbols[1]: gy})
            drawn.append((name, level))
        else:
            drawn.append((name, locus))
    return Map(title, (symbols[0].name, symbols[1].name), ((xlo, xhi), (ylo, yhi)), xs, ys, values,
               label, tuple(drawn))


# -- ticks ----------------------------------------------------------------------
def pi_ticks(lo: sympy.Expr, hi: sympy.Expr) -> list[tuple[float, str]] | None:
    """Ticks at multiples of pi/k (as '$3\\pi/4$') when both ends are rational multiples of pi."""
    ends = [sympy.simplify(e / sympy.pi) for e in (lo, hi)]
    if not all(e.is_Rational for e in ends):
        return None
    a, b = (Fraction(int(e.p), int(e.q)) for e in ends)
    for k in (1, 2, 3, 4, 6, 8, 12):
        step = Fraction(1, k)
        first = math.ceil(a / step)
        count = math.floor(b / step) - first + 1
        if 5 <= count <= 9:
            return [(float((first + j) * step) * math.pi, pi_label((first + j) * step))
                    for j in range(count)]
    return None


def pi_label(multiple: Fraction) -> str:
    if multiple == 0:
        return "$0$"
    sign = "-" if multiple < 0 else ""
    p, q = abs(multiple.numerator), multiple.denominator
    top = "\\pi" if p == 1 else f"{p}\\pi"
    return f"${sign}{top}$" if q == 1 else f"${sign}{top}/{q}$"


def _pi_axis(axis, lo, hi) -> None:
    ticks = pi_ticks(lo, hi)
    if ticks:
        axis.set_ticks([t for t, _ in ticks])
        axis.set_ticklabels([label for _, label in ticks])


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


def map_lines(chart: Map, width: int = WIDTH, height: int = HEIGHT) -> tuple[str, ...]:
    """A coarse shaded picture of a map for the terminal, darker for larger values."""
    values = chart.values
    low, high = float(numpy.nanmin(values)), float(numpy.nanmax(values))
    span = high - low or 1.0
    rows = []
    for r in range(height):
        i = round((height - 1 - r) * (len(chart.ys) - 1) / (height - 1))
        line = ""
        for c in range(width):
            v = values[i, round(c * (len(chart.xs) - 1) / (width - 1))]
            line += "?" if numpy.isnan(v) else SHADES[min(len(SHADES) - 1, int((v - low) / span * len(SHADES)))]
        rows.append(" " * MARGIN + "│" + line)
    (xlo, xhi), (ylo, yhi) = chart.bounds
    return (f"{chart.names[1]} from {expr_text(ylo)} (bottom) to {expr_text(yhi)} (top)", *rows,
            " " * MARGIN + "└" + "─" * width,
            f"{chart.names[0]} from {expr_text(xlo)} (left) to {expr_text(xhi)} (right); "
            f"shades '{SHADES}' from {low:.3g} to {high:.3g}")


# -- matplotlib ----------------------------------------------------------------
def new_figure():
    """A matplotlib Figure with its own Agg canvas: pyplot's global state is never touched."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure
    figure = Figure(figsize=(6.4, 4.2), layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def draw_chart(figure, chart: Chart) -> None:
    axes = figure.add_subplot()
    xs = numpy.array(chart.xs)
    for curve in chart.curves:
        ys = numpy.array([numpy.nan if y is None else y for y in curve.ys])
        line, = axes.plot(xs, ys, label=curve.label, linewidth=1.6)
        for marker in chart.markers:
            k = chart.xs.index(float(marker.x))
            if curve.label.startswith(marker.owner) and not numpy.isnan(ys[k]):
                axes.plot([xs[k]], [ys[k]], marker="^", color=line.get_color(), markersize=7,
                          linestyle="none")
    for k, marker in enumerate({m.x: m for m in chart.markers}.values()):
        axes.axvline(float(marker.x), linestyle=":", color="grey", linewidth=1,
                     label="rank drops" if k == 0 else None)
    axes.set_xlim(float(chart.lo), float(chart.hi))
    axes.set_xlabel(f"${sympy.latex(sympy.Symbol(chart.xname))}$")
    axes.set_ylabel(chart.ylabel or (chart.curves[0].label if len(chart.curves) == 1 else "value"))
    _pi_axis(axes.xaxis, chart.lo, chart.hi)
    axes.set_title(chart.title, fontsize=10)
    if len(chart.curves) > 1 or chart.markers:
        axes.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, frameon=False)


def draw_map(figure, chart: Map) -> None:
    axes = figure.add_subplot()
    filled = axes.contourf(chart.xs, chart.ys, numpy.ma.masked_invalid(chart.values), levels=20,
                           cmap="viridis")
    figure.colorbar(filled, ax=axes, label=chart.label)
    for k, (name, locus) in enumerate(chart.loci):
        colour = ("red", "white", "orange", "magenta", "cyan")[k % 5]
        if isinstance(locus, numpy.ndarray):
            if numpy.nanmin(locus) < 0 < numpy.nanmax(locus) or numpy.any(locus == 0):
                axes.contour(chart.xs, chart.ys, locus, levels=[0.0], colors=[colour], linewidths=1.5)
                axes.plot([], [], color=colour, label=name)
        else:
            points = [(float(x), float(y)) for x, y in locus]
            axes.plot([p[0] for p in points], [p[1] for p in points], marker="^", linestyle="none",
                      color=colour, label=name)
    (xlo, xhi), (ylo, yhi) = chart.bounds
    axes.set_xlabel(f"${sympy.latex(sympy.Symbol(chart.names[0]))}$")
    axes.set_ylabel(f"${sympy.latex(sympy.Symbol(chart.names[1]))}$")
    _pi_axis(axes.xaxis, xlo, xhi)
    _pi_axis(axes.yaxis, ylo, yhi)
    axes.set_title(chart.title, fontsize=10)
    if chart.loci:
        figure.legend(loc="outside lower center", fontsize=8, ncols=2, facecolor="lightgrey")


def figure_bytes(chart: Chart | Map, form: str) -> bytes:
    """The chart drawn by matplotlib as svg, pdf or png."""
    figure = new_figure()
    (draw_map if isinstance(chart, Map) else draw_chart)(figure, chart)
    out = io.BytesIO()
    figure.savefig(out, format=form, dpi=150 if form == "png" else None)
    return out.getvalue()


# -- files: what a statement asks written; the shells write it (render.files) ----
def check_target(path: str, allowed: Sequence[str], what: str) -> str:
    """The extension of a file a chart is to be written to, checked (and its folder found)
    before anything is computed or written; InputError otherwise."""
    extension = os.path.splitext(path)[1].lower()
    if extension not in allowed:
        raise InputError(f"{what} files end in {', '.join(allowed)}; found {path!r}")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise InputError(f"no folder {folder!r} to write the {what} into")
    return extension


def chart_file(chart: Chart | Map, path: str) -> str | bytes:
    """The chart as the contents of ``path`` (.svg as text, .pdf or .png as bytes)."""
    extension = check_target(path, FORMATS, "plot")
    data = figure_bytes(chart, extension[1:])
    return data.decode() if extension == ".svg" else data


def data_text(chart: Chart | Map) -> str:
    """The sampled values as CSV: one column per parameter and per curve (empty: no value;
    numbers as the shortest text that reads back as the same float)."""
    def cell(v) -> str:
        return "" if v is None or math.isnan(v) else repr(float(v))
    if isinstance(chart, Map):
        rows = [[*chart.names, chart.label]]
        rows += [[repr(x), repr(y), cell(chart.values[i, j])] for i, y in enumerate(chart.ys.tolist())
                 for j, x in enumerate(chart.xs.tolist())]
    else:
        rows = [[chart.xname] + [c.label for c in chart.curves]]
        rows += [[repr(x)] + [cell(c.ys[k]) for c in chart.curves] for k, x in enumerate(chart.xs)]
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerows(rows)
    return out.getvalue()


@dataclass(frozen=True)
class Drawing:
    """The value of ``plot`` and ``map``: the chart, and the files the statement asked it
    written to (``picture``: .svg, .pdf or .png; ``data``: the samples as .csv).

    Computing never writes: the shells write the files a Drawing asks for
    (:func:`ketsplit.render.files.write_requested`), and a worksheet from a file
    may not ask for any.
    """

    chart: Chart | Map
    picture: str | None = None
    data: str | None = None

    @classmethod
    def asked(cls, chart: Chart | Map, picture: str | None = None, data: str | None = None
              ) -> "Drawing":
        """The drawing, its file names checked (extension, folder) before a shell writes them."""
        if picture is not None:
            check_target(picture, FORMATS, "plot")
        if data is not None:
            check_target(data, (".csv",), "data")
        return cls(chart, picture, data)

    @property
    def files(self) -> tuple[str, ...]:
        return tuple(f for f in (self.picture, self.data) if f is not None)

    def __repr__(self) -> str:
        files = "".join(f", {name}={value!r}" for name, value in
                        (("picture", self.picture), ("data", self.data)) if value is not None)
        return f"Drawing({self.chart!r}{files})"

    def _repr_png_(self) -> bytes:
        return self.chart._repr_png_()

    def _repr_svg_(self) -> str:
        return self.chart._repr_svg_()


# -- families: the curves, marks and maps a statement or the API asks for ----------
COEFFICIENTS = "coefficients"


def figure_label(figure, unit: str) -> str:
    """'entropy (bits)', 'renyi(2) (bits)', 'concurrence'."""
    if figure == COEFFICIENTS:
        return "Schmidt coefficients"
    label = figure if isinstance(figure, str) else f"renyi({expr_text(figure)})"
    logarithmic = not isinstance(figure, str) or figure in LOGARITHMIC
    return f"{label} ({unit})" if logarithmic else label


def spectrum_curves(spectrum: Spectrum, figure, unit: str) -> dict[str, sympy.Expr]:
    """label -> closed form of one figure ('coefficients': every Schmidt coefficient)."""
    if figure == COEFFICIENTS:
        return {f"sigma_{k + 1}": c for k, c in enumerate(spectrum.coefficients)}
    if isinstance(figure, str):
        return {figure_label(figure, unit): spectrum_figures(spectrum, unit, [figure])[figure]}
    return {figure_label(figure, unit): renyi_of(spectrum, figure, unit)}


def rank_drops(state: State, cut: Cut, symbol: sympy.Symbol, budget: float,
               prefix: str = "") -> tuple[list[Marker], str | None]:
    """Where the Schmidt rank drops along ``symbol`` (from the strata), or why not marked."""
    try:
        found = strata(state, cut, budget=budget)
    except (InputError, ArithmeticError, NotImplementedError) as err:
        return [], f"rank drops are not marked: {err}"
    markers = []
    for stratum in found[1:]:
        for point in stratum.points or ():
            value = next((v for k, v in point.items() if getattr(k, "name", k) == symbol.name), None)
            if value is not None:
                markers.append(Marker(value, f"{prefix}rank {stratum.rank} at {symbol.name} = "
                                             f"{expr_text(value)}", prefix))
    return markers, None


@dataclass(frozen=True)
class Family:
    """One state of a plot: how it is named in labels, and its cut."""

    subject: str
    state: State
    cut: Cut


def family_chart(title: str, figures: Sequence, families: Sequence[Family], symbol: sympy.Symbol,
                 bounds, unit: str = "bits", budget: float = 30.0,
                 count: int = FILE_SAMPLES) -> tuple[Chart, tuple[str, ...]]:
    """Every figure of every state on one chart, rank drops marked and drawn through."""
    curves, sources, markers, notes = {}, {}, [], []
    for family in families:
        found = decompose(family.state, family.cut, method="exact", vectors=False)
        notes.extend(found.notes)
        prefix = f"{family.subject}: " if len(families) > 1 else ""
        for figure in figures:
            for label, expr in spectrum_curves(Spectrum.of(found), figure, unit).items():
                curves[prefix + label] = expr
                sources[prefix + label] = (family, figure, label)
        marks, note = rank_drops(family.state, family.cut, symbol, budget, prefix)
        markers += marks
        notes += [note] if note else []

    def exact_at(label: str, x: sympy.Expr) -> float | None:
        family, figure, key = sources[label]
        at = decompose(family.state.subs({symbol.name: x}), family.cut, vectors=False)
        if at.certified is not None:
            return None
        value = spectrum_curves(Spectrum.of(at), figure, unit).get(key, sympy.Integer(0))
        mid, radius = ball_value(without_extrema(value), {}, 64)
        return mid if radius <= TRUSTED * (1 + abs(mid)) else None

    ylabel = figure_label(figures[0], unit) if len(figures) == 1 else "value"
    chart = make_chart(title, curves, symbol, bounds, markers, count, ylabel, exact_at)
    return chart, tuple(dict.fromkeys(notes))


def family_map(title: str, figure, family: Family, symbols: tuple[sympy.Symbol, sympy.Symbol], bounds,
               unit: str = "bits", budget: float = 30.0,
               count: int = MAP_SAMPLES) -> tuple[Map, tuple[str, ...]]:
    """One figure of a two-parameter family over both ranges, with its rank-drop sets."""
    found = decompose(family.state, family.cut, method="exact", vectors=False)
    curves = spectrum_curves(Spectrum.of(found), figure, unit)
    if len(curves) != 1:
        raise InputError("map: one figure at a time (coefficients: name one, as sigma_1 in plot)")
    (label, expr), = curves.items()
    notes = list(found.notes)
    try:
        layers = strata(family.state, family.cut, budget=budget)
    except (InputError, ArithmeticError, NotImplementedError) as err:
        layers, notes = [], notes + [f"rank drops are not drawn: {err}"]
    loci = []
    for stratum in layers[1:]:
        name = f"rank {stratum.rank}"
        if stratum.points is not None:
            loci.append((name, [tuple(point.get(s, sympy.nan) for s in symbols) for point in stratum.points]))
        else:
            loci.extend((f"{name}: {expr_text(equation)} = 0", equation) for equation in stratum.equations)
    return make_map(title, expr, symbols, bounds, label, loci, count), tuple(dict.fromkeys(notes))
