"""Statements ``figures``, ``cuts``, ``compare`` and ``plot``."""

from __future__ import annotations

from dataclasses import replace

import sympy
from flint import arb

from ..compare import compare_across
from ..decomposition import decompose
from ..numeric.digits import digits_cell
from ..numeric.values import certified_real
from ..figures import (certified_figures, Figures, NAMES, Spectrum, overview, renyi_of, spectrum_figures,
                       unknown_figure, verdict, without_extrema)
from ..plots import COEFFICIENTS, Drawing, Family, family_chart, figure_label, terminal_lines
from ..base.document import Digits, Field, Note, Plot, Report, Table, Truth
from ..states import State
from ..language.statements import (CutSpec, Figure, Option, PlotStatement, Words, figure_list,
                                   read_plot, split_commas, split_cut, split_spaced,
                                   trailing_figures)
from .registry import CommandCall, command

UNIT_WORDS = ("bits", "nats")


# -- figure words after the state: units and figure names ---------------------------
def _is_option(figure: Figure) -> bool:
    if figure.argument is not None:
        return figure.name == "renyi"
    return figure.name in UNIT_WORDS or figure.name in NAMES


def split_options(call: CommandCall) -> tuple[Words, CutSpec | None, tuple[Figure, ...]]:
    """``expr (cut figure* | figure*)``: the state's words, the cut and the figure words.

    Figure words follow the cut; without a cut, trailing words that are figures (or
    unbound bare names, which can only be misspelt figures) are taken."""
    body, cut, rest = split_cut(call.words())
    if cut is not None:
        return body, cut, figure_list(rest)
    body, figures = trailing_figures(body, lambda figure: _is_option(figure) or (
        figure.argument is None and call.session.lookup(figure.name) is None))
    return body, None, figures


def _selection(call: CommandCall, options: tuple[Figure, ...]
               ) -> tuple[str, list[str | sympy.Expr]]:
    """(unit, wanted figures): names, or Renyi orders as sympy numbers."""
    unit, wanted = call.session.settings.entropy_unit, []
    for figure in options:
        if figure.argument is None and figure.name in UNIT_WORDS:
            unit = figure.name
        elif figure.argument is None and figure.name in NAMES:
            wanted.append(figure.name)
        elif figure.name == "renyi" and figure.argument is not None:
            wanted.append(renyi_order(call, figure))
        else:
            raise call.error(unknown_figure(figure.text).message, figure.span.column - 1,
                             figure.span.length)
    return unit, wanted or list(NAMES)


def renyi_order(call: CommandCall, figure: Figure) -> sympy.Expr:
    """The order of ``renyi(ALPHA)``: a real number >= 0, or inf."""
    inner = figure.argument
    if inner.text.strip() in ("inf", "oo"):
        return sympy.oo
    value = call.value(inner.text, inner.start)
    if not isinstance(value, sympy.Expr) or not value.is_number or not value.is_real or value < 0:
        raise call.error(f"renyi(ALPHA) needs a real order ALPHA >= 0, found "
                         f"{inner.text.strip()!r}", figure.span.column - 1, figure.span.length)
    return value


def _figure_values(spectrum: Spectrum, wanted: list, unit: str) -> dict[str, sympy.Expr]:
    names = [w for w in wanted if isinstance(w, str)]
    named = spectrum_figures(spectrum, unit, names)
    values = {}
    for w in wanted:
        values[figure_label(w, unit)] = named[w] if isinstance(w, str) else renyi_of(spectrum, w, unit)
    return values


def certified(value: sympy.Expr, digits: int) -> Digits | str:
    """The certain digits of a real constant; a note instead when it depends on parameters."""
    if value.free_symbols:
        return "depends on " + ", ".join(sorted(s.name for s in value.free_symbols))
    if value.is_Rational and _terminates(value):
        return Digits(_decimal(value), digits)
    return digits_cell(certified_real(without_extrema(value), digits), digits)


def entropy_cells(value, digits: int) -> tuple:
    """(exact, certified digits) cells of an exact value or of a certified ball."""
    if isinstance(value, arb):
        return "no closed form", digits_cell(value, digits)
    return value, certified(value, digits)


def _terminates(value: sympy.Rational) -> bool:
    q = int(value.q)
    for prime in (2, 5):
        while q % prime == 0:
            q //= prime
    return q == 1


