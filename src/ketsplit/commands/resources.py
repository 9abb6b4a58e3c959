"""The ``limits`` statement: list the resource limits, or change some of them."""

from __future__ import annotations

from .. import limits
from ..base.document import Note, Report, Table
from .registry import CommandCall, command


@command("limits", "limits [NAME=VALUE ...]",
         "the resource limits (input size, nesting, exponents, parts, dimensions, digits, time); "
         "with NAME=VALUE, change them for this session",
         "limits parts=128 seconds=60", topic="settings")
def run_limits(call: CommandCall) -> Report:
    text = call.args.strip()
    if text:
        try:
            call.session.limits = limits.changed(call.session.limits,
                                                 **limits.parse_assignments(text))
        except ValueError as err:
            raise call.error(f"limits: {err}", call.offset + call.args.index(text), len(text))
    now = call.session.limits.as_dict()
    rows = tuple((name, limits.shown(value), limits.MEANINGS[name]) for name, value in now.items())
    return Report("resource limits" if not text else f"limits {text}",
                  (Table(("limit", "value", "bounds"), rows),
                   Note("change with 'limits NAME=VALUE'; the limits hold for this session")),
                  value=call.session.limits)
