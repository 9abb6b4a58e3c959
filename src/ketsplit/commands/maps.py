"""Statement ``map``: one figure of a family over two real parameters, as a filled contour."""

from __future__ import annotations

import re

from ..base.document import Plot, Report
from ..plots import family_map, figure_label, map_lines
from .figures import drawing, file_options, plot_families, plot_figures, plotted_parameter
from .registry import CommandCall, command

MAP = re.compile(r"^(\s*)(\S+)(\s+)(.*?)\s+over\s+([A-Za-z_][A-Za-z0-9_]*)\s*,\s*([A-Za-z_][A-Za-z0-9_]*)"
                 r"((?:\s+--\S+\s+\S+)*)\s*$")
MAP_USAGE = ("map FIGURE STATE [CUT] over NAME, NAME [--to FILE.svg|.pdf|.png] [--data FILE.csv] "
             "[with NAME=VALUE, ...]")


@command("map", MAP_USAGE,
         "a figure over the declared ranges of two real parameters: a filled contour with the "
         "rank-drop sets drawn on top",
         "real t in [0, pi/2]; real phi in [0, pi]; "
         "map entropy cos(t)|00> + sin(t)(cos(phi)|11> + sin(phi)|22>) 1|2 over t, phi")
def run_map(call: CommandCall) -> Report:
    match = MAP.match(call.args)
    if match is None:
        raise call.error(f"map: expected '{MAP_USAGE}'", call.offset, len(call.args.rstrip()) or 1)
    unit = call.session.settings.entropy_unit
    figures = plot_figures(call, match.group(2), call.offset + match.start(2))
    if len(figures) != 1:
        raise call.error("map: one figure at a time", call.offset + match.start(2), len(match.group(2)))
    options = file_options(call, match.group(7), call.offset + match.start(7))
    families = plot_families(call, match.group(4), call.offset + match.start(4))
    if len(families) != 1:
        raise call.error("map: one state at a time", call.offset + match.start(4), len(match.group(4)))
    family = families[0]
    axes = [plotted_parameter(call, family.state, match.group(k), call.offset + match.start(k), 1)
            for k in (5, 6)]
    if match.group(5) == match.group(6):
        raise call.error("map: two different parameters, as in 'over t, phi'",
                         call.offset + match.start(6), len(match.group(6)))
    title = (f"{figure_label(figures[0], unit)} of {family.subject} across "
             f"{family.cut.describe(family.state)}")
    chart, notes = family_map(title, figures[0], family, (axes[0][0], axes[1][0]),
                              (axes[0][1], axes[1][1]), unit, call.session.settings.strata_budget)
    return Report(title, (Plot(map_lines(chart)),), notes, value=drawing(chart, options))