def _decimal(value: sympy.Rational) -> str:
    """The exact decimal expansion of a terminating rational."""
    from decimal import Decimal, localcontext
    with localcontext() as context:
        context.prec = len(str(value.p)) + len(str(value.q)) + 5
        return format((Decimal(int(value.p)) / Decimal(int(value.q))).normalize(), "f")



@command("figures", "figures STATE [CUT] [bits|nats] [FIGURE ...] [with NAME=VALUE, ...]",
         "entanglement figures across a cut: entropy, Renyi, purity, concurrence, negativity, ...",
         "real t; figures cos(t)|00> + sin(t)|11> 1|2 nats")
def run_figures(call: CommandCall) -> Report:
    body, cut_spec, options = split_options(call)
    unit, wanted = _selection(call, options)
    state, cut = call.state_across(body, cut_spec)
    digits = call.session.settings.digits
    d = decompose(state, cut, digits=digits, vectors=False)
    if d.certified is not None:
        balls = certified_figures(d, wanted, unit)
        rows = tuple((figure_label(w, unit), "no closed form", digits_cell(balls[w], digits))
                     for w in wanted)
        squared = [digits_cell(ball, digits) for ball in d.squared]
        values = {figure_label(w, unit): balls[w] for w in wanted}
    else:
        values = _figure_values(Spectrum.of(d), wanted, unit)
        rows = tuple((label, value, certified(value, digits)) for label, value in values.items())
        squared = list(d.squared)
    items = (Field("squared Schmidt coefficients", squared),
             Table(("figure", "exact", f"certified digits (up to {digits})"), rows,
                   ("figure", "exact", "certified_digits")))
    return Report(f"entanglement figures of {body.text().strip()} across {cut.describe(state)}",
                  items, d.notes, value=Figures(tuple(d.squared), tuple(values.items()), unit))


@command("cuts", "cuts STATE [with NAME=VALUE, ...]",
         "every bipartition of a many-part state: Schmidt rank, entropy, and which parts split off",
         "cuts |000> + |111>")
def run_cuts(call: CommandCall) -> Report:
    body, cut, options = split_options(call)
    if cut is not None:
        raise call.error("cuts: every cut is listed; write the state alone",
                         cut.span.column - 1, cut.span.length)
    unit = call.session.settings.entropy_unit
    for figure in options:
        if figure.argument is not None or figure.name not in UNIT_WORDS:
            raise call.error(f"cuts: expected only bits or nats after the state, found "
                             f"{figure.text!r}", figure.span.column - 1, figure.span.length)
        unit = figure.name
    state = call.state_of(body.expression())
    found = overview(state, unit)
    digits = call.session.settings.digits
    rows = tuple((s.cut.describe(state), s.rank if s.rank is not None else "undecided",
                  *entropy_cells(s.entropy, digits)) for s in found.summaries)
    notes = ("ranks are generic: they can drop at special parameter values (see 'strata')",) \
        if found.generic else ()
    return Report(f"every cut of {body.text().strip()} ({len(rows)} bipartitions)",
                  (Table(("cut", "rank", f"entropy ({unit})", "certified digits"), rows),
                   Field("verdict", verdict(found, state))), notes, value=found)


# -- compare ------------------------------------------------------------------
def two_states(call: CommandCall) -> tuple[tuple[str, State], tuple[str, State], CutSpec | None,
                                           int]:
    """``pair cut?``: both states of ``compare A B CUT`` (or ``compare EXPR, EXPR CUT``), the
    cut, and the column after the states."""
    body, cut = call.split_cut()
    pieces = split_commas(body)
    if len(pieces) == 1:
        pieces = split_spaced(body)
    if len(pieces) != 2:
        raise call.error("compare: expected two states, as in 'compare psi chi 1|2' or "
                         "'compare EXPR, EXPR 1|2'", body.start, len(body.text()) or 1)
    expressions = [piece.expression() for piece in pieces]
    bare = replace(call, point={})
    states = tuple(bare.state_of(expression) for expression in expressions)
    unused = set(call.point) - {s.name for state in states for s in state.symbols}
    if unused:
        raise call.error(f"neither state has a parameter named {sorted(unused)[0]!r}")
    placed = tuple(replace(call, point={k: v for k, v in call.point.items()
                                        if k in {s.name for s in state.symbols}}).at_point(state)
                   for state in states)
    return ((expressions[0].text.strip(), placed[0]), (expressions[1].text.strip(), placed[1]),
            cut, body.end)


def _yes(flag: bool | None, method: str = "") -> Truth:
    """yes / no / undecided (the decision layer could not settle it; the notes say how to)."""
    return Truth("undecided" if flag is None else "yes" if flag else "no", flag, method)


