"""The entanglement class of a three-qubit pure state, the three-tangle, CKW terms, class strata.

Two three-qubit states are in the same class when invertible local
operations turn one into the other with some probability (Dür, Vidal & Cirac
2000).  There are six classes: fully product, three biseparable classes (one
qubit splits off: A|BC, B|AC, C|AB), the W class and the GHZ class.  They are
told apart by two invariants (DVC 2000, Coffman, Kundu & Wootters 2000):

- the ranks of the three one-party reduced states (the Schmidt ranks across
  1|23, 2|13, 3|12, through :func:`ketsplit.decomposition.decompose`): all 1
  is a product, exactly one equal to 1 names the qubit that splits off;
- with every rank 2, the three-tangle tau = 4 |Det| (Det Cayley's
  hyperdeterminant of the 2x2x2 array of normalised amplitudes): tau > 0 is
  the GHZ class, tau = 0 the W class.

Every zero decision goes through :mod:`ketsplit.arith.decide` (exact, or a
ball that excludes zero); an undecided one makes the class "undecided" with
the hint of the decision layer.  The CKW terms use the concurrence of a
two-qubit mixed state (Wootters 1998), kept in :func:`two_qubit_concurrence`
so that it can move to a mixed-state module.  Class strata reuse the rank
strata of :mod:`ketsplit.strata`: once per one-party cut for the biseparable
points, and for tau = 0 on the auxiliary two-qubit state |00> + Det|11>, whose
Schmidt rank is 1 exactly where Det = 0 (so the same exact solving, the same
proofs that a locus misses the ranges, the same "undecided" reports).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from itertools import combinations, product

import sympy
from flint import acb_mat, arb, ctx

from .arith.decide import Decided, compare, drop_abs, is_zero, sign
from .base.errors import InputError
from .cuts import Cut, join_names, reduced, simplified
from .decomposition import decompose
from .exact.signs import box_of
from .figures import overview
from .numeric.enclose import NotEnclosable, enclose
from .numeric.stored import BallValue
from .numeric.values import certified_real
from .states import State
from .strata import DEFAULT_BUDGET, Stratum, Undecided, strata
from .strata.model import NotedList
from .strata.search import same_point, state_rank_at

QUBITS = (2, 2, 2)
LABELS = tuple(product((0, 1), repeat=3))


# -- the hyperdeterminant and the three-tangle -----------------------------------

def hyperdeterminant(a) -> sympy.Expr:
    """Cayley's hyperdeterminant of a 2x2x2 array ``a[(i, j, k)]``, as written out in CKW 2000."""
    def p(*labels: str) -> sympy.Expr:
        return sympy.Mul(*(a[tuple(int(c) for c in label)] for label in labels))
    squares = p("000", "000", "111", "111") + p("001", "001", "110", "110") \
        + p("010", "010", "101", "101") + p("100", "100", "011", "011")
    pairs = p("000", "111", "011", "100") + p("000", "111", "101", "010") \
        + p("000", "111", "110", "001") + p("011", "100", "101", "010") \
        + p("011", "100", "110", "001") + p("101", "010", "110", "001")
    quads = p("000", "110", "101", "011") + p("111", "001", "010", "100")
    return sympy.expand(squares - 2 * pairs + 4 * quads)


def amplitude_array(state: State) -> dict[tuple[int, int, int], sympy.Expr]:
    return {label: state.amplitudes.get(label, sympy.Integer(0)) for label in LABELS}


def raw_hyperdeterminant(state: State) -> sympy.Expr:
    """Det of the amplitudes as typed; Det of the normalised state is this over norm^4."""
    return hyperdeterminant(amplitude_array(state))


def three_tangle(state: State) -> sympy.Expr:
    """tau = 4 |Det| of the normalised state, exact (a symbolic expression for a family)."""
    require_three_qubits(state, "the three-tangle")
    det = raw_hyperdeterminant(state)
    norm2 = state.norm_squared()
    if not det.free_symbols:
        modulus = sympy.sqrt(sympy.expand(det * sympy.conjugate(det)))
        return sympy.radsimp(4 * modulus / norm2 ** 2)
    return drop_abs(4 * sympy.Abs(det) / norm2 ** 2, box_of(state))


