"""Exact Schmidt pieces of a block of numbers, computed in its exact number field.

The entries of the block and their complex conjugates are put into one exact
domain F (ZZ, QQ, the Gaussian rationals or an algebraic field QQ<a>, the
form :func:`sympy.polys.constructor.construct_domain` gives them).  Every
decision is then exact arithmetic in F: the rank, the reduced state
rho = B B^dagger, its characteristic polynomial and the factors of it.  No
zero test is made on floats and nothing is simplified heuristically.

Eigenvectors come without a nullspace over radicals.  With m the product of
the distinct irreducible factors of the characteristic polynomial (rho is
Hermitian, so m is its minimal polynomial) and lambda a root of the factor f,
P = m(rho) / (rho - lambda) maps everything into the eigenspace of lambda and
is lambda-times-a-projector there: P = P(lambda) Pi.  Its entries are
polynomials in lambda over F (reduced modulo f), computed exactly; a column c
with P_cc != 0 (an exact test in F[lambda]/(f), a field) is an eigenvector
whose squared norm is P(lambda) P_cc, and its conjugate is row c of P, because
P is Hermitian.  A repeated eigenvalue takes k columns of P through Gram-Schmidt
in F[lambda]/(f), whose Gram matrix is P(lambda) P.  The closed form of lambda
(radicals for degree 2, Viete for a rational cubic, CRootOf up to degree 8)
enters only when the result is written out; other factors raise NoClosedForm
from their degree and coefficients before any vector is computed.

Blocks whose entries are not algebraic numbers return None here (the caller
takes the symbolic route or declines with NoClosedForm).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

import sympy
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix
from sympy.polys.polyerrors import BasePolynomialError, CoercionFailed

from ..numeric.blocks import gaussian_rational
from .eigen import LAMBDA, NoClosedForm, refusal, solve_factor
from .tidy import expanded

Vector = sympy.Matrix
Piece = tuple[sympy.Expr, Vector, Vector]
MAX_FIELD_DEGREE = 16   # number fields of larger (bounded) degree are not built: cos(pi/202) has 100


def field_degree_bound(values) -> int | None:
    """An upper bound on the degree over QQ of the field the values generate, read from their
    structure (radicals of rationals, roots of unity, cos/sin of rational multiples of pi);
    None when a value is not recognisably algebraic (pi, e, exp(1), ...)."""
    generators: dict[sympy.Expr, int] = {}
    pending = list(values)
    while pending:
        node = pending.pop()
        if node.is_Rational:
            continue
        if node.is_Add or node.is_Mul:
            pending.extend(node.args)
            continue
        degree = 2 if node is sympy.I else _generator_degree(node)
        if degree is None:
            return None
        if node.is_Pow:
            pending.append(node.base)
        generators[node] = degree
    total = 1
    for degree in generators.values():
        total *= degree
    return total


def _generator_degree(node: sympy.Expr) -> int | None:
    if node.is_Pow:
        if node.exp.is_Integer:
            return 1
        return int(node.exp.q) if node.exp.is_Rational else None
    if isinstance(node, (sympy.exp, sympy.cos, sympy.sin)):
        argument = node.args[0] / (sympy.I * sympy.pi if isinstance(node, sympy.exp) else sympy.pi)
        return int(sympy.totient(2 * argument.q)) if argument.is_Rational else None
    return None


@dataclass(frozen=True)
class NumberBlock:
    """A block B and its conjugate over one exact field F (rows <= columns)."""

    matrix: DomainMatrix      # B over F
    conjugate: DomainMatrix   # conj(B) over F
    values: tuple = ()        # B's entries as given, row by row (kept for single-entry rows)

    @property
    def field(self):
        return self.matrix.domain

    def expr(self, element) -> sympy.Expr:
        """An element of F as a readable sympy number (roots of unity as radicals)."""
        value = self.field.to_sympy(element)
        return value if self.field.is_QQ or self.field.is_QQ_I else radical_form(value)


def number_block(block: sympy.Matrix) -> NumberBlock | None:
    """The block over the exact number field of its entries, or None when they are not
    algebraic numbers (parameters, pi, e, ...)."""
    if block.free_symbols:
        return None
    values = list(block)
    if all(v.is_Rational for v in values):  # the common case, without construct_domain
        elements = [sympy.QQ(int(v.p), int(v.q)) for v in values]
        return _block(block.shape, elements + elements, sympy.QQ, values)
    parts = [gaussian_rational(v) if not v.has(sympy.Float) else None for v in values]
    if all(part is not None for part in parts):  # p/q + i r/s: QQ(i), again without construct_domain
        field = sympy.QQ_I
        elements = [field(x, y) for x, y in parts] + [field(x, -y) for x, y in parts]
        return _block(block.shape, elements, field, values)
    degree = field_degree_bound(values)
    if degree is None or degree > MAX_FIELD_DEGREE:
        return None
    conjugates = [sympy.conjugate(v) for v in values]
    try:
        domain, elements = construct_domain(values + conjugates, extension=True)
    except (BasePolynomialError, CoercionFailed, NotImplementedError, ValueError):
        return None
    if not (domain.is_ZZ or domain.is_QQ or domain.is_ZZ_I or domain.is_QQ_I or domain.is_AlgebraicField):
        return None
    field = domain.get_field()
    try:  # sympy's field isomorphism runs PSLQ, which fails on entries like 10^(-300) sqrt(2)
        converted = [field.convert_from(e, domain) for e in elements]
    except (BasePolynomialError, CoercionFailed, NotImplementedError, ValueError):
        return None
    return _block(block.shape, converted, field, values)


def _block(shape: tuple[int, int], elements: list, field, values: list) -> NumberBlock:
    """B and conj(B) from their elements over ``field`` (B's row by row, then conj(B)'s)."""
    size = shape[0] * shape[1]

    def matrix(items) -> DomainMatrix:
        return DomainMatrix([items[r * shape[1]:(r + 1) * shape[1]] for r in range(shape[0])],
                            shape, field)

    return NumberBlock(matrix(elements[:size]), matrix(elements[size:]), tuple(values))


def radical_form(value: sympy.Expr) -> sympy.Expr:
    """exp(i pi r) for rational r written as radicals where sympy's cos/sin evaluate to them."""
    replacements = {}
    for atom in value.atoms(sympy.exp):
        ratio = atom.args[0] / (sympy.I * sympy.pi)
        if ratio.is_Rational:
            form = sympy.cos(sympy.pi * ratio) + sympy.I * sympy.sin(sympy.pi * ratio)
            if not form.has(sympy.cos, sympy.sin):
                replacements[atom] = form
    return sympy.expand(value.xreplace(replacements)) if replacements else value


