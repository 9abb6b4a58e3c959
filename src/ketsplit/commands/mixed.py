"""Statements on mixed states and operators: density, ptranspose, negativity, concurrence,
mixedness, fidelity, separable, opschmidt, schmidtbasis; and ``NAME = reduce ...`` /
``NAME = density ...``, which bind a density matrix (see :func:`bound_value`)."""

from __future__ import annotations

import sympy
from flint import arb

from .. import mixed
from ..base.document import Field, Note, Report, Table
from ..base.errors import InputError
from ..cuts import Cut, parse_parts
from ..language.statements import split_commas, trailing_parts
from ..language.build import KetValue, kind_of
from ..language.printer import text as language_text
from ..mixed import Density, Number, Piece
from ..numeric.digits import digits_cell
from ..numeric.stored import stored
from ..numeric.values import exact_cell
from ..states import Parameter, State
from .registry import BINDERS, CommandCall, command

MIXED_TOPIC = "mixed"


# -- reading arguments -----------------------------------------------------------------


def _dims(call: CommandCall, size: int) -> tuple[tuple[int, ...] | None, tuple[str, ...]]:
    space = call.session.space
    if space is not None and _product(space.dims) == size:
        return space.dims, space.names
    return mixed.qubit_dims(size), ()


def _product(values) -> int:
    total = 1
    for v in values:
        total *= v
    return total


def _params(call: CommandCall) -> tuple[Parameter, ...]:
    return tuple(call.session.params.values())


def operand(call: CommandCall, text: str, offset: int) -> Density | State:
    """A bound density matrix, a state, or a matrix checked as a density matrix."""
    name = text.strip()
    found = call.session.bindings.get(name)
    if isinstance(found, Density):
        return _at_point(call, found)
    value = call.value(text, offset)
    if isinstance(value, KetValue):
        return call.state(text, offset)
    if isinstance(value, sympy.MatrixBase):
        dims, names = _dims(call, value.rows)
        try:
            return _at_point(call, mixed.density(value, dims, names, _params(call)))
        except InputError as err:
            if err.span is not None:
                raise
            lead = len(text) - len(text.lstrip())
            raise call.error(err.message, offset + lead, len(text.strip()) or 1) from None
    raise call.error(f"{call.name}: expected a density matrix, a matrix or a state, found a "
                     f"{kind_of(value)}", offset)


def _at_point(call: CommandCall, rho: Density) -> Density:
    if not call.point:
        return rho
    symbols = {p.name: p.symbol for p in rho.params}
    missing = [n for n in call.point if n not in symbols]
    if missing:
        raise call.error(f"the density matrix has no parameter named {missing[0]!r}")
    return mixed.density(rho.matrix.subs({symbols[n]: v for n, v in call.point.items()}),
                         rho.dims, rho.names, rho.params)


def _density_alone(call: CommandCall) -> Density:
    """``expr``: all the words as one density matrix, matrix or state."""
    expression = call.alone()
    return density_operand(call, expression.text, expression.start)


def density_operand(call: CommandCall, text: str, offset: int) -> Density:
    found = operand(call, text, offset)
    return mixed.pure_density(found) if isinstance(found, State) else found


def _frame(rho: Density) -> State:
    """A state with the density's parts, for reading cuts and part lists."""
    return State(rho.dims, {}, rho.part_names())


def density_and_cut(call: CommandCall) -> tuple[Density, Cut]:
    """``expr cut?``: the density matrix and the cut on its parts."""
    body, cut = call.split_cut()
    expression = body.expression()
    rho = density_operand(call, expression.text, expression.start)
    return rho, call.cut_of(cut, _frame(rho), body.end)


def density_and_parts(call: CommandCall) -> tuple[Density, tuple[int, ...]]:
    """``expr parts?``: the density matrix and the parts named (the second of two if none)."""
    body, parts = trailing_parts(call.words())
    expression = body.expression()
    rho = density_operand(call, expression.text, expression.start)
    if parts is None:
        if len(rho.dims) != 2:
            raise call.error(f"{call.name}: name the parts after the matrix, as in "
                             f"'{call.name} rho 2'", body.end)
        return rho, (1,)
    return rho, parse_parts(parts, _frame(rho), call.source)