def require_three_qubits(state: State, what: str) -> None:
    if state.dims != QUBITS:
        shape = "x".join(str(d) for d in state.dims)
        raise InputError(f"{what}: asked of three qubits (2x2x2) only; this state is {shape}"
                         + ("; for more parts ask 'class' for what can be decided"
                            if state.nparts > 3 else ""))


def one_party_cut(k: int) -> Cut:
    return Cut((k,), tuple(p for p in range(3) if p != k))


# -- the class -------------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class EntanglementClass(BallValue):
    """The class of a three-qubit pure state with the invariants that decide it.

    ``kind``: "product", "biseparable", "W", "GHZ", or "undecided".  ``splits``
    names the cut of a biseparable state (the qubit that splits off first).
    ``generic``: the state has parameters and this is its class at generic
    values (see :func:`class_strata` for the exceptions).
    """

    kind: str
    splits: str | None
    ranks: tuple[int | None, int | None, int | None]
    tau: sympy.Expr | None
    tau_ball: arb | None
    proofs: tuple[str, ...]
    hint: str = ""
    generic: bool = False

    @property
    def name(self) -> str:
        return {"product": "fully product", "W": "W class", "GHZ": "GHZ class",
                "undecided": "undecided"}.get(self.kind, f"biseparable {self.splits}")

    @property
    def known(self) -> bool:
        return self.kind != "undecided"


def entanglement_class(state: State, digits: int = 30) -> EntanglementClass:
    """The class of the normalised three-qubit ``state`` (generic class of a family)."""
    require_three_qubits(state, "the entanglement class")
    if state.symbols:
        return generic_class(state, [rank_strata(state, k) for k in range(3)], digits)
    ranks, proofs = one_party_ranks(state)
    return decided_class(state, ranks, proofs, digits)


def generic_class(state: State, found: list, digits: int) -> EntanglementClass:
    """A family's class from the generic ranks its rank strata proved."""
    ranks = tuple(s[0].rank for s in found)
    proofs = tuple(f"generic rank of rho_{state.names[k]} = {r} (exact, rank strata)"
                   for k, r in enumerate(ranks))
    return decided_class(state, ranks, proofs, digits)


def decided_class(state: State, ranks, proofs, digits: int) -> EntanglementClass:
    tau = three_tangle(state)
    ball = tau_digits(tau, digits)
    generic = bool(state.symbols)
    if None in ranks:
        return EntanglementClass("undecided", None, ranks, tau, ball, proofs,
                                 "a one-party rank is undecided at the precision ceiling: write "
                                 "the amplitudes exactly, or raise 'digits'", generic)
    return class_from(state, ranks, tau, ball, proofs, tau_zero(state), generic)


def rank_strata(state: State, k: int, budget: float = DEFAULT_BUDGET):
    return strata(state, one_party_cut(k), budget=budget)


def class_from(state: State, ranks, tau, ball, proofs, zero: Decided[bool],
               generic: bool) -> EntanglementClass:
    """The DVC decision from the ranks and the decided zero of Det."""
    ones = [k for k, r in enumerate(ranks) if r == 1]
    if len(ones) == 3:
        return EntanglementClass("product", None, ranks, tau, ball, proofs, "", generic)
    if ones:
        cut = one_party_cut(ones[0])
        return EntanglementClass("biseparable", cut.describe(state), ranks, tau, ball, proofs, "",
                                 generic)
    proofs = proofs + (f"tau = 0: {zero.proof}" if zero.value else f"tau != 0: {zero.proof}",)
    if zero.value is None:
        return EntanglementClass("undecided", None, ranks, tau, ball, proofs,
                                 zero.hint or "decide whether tau vanishes", generic)
    return EntanglementClass("W" if zero.value else "GHZ", None, ranks, tau, ball, proofs, "",
                             generic)


def one_party_ranks(state: State) -> tuple[tuple, tuple[str, ...]]:
    ranks, proofs = [], []
    for k in range(3):
        found = decompose(state, one_party_cut(k), vectors=False)
        ranks.append(found.rank)
        how = "certified balls" if found.certified is not None else "exact"
        proofs.append(f"rank of rho_{state.names[k]} = {found.rank} ({how})")
    return tuple(ranks), tuple(proofs)


