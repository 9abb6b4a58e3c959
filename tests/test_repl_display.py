"""2-D output (render/pretty.py through render/text.py) and folding of long outputs."""

from __future__ import annotations

import sympy

from ketsplit.render.pretty import kets_picture, table_text, text
from ketsplit.base.document import Digits, Field, Kets, Report, Table
from ketsplit.render.text import to_text
from ketsplit.repl.display import Mode, fold


def sympy_lines(expr) -> list[str]:
    """sympy's own 2-D picture of one expression: the reference library."""
    return sympy.pretty(expr, use_unicode=True).split("\n")


def test_a_fraction_coefficient_sits_on_the_baseline_of_its_ket():
    half = sympy.sqrt(2) / 2
    lines = text(Kets(((half, "00"), (-half, "11")))).split("\n")
    reference = sympy_lines(half)
    assert len(lines) == len(reference) == 3
    bar = next(k for k, line in enumerate(reference) if "─" in line)
    assert "|00⟩" in lines[bar] and "|11⟩" in lines[bar] and " - " in lines[bar]
    width = max(len(r) for r in reference)
    assert [line[:width].rstrip() for line in lines] == [r.rstrip() for r in reference]


def test_a_sum_coefficient_is_bracketed():
    t = sympy.Symbol("t", real=True)
    picture = kets_picture(Kets(((sympy.cos(t) + sympy.sin(t), "0"),)))
    middle = picture.picture[picture.baseline]
    assert middle.startswith("(") and middle.rstrip().endswith("|0⟩")
    assert text(Kets(((1, "0"), (-1, "1")))) == "|0⟩ - |1⟩"
    assert text(Kets(((-1, "0"),))) == "-|0⟩"


def test_digits_and_lists_in_two_d():
    root = sympy.sqrt(3) / 3      # sqrt(3)/3 = 0.5773502... (fact of the trade)
    assert text(Digits("0.577350", 6, root)).split("\n") == ["√3", "── ≈ 0.577350", "3"]
    assert text([root, 2]).split("\n") == [" √3", "[──, 2]", " 3"]
    assert text(sympy.Rational(1, 3)) == "1/3"    # sympy draws plain rationals on one line


def test_table_rows_align_on_their_baselines():
    root = 1 / sympy.sqrt(3)
    table = Table(("k", "coefficient", "vector"), ((1, root, Kets(((root, "0"),))), (2, 2, "x")))
    lines = table_text(table).split("\n")
    header, rule, *rows = lines
    assert header.split() == ["k", "coefficient", "vector"] and set(rule.strip()) <= {"─", " "}
    bar = next(k for k, line in enumerate(rows) if "─" in line)
    assert rows[bar].split()[0] == "1" and "|0⟩" in rows[bar]
    assert rows[-1].split() == ["2", "2", "x"]


def test_to_text_switches_between_linear_and_two_d():
    report = Report("value", (Field("value", sympy.sqrt(2) / 2),))
    assert to_text(report) == "value\n  value: sqrt(2)/2"
    assert to_text(report, pretty=True) == "value\n  value:\n    √2\n    ──\n    2"


def test_folding_keeps_the_head_and_counts_what_is_hidden():
    text_50 = "\n".join(f"line {k}" for k in range(50))
    folded = fold(text_50, 40)
    assert folded.shown.split("\n") == [f"line {k}" for k in range(40)] and folded.hidden == 10
    assert fold(text_50, 48).hidden == 0        # folding away two lines saves nothing
    assert fold(text_50, 0).hidden == 0         # 0: never fold
    assert Mode().toggled().name == "linear" and Mode().name == "2-D"


def test_labels_take_unicode_subscripts_where_unicode_has_them():
    from ketsplit.render.pretty import label
    assert label("rho_13") == "ρ₁₃" and label("rho_AB") == "ρ_AB"
    assert label("rank") == "rank" and label("log_negativity") == "log_negativity"
    report = Report("reduced state on 1", (Field("rho_1", sympy.Matrix([[1, 0], [0, 0]])),))
    assert "ρ₁:" in to_text(report, pretty=True) and "rho_1:" in to_text(report)