# -- cells -------------------------------------------------------------------------------


def number_cell(value: Number, digits: int):
    if isinstance(value, arb):
        return digits_cell(value, digits)
    return exact_cell(value, digits) if value.is_number else value


def pieces_items(label: str, pieces: tuple[Piece, ...], digits: int) -> tuple:
    if len(pieces) == 1 and pieces[0].symbol is None:
        return (Field(label, number_cell(pieces[0].value, digits)),)
    if len(pieces) == 1:
        return (Field(label, pieces[0].value),)
    symbol = pieces[0].symbol
    rows = tuple((f"{symbol} in [{language_text(p.lo)}, {language_text(p.hi)}]", p.value)
                 for p in pieces)
    return (Table((f"range of {symbol}", label), rows),)


def spectrum_cells(found: mixed.Spectrum, digits: int) -> list:
    return [(number_cell(v, digits), m) for v, m in found.values]


def _spectrum_items(found: mixed.Spectrum, digits: int, label: str) -> tuple:
    rows = tuple((k, cell, m) for k, (cell, m) in enumerate(spectrum_cells(found, digits), start=1))
    items: tuple = (Table(("k", label, "multiplicity"), rows),)
    if found.factors:
        items += (Field("the certified ones are the roots of",
                        "; ".join(language_text(f) for f in found.factors)),)
    return items


def _digits(call: CommandCall) -> int:
    return call.session.settings.digits


# -- binding -----------------------------------------------------------------------------


BINDING_WORDS = ("reduce", "density")


def bound_value(call: CommandCall, name: str) -> Report:
    """``NAME = reduce STATE PARTS`` or ``NAME = density EXPR``: bind a density matrix
    (registered in BINDERS for those two words; ``call`` holds the words after the word)."""
    rho = _reduced_density(call) if call.name == "reduce" else _density_alone(call)
    call.session.bindings[name] = rho
    return density_report(f"{name} =", rho)


for _word in BINDING_WORDS:
    BINDERS[_word] = bound_value


def _reduced_density(call: CommandCall) -> Density:
    state, keep = call.state_and_parts()
    return mixed.reduced_density(state, keep)


def density_report(title: str, rho: Density) -> Report:
    parts = " ".join(f"{n}:{d}" for n, d in zip(rho.part_names(), rho.dims))
    items = [Field("density matrix", rho.matrix), Field("parts", parts)]
    if rho.params:
        items.append(Field("parameters", ", ".join(p.describe() for p in rho.params)))
    return Report(title, tuple(items), rho.notes, value=rho)


# -- statements ----------------------------------------------------------------------------


@command("density", "density EXPR [with NAME=VALUE, ...]",
         "a density matrix, checked (Hermitian, trace one, positive semidefinite); "
         "NAME = density EXPR binds it, NAME = reduce STATE PARTS binds a reduced state",
         "density [[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]]/2", topic=MIXED_TOPIC)
def run_density(call: CommandCall) -> Report:
    rho = _density_alone(call)
    return density_report("density matrix", rho).with_items(Field("purity", mixed.purity(rho)))


@command("ptranspose", "ptranspose RHO [PARTS] [with NAME=VALUE, ...]",
         "the partial transpose on the parts named (default: the second of two) and its spectrum",
         "ptranspose [[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]]/2 2",
         topic=MIXED_TOPIC)
def run_ptranspose(call: CommandCall) -> Report:
    rho, parts = density_and_parts(call)
    transposed = mixed.partial_transpose(rho, parts)
    names = "".join(rho.part_names()[p] for p in parts)
    items = (Field(f"rho^T_{names}", transposed),) + _spectrum_or_note(transposed, _digits(call))
    return Report(f"partial transpose on {names}", items, rho.notes, value=transposed)


def _spectrum_or_note(matrix: sympy.MatrixBase, digits: int) -> tuple:
    """The eigenvalues as a table, or a note when a family's have no closed form here."""
    try:
        return _spectrum_items(mixed.spectrum(matrix, digits), digits, "eigenvalue")
    except InputError as why:
        return (Note(why.message),)


