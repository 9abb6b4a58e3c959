"""Statements ``figures``, ``cuts``, ``compare`` and ``plot``."""

from __future__ import annotations

import re
from dataclasses import replace

import sympy
from flint import arb

from ..compare import compare_across
from ..cuts import CUT_PATTERN, parse_cut
from ..decomposition import decompose
from ..numeric.digits import digits_cell
from ..numeric.values import certified_real
from ..figures import (certified_figures, Figures, NAMES, Spectrum, overview, renyi_of, spectrum_figures,
                       unknown_figure, verdict, without_extrema)
from ..base.errors import Span
from ..plots import COEFFICIENTS, Drawing, Family, family_chart, figure_label, terminal_lines
from ..base.document import Digits, Field, Note, Plot, Report, Table, Truth
from ..states import State
from .registry import CommandCall, command

UNIT_WORDS = ("bits", "nats")
RENYI = re.compile(r"^renyi\((.+)\)$")


# -- options after the state: units and figure names ---------------------------
def _is_option(word: str) -> bool:
    return word in UNIT_WORDS or word in NAMES or bool(RENYI.match(word))


def split_options(call: CommandCall) -> tuple[CommandCall, list[tuple[str, int]]]:
    """The call without its trailing option words, and those words with their columns.

    Options follow the cut; without a cut, trailing words that are options (or
    unbound bare names, which can only be misspelt options) are taken.
    """
    words = [(m.group(), m.start()) for m in re.finditer(r"\S+", call.args)]
    cut_at = next((k for k in range(len(words) - 1, 0, -1) if CUT_PATTERN.match(words[k][0])), None)
    if cut_at is not None:
        first = cut_at + 1
    else:
        first = len(words)
        while first > 1 and (_is_option(words[first - 1][0]) or _unbound_name(call, words[first - 1][0])):
            first -= 1
    options = [(w, call.offset + at) for w, at in words[first:]]
    end = words[first][1] if first < len(words) else len(call.args)
    return replace(call, args=call.args[:end]), options


def _unbound_name(call: CommandCall, word: str) -> bool:
    return word.isidentifier() and call.session.lookup(word) is None


def _selection(call: CommandCall, options: list[tuple[str, int]]) -> tuple[str, list[str | sympy.Expr]]:
    """(unit, wanted figures): names, or Renyi orders as sympy numbers."""
    unit, wanted = call.session.settings.entropy_unit, []
    for word, column in options:
        if word in UNIT_WORDS:
            unit = word
        elif word in NAMES:
            wanted.append(word)
        elif RENYI.match(word):
            wanted.append(renyi_order(call, word, column))
        else:
            raise call.error(unknown_figure(word).message, column, len(word))
    return unit, wanted or list(NAMES)


def renyi_order(call: CommandCall, word: str, column: int) -> sympy.Expr:
    inner = RENYI.match(word).group(1)
    if inner in ("inf", "oo"):
        return sympy.oo
    value = call.value(inner, column + len("renyi("))
    if not isinstance(value, sympy.Expr) or not value.is_number or not value.is_real or value < 0:
        raise call.error(f"renyi(ALPHA) needs a real order ALPHA >= 0, found {inner!r}",
                         column, len(word))
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
    trimmed, options = split_options(call)
    unit, wanted = _selection(call, options)
    state, cut = trimmed.state_and_cut()
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
    return Report(f"entanglement figures of {trimmed.subject()} across {cut.describe(state)}",
                  items, d.notes, value=Figures(tuple(d.squared), tuple(values.items()), unit))


@command("cuts", "cuts STATE [with NAME=VALUE, ...]",
         "every bipartition of a many-part state: Schmidt rank, entropy, and which parts split off",
         "cuts |000> + |111>")
