"""Terminal and SVG plots across a declared parameter range."""

from __future__ import annotations

import importlib.util
import math
import xml.etree.ElementTree as ElementTree

import pytest
import sympy

import ketsplit
from ketsplit.plots import Marker, make_chart, nice, svg_text, terminal_lines

FAMILY = "real t in [0, pi]\npsi = cos(t)|00> + sin(t)|11>"


@pytest.fixture(scope="module")
def session() -> ketsplit.Session:
    s = ketsplit.Session()
    s.run(FAMILY)
    return s


def test_terminal_plot_fits_80_columns_and_labels_its_axes(session):
    result = session.run("plot concurrence psi 1|2 over t")[0]
    lines = result.report.items[0].lines
    assert max(len(line) for line in lines) <= 80
    axis_labels = next(line for line in lines if "pi/4" in line)
    assert "0" in axis_labels and "pi/2" in axis_labels and axis_labels.rstrip().endswith("t")
    assert "concurrence" in result.report.title


def test_samples_agree_with_the_closed_form():
    # Concurrence of cos t|00> + sin t|11> is |sin 2t| (Hill & Wootters, PRL 78, 5022 (1997));
    # every sample of the exact figure must agree with it at the sample point.
    t = sympy.Symbol("t", real=True)
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    chart = make_chart("c", {"concurrence": ketsplit.figures(psi)["concurrence"]}, t, (0, sympy.pi))
    for x, y in zip(chart.xs, chart.curves[0].ys):
        assert y is not None and abs(y - abs(math.sin(2 * x))) < 1e-12


def test_strata_points_are_marked_when_strata_are_available(session):
    text = session.run("plot entropy psi over t")[0].text()
    if importlib.util.find_spec("ketsplit.strata") is None:
        assert "not marked" in text
    else:
        # rank 1 where cos t or sin t vanishes: t = 0, pi/2, pi (fact of the trade)
        assert "rank 1 at t = pi/2" in text and "rank 1 at t = 0" in text


def test_svg_file(tmp_path, session):
    target = tmp_path / "entropy.svg"
    session.run(f"plot coefficients psi 1|2 over t --to {target}")
    root = ElementTree.parse(target).getroot()
    assert root.tag.endswith("svg")
    lines = [e for e in root.iter() if e.tag.endswith("polyline")]
    assert len(lines) >= 2  # both Schmidt coefficients


def test_png_needs_matplotlib(tmp_path, session):
    if importlib.util.find_spec("matplotlib") is not None:
        session.run(f"plot entropy psi over t --to {tmp_path / 'e.png'}")
        assert (tmp_path / "e.png").stat().st_size > 0
    else:
        with pytest.raises(ketsplit.InputError, match="matplotlib"):
            session.run(f"plot entropy psi over t --to {tmp_path / 'e.png'}")


@pytest.mark.parametrize("statement,message", [
    ("plot entropy psi over s", "no parameter 's'"),
    ("plot entrop psi over t", "entropy"),
    ("plot entropy psi 1|2", "over NAME"),
    ("plot entropy psi over t --to out.txt", ".svg"),
])
def test_bad_plot_requests(session, statement, message):
    with pytest.raises(ketsplit.InputError, match=message):
        session.run(statement)


def test_parameter_without_range_or_not_real():
    s = ketsplit.Session()
    s.run("real u\nphi = cos(u)|00> + sin(u)|11>\nchi = |00> + z|11>")
    with pytest.raises(ketsplit.InputError, match="no declared range"):
        s.run("plot entropy phi over u")
    with pytest.raises(ketsplit.InputError, match="complex"):
        s.run("plot entropy chi over z")


def test_chart_drawing_is_deterministic():
    t = sympy.Symbol("t", real=True)
    chart = make_chart("sin", {"sin^2": sympy.sin(t) ** 2}, t, (0, sympy.pi),
                       [Marker(sympy.pi / 2, "top")])
    assert terminal_lines(chart) == terminal_lines(chart)
    assert "stroke-dasharray" in svg_text(chart)
    assert nice(0.998, 1) == 1.0 and nice(-0.013, -1) == -0.013 and nice(0.0, 1) == 0.0


def test_many_curves_all_drawn_and_legend_fits():
    t = sympy.Symbol("t", real=True)
    curves = {f"curve_{k}": sympy.Integer(k) / 10 + sympy.sin(t) / 100 for k in range(11)}
    lines = terminal_lines(make_chart("many", curves, t, (0, 1)))
    legend = " ".join(line for line in lines if "curve_" in line)
    assert all(f"curve_{k}" in legend for k in range(11))
    assert max(len(line) for line in lines) <= 80
    with pytest.raises(ketsplit.InputError, match="single point"):
        make_chart("flat", curves, t, (1, 1))