@command("negativity", "negativity RHO [CUT] [with NAME=VALUE, ...]",
         "negativity and logarithmic negativity (the right side of the cut is transposed)",
         "negativity [[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]]/2 1|2",
         topic=MIXED_TOPIC)
def run_negativity(call: CommandCall) -> Report:
    rho, cut = density_and_cut(call)
    pieces = mixed.negativity(rho, cut.right, _digits(call))
    logs = tuple(Piece(mixed.log_negativity(p.value), p.symbol, p.lo, p.hi) for p in pieces)
    items = pieces_items("negativity", pieces, _digits(call)) + \
        pieces_items("log-negativity (base 2)", logs, _digits(call))
    return Report(f"negativity across {cut.describe(_frame(rho))}", items, rho.notes, value=pieces)


@command("concurrence", "concurrence RHO [with NAME=VALUE, ...]",
         "two-qubit concurrence of a mixed state (Wootters 1998) and the entanglement of formation",
         "concurrence [[1, 0, 0, 1], [0, 1, 0, 0], [0, 0, 1, 0], [1, 0, 0, 1]]/4",
         topic=MIXED_TOPIC)
def run_concurrence(call: CommandCall) -> Report:
    rho = _density_alone(call)
    pieces = mixed.concurrence(rho, _digits(call))
    formation = tuple(Piece(mixed.formation(p.value), p.symbol, p.lo, p.hi) for p in pieces)
    items = pieces_items("concurrence", pieces, _digits(call)) + \
        pieces_items("entanglement of formation (ebits)", formation, _digits(call))
    return Report("concurrence (Wootters 1998)", items, rho.notes, value=pieces)


@command("mixedness", "mixedness RHO [with NAME=VALUE, ...]",
         "spectrum, purity, linear entropy and von Neumann entropy (bits) of a density matrix",
         "mixedness [[3, 1], [1, 1]]/4", topic=MIXED_TOPIC)
def run_mixedness(call: CommandCall) -> Report:
    rho = _density_alone(call)
    digits = _digits(call)
    found = mixed.mixedness(rho, digits)
    items: tuple = (Field("purity", number_cell(found.purity, digits)),
                    Field("linear entropy", number_cell(found.linear_entropy, digits)),
                    Field("von Neumann entropy (bits)", number_cell(found.entropy, digits)))
    return Report("mixedness", _spectrum_or_note(rho.matrix, digits) + items, rho.notes, value=found)


def _split_pair(call: CommandCall) -> tuple[tuple[str, int], tuple[str, int]]:
    """``pair := expr ',' expr``."""
    pieces = split_commas(call.words())
    if len(pieces) != 2:
        place = pieces[1].end if len(pieces) > 2 else call.offset
        raise call.error("fidelity: give two states or density matrices separated by a comma, "
                         "as in 'fidelity rho, sigma'", place)
    first, second = (piece.expression() for piece in pieces)
    return (first.text, first.start), (second.text, second.start)


@command("fidelity", "fidelity A, B [with NAME=VALUE, ...]",
         "fidelity (tr sqrt(sqrt(A) B sqrt(A)))^2 of two states or density matrices",
         "fidelity (|00> + |11>)/sqrt(2), [[1, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 1]]/2",
         topic=MIXED_TOPIC)
def run_fidelity(call: CommandCall) -> Report:
    (a_text, a_at), (b_text, b_at) = _split_pair(call)
    a, b = operand(call, a_text, a_at), operand(call, b_text, b_at)
    value = mixed.fidelity(a, b, _digits(call))
    return Report("fidelity", (Field("F", number_cell(value, _digits(call))),), value=stored(value))


def region_text(region: mixed.Region) -> str:
    if region.symbol is None:
        return "everywhere"
    if region.is_point:
        return f"{region.symbol} = {language_text(region.lo)}"
    return interval_text(region.symbol, language_text(region.lo), language_text(region.hi),
                         region.closed)


def interval_text(name, lo: str, hi: str, closed: tuple[bool, bool]) -> str:
    return f"{name} in {'[' if closed[0] else '('}{lo}, {hi}{']' if closed[1] else ')'}"


