"""The settings a worksheet's header may set, and the ceiling a worksheet may not pass.

A worksheet may come from a stranger, so its header can lower the precision
or a budget but never raise one beyond the reader's ceiling: the defaults,
or the reader's own settings where they are higher (the reader chose those).
Every header value must be in its allowed set; anything else (``inf``,
``nan``, ``-5``, ``1e9``, digits other than ASCII, an unknown key) is a
:class:`SheetError` naming the line, and nothing of the file is loaded.
"""

from __future__ import annotations

from dataclasses import fields, replace
from typing import Callable

from ..figures import UNITS
from ..planner import METHODS
from ..session import MIN_DIGITS, Settings
from .reading import SheetError

INFORMATIONAL = ("ketsplit", "saved")  # header keys that describe the file and set nothing
CEILINGED = ("digits", "exact_budget", "strata_budget")  # settings a worksheet may not raise


SHORT = 12  # characters of a header number (no setting needs more; int() refuses 4300+ digits)


def whole(text: str, low: int, high: int) -> int:
    if not (len(text) <= SHORT and text.isascii() and text.isdigit()
            and low <= int(text) <= high):
        raise ValueError(f"a whole number from {low} to {high}")
    return int(text)


def seconds(text: str, high: float) -> float:
    plain = text.replace(".", "", 1)
    if not (len(text) <= SHORT and plain.isascii() and plain.isdigit()
            and 0 <= float(text) <= high):
        raise ValueError(f"a number of seconds from 0 to {high:g}, written with digits")
    return float(text)


def one_of(text: str, choices: tuple[str, ...]) -> str:
    if text not in choices:
        raise ValueError(f"one of {', '.join(choices)}")
    return text


# For each setting: the value a header text gives, under the reader's ceiling (ValueError
# naming the allowed set otherwise).
RULES: dict[str, Callable[[str, Settings], object]] = {
    "digits": lambda text, top: whole(text, MIN_DIGITS, top.digits),
    "entropy_unit": lambda text, top: one_of(text, tuple(UNITS)),
    "exact_budget": lambda text, top: seconds(text, top.exact_budget),
    "method": lambda text, top: one_of(text, METHODS),
    "strata_budget": lambda text, top: seconds(text, top.strata_budget),
}


def ceiling_for(reader: Settings) -> Settings:
    """The highest settings a worksheet may ask for: the defaults, or the reader's if higher."""
    default = Settings()
    return replace(default, **{name: max(getattr(default, name), getattr(reader, name))
                               for name in CEILINGED})


def raised(settings: Settings, ceiling: Settings) -> list[str]:
    """The settings (as written in a header) that ``settings`` puts above ``ceiling``."""
    return [key(name) for name in CEILINGED if getattr(settings, name) > getattr(ceiling, name)]


def key(name: str) -> str:
    return name.replace("_", " ")


def read_settings(header: list[tuple[str, str]], lines: list[int], name: str,
                  ceiling: Settings) -> Settings:
    """The settings a header sets (``lines``: the file line of each value); SheetError
    naming the line of a key set twice or of a value outside its allowed set."""
    rules = {key(f.name): f.name for f in fields(Settings) if f.name in RULES}
    settings, seen = Settings(), set()
    for (written_key, text), line in zip(header, lines):
        if written_key in INFORMATIONAL:
            continue
        where = f"{name}, line {line}"
        if written_key not in rules:
            raise SheetError(f"{where}: the header names no setting {written_key!r}; a worksheet "
                             f"header may set {', '.join(rules)}")
        if written_key in seen:
            raise SheetError(f"{where}: the header sets {written_key} a second time")
        seen.add(written_key)
        try:
            value = RULES[rules[written_key]](text, ceiling)
        except ValueError as err:
            raise SheetError(f"{where}: header value {written_key}: {text!r} is not allowed; it "
                             f"must be {err} (a worksheet may lower a setting, never raise it "
                             "beyond the defaults)") from None
        settings = replace(settings, **{rules[written_key]: value})
    return settings