def number_rank(block: sympy.Matrix) -> int | None:
    """The exact rank of a block of numbers; None when no exact domain decides it.

    Algebraic numbers: the rank over their number field.  Otherwise, numbers
    polynomial in ONE transcendental constant (pi, or exp of a nonzero
    rational, Lindemann's theorem): the rank over QQ(pi), treating pi as a
    variable, which is exact because pi satisfies no polynomial equation.  Two
    such constants (pi and e) are refused: their algebraic independence is not
    known, so a polynomial identity between them cannot be ruled out.
    """
    if block.free_symbols:
        return None
    found = number_block(block)
    if found is not None:
        return found.matrix.rank()
    try:
        domain, elements = construct_domain(list(block))
    except (BasePolynomialError, CoercionFailed, NotImplementedError, ValueError):
        return None
    if not (domain.is_PolynomialRing or domain.is_FractionField) or len(domain.symbols) != 1 \
            or not _transcendental(domain.symbols[0]) or not domain.domain.is_Exact or domain.domain.is_EX:
        return None
    field = domain.get_field()
    rows, cols = block.shape
    entries = [field.convert_from(e, domain) for e in elements]
    return DomainMatrix([entries[r * cols:(r + 1) * cols] for r in range(rows)], (rows, cols), field).rank()