def _threshold_digits(regions: tuple[mixed.Region, ...], digits: int) -> tuple:
    points = {r.lo for r in regions if r.symbol is not None} | {r.hi for r in regions if r.symbol}
    shown = sorted((p for p in points if not p.is_Rational), key=sympy.default_sort_key)
    return tuple(Field("threshold", exact_cell(p, digits)) for p in shown)


def plane_items(plane: "mixed.Plane", digits: int) -> tuple:
    """Two parameters: the cells (where, verdict, the exact point it was decided at), the
    boundary curves, the thresholds in the second parameter and the critical values' digits."""
    rows = tuple((cell_text(plane, c), c.verdict, _point_text(c.sample)) for c in plane.cells)
    items: tuple = (Table(("where", "verdict", "decided at"), rows),)
    if plane.boundary:
        items += (Field("boundary", "; ".join(f"{language_text(f)} = 0" for f in plane.boundary)),)
    thresholds = tuple(_thresholds(plane))
    if thresholds:
        items += (Table((f"where {plane.x} is", f"threshold in {plane.y}", "below", "above"),
                        thresholds),)
    shown = [v for v in plane.critical if not v.is_Rational]
    return items + tuple(Field(f"critical {plane.x}", exact_cell(v, digits)) for v in shown)


def cell_text(plane: "mixed.Plane", cell) -> str:
    x, y = plane.x, plane.y
    where = f"{x} = {language_text(cell.x_lo)}" if cell.on_line else \
        f"{x} in ({language_text(cell.x_lo)}, {language_text(cell.x_hi)})"
    if cell.on_curve:
        return f"{where}, {y} = {bound_text(cell.y_lo, y)}"
    return f"{where}, " + interval_text(y, bound_text(cell.y_lo, y), bound_text(cell.y_hi, y),
                                        cell.closed)


def bound_text(bound, y) -> str:
    """A number, a closed form in the first parameter, or 'root k in y of f = 0'."""
    if isinstance(bound, sympy.Expr):
        return language_text(bound)
    if bound.closed is not None:
        return language_text(bound.closed)
    return f"root {bound.index + 1} in {y} of {language_text(bound.poly)} = 0"


def _thresholds(plane: "mixed.Plane"):
    """Over each interval of the first parameter, the sections between different verdicts."""
    for below, above in zip(plane.cells, plane.cells[1:]):
        same_column = (below.x_lo, below.x_hi) == (above.x_lo, above.x_hi)
        if same_column and not below.on_line and below.verdict != above.verdict:
            edge = below.y_hi if above.on_curve else above.y_lo
            yield (f"({language_text(below.x_lo)}, {language_text(below.x_hi)})",
                   f"{plane.y} = {bound_text(edge, plane.y)}", below.verdict, above.verdict)


def _point_text(point) -> str:
    return ", ".join(f"{s} = {language_text(v)}" for s, v in point.items())


def plane_note(sides: tuple[int, int]) -> str:
    rule = ("entangled exactly where det(rho^T) < 0 (Augusiak, Demianowicz & Horodecki 2008)"
            if sides == (2, 2) else "PPT exactly where every coefficient of the characteristic "
            "polynomial of rho^T at -x is >= 0 (Descartes' rule)")
    return ("two parameters: the box is cut into cells on which no condition changes sign "
            f"(cylindrical decomposition); {rule}; each cell decided exactly at the point shown")


@command("separable", "separable RHO [CUT] [with NAME=VALUE, ...]",
         "where a density matrix (or a family of one or two parameters) is separable or entangled: "
         "the PPT criterion, decisive on 2x2 and 2x3; larger sides are labelled PPT",
         "separable [[1, 0, 0, 1], [0, 1, 0, 0], [0, 0, 1, 0], [1, 0, 0, 1]]/4 1|2",
         topic=MIXED_TOPIC)
