"""Terminal plots, matplotlib files (svg, pdf, png), CSV samples and maps across declared ranges."""

from __future__ import annotations

import csv
import importlib.util
import math
import sys
import xml.etree.ElementTree as ElementTree

import numpy
import pytest
import sympy

import ketsplit
from ketsplit.plots import Marker, make_chart, nice, pi_ticks, terminal_lines

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


def test_svg_file_from_matplotlib(tmp_path, session):
    target = tmp_path / "entropy.svg"
    session.run(f"plot coefficients psi 1|2 over t --to {target}")
    root = ElementTree.parse(target).getroot()
    assert root.tag.endswith("svg")
    paths = [e for e in root.iter() if e.tag.endswith("path")]
    assert len(paths) > 10   # axes, ticks, both coefficient curves
    text = target.read_text()
    assert "sigma_1" in text and "sigma_2" in text   # the legend names both curves


@pytest.mark.parametrize("suffix,magic", [(".pdf", b"%PDF"), (".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_every_file_format(tmp_path, session, suffix, magic):
    target = tmp_path / f"entropy{suffix}"
    session.run(f"plot entropy psi over t --to {target}")
    assert target.read_bytes().startswith(magic)   # file signatures (fact of the trade)


def test_the_users_matplotlib_backend_is_left_alone(tmp_path, session):
    import matplotlib
    raw = dict.__getitem__(matplotlib.rcParams, "backend")  # read without resolving it
    had_pyplot = "matplotlib.pyplot" in sys.modules
    session.run(f"plot entropy psi over t --to {tmp_path / 'e.png'}")
    assert dict.__getitem__(matplotlib.rcParams, "backend") == raw
    assert had_pyplot or "matplotlib.pyplot" not in sys.modules   # drawn through the object API


def test_data_file_holds_the_samples_and_the_curve_reaches_the_marks(tmp_path, session):
    target = tmp_path / "e.csv"
    session.run(f"plot entropy,concurrence psi over t --data {target}")
    rows = list(csv.reader(target.open()))
    assert rows[0] == ["t", "entropy (bits)", "concurrence"]
    xs = [float(r[0]) for r in rows[1:]]
    assert xs[0] == 0.0 and xs[-1] == float(sympy.pi)   # the ends of the range are drawn
    assert float(sympy.pi / 2) in xs                    # and the rank drop at pi/2
    for x, entropy, concurrence in rows[1:]:
        # concurrence of cos t|00> + sin t|11> is |sin 2t| (Hill & Wootters, PRL 78, 5022 (1997));
        # entropy -c^2 log2 c^2 - s^2 log2 s^2 (definition), with 0 log 0 = 0
        x = float(x)
        assert abs(float(concurrence) - abs(math.sin(2 * x))) < 1e-9
        p = [math.cos(x) ** 2, math.sin(x) ** 2]
        assert abs(float(entropy) + sum(q * math.log2(q) for q in p if q > 0)) < 1e-9


def test_several_states_on_one_plot(session):
    session.run("chi = cos(t)|01> + sin(t)|10>")
    text = session.run("plot entropy psi, chi over t")[0].text()
    assert "psi: entropy (bits)" in text and "chi: entropy (bits)" in text


def test_pi_ticks():
    # multiples of pi/4 on [0, pi], of pi/8 on [0, pi/2]; none on [0, 1]
    assert [label for _, label in pi_ticks(sympy.Integer(0), sympy.pi)] == \
        ["$0$", "$\\pi/4$", "$\\pi/2$", "$3\\pi/4$", "$\\pi$"]
    assert len(pi_ticks(sympy.Integer(0), sympy.pi / 2)) == 5
    assert pi_ticks(sympy.Integer(0), sympy.Integer(1)) is None


def test_chart_shows_itself_in_a_notebook():
    t = sympy.Symbol("t", real=True)
    chart = make_chart("sin", {"sin^2": sympy.sin(t) ** 2}, t, (0, sympy.pi), [Marker(sympy.pi / 2, "top")])
    assert chart._repr_png_().startswith(b"\x89PNG")
    assert "<svg" in chart._repr_svg_()


def test_map_statement(tmp_path):
    s = ketsplit.Session()
    s.run("real t in [0, pi/2]\nreal phi in [0, pi]\n"
          "psi = cos(t)|00> + sin(t)(cos(phi)|11> + sin(phi)|22>)")
    data, picture = tmp_path / "m.csv", tmp_path / "m.png"
    result = s.run(f"map entropy psi 1|2 over t, phi --to {picture} --data {data}")[0]
    assert picture.read_bytes().startswith(b"\x89PNG")
    rows = list(csv.reader(data.open()))[1:]
    assert len(rows) == 81 * 81
    for t, phi, value in rows[::97]:
        # the state is already in Schmidt form: p = (c^2, s^2 cos^2 phi, s^2 sin^2 phi) (by hand),
        # its entropy checked against numpy's SVD of the coefficient matrix
        t, phi = float(t), float(phi)
        sigma = numpy.linalg.svd(numpy.diag([math.cos(t), math.sin(t) * math.cos(phi),
                                             math.sin(t) * math.sin(phi)]), compute_uv=False)
        assert abs(float(value) + sum(q * math.log2(q) for q in sigma ** 2 if q > 0)) < 1e-9
    assert "phi from 0 (bottom) to pi (top)" in result.text()


def test_bad_map_requests():
    s = ketsplit.Session()
    s.run("real t in [0, pi]\nreal u\npsi = cos(t)|00> + sin(t) exp(i u)|11>")
    with pytest.raises(ketsplit.InputError, match="no declared range"):
        s.run("map entropy psi over t, u")
    with pytest.raises(ketsplit.InputError, match="over NAME, NAME"):
        s.run("map entropy psi over t")


@pytest.mark.parametrize("statement,message", [
    ("plot entropy psi over s", "no parameter 's'"),
    ("plot entrop psi over t", "entropy"),
    ("plot entropy psi 1|2", "over NAME"),
    ("plot entropy psi over t --to out.txt", ".svg"),
    ("plot entropy psi over t --data out.txt", ".csv"),
    ("plot entropy psi over t --colour red", "unknown option"),
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


def test_a_statement_never_writes_the_shell_does(tmp_path):
    # issue 12, item 5: plot and map return the chart and the files asked for; the shells write
    from ketsplit.plots import Drawing
    from ketsplit.render.files import write_requested
    from ketsplit.session import Session as Engine
    engine = Engine()
    engine.run(FAMILY)
    picture, data = tmp_path / "e.svg", tmp_path / "e.csv"
    [result] = engine.run(f"plot entropy psi over t --to {picture} --data {data}")
    assert isinstance(result.value, Drawing)
    assert result.value.picture == str(picture) and result.value.data == str(data)
    assert list(tmp_path.iterdir()) == []  # the statement ran; nothing was written
    written = write_requested(result)
    assert ElementTree.parse(picture).getroot().tag.endswith("svg")
    assert next(csv.reader(data.open())) == ["t", "entropy (bits)"]
    fields = {item.label: item.value for item in written.report.items if hasattr(item, "label")}
    assert fields == {"written": str(picture), "data written": str(data)}
    assert written.value == result.value and write_requested(engine.run("rank psi")[0]).report.items


def test_engine_and_command_modules_hold_no_file_writer():
    # the layers below render never write a file: no atomic writer, no write_text/write_bytes
    import ast
    from pathlib import Path
    root = Path(ketsplit.__file__).parent
    shells = {"cli.py", "api.py", "__main__.py"}
    for path in root.rglob("*.py"):
        relative = path.relative_to(root)
        if relative.parts[0] in ("repl", "sheets", "render") or str(relative) in shells \
                or str(relative) == "base/files.py":
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            name = getattr(node, "attr", None) or getattr(node, "id", None)
            assert name not in ("write_atomic", "write_text", "write_bytes"), f"{relative} writes"


def test_a_worksheet_from_a_file_may_not_ask_for_a_data_file(tmp_path):
    from ketsplit.sheets.format import parse_sheet
    from ketsplit.sheets.runner import replay
    target = tmp_path / "e.csv"
    sheet = parse_sheet(f"{FAMILY}\nplot entropy psi over t --data {target}\n".encode())
    _, outcomes = replay(sheet)
    assert "cannot write files" in outcomes[-1].error.message
    assert not target.exists()


def test_the_interactive_shell_and_the_command_line_write_what_plot_asks_for(tmp_path, capsys):
    import io
    from ketsplit.cli import main
    from ketsplit.repl.loop import Shell
    shell = Shell(out=io.StringIO(), colour=False, spinner=False)
    picture = tmp_path / "shell.png"
    shell.handle(f"{FAMILY}\nplot entropy psi over t --to {picture}")
    assert picture.read_bytes().startswith(b"\x89PNG")  # file signature (fact of the trade)
    assert f"written: {picture}" in shell.console.stream.getvalue().replace("\n", " ")
    data = tmp_path / "cli.csv"
    assert main(["-c", f"{FAMILY}\nplot entropy psi over t --data {data}"]) == 0
    assert next(csv.reader(data.open())) == ["t", "entropy (bits)"]
    unwritable = tmp_path / "missing" / "e.svg"  # no such folder: an error, nothing written
    assert main(["-c", f"{FAMILY}\nplot entropy psi over t --to {unwritable}"]) == 2
    assert "no folder" in capsys.readouterr().err
