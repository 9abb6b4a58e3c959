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
P is Hermitian.  The closed form of lambda (radicals for degree 2, Viete for a
rational cubic, CRootOf beyond) enters only when the result is written out.

Blocks whose entries are not algebraic numbers return None here (the caller
takes the symbolic route or declines with NoClosedForm).
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix
from sympy.polys.polyerrors import BasePolynomialError, CoercionFailed

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
    return _block(block.shape, [field.convert_from(e, domain) for e in elements], field, values)


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
    poly = sympy.Poly([field.to_sympy(c) for c in rho.charpoly()], LAMBDA, domain=field)
    _, factors = poly.factor_list()
    factors = [(f.monic(), k) for f, k in factors]
    for f, _ in factors:  # the structure decides at once, before any eigenvector work
        if refusal(f):
            raise NoClosedForm(refusal(f))
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
        if multiplicity == 1:
            pieces += simple_pieces(found, Projector.of(powers, minimal, f))
        elif f.degree() == 1:
            pieces += repeated_pieces(found, rho, -f.TC())
        else:
            raise NoClosedForm(f"the irreducible factor {f.as_expr()} of degree {f.degree()} is "
                               f"repeated {multiplicity} times: no closed-form eigenvectors here")
    return pieces


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


def repeated_pieces(found: NumberBlock, rho: DomainMatrix, value) -> list[Piece]:
    """A repeated eigenvalue in F: an orthonormal basis of its eigenspace (Gram-Schmidt in F)."""
    field = found.field
    rows = rho.shape[0]
    shifted = rho - DomainMatrix.eye(rows, field).to_dense().mul(value)
    basis = [list(r) for r in shifted.nullspace().to_list()]
    done: list[tuple[list, object]] = []   # (orthogonal vector, its squared norm)
    for v in basis:
        for x, n2 in done:
            overlap = _dot(found, x, v)
            v = [a - overlap / n2 * b for a, b in zip(v, x)]
        done.append((v, _dot(found, v, v)))
    sigma = root(found.expr(value))
    pieces = []
    for v, n2 in done:
        norm = root(found.expr(n2))
        u = Vector([found.expr(a) for a in v]) / norm
        conj = DomainMatrix([[_conj(found, a)] for a in v], (rows, 1), field)
        image = found.matrix.transpose().matmul(conj).to_list()
        w = Vector([found.expr(e[0]) for e in image]) / (norm * sigma)
        pieces.append((sigma, u.applyfunc(_readable), w.applyfunc(_readable)))
    return pieces


def _dot(found: NumberBlock, x: list, y: list):
    """<x|y> = sum conj(x_i) y_i in F."""
    return sum((_conj(found, a) * b for a, b in zip(x, y)), found.field.zero)


def _conj(found: NumberBlock, element):
    field = found.field
    if field.is_QQ or field.is_ZZ:
        return element
    return field.from_sympy(sympy.conjugate(field.to_sympy(element)))


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


def _readable(value: sympy.Expr) -> sympy.Expr:
    """Expanded (radsimp on nested radicals costs more than the whole decomposition)."""
    return sympy.expand(value)