def run_cuts(call: CommandCall) -> Report:
    trimmed, options = split_options(call)
    unit = call.session.settings.entropy_unit
    for word, column in options:
        if word not in UNIT_WORDS:
            raise call.error(f"cuts: expected only bits or nats after the state, found {word!r}",
                             column, len(word))
        unit = word
    state = trimmed.state()
    found = overview(state, unit)
    digits = call.session.settings.digits
    rows = tuple((s.cut.describe(state), s.rank if s.rank is not None else "undecided",
                  *entropy_cells(s.entropy, digits)) for s in found.summaries)
    notes = ("ranks are generic: they can drop at special parameter values (see 'strata')",) \
        if found.generic else ()
    return Report(f"every cut of {trimmed.args.strip()} ({len(rows)} bipartitions)",
                  (Table(("cut", "rank", f"entropy ({unit})", "certified digits"), rows),
                   Field("verdict", verdict(found, state))), notes, value=found)


# -- compare ------------------------------------------------------------------
def top_level_comma(text: str) -> int | None:
    """The first comma outside brackets and kets, or None."""
    depth, in_ket = 0, False
    for k, ch in enumerate(text):
        if in_ket:
            in_ket = ch != ">"
        elif ch == "|":
            in_ket = True
        elif ch in "([":
            depth += 1
        elif ch in ")]":
            depth -= 1
        elif ch == "," and depth == 0:
            return k
    return None


def two_states(call: CommandCall) -> tuple[tuple[str, State], tuple[str, State], str | None, int]:
    """Both states of ``compare A B CUT`` (or ``compare EXPR, EXPR CUT``), the cut text
    and its column."""
    text, cut_text, column = call.split_last(CUT_PATTERN)
    comma = top_level_comma(text)
    if comma is not None:
        pieces = [(text[:comma], 0), (text[comma + 1:], comma + 1)]
    else:
        words = [(m.group(), m.start()) for m in re.finditer(r"\S+", text)]
        if len(words) != 2:
            raise call.error("compare: expected two states, as in 'compare psi chi 1|2' or "
                             "'compare EXPR, EXPR 1|2'", call.offset, len(text) or 1)
        pieces = words
    bare = replace(call, point={})
    states = tuple(bare.state(piece, call.offset + at) for piece, at in pieces)
    unused = set(call.point) - {s.name for state in states for s in state.symbols}
    if unused:
        raise call.error(f"neither state has a parameter named {sorted(unused)[0]!r}")
    placed = tuple(replace(call, point={k: v for k, v in call.point.items()
                                        if k in {s.name for s in state.symbols}}).at_point(state)
                   for state in states)
    return ((pieces[0][0].strip(), placed[0]), (pieces[1][0].strip(), placed[1]), cut_text, column)


def _yes(flag: bool | None, method: str = "") -> Truth:
    """yes / no / undecided (the decision layer could not settle it; the notes say how to)."""
    return Truth("undecided" if flag is None else "yes" if flag else "no", flag, method)


@command("compare", "compare STATE STATE [CUT] [with NAME=VALUE, ...]",
         "LU-equivalent? convertible by LOCC either way (majorization)? optimal probability?",
         "compare |00> + |11>, cos(pi/8)|00> + sin(pi/8)|11> 1|2")
def run_compare(call: CommandCall) -> Report:
    (a_text, a), (b_text, b), cut_text, column = two_states(call)
    a_name, b_name = (t if re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]{0,11}", t) else label
                      for t, label in ((a_text, "A"), (b_text, "B")))
    span = Span(call.line, column + 1, len(cut_text or "x"))
    cut_a, cut_b = (parse_cut(cut_text, s, span, call.source) for s in (a, b))
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
PLOT = re.compile(r"^(\s*)(\S+)(\s+)(.*?)\s+over\s+([A-Za-z_][A-Za-z0-9_]*)((?:\s+--\S+\s+\S+)*)\s*$")
FILE_OPTIONS = re.compile(r"--(\S+)\s+(\S+)")
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


def file_options(call: CommandCall, text: str, start: int) -> dict[str, str]:
    """``--to FILE`` and ``--data FILE`` after the parameter names."""
    found = {}
    for match in FILE_OPTIONS.finditer(text):
        if match.group(1) not in ("to", "data"):
            raise call.error(f"{call.name}: unknown option --{match.group(1)}; the options are "
                             "--to FILE (.svg, .pdf, .png) and --data FILE.csv",
                             start + match.start(), len(match.group(1)) + 2)
        found[match.group(1)] = match.group(2)
    return found


