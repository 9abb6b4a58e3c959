"""Statement ``map``: one figure of a family over two real parameters, as a filled contour."""

from __future__ import annotations

from ..base.document import Plot, Report
from ..plots import family_map, figure_label, map_lines
from ..language.statements import read_plot
from .figures import (drawing, file_options, plot_families, plot_figures, plot_parameters,
                      plotted_parameter)
from .registry import CommandCall, command

MAP_USAGE = ("map FIGURE STATE [CUT] over NAME, NAME [--to FILE.svg|.pdf|.png] [--data FILE.csv] "
             "[with NAME=VALUE, ...]")


@command("map", MAP_USAGE,
         "a figure over the declared ranges of two real parameters: a filled contour with the "
         "rank-drop sets drawn on top",
         "real t in [0, pi/2]; real phi in [0, pi]; "
         "map entropy cos(t)|00> + sin(t)(cos(phi)|11> + sin(phi)|22>) 1|2 over t, phi",
         options=True)
def run_map(call: CommandCall) -> Report:
    plot = read_plot(call.words(), MAP_USAGE)
    unit = call.session.settings.entropy_unit
    if len(plot.figures) != 1:
        raise call.error("map: one figure at a time", plot.figures_span.column - 1,
                         plot.figures_span.length)
    figures = plot_figures(call, plot.figures)
    options = file_options(call, plot.options)
    if len(plot.states) != 1:
        raise call.error("map: one state at a time", plot.states_span.column - 1,
                         plot.states_span.length)
    names = plot_parameters(call, plot, 2, MAP_USAGE)
    [family] = plot_families(call, plot)
    axes = [plotted_parameter(call, family.state, name, column, 1) for name, column in names]
    if names[0][0] == names[1][0]:
        raise call.error("map: two different parameters, as in 'over t, phi'", names[1][1],
                         len(names[1][0]))
    title = (f"{figure_label(figures[0], unit)} of {family.subject} across "
             f"{family.cut.describe(family.state)}")
    chart, notes = family_map(title, figures[0], family, (axes[0][0], axes[1][0]),
                              (axes[0][1], axes[1][1]), unit, call.session.settings.strata_budget)
    return Report(title, (Plot(map_lines(chart)),), notes, value=drawing(chart, options))
