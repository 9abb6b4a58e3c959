"""Writing the files a statement asks for (``plot ... --to FILE --data FILE``, ``map ...``).

Statements compute values and never write: ``plot`` and ``map`` return a
:class:`ketsplit.plots.Drawing` that names the files asked for.  The shells
(``ketsplit -c`` and piped statements, the interactive shell, the Python API's
Session) pass every result through :func:`write_requested`, which writes those
files atomically and adds a field naming each file written.  A worksheet read
from a file never gets here with a file to write: its runner refuses ``--to``.
"""

from __future__ import annotations

import os
from dataclasses import replace

from ..base.document import Field
from ..base.files import write_atomic
from ..plots import Chart, Drawing, Map, chart_file, check_target, data_text
from ..session import Result


def write_chart(chart: Chart | Map, path: str) -> str:
    """Write the chart to ``path`` (.svg, .pdf or .png, drawn by matplotlib); the absolute path."""
    write_atomic(path, chart_file(chart, path))
    return os.path.abspath(path)


def write_data(chart: Chart | Map, path: str) -> str:
    """Write the chart's samples to ``path`` (.csv); the absolute path."""
    check_target(path, (".csv",), "data")
    write_atomic(path, data_text(chart))
    return os.path.abspath(path)


def write_requested(result: Result) -> Result:
    """The result after writing the files its value asks for, with a field naming each one
    (the result itself when it asks for none).  A file that cannot be written is an
    InputError (:class:`ketsplit.base.files.WriteError`); the target is then left as it was."""
    drawing = result.value
    if not isinstance(drawing, Drawing) or not drawing.files:
        return result
    items = ()
    if drawing.picture is not None:
        items += (Field("written", write_chart(drawing.chart, drawing.picture)),)
    if drawing.data is not None:
        items += (Field("data written", write_data(drawing.chart, drawing.data)),)
    return replace(result, report=result.report.with_items(*items))