def plot_families(call: CommandCall, text: str, offset: int) -> list[Family]:
    """The states of ``STATE[, STATE...] [CUT]``, each at the ``with`` point and with its cut."""
    inner = replace(call, args=text, offset=offset)
    body, cut_text, column = inner.split_last(CUT_PATTERN)
    pieces, start = [], 0
    while (comma := top_level_comma(body[start:])) is not None:
        pieces.append((body[start:start + comma], start))
        start += comma + 1
    pieces.append((body[start:], start))
    families = []
    for piece, at in pieces:
        bare = replace(call, point={})
        state = bare.state(piece, offset + at)
        names = {s.name for s in state.symbols}
        state = replace(call, point={k: v for k, v in call.point.items() if k in names}).at_point(state)
        span = Span(call.line, column + 1, len(cut_text or "x"))
        families.append(Family(piece.strip(), state, parse_cut(cut_text, state, span, call.source)))
    return families


def plot_figures(call: CommandCall, words: str, column: int) -> list:
    figures, at = [], column
    for word in words.split(","):
        figures.append(_plot_figure(call, word, at))
        at += len(word) + 1
    return figures


def drawing(chart, options: dict[str, str]) -> Drawing:
    """The statement's value: the chart and the files ``--to`` and ``--data`` ask for (the
    shells write them: a statement never writes)."""
    return Drawing.asked(chart, options.get("to"), options.get("data"))


@command("plot", PLOT_USAGE,
         "figures (or 'coefficients') of one or more states across the declared range of one "
         "real parameter, rank drops marked; --to writes svg, pdf or png, --data the samples as CSV",
         "real t in [0, pi]; plot entropy,concurrence cos(t)|00> + sin(t)|11> 1|2 over t")
def run_plot(call: CommandCall) -> Report:
    match = PLOT.match(call.args)
    if match is None:
        raise call.error(f"plot: expected '{PLOT_USAGE}'", call.offset, len(call.args.rstrip()) or 1)
    unit = call.session.settings.entropy_unit
    figures = plot_figures(call, match.group(2), call.offset + match.start(2))
    options = file_options(call, match.group(6), call.offset + match.start(6))
    families = plot_families(call, match.group(4), call.offset + match.start(4))
    name, name_at = match.group(5), call.offset + match.start(5)
    symbol, bounds = plotted_parameter(call, families[0].state, name, name_at)
    for family in families[1:]:
        plotted_parameter(call, family.state, name, name_at)
    what = ", ".join(figure_label(f, unit) for f in figures)
    subjects = ", ".join(f.subject for f in families)
    title = f"{what} of {subjects} across {families[0].cut.describe(families[0].state)}"
    chart, notes = family_chart(title, figures, families, symbol, bounds, unit,
                                call.session.settings.strata_budget)
    return Report(title, (Plot(terminal_lines(chart)),), notes, value=drawing(chart, options))


def _plot_figure(call: CommandCall, word: str, column: int) -> str | sympy.Expr:
    if word == COEFFICIENTS or word in NAMES:
        return word
    if RENYI.match(word):
        return renyi_order(call, word, column)
    raise call.error(unknown_figure(word).message + f"; or {COEFFICIENTS} for every Schmidt coefficient",
                     column, len(word))


@command("units", "units bits|nats", "the unit of entropies, Renyi entropies and log-negativity",
         "units nats", topic="settings")
def run_units(call: CommandCall) -> Report:
    word = call.args.strip()
    if word not in UNIT_WORDS:
        raise call.error(f"units: expected bits or nats, found {word!r}",
                         call.offset + len(call.args) - len(call.args.lstrip()), len(word) or 1)
    call.session.settings = replace(call.session.settings, entropy_unit=word)
    return Report(f"units {word}", value=word)