@command("compare", "compare STATE STATE [CUT] [with NAME=VALUE, ...]",
         "LU-equivalent? convertible by LOCC either way (majorization)? optimal probability?",
         "compare |00> + |11>, cos(pi/8)|00> + sin(pi/8)|11> 1|2")
def run_compare(call: CommandCall) -> Report:
    (a_text, a), (b_text, b), cut, end = two_states(call)
    a_name, b_name = (t if t.isascii() and t.isidentifier() and len(t) <= 12 else label
                      for t, label in ((a_text, "A"), (b_text, "B")))
    cut_a, cut_b = (call.cut_of(cut, s, end) for s in (a, b))
    digits = call.session.settings.digits
    found = compare_across(a, cut_a, b, cut_b, digits)
    rows = tuple((k + 1, *(_ball_cell(v, digits) for v in values), _yes(step)) for k, (*values, step)
                 in enumerate(zip(found.source, found.target, found.source_sums, found.target_sums,
                                  found.steps)))
    items = (
        Table(("k", f"{a_name}: p_k", f"{b_name}: p_k", f"{a_name}: sum to k", f"{b_name}: sum to k",
               f"{a_name} sum <= {b_name} sum"), rows,
              ("k", "source_p", "target_p", "source_sum", "target_sum", "source_sum_at_most_target_sum")),
        Field("LU-equivalent", _yes(found.lu_equivalent, "equal Schmidt spectra"), "lu_equivalent"),
        Field(f"{a_name} -> {b_name} by LOCC", _yes(found.forward, MAJORIZATION), "forward"),
        Field(f"{b_name} -> {a_name} by LOCC", _yes(found.backward, MAJORIZATION), "backward"),
        Field(f"best probability {a_name} -> {b_name}", _exact_and_digits(found.p_forward, digits),
              "p_forward"),
        Field(f"best probability {b_name} -> {a_name}", _exact_and_digits(found.p_backward, digits),
              "p_backward"),
        Note("p_k: squared Schmidt coefficients, largest first; A -> B by LOCC exactly when every "
             "partial sum of A is at most B's (Nielsen); best probability by Vidal's formula"),
    )
    notes = ("incomparable: neither converts into the other with certainty",) if found.incomparable else ()
    notes += found.undecided
    named = tuple(Field(name, text, key) for name, text, key in
                  ((a_name, a_text, "source"), (b_name, b_text, "target")) if name != text)
    items = named + items
    return Report(f"comparison of {a_name} and {b_name} across {cut_a.describe(a)}", items, notes,
                  value=found)


MAJORIZATION = "majorization of the Schmidt spectra (Nielsen 1999)"


def _ball_cell(value, digits: int):
    """A certified ball as its certain digits (a spectrum without closed form); else as is."""
    return digits_cell(value, digits) if isinstance(value, arb) else value


def _exact_and_digits(value: sympy.Expr, digits: int):
    """The exact value, with certified digits beside it when it is irrational."""
    if value is None:
        return "undecided"
    if isinstance(value, arb):
        return digits_cell(value, digits)
    if value.is_Rational or value.free_symbols:
        return value
    return replace(certified(value, digits), exact=value)


# -- plot ---------------------------------------------------------------------
PLOT_USAGE = ("plot FIGURE[,FIGURE...] STATE[, STATE...] [CUT] over NAME [--to FILE.svg|.pdf|.png] "
              "[--data FILE.csv] [with NAME=VALUE, ...]")


def plotted_parameter(call: CommandCall, state: State, name: str, column: int, others_ok: int = 0):
    """The real, ranged parameter ``name`` of the state, and a check that it is the only one
    (or one of two, for a map: ``others_ok`` other parameters allowed)."""
    symbols = {s.name: s for s in state.symbols}
    if name not in symbols:
        has = ", ".join(sorted(symbols)) or "no parameters"
        raise call.error(f"{call.name}: the state has no parameter {name!r} (it has {has})",
                         column, len(name))
    param = state.parameter(name)
    if param is None or not param.is_real:
        raise call.error(f"{call.name}: {name} is complex; only a real parameter can be plotted "
                         f"(declare it: real {name} in [lo, hi])", column, len(name))
    if param.range is None:
        raise call.error(f"{call.name}: {name} has no declared range; declare one, as in "
                         f"'real {name} in [0, pi]'", column, len(name))
    if not bool(param.range[1] > param.range[0]):
        raise call.error(f"{call.name}: the range of {name} is a single point; nothing to plot across",
                         column, len(name))
    others = sorted(set(symbols) - {name})
    if len(others) > others_ok:
        raise call.error(f"{call.name}: the state also depends on {', '.join(others)}; fix "
                         f"{'them' if len(others) > 1 else 'it'} with 'with {others[0]}=...'",
                         column, len(name))
    return symbols[name], param.range