def _transcendental(generator: sympy.Expr) -> bool:
    """pi, e, and exp(q) for rational q != 0 (Lindemann)."""
    if generator is sympy.pi or generator is sympy.E:
        return True
    return isinstance(generator, sympy.exp) and generator.args[0].is_Rational and generator.args[0] != 0


def number_pieces(found: NumberBlock) -> list[Piece]:
    """All Schmidt pieces of the block (left vectors on its rows)."""
    if found.matrix.shape[0] == 1 or found.matrix.rank() == 1:
        return [rank_one(found)]
    rho = found.matrix.matmul(found.conjugate.transpose())
    field = found.field
    factors = eigen_factors(found, rho)
    minimal = sympy.Poly(1, LAMBDA, domain=field)
    for f, _ in factors:
        minimal = minimal * f
    powers = [DomainMatrix.eye(rho.shape[0], field).to_dense()]
    for _ in range(minimal.degree() - 1):
        powers.append(powers[-1].matmul(rho))
    pieces: list[Piece] = []
    for f, multiplicity in factors:
        if f.degree() == 1 and f.TC() == 0:
            continue  # the zero eigenvalue carries no Schmidt piece
        projector = Projector.of(powers, minimal, f)
        if multiplicity == 1:
            pieces += simple_pieces(found, projector)
        else:
            pieces += multiple_pieces(found, projector, multiplicity)
    return pieces


def eigen_factors(found: NumberBlock, rho: DomainMatrix) -> list[tuple[sympy.Poly, int]]:
    """The monic irreducible factors of rho's characteristic polynomial over the block's field,
    with multiplicities; NoClosedForm at once where a factor has no closed form."""
    field = found.field
    poly = sympy.Poly([field.to_sympy(c) for c in rho.charpoly()], LAMBDA, domain=field)
    factors = [(f.monic(), k) for f, k in poly.factor_list()[1]]
    for f, _ in factors:  # the structure decides at once, before any eigenvector work
        if refusal(f):
            raise NoClosedForm(refusal(f))
    return factors


def number_spectrum(found: NumberBlock) -> list[sympy.Expr]:
    """The block's Schmidt coefficients alone, without vectors: the closed forms
    :func:`number_pieces` gives (sqrt of each nonzero eigenvalue of rho = B B^dagger, as
    often as its multiplicity)."""
    if found.matrix.shape[0] == 1 or found.matrix.rank() == 1:
        return [rank_one(found)[0]]
    rho = found.matrix.matmul(found.conjugate.transpose())
    field = found.field
    values: list[sympy.Expr] = []
    for f, multiplicity in eigen_factors(found, rho):
        if not (f.degree() == 1 and f.TC() == 0):  # the zero eigenvalue carries no coefficient
            values += [root(at([field.zero, field.one])) for at in evaluations(found, f)] * multiplicity
    return values


def two_row_spectrum(rows: list[list[sympy.Expr]]) -> list[sympy.Expr] | None:
    """The Schmidt coefficients of a block of two rows of Gaussian rationals (None for other
    entries), in exact rational arithmetic on Python numbers, no field built.

    rho = B B^dagger is 2 x 2 with w = tr rho and D = det rho rational: its
    eigenvalues are w/2 +- sqrt(w^2/4 - D), the roots of x^2 - w x + D, written
    as :func:`evaluations` writes them (a double root twice; D = 0 is a rank-one
    block, one coefficient sqrt(w), as :func:`rank_one` gives).
    """
    parts = [[gaussian_rational(v) if not v.has(sympy.Float) else None for v in row] for row in rows]
    if any(part is None for row in parts for part in row):
        return None
    (top, bottom), weights = parts, [sum(x * x + y * y for x, y in row) for row in parts]
    # q = sum_k a_k conj(b_k) = (x + i y)(u - i v) summed, its real and imaginary parts
    q_re = sum(x * u + y * v for (x, y), (u, v) in zip(top, bottom))
    q_im = sum(y * u - x * v for (x, y), (u, v) in zip(top, bottom))
    det = weights[0] * weights[1] - q_re * q_re - q_im * q_im
    half = Fraction(weights[0] + weights[1]) / 2
    if not det:
        return [root(_rational(2 * half))]
    radicand = half * half - det
    if not radicand:
        return [root(_rational(half))] * 2
    radical = root(_rational(radicand))
    return [root(_rational(half) + radical), root(_rational(half) - radical)]


