"""Notebook display: a small notebook executed by a real Jupyter kernel (nbclient + ipykernel).

Each cell ends in one value; its rich outputs must hold LaTeX (``text/latex``),
HTML tables where the value is a table, and a picture for a plot, the MIME
types through which Jupyter shows values (fact of the trade).
"""

from __future__ import annotations

import pytest

nbformat = pytest.importorskip("nbformat", reason="the test extra installs nbformat")
nbclient = pytest.importorskip("nbclient", reason="the test extra installs nbclient")
pytest.importorskip("ipykernel", reason="the test extra installs ipykernel")

SETUP = """import ketsplit
from ketsplit.compare import compare_across
psi = ketsplit.ket("cos(t)|00> + exp(i phi) sin(t)|11>", real="t phi", ranges={"t": (0, "pi/2")})
fam = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi")})"""

CELLS = {  # name: (code, MIME types its output must have, text the LaTeX must contain)
    "state": ("psi", ("text/latex",), r"\lvert 00\rangle"),
    "decomposition": ("ketsplit.schmidt(psi)", ("text/latex",), r"\otimes"),
    "certified": ("ketsplit.schmidt(ketsplit.ket([0.6, 0.1, 0.2, 0.77]))", ("text/latex",), "certified"),
    "reduced": ('ketsplit.reduced(psi, "1")', ("text/latex",), r"\cos"),
    "figures": ("ketsplit.figures(psi)", ("text/latex", "text/html"), r"\text{linear}\_\text{entropy}"),
    "strata": ('ketsplit.strata(fam, "1|2")', ("text/latex", "text/html"), "rank"),
    "verdict": ('ketsplit.check("cos(t)^2 + sin(t)^2", "1", real="t")', ("text/latex",), "holds"),
    "comparison": ('compare_across(ketsplit.ket("|00> + |11>"), "1|2", '
                   'ketsplit.ket("cos(pi/8)|00> + sin(pi/8)|11>"), "1|2")', ("text/latex", "text/html"), "LOCC"),
    "result": ('ketsplit.Session().run("schmidt |00> + |11>")[0]', ("text/latex",), "Schmidt"),
    "plot": ('ketsplit.plot("entropy", fam, over="t")', ("image/png",), None),
}


@pytest.fixture(scope="module")
def executed():
    notebook = nbformat.v4.new_notebook()
    notebook.cells = [nbformat.v4.new_code_cell(SETUP)] + [nbformat.v4.new_code_cell(code)
                                                         for code, _, _ in CELLS.values()]
    nbclient.NotebookClient(notebook, timeout=600, kernel_name="python3").execute()
    return dict(zip(CELLS, notebook.cells[1:]))


@pytest.mark.parametrize("name", list(CELLS))
def test_every_value_shows_itself(executed, name):
    _, mimes, needle = CELLS[name]
    outputs = [o for o in executed[name].outputs if o.output_type == "execute_result"]
    assert outputs, executed[name].outputs
    data = outputs[0].data
    for mime in mimes:
        assert mime in data, (name, sorted(data))
    if needle is not None:
        assert needle in data["text/latex"], data["text/latex"]
    if "text/latex" in data:
        latex = data["text/latex"]
        assert latex.startswith("$") and latex.endswith("$")
        assert latex.count("{") == latex.count("}")


def test_a_plot_statement_shows_its_chart_inline():
    # issue 13: 'plot' in a notebook showed nothing; a result now carries its chart as PNG
    import ketsplit
    result = ketsplit.Session().run("real t in [0, pi/2]; plot entropy cos(t)|00> + sin(t)|11> over t")[-1]
    assert result._repr_png_().startswith(b"\x89PNG")
    assert ketsplit.Session().run("rank |00> + |11>")[0]._repr_png_() is None