def tau_zero(state: State) -> Decided[bool]:
    """Does Det vanish (identically on the declared ranges, for a family)?"""
    return is_zero(raw_hyperdeterminant(state), box_of(state) or None)


def tau_digits(tau: sympy.Expr, digits: int) -> arb | None:
    """A ball around a constant tau with ``digits`` certain digits where the ladder reaches them."""
    if tau.free_symbols or tau.is_Rational:
        return None
    try:
        return certified_real(tau, digits)
    except (NotEnclosable, InputError):
        return None


# -- the class at an exact point of a family (the strata samples) -----------------

def class_at(state: State, point: dict, digits: int = 30) -> EntanglementClass:
    """The class at an exact parameter point: exact ranks over the point's field first
    (the strata package's exact rank), the decision layer otherwise."""
    at = state.subs({s.name: v for s, v in point.items()})
    if not at.amplitudes:
        return EntanglementClass("undecided", None, (0, 0, 0), None, None,
                                 ("every amplitude vanishes: not a state",), "")
    exact = [state_rank_at(state, one_party_cut(k), point) for k in range(3)]
    if None in exact:
        return entanglement_class(at, digits)
    proofs = tuple(f"rank of rho_{state.names[k]} = {r} (exact, at the point)"
                   for k, r in enumerate(exact))
    tau = three_tangle(at)
    zero = is_zero(raw_hyperdeterminant(at))
    if zero.value is None:
        zero = det_zero_by_rank(state, point) or zero
    return class_from(at, tuple(exact), tau, tau_digits(tau, digits), proofs, zero, False)


def det_zero_by_rank(state: State, point: dict) -> Decided[bool] | None:
    """Det = 0 at the point as the exact rank of diag(1, Det) over the point's field."""
    rank = state_rank_at(tangle_state(state), Cut((0,), (1,)), point)
    if rank is None:
        return None
    return Decided(rank == 1, "exact rank of diag(1, Det) over the field of the point")


def tangle_state(state: State) -> State:
    """|00> + Det|11>: Schmidt rank 1 exactly where the hyperdeterminant vanishes."""
    return State((2, 2), {(0, 0): sympy.Integer(1), (1, 1): raw_hyperdeterminant(state)},
                 ("D", "E"), state.params)


# -- concurrence and the CKW terms ------------------------------------------------

SIGMA_YY = sympy.Matrix(4, 4, lambda i, j: (-1 if i in (0, 3) else 1) if i + j == 3 else 0)


@dataclass(frozen=True, eq=False)
class Term(BallValue):
    """One CKW term: exact (``value``), certified (``ball``), or missing with ``note``."""

    name: str
    value: sympy.Expr | None
    ball: arb | None = None
    note: str = ""

    @property
    def missing(self) -> bool:
        return self.value is None and self.ball is None


def two_qubit_concurrence(rho: sympy.Matrix, rank_bound: int | None = None,
                          box=None) -> Term:
    """Squared concurrence of a two-qubit density matrix (Wootters 1998).

    R = rho (sy x sy) rho* (sy x sy) has eigenvalues l_i^2, l_i >= 0, and
    C = max(0, l1 - l2 - l3 - l4) with l1 the largest.  When rank rho <= 2
    (``rank_bound``, or proved here from the coefficients of R's characteristic
    polynomial), only l1, l2 can be nonzero: C^2 = (l1 - l2)^2 = tr R - 2 sqrt(e2),
    e2 = l1^2 l2^2 the second elementary symmetric function of R's spectrum.
    Otherwise a constant rho gets exact eigenvalues when sympy finds them all,
    or certified ball eigenvalues (acb_mat.eig); a family gets a missing term.
    """
    r = sympy.expand(rho * SIGMA_YY * rho.conjugate() * SIGMA_YY)
    trace = sympy.expand(r.trace())
    e2 = sympy.expand((trace ** 2 - (r * r).trace()) / 2)
    if rank_bound is not None and rank_bound <= 2 or small_rank(r, box):
        if not e2.free_symbols:
            return Term("C^2", simplified(trace - 2 * sympy.sqrt(e2), sympy.radsimp))
        return Term("C^2", sympy.factor(trace) - 2 * sympy.sqrt(sympy.factor(e2)))
    if rho.free_symbols:
        return Term("C^2", None, None, "rank of the two-qubit state above 2 for a family: "
                                       "the general concurrence of a family is not computed here")
    return constant_concurrence(r)