def _rational(value: Fraction) -> sympy.Rational:
    return sympy.Rational(value.numerator, value.denominator)


@dataclass(frozen=True)
class Projector:
    """P = m(rho)/(rho - lambda) = sum_j lambda^j parts[j], lambda a root of ``factor``;
    ``scale`` is P(lambda), so that P = scale * (projector onto the eigenspace)."""

    factor: sympy.Poly
    parts: tuple[list[list], ...]   # entries over F, one matrix per power of lambda
    scale: sympy.Poly

    @staticmethod
    def of(powers: list[DomainMatrix], minimal: sympy.Poly, factor: sympy.Poly) -> "Projector":
        field = factor.domain
        lam = sympy.Poly(LAMBDA, LAMBDA, domain=field)
        coeffs = minimal.rep.to_list()  # highest first: m = sum a_k x^k, a_n = 1
        n = minimal.degree()
        quotient = [lam] * n  # q_k in F[lambda]/(f), Q(x) = m(x)/(x - lambda) = sum q_k x^k
        carry = sympy.Poly.from_list([coeffs[0]], LAMBDA, domain=field)
        for k in range(n - 1, -1, -1):
            quotient[k] = carry
            carry = (carry * lam + sympy.Poly.from_list([coeffs[n - k]], LAMBDA, domain=field)).rem(factor)
        scale = sympy.Poly(0, LAMBDA, domain=field)
        for k in range(n - 1, -1, -1):
            scale = (scale * lam + quotient[k]).rem(factor)
        low = [q.rep.to_list()[::-1] for q in quotient]
        parts = []
        for j in range(factor.degree()):
            total = DomainMatrix.zeros(powers[0].shape, field).to_dense()
            for k in range(n):
                if j < len(low[k]) and low[k][j]:
                    total = total + powers[k].mul(low[k][j])
            parts.append(total.to_list())
        return Projector(factor, tuple(parts), scale)

    def entry(self, i: int, c: int) -> list:
        """P_ic as its coefficients over F, lowest power of lambda first."""
        return [part[i][c] for part in self.parts]

    def poly(self, coefficients: list) -> sympy.Poly:
        return sympy.Poly.from_list(coefficients[::-1], LAMBDA, domain=self.factor.domain)


def simple_pieces(found: NumberBlock, projector: Projector) -> list[Piece]:
    """The pieces of a simple eigenvalue (each root of the factor): u = P e_c / |P e_c|."""
    rows = found.matrix.shape[0]
    column = next(c for c in range(rows) if any(projector.entry(c, c)))
    norm2 = (projector.scale * projector.poly(projector.entry(column, column))).rem(projector.factor)
    u_polys = [projector.entry(i, column) for i in range(rows)]
    # B^T conj(P e_c) = B^T (row c of P)^T: conj(P_ic) = P_ci, P being Hermitian
    images = []
    for part in projector.parts:
        row = DomainMatrix([[part[column][i]] for i in range(rows)], (rows, 1), found.field)
        images.append(found.matrix.transpose().matmul(row).to_list())
    w_polys = [[images[j][k][0] for j in range(len(images))] for k in range(found.matrix.shape[1])]
    # |w| scale: sigma |P e_c| = sqrt(lambda N(lambda)), one radical of a polynomial reduced mod f
    lam = sympy.Poly(LAMBDA, LAMBDA, domain=found.field)
    scale2 = (norm2 * lam).rem(projector.factor)
    pieces = []
    for at in evaluations(found, projector.factor):
        norm, scale = root(at(norm2)), root(at(scale2))
        u = Vector([at(p) / norm for p in u_polys])
        w = Vector([at(p) / scale for p in w_polys])
        pieces.append((root(at([found.field.zero, found.field.one])), u, w))
    return pieces