def file_options(call: CommandCall, options: tuple[Option, ...]) -> dict[str, str]:
    """``--to FILE`` and ``--data FILE`` after the parameter names."""
    found = {}
    for option in options:
        if option.name not in ("to", "data"):
            raise call.error(f"{call.name}: unknown option --{option.name}; the options are "
                             "--to FILE (.svg, .pdf, .png) and --data FILE.csv",
                             option.span.column - 1, option.span.length)
        found[option.name] = option.value
    return found


def plot_families(call: CommandCall, plot: PlotStatement) -> list[Family]:
    """The states of ``STATE[, STATE...] [CUT]``, each at the ``with`` point and with its cut."""
    end = plot.states_span.column - 1 + plot.states_span.length
    families = []
    for expression in plot.states:
        state = replace(call, point={}).state_of(expression)
        names = {s.name for s in state.symbols}
        state = replace(call, point={k: v for k, v in call.point.items() if k in names}).at_point(state)
        families.append(Family(expression.text.strip(), state, call.cut_of(plot.cut, state, end)))
    return families


def plot_figures(call: CommandCall, figures: tuple[Figure, ...]) -> list:
    return [_plot_figure(call, figure) for figure in figures]


def plot_parameters(call: CommandCall, plot: PlotStatement, count: int, usage: str
                    ) -> list[tuple[str, int]]:
    """The ``count`` names after ``over`` and their 0-based columns."""
    if len(plot.over) != count:
        place = plot.over[min(count, len(plot.over) - 1)][1]
        raise call.error(f"{call.name}: expected '{usage}'", place.column - 1, place.length)
    return [(name, span.column - 1) for name, span in plot.over]


def drawing(chart, options: dict[str, str]) -> Drawing:
    """The statement's value: the chart and the files ``--to`` and ``--data`` ask for (the
    shells write them: a statement never writes)."""
    return Drawing.asked(chart, options.get("to"), options.get("data"))


@command("plot", PLOT_USAGE,
         "figures (or 'coefficients') of one or more states across the declared range of one "
         "real parameter, rank drops marked; --to writes svg, pdf or png, --data the samples as CSV",
         "real t in [0, pi]; plot entropy,concurrence cos(t)|00> + sin(t)|11> 1|2 over t",
         options=True)
def run_plot(call: CommandCall) -> Report:
    plot = read_plot(call.words(), PLOT_USAGE)
    unit = call.session.settings.entropy_unit
    figures = plot_figures(call, plot.figures)
    options = file_options(call, plot.options)
    families = plot_families(call, plot)
    [(name, name_at)] = plot_parameters(call, plot, 1, PLOT_USAGE)
    symbol, bounds = plotted_parameter(call, families[0].state, name, name_at)
    for family in families[1:]:
        plotted_parameter(call, family.state, name, name_at)
    what = ", ".join(figure_label(f, unit) for f in figures)
    subjects = ", ".join(f.subject for f in families)
    title = f"{what} of {subjects} across {families[0].cut.describe(families[0].state)}"
    chart, notes = family_chart(title, figures, families, symbol, bounds, unit,
                                call.session.settings.strata_budget)
    return Report(title, (Plot(terminal_lines(chart)),), notes, value=drawing(chart, options))


def _plot_figure(call: CommandCall, figure: Figure) -> str | sympy.Expr:
    if figure.argument is None and (figure.name == COEFFICIENTS or figure.name in NAMES):
        return figure.name
    if figure.name == "renyi" and figure.argument is not None:
        return renyi_order(call, figure)
    raise call.error(unknown_figure(figure.text).message + f"; or {COEFFICIENTS} for every "
                     "Schmidt coefficient", figure.span.column - 1, figure.span.length)


@command("units", "units bits|nats", "the unit of entropies, Renyi entropies and log-negativity",
         "units nats", topic="settings")
def run_units(call: CommandCall) -> Report:
    word, column = call.setting()
    if word not in UNIT_WORDS:
        raise call.error(f"units: expected bits or nats, found {word!r}", column, len(word) or 1)
    call.session.settings = replace(call.session.settings, entropy_unit=word)
    return Report(f"units {word}", value=word)