def small_rank(r: sympy.Matrix, box) -> bool:
    """e3 and e4 of R's spectrum both proved zero (R has rank <= 2)."""
    coefficients = r.charpoly().all_coeffs()
    return all(is_zero(c, box).value is True for c in coefficients[3:])


def constant_concurrence(r: sympy.Matrix) -> Term:
    """Exact when R's characteristic polynomial splits into factors of degree <= 2 (readable
    roots), certified balls otherwise (Ferrari's radicals are exact but slow to order)."""
    _, factors = r.charpoly().factor_list()
    if all(f.degree() <= 2 for f, _ in factors):
        roots = [v for f, m in factors for v in sympy.roots(f.as_expr(), *f.gens, multiple=True)
                 for _ in range(m)]
        found = exact_concurrence([sympy.sqrt(v) for v in roots]) if len(roots) == 4 else None
        if found is not None:
            return found
    return ball_concurrence(r)


def exact_concurrence(ls: list[sympy.Expr]) -> Term | None:
    """max(0, l1 - l2 - l3 - l4) squared, the largest and the sign decided exactly."""
    for k in range(len(ls)):
        if all(compare(ls[k], other).value in (0, 1) for other in ls):
            rest = sympy.expand(2 * ls[k] - sum(ls))
            decided = sign(rest)
            if decided.value is None:
                return None
            return Term("C^2", sympy.expand(rest ** 2) if decided.value > 0 else sympy.Integer(0))
    return None


def ball_concurrence(r: sympy.Matrix, bits: int = 256) -> Term:
    with ctx.workprec(bits):
        try:
            matrix = acb_mat([[enclose(e, bits) for e in row] for row in r.tolist()])
            values = matrix.eig(multiple=True)
        except (ValueError, NotEnclosable) as err:
            return Term("C^2", None, None, f"the spectrum of R was not enclosed ({err})")
        ls = sorted((v.real.sqrt() for v in values), key=lambda b: b.mid(), reverse=True)
        if any(not (a > b or a == b and a.is_exact()) for a, b in zip(ls, ls[1:])):
            return Term("C^2", None, None, "the order of R's eigenvalues is not proved by the balls")
        c = ls[0] - ls[1] - ls[2] - ls[3]
        if c < 0:
            return Term("C^2", sympy.Integer(0), None)
        if not c > 0:
            return Term("C^2", None, None, "the sign of l1 - l2 - l3 - l4 is not proved")
        return Term("C^2", None, c * c)


@dataclass(frozen=True)
class Monogamy:
    """The CKW terms with A as focus: C^2_AB + C^2_AC <= C^2_A(BC), the gap being tau."""

    ab: Term
    ac: Term
    a_bc: Term
    tau: sympy.Expr
    holds: Decided[bool] | None           # the inequality, None when a term is missing
    gap_is_tau: Decided[bool] | None      # tau = C^2_A(BC) - C^2_AB - C^2_AC

    @property
    def missing(self) -> tuple[str, ...]:
        return tuple(t.name for t in (self.ab, self.ac, self.a_bc) if t.missing)