def evaluations(found: NumberBlock, factor: sympy.Poly) -> list:
    """For each root lambda of the factor, a function taking a polynomial over F (reduced mod
    the factor; a Poly or coefficients lowest first) to its closed-form value at lambda.

    A monic quadratic x^2 + b x + c has lambda = h +- sqrt(D) with h = -b/2 and
    D = b^2/4 - c in F, so c0 + c1 lambda = (c0 + c1 h) +- c1 sqrt(D) is formed in F and
    written out once, with no expansion of radical expressions.  Cubics (Viete) and
    higher (CRootOf) are substituted as they are.
    """
    field = found.field
    if factor.degree() == 2:
        _, b, c = factor.rep.to_list()
        half = -b / 2
        radical = root(found.expr(b * b / 4 - c))

        def quadratic(sign: int):
            def at(poly) -> sympy.Expr:
                c0, c1 = (_low_first(poly) + [field.zero, field.zero])[:2]
                return found.expr(c0 + c1 * half) + sign * found.expr(c1) * radical
            return at
        return [quadratic(1), quadratic(-1)]

    def closed(value: sympy.Expr):
        return lambda poly: sympy.Add(*(found.expr(c) * value ** j
                                        for j, c in enumerate(_low_first(poly)) if c))
    return [closed(value) for value in solve_factor(factor)]


def _low_first(poly) -> list:
    return poly.rep.to_list()[::-1] if isinstance(poly, sympy.Poly) else list(poly)


def multiple_pieces(found: NumberBlock, projector: Projector, multiplicity: int) -> list[Piece]:
    """An eigenvalue of multiplicity k: k orthonormal vectors from the columns of P.

    The columns of P span the eigenspace, and their Gram matrix is P(lambda) P
    (P is Hermitian and P^2 = P(lambda) P).  Gram-Schmidt runs on coordinates
    over the columns, in K = F[lambda]/(f), a field: every zero test there is
    exact, and lambda enters only when the vectors are written out.
    """
    ring = Residues(found, projector.factor)
    rows = found.matrix.shape[0]
    entry = [[ring.poly(projector.entry(i, c)) for c in range(rows)] for i in range(rows)]
    gram = [[ring.mul(projector.scale, entry[i][c]) for c in range(rows)] for i in range(rows)]
    done: list[tuple[dict[int, sympy.Poly], sympy.Poly]] = []   # (coordinates, squared norm)
    for c in range(rows):
        coords = {c: ring.one}
        for other, norm2 in done:
            overlap = ring.inner(other, {c: ring.one}, gram)
            factor = ring.mul(overlap, ring.inverse(norm2))
            for m, t in other.items():
                coords[m] = (coords.get(m, ring.zero) - ring.mul(factor, t)).rem(ring.factor)
        norm2 = ring.inner(coords, coords, gram)
        if not norm2.is_zero:
            done.append((coords, norm2))
        if len(done) == multiplicity:
            break
    lam = sympy.Poly(LAMBDA, LAMBDA, domain=found.field)
    image = found.matrix.transpose()
    pieces = []
    for coords, norm2 in done:
        u = [sum((ring.mul(t, entry[i][m]) for m, t in coords.items()), ring.zero) for i in range(rows)]
        # B^T conj(u): conj(u_i) = sum_m conj(t_m) P_mi, P being Hermitian and lambda real
        conj_u = [sum((ring.mul(ring.conj(t), entry[m][i]) for m, t in coords.items()), ring.zero)
                  for i in range(rows)]
        w = [sum((ring.mul(ring.constant(image[j, i].element), conj_u[i]) for i in range(rows)), ring.zero)
             for j in range(found.matrix.shape[1])]
        scale2 = ring.mul(norm2, lam)
        for at in evaluations(found, projector.factor):
            norm, scale = root(at(norm2)), root(at(scale2))
            pieces.append((root(at(lam)), Vector([at(x) / norm for x in u]),
                           Vector([at(x) / scale for x in w])))
    return pieces