def run_separable(call: CommandCall) -> Report:
    rho, cut = density_and_cut(call)
    found = mixed.separability(rho, cut, call.session.settings.strata_budget)
    if found.plane is not None:
        items: tuple = plane_items(found.plane, _digits(call))
        notes = (plane_note(found.sides),)
    else:
        rows = tuple((region_text(r), r.verdict) for r in found.regions)
        items = (Table(("where", "verdict"), rows),) + _threshold_digits(found.regions, _digits(call))
        notes = ()
    a, b = found.sides
    note = (f"PPT criterion (Peres 1996) on {a}x{b}: necessary and sufficient there (Horodecki, "
            "Horodecki & Horodecki 1996)" if found.decisive else
            f"on {a}x{b} PPT does not prove separability (PPT entangled states exist, Horodecki "
            "1997): PPT regions are labelled PPT, not separable")
    return Report(f"separability across {cut.describe(_frame(rho))}", items,
                  rho.notes + notes + (note,),
                  value=found)


def operator_and_cut(call: CommandCall) -> tuple[sympy.MatrixBase, tuple[int, ...], State, Cut]:
    body, cut = call.split_cut()
    expression = body.expression()
    found = call.session.bindings.get(expression.text.strip())
    matrix = found.matrix if isinstance(found, Density) else call.value(expression.text,
                                                                         expression.start)
    if not isinstance(matrix, sympy.MatrixBase) or matrix.rows != matrix.cols:
        raise call.error(f"{call.name}: expected a square matrix, found a {kind_of(matrix)}",
                         call.offset)
    dims, names = (found.dims, found.part_names()) if isinstance(found, Density) else \
        _dims(call, matrix.rows)
    if dims is None:
        raise call.error(f"a {matrix.rows}x{matrix.rows} operator: declare its parts with 'space'",
                         call.offset)
    frame = State(dims, {}, names)
    if call.point:
        matrix = matrix.subs({sympy.Symbol(n, **_assumptions(call, n)): v
                              for n, v in call.point.items()})
    return matrix, dims, frame, call.cut_of(cut, frame, body.end)


def _assumptions(call: CommandCall, name: str) -> dict:
    param = call.session.params.get(name)
    return {} if param is None else param.symbol.assumptions0


@command("opschmidt", "opschmidt OPERATOR [CUT] [with NAME=VALUE, ...]",
         "operator Schmidt decomposition (Hilbert-Schmidt inner product): coefficients, rank and "
         "the operators on each side",
         "opschmidt [[1, 0, 0, 0], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]] 1|2", topic=MIXED_TOPIC)
def run_opschmidt(call: CommandCall) -> Report:
    matrix, dims, frame, cut = operator_and_cut(call)
    found = mixed.operator_schmidt(matrix, dims, cut, _digits(call))
    notes = ("operators orthonormal in tr(A^dagger B); O = sum_k c_k A_k (x) B_k",)
    if found.exact:
        rows = tuple((k, number_cell(c, _digits(call)), a, b) for k, (c, a, b) in
                     enumerate(zip(found.coefficients, found.left, found.right), start=1))
        table = Table(("k", "coefficient", "left operator", "right operator"), rows)
    else:
        rows = tuple((k, number_cell(c, _digits(call))) for k, c in
                     enumerate(found.coefficients, start=1))
        table = Table(("k", "coefficient"), rows)
        notes += ("certified: the operators are enclosed in balls (ketsplit.operator_schmidt "
                  "in Python gives them as python-flint acb_mat)",)
    items = (Field("operator Schmidt rank", found.rank), table)
    return Report(f"operator Schmidt decomposition across {cut.describe(frame)}", items, notes,
                  value=found)


@command("schmidtbasis", "schmidtbasis STATE [CUT] [with NAME=VALUE, ...]",
         "local unitaries U_A, U_B with (U_A (x) U_B)|psi> = sum_k s_k |k>|k>",
         "schmidtbasis (|00> + |01> + 2|11>)/sqrt(6) 1|2", topic=MIXED_TOPIC)
def run_schmidtbasis(call: CommandCall) -> Report:
    state, cut = call.state_and_cut()
    found = mixed.to_schmidt_basis(state, cut)
    items = (Field("coefficients", list(found.coefficients)), Field("U_A", found.left),
             Field("U_B", found.right))
    return Report(f"local unitaries to Schmidt form across {cut.describe(state)}", items,
                  ("rows beyond the Schmidt rank complete the bases (Gram-Schmidt on the "
                   "standard basis)",), value=found)