def monogamy(state: State) -> Monogamy:
    """The CKW terms of the normalised three-qubit state (Coffman, Kundu & Wootters 2000)."""
    require_three_qubits(state, "the CKW terms")
    box = box_of(state) or None
    normal = state.normalised()
    names = state.names
    terms = []
    for other in (1, 2):
        rho = reduced(normal, (0, other))  # rank rho_AB = rank rho_C <= 2 for a pure state
        found = two_qubit_concurrence(rho, rank_bound=2, box=box)
        terms.append(Term(f"C^2_{names[0]}{names[other]}", found.value, found.ball, found.note))
    rho_a = reduced(normal, (0,))
    a_bc = Term(f"C^2_{names[0]}({names[1]}{names[2]})", simplify_term(4 * rho_a.det()))
    tau = three_tangle(state)
    if any(t.missing for t in terms):
        return Monogamy(terms[0], terms[1], a_bc, tau, None, None)
    gap = a_bc.value - terms[0].value - terms[1].value
    equal = guarded(is_zero, gap - tau, box)
    if equal.value:  # tau = 4 |Det| / N^2 >= 0 by construction
        return Monogamy(terms[0], terms[1], a_bc, tau,
                        Decided(True, "the gap equals tau, which is 4 |Det| / norm^4 >= 0"), equal)
    return Monogamy(terms[0], terms[1], a_bc, tau, holds_from(guarded(sign, gap, box)), equal)


def guarded(decide, expr: sympy.Expr, box) -> Decided:
    """The decision layer's answer; an expression its polynomial rewriting cannot take is
    undecided (said so), never an internal error."""
    try:
        return decide(expr, box)
    except sympy.polys.polyerrors.PolynomialError as err:
        return Decided(None, f"the decision layer could not rewrite the expression ({err})",
                       "ask at a parameter point ('with NAME=VALUE')")


def simplify_term(value: sympy.Expr) -> sympy.Expr:
    return sympy.radsimp(sympy.expand(value)) if not value.free_symbols else sympy.simplify(value)


def holds_from(found: Decided[int]) -> Decided[bool]:
    if found.value is None:
        return Decided(None, found.proof, found.hint)
    return Decided(found.value >= 0, found.proof)


# -- class strata ----------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class ClassStratum(BallValue):
    """Where a family has one class: ``points`` (a finite list) or a locus with ``equations``.

    ``cause`` says which invariant drops there; ``found`` is the class at the sample
    point, computed afresh at that exact point."""

    found: EntanglementClass
    cause: str
    equations: tuple[sympy.Expr, ...]
    points: list[dict] | None
    sample: dict | None
    description: str


class ClassStrata(NotedList):
    """ClassStratum values, generic class first; notes and undecided loci ((cause,
    :class:`Undecided`) pairs) beside them."""


@dataclass
class Loci:
    """Points and loci collected from the rank strata of the four auxiliary questions."""

    state: State
    digits: int
    points: list[tuple[dict, list[str]]] = field(default_factory=list)
    curves: list[ClassStratum] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    undecided: list[tuple[str, Undecided]] = field(default_factory=list)

    def add(self, cause: str, found) -> None:
        self.notes.extend(f"{cause}: {note}" for note in found.notes
                          if f"{cause}: {note}" not in self.notes)
        self.undecided.extend((cause, u) for u in found.undecided)
        for stratum in found[1:]:
            if stratum.points is not None:
                for point in stratum.points:
                    self.add_point(point, cause)
            else:
                self.add_curve(cause, stratum)

    def add_point(self, point: dict, cause: str) -> None:
        for known, causes in self.points:
            if same_point(known, point):
                causes.append(cause)
                return
        self.points.append((point, [cause]))

    def add_curve(self, cause: str, stratum: Stratum) -> None:
        """A locus of lower rank; the same locus met by another question gains that cause."""
        where = stratum.description.removeprefix(f"rank {stratum.rank} ")
        for k, known in enumerate(self.curves):
            if known.description == where:
                causes = [*known.cause.split("; "), cause]
                self.curves[k] = ClassStratum(known.found, "; ".join(causes), known.equations,
                                              None, known.sample, where)
                return
        found = class_at(self.state, stratum.sample, self.digits)
        self.curves.append(ClassStratum(found, cause, stratum.equations, None, stratum.sample,
                                        where))

    def curve_strata(self) -> list[ClassStratum]:
        return [ClassStratum(c.found, cause_text(c.cause.split("; ")), c.equations, None,
                             c.sample, c.description) for c in self.curves]

    def point_strata(self) -> list[ClassStratum]:
        """One stratum per class and cause, the points of each listed."""
        groups: dict[tuple[str, str], list[tuple[dict, EntanglementClass]]] = {}
        for point, causes in self.points:
            found = class_at(self.state, point, self.digits)
            groups.setdefault((found.name, cause_text(causes)), []).append((point, found))
        return [ClassStratum(members[0][1], cause, (), [p for p, _ in members], members[0][0],
                             f"{name} at {len(members)} point{'s' if len(members) > 1 else ''}")
                for (name, cause), members in groups.items()]