class Residues:
    """Arithmetic in K = F[lambda]/(f), elements as polynomials of degree < deg f."""

    def __init__(self, found: NumberBlock, factor: sympy.Poly):
        self.found, self.factor, self.field = found, factor, factor.domain
        self.zero = sympy.Poly(0, LAMBDA, domain=self.field)
        self.one = sympy.Poly(1, LAMBDA, domain=self.field)

    def poly(self, low_first: list) -> sympy.Poly:
        return sympy.Poly.from_list(low_first[::-1], LAMBDA, domain=self.field)

    def constant(self, element) -> sympy.Poly:
        return sympy.Poly.from_list([element], LAMBDA, domain=self.field)

    def mul(self, a: sympy.Poly, b: sympy.Poly) -> sympy.Poly:
        return (a * b).rem(self.factor)

    def inverse(self, a: sympy.Poly) -> sympy.Poly:
        return a.invert(self.factor)

    def conj(self, a: sympy.Poly) -> sympy.Poly:
        """The conjugate at a real root: conjugate coefficients (identity over real fields)."""
        if self.field.is_QQ:
            return a
        to, back = self.field.to_sympy, self.field.from_sympy
        return self.poly([back(sympy.conjugate(to(c))) for c in a.rep.to_list()[::-1]])

    def inner(self, x: dict, y: dict, gram: list) -> sympy.Poly:
        """<sum x_m col_m | sum y_n col_n> = sum conj(x_m) y_n G_mn."""
        total = self.zero
        for m, a in x.items():
            for n, b in y.items():
                total = total + self.mul(self.mul(self.conj(a), b), gram[m][n])
        return total.rem(self.factor)


def rank_one(found: NumberBlock) -> Piece:
    """B = x y^T: sigma = sqrt(sum |b_ij|^2); u = x/|x|; w = B^T conj(u) / sigma."""
    field = found.field
    entries, conj = found.matrix.to_list(), found.conjugate.to_list()
    rows, cols = found.matrix.shape
    weight = sum((a * b for ra, rb in zip(entries, conj) for a, b in zip(ra, rb)), field.zero)
    sigma = root(found.expr(weight))
    if rows == 1:  # keep any phase on the right vector: the left one is then |0>
        single = [v for v in found.values if v != 0]
        if len(single) == 1 and not sympy.Abs(single[0]).has(sympy.Abs):
            # one amplitude a: |a| and a/|a| as typed (cos(pi/8), exp(2 pi i/3)), not rewritten
            sigma = sympy.Abs(single[0])
            return sigma, Vector([[1]]), _vector([v / sigma for v in found.values])
        return sigma, Vector([[1]]), _vector([found.expr(a) / sigma for a in entries[0]])
    column = next(j for j in range(cols) if any(entries[i][j] for i in range(rows)))
    norm = root(found.expr(sum((entries[i][column] * conj[i][column] for i in range(rows)), field.zero)))
    u = _vector([found.expr(entries[i][column]) / norm for i in range(rows)])
    image = [sum((entries[i][j] * conj[i][column] for i in range(rows)), field.zero) for j in range(cols)]
    return sigma, u, _vector([found.expr(e) / (norm * sigma) for e in image])


def _vector(values: list[sympy.Expr]) -> Vector:
    return Vector([expanded(v) for v in values])


def root(value: sympy.Expr) -> sympy.Expr:
    """sqrt of a nonnegative closed form; sqrt(a + b sqrt(d)) denested when a^2 - b^2 d is a
    rational square (the classical test, read from the structure, no search)."""
    result = sympy.sqrt(value)
    if not (result.is_Pow and result.base.is_Add and len(result.base.args) == 2):
        return result
    a, rest = result.base.as_coeff_Add()
    b, radical = rest.as_coeff_Mul()
    if not (a.is_Rational and b.is_Rational and radical.is_Pow and radical.exp == sympy.Rational(1, 2)
            and radical.base.is_Rational):
        return result
    c = sympy.sqrt(a * a - b * b * radical.base)
    if not c.is_Rational:
        return result
    return sympy.expand(sympy.sqrt((a + c) / 2) + sympy.sign(b) * sympy.sqrt((a - c) / 2))
