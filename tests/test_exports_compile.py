"""Every demo worksheet's LaTeX export compiles with a real LaTeX, inside an amsmath article.

pdflatex runs wherever it is installed (CI installs Debian's texlive-latex-base
and texlive-latex-recommended, see .ci/run); where it is not, the tests skip
and say so.  Besides compiling, the log must hold no overfull box: a long sum
or a long line of ours that runs past the margin is a failure (TeX reports
every such box as "Overfull \\hbox" in its log; fact of the trade).
"""

from __future__ import annotations

import functools
import shutil
import subprocess
from pathlib import Path

import pytest

from ketsplit.sheets.export import export
from ketsplit.sheets.format import parse_sheet
from ketsplit.sheets.runner import replay

WORKSHEETS = sorted((Path(__file__).parent.parent / "worksheets").glob("*.kss"))
PDFLATEX = shutil.which("pdflatex")
ARTICLE = "\\documentclass{article}\n\\usepackage{amsmath}\n\\begin{document}\n%s\n\\end{document}\n"

needs_latex = pytest.mark.skipif(PDFLATEX is None, reason="pdflatex is not installed here (CI installs "
                                 "texlive-latex-base and texlive-latex-recommended; see .ci/run)")


@functools.cache
def exported(path: Path, to: str) -> str:
    _, outcomes = replay(parse_sheet(path.read_bytes()))
    return export(outcomes, to, path.name)


def compile_latex(fragment: str, folder: Path) -> str:
    """pdflatex's log of the fragment in an amsmath article; fails the test on a LaTeX error."""
    (folder / "paper.tex").write_text(ARTICLE % fragment, encoding="utf-8")
    run = subprocess.run([PDFLATEX, "-interaction=nonstopmode", "-halt-on-error", "paper.tex"],
                         cwd=folder, capture_output=True, text=True, timeout=120)
    log = (folder / "paper.log").read_text(encoding="latin-1")
    errors = [line for line in log.splitlines() if line.startswith("!")]
    assert run.returncode == 0 and not errors, "\n".join(errors) or run.stdout[-2000:]
    assert (folder / "paper.pdf").stat().st_size > 0
    return log


def test_there_are_demo_worksheets():
    assert len(WORKSHEETS) >= 6


@needs_latex
@pytest.mark.parametrize("path", WORKSHEETS, ids=lambda p: p.stem)
def test_export_compiles_without_overfull_boxes(path, tmp_path):
    log = compile_latex(exported(path, "tex"), tmp_path)
    overfull = [line for line in log.splitlines() if line.startswith("Overfull \\hbox")]
    assert not overfull, overfull


@needs_latex
def test_hard_characters_compile(tmp_path):
    # the characters that broke the old export: ^ (Missing $ inserted), kets in prose (|00> printed
    # as an em dash and an inverted question mark in OT1 fonts), and -> ; escaped, they compile
    sheet = (b"#! ketsplit worksheet 1\n# a^2 + |00> -> |11> costs 100% of {x}_1 & $5 ~ #3 \\ done\n"
             b"real t in [0, pi/2]\npsi = cos(t)|00> + sin(t)|11>\nschmidt psi\nfigures psi\n")
    _, outcomes = replay(parse_sheet(sheet))
    latex = export(outcomes, "tex", "hard.kss")
    assert r"$\lvert 00\rangle$" in latex and r"\textasciicircum{}" in latex
    log = compile_latex(latex, tmp_path)
    assert "Overfull \\hbox" not in log


def test_markdown_uses_standard_math_delimiters():
    text = exported(WORKSHEETS[0], "md")
    assert "$$" in text or "$" in text
    assert r"\text{linear\_entropy}" not in text   # MathJax shows a backslash there
