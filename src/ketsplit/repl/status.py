"""The prompt and the bottom status line.

The prompt is short (``ks⟩``) and the continuation lines show ``⋮`` under it;
the status line tells what the next result depends on: precision, entropy
unit, the declared space, how many names and parameters the session holds,
the display mode and how long the last statement took.
"""

from __future__ import annotations

from dataclasses import dataclass

from prompt_toolkit.formatted_text import FormattedText

PROMPT = "ks⟩ "


@dataclass(frozen=True)
class Status:
    digits: int
    unit: str
    space: str          # "A:2 B:3", or "" when none is declared
    names: int
    parameters: int
    mode: str           # "2-D" or "linear"
    elapsed: float | None  # seconds the last statement took

    @classmethod
    def of(cls, session, mode: str, elapsed: float | None) -> "Status":
        space = session.space
        listing = " ".join(f"{n}:{d}" for n, d in zip(space.names, space.dims)) if space else ""
        return cls(session.settings.digits, session.settings.entropy_unit, listing,
                   len(session.bindings), len(session.params), mode, elapsed)

    def pieces(self) -> list[str]:
        out = [f"{self.digits} digits", self.unit]
        if self.space:
            out.append(f"space {self.space}")
        out.append(plural(self.names, "name"))
        out.append(plural(self.parameters, "parameter"))
        out.append(self.mode)
        if self.elapsed is not None:
            out.append(f"last {seconds(self.elapsed)}")
        return out


def plural(count: int, word: str) -> str:
    return f"{count} {word}" + ("" if count == 1 else "s")


def seconds(value: float) -> str:
    return f"{value * 1000:.0f} ms" if value < 1 else f"{value:.1f} s"


KEYS = (("F2", "2-D/linear"), ("F3", "whole"), ("^D", "leave"))


def toolbar(status: Status) -> FormattedText:
    parts: list[tuple[str, str]] = [("class:bottom-toolbar", " " + " · ".join(status.pieces()) + "  ")]
    for key, what in KEYS:
        parts += [("class:bottom-toolbar.key", key), ("class:bottom-toolbar", f" {what} ")]
    return FormattedText(parts)


def prompt() -> FormattedText:
    return FormattedText([("class:prompt", PROMPT)])


def continuation(width: int, line_number: int, wrap_count: int) -> FormattedText:
    return FormattedText([("class:continuation", "⋮".rjust(max(1, width - 1)) + " ")])