def cause_text(causes: list[str]) -> str:
    """'rank of rho_A drops' x3 and 'tau = 0' read as 'ranks of rho_A, rho_B, rho_C drop; tau = 0'."""
    drops = [c.split()[2] for c in causes if c.startswith("rank of ")]
    shown = [f"rank of {drops[0]} drops" if len(drops) == 1 else
             f"ranks of {', '.join(drops)} drop"] if drops else []
    return "; ".join(shown + [c for c in causes if not c.startswith("rank of ")])


def class_strata(state: State, *, budget: float = DEFAULT_BUDGET,
                 digits: int = 30) -> ClassStrata:
    """Every class a three-qubit family takes inside the declared ranges, generic first.

    Biseparable and product points come from the rank strata of the three
    one-party cuts, W-class-or-lower points from the rank strata of
    |00> + Det|11> (Schmidt rank 1 exactly where tau = 0); every point's class
    is then decided afresh at that exact point.  Loci proved empty are named
    in the notes; undecided loci are kept apart, never listed as strata.
    """
    require_three_qubits(state, "class strata")
    if not state.symbols:
        only = entanglement_class(state, digits)
        return ClassStrata([ClassStratum(only, "no parameters", (), [{}], {}, only.name)],
                           ("the state has no parameters, so there are no strata",))
    found = [rank_strata(state, k, budget) for k in range(3)]
    generic = generic_class(state, found, digits)
    loci = Loci(state, digits)
    for k, ranks in enumerate(found):
        loci.add(f"rank of rho_{state.names[k]} drops", ranks)
    if generic.kind == "GHZ":
        loci.add("tau = 0", strata(tangle_state(state), Cut((0,), (1,)), budget=budget))
    return ClassStrata([generic_stratum(state, generic, found, digits)] + loci.point_strata()
                       + loci.curve_strata(), tuple(loci.notes), tuple(loci.undecided))


def generic_stratum(state: State, generic: EntanglementClass, found: list,
                    digits: int) -> ClassStratum:
    """The generic class with a sample from the rank strata's generic samples, its class
    computed at that exact point (none when no such sample has the generic class)."""
    samples = [s[0].sample for s in found if s[0].sample]
    sample = next((p for p in samples if class_at(state, p, digits).name == generic.name), None)
    return ClassStratum(generic, "generic", (), None, sample, "everywhere else in the ranges")


# -- more parts ------------------------------------------------------------------

@dataclass(frozen=True)
class ManyParts:
    """What the class question can decide for a state of four or more parts."""

    groups: tuple[tuple[int, ...], ...]     # the finest product split (from the cut overview)
    decided: bool
    triples: tuple[tuple[tuple[int, int, int], str], ...]


def many_parts(state: State) -> ManyParts:
    """The finest product split, and for each three qubits what their class question is."""
    if state.nparts < 4:
        raise InputError("many_parts is for four or more parts")
    found = overview(state)
    qubits = [p for p, d in enumerate(state.dims) if d == 2]
    triples = []
    for triple in combinations(qubits, 3):
        names = join_names(state, triple)
        if all(set(g) <= set(triple) or not set(g) & set(triple) for g in found.groups):
            triples.append((triple, f"{names} is a union of product factors, so its reduced "
                                    f"state is pure: its class is the class of that factor (take "
                                    f"it from 'schmidt' across {names}|rest)"))
        else:
            triples.append((triple, f"the reduced state on {names} is mixed: the class of mixed "
                                    "three-qubit states is not decided here"))
    return ManyParts(found.groups, found.decided, tuple(triples))


__all__ = ["EntanglementClass", "entanglement_class", "three_tangle", "hyperdeterminant",
           "two_qubit_concurrence", "monogamy", "Monogamy", "Term", "class_strata",
           "ClassStrata", "ClassStratum", "many_parts", "ManyParts", "class_at"]
