"""Whether a result computed now agrees with the one a worksheet recorded.

Lines that read the same agree.  Otherwise the two lines are cut into cells
(``label: value``, or table columns); a pair of cells agrees when

- the text outside their decimal numbers (those with a point or an exponent;
  whole numbers such as a rank compare exactly) is the same and each pair of
  decimals is the same where both are certain: a certified decimal D with
  last place u is the correctly rounded value of a number strictly inside
  (D - u/2, D + u/2) (:mod:`ketsplit.numeric.digits`).  Two decimals with the
  same last place must therefore be equal, digit for digit (0.96 and 0.97 are
  a difference, whatever the engine's precision); two with different last
  places (a later version certifying more digits) agree when their rounding
  cells overlap, so that one number can be both (compared in exact
  rationals); or
- both read, in the state language, as exact values whose difference
  simplifies to zero (the ``equal`` callback decides; it must say False when
  it cannot prove equality).

So an exact result passes only when it is the same value, and a numeric one
only when it is the same to every digit it certified.
"""

from __future__ import annotations

import re
from fractions import Fraction
from typing import Callable

NUMBER = re.compile(r"(?<![\w.])(-?)(\d+)(?:\.(\d+))?(?:e([-+]?\d+))?(?![\w.])")
LABELLED = re.compile(r"^([^:]{1,80}): (.*)$")
COLUMNS = re.compile(r"\s{2,}")
RULE = re.compile(r"^[─\s]+$")

Equal = Callable[[str, str], bool]


def first_difference(recorded: list[str], fresh: list[str], equal: Equal) -> int | None:
    """The index of the first line that does not agree (None when all agree)."""
    for k, (a, b) in enumerate(zip(recorded, fresh)):
        if not lines_agree(a, b, equal):
            return k
    return None if len(recorded) == len(fresh) else min(len(recorded), len(fresh))


def lines_agree(recorded: str, fresh: str, equal: Equal) -> bool:
    recorded, fresh = recorded.rstrip(), fresh.rstrip()
    if recorded == fresh or (RULE.match(recorded) and RULE.match(fresh)):
        return True
    old, new = cells(recorded), cells(fresh)
    return len(old) == len(new) and all(cells_agree(a, b, equal) for a, b in zip(old, new))


def cells(line: str) -> list[str]:
    """``label: value`` as [label, value]; otherwise the columns of a table row."""
    labelled = LABELLED.match(line.strip())
    if labelled:
        return [labelled.group(1), labelled.group(2)]
    return COLUMNS.split(line.strip())


def cells_agree(recorded: str, fresh: str, equal: Equal) -> bool:
    return recorded == fresh or decimals_agree(recorded, fresh) or equal(recorded, fresh)


def decimals(text: str) -> list[re.Match[str]]:
    return [m for m in NUMBER.finditer(text) if m.group(3) is not None or m.group(4) is not None]


def skeleton(text: str, found: list[re.Match[str]]) -> str:
    """The text with each decimal replaced by a mark."""
    pieces, at = [], 0
    for match in found:
        pieces += [text[at:match.start()], "\0"]
        at = match.end()
    return "".join(pieces) + text[at:]


def decimals_agree(recorded: str, fresh: str) -> bool:
    """Same text around the decimals, and each pair of decimals the same where both are certain."""
    old, new = decimals(recorded), decimals(fresh)
    if not old or len(old) != len(new) or skeleton(recorded, old) != skeleton(fresh, new):
        return False
    return all(same_where_certain(a, b) for a, b in zip(old, new))


def same_where_certain(a: re.Match[str], b: re.Match[str]) -> bool:
    """Equal when printed to the same place; otherwise their open rounding cells overlap."""
    if last_place(a) == last_place(b):
        return value(a) == value(b)
    return 2 * abs(value(a) - value(b)) < last_place(a) + last_place(b)


def value(match: re.Match[str]) -> Fraction:
    sign, whole, fraction, exponent = match.groups()
    fraction = fraction or ""
    digits = Fraction(int(whole + fraction), 10 ** len(fraction))
    return (-1 if sign else 1) * digits * Fraction(10) ** int(exponent or 0)


def last_place(match: re.Match[str]) -> Fraction:
    """One unit in the last printed place."""
    _, _, fraction, exponent = match.groups()
    return Fraction(10) ** (int(exponent or 0) - len(fraction or ""))


# -- recorded values (a worksheet's '#=' lines) ------------------------------------

NUMBER_KEYS = {"exact", "digits", "certain", "rows"}  # a number (or matrix) of render.jsonout


def is_number(value) -> bool:
    """An exact value and/or its certified digits, as render.jsonout writes one (not a table
    row that happens to have a column named 'exact')."""
    return isinstance(value, dict) and bool(value) and set(value) <= NUMBER_KEYS and (
        "exact" in value or "digits" in value)


def value_difference(recorded, fresh, equal: Equal, where: str = "") -> str | None:
    """What differs between two recorded values (parsed JSON, see render.jsonout), or None.

    Exact values agree when ``equal`` proves them the same; certified digits when
    they are the same where both are certain; text as recorded text does
    (:func:`cells_agree`); everything else (ranks, verdicts) when it is equal.
    """
    if isinstance(recorded, dict) and isinstance(fresh, dict):
        if is_number(recorded) and is_number(fresh):
            return None if numbers_agree(recorded, fresh, equal) else shown(where, recorded, fresh)
        if set(recorded) != set(fresh):
            return shown(where, sorted(recorded), sorted(fresh), "names")
        return next((d for key in recorded if (d := value_difference(
            recorded[key], fresh[key], equal, joined(where, key))) is not None), None)
    if isinstance(recorded, list) and isinstance(fresh, list):
        if len(recorded) != len(fresh):
            return shown(where, len(recorded), len(fresh), "length")
        return next((d for k, (a, b) in enumerate(zip(recorded, fresh)) if (d := value_difference(
            a, b, equal, f"{where}[{k + 1}]")) is not None), None)
    if type(recorded) is type(fresh) and recorded == fresh:
        return None
    if isinstance(recorded, str) and isinstance(fresh, str) and cells_agree(recorded, fresh, equal):
        return None  # words and values in text: as recorded text is compared
    return shown(where, recorded, fresh)


def numbers_agree(recorded: dict, fresh: dict, equal: Equal) -> bool:
    old, new = recorded.get("exact"), fresh.get("exact")
    if isinstance(old, str) and isinstance(new, str):
        return old == new or equal(old, new)
    return digits_agree(recorded.get("digits"), fresh.get("digits"))


def digits_agree(recorded, fresh) -> bool:
    """Two certified decimals the same where both are certain (as same_where_certain)."""
    if not isinstance(recorded, str) or not isinstance(fresh, str):
        return False
    a, b = NUMBER.fullmatch(recorded.strip()), NUMBER.fullmatch(fresh.strip())
    return a is not None and b is not None and same_where_certain(a, b)


def joined(where: str, key: str) -> str:
    return f"{where}.{key}" if where else key


def shown(where: str, recorded, fresh, what: str = "") -> str:
    name = " ".join(part for part in (where or "value", what) if part)
    return f"{name}: recorded {brief(recorded)}, now {brief(fresh)}"


def brief(value) -> str:
    if is_number(value):
        exact, digits = value.get("exact"), value.get("digits")
        return " ≈ ".join(str(v) for v in (exact, digits) if v is not None) or "no value"
    text = str(value)
    return text if len(text) <= 80 else text[:77] + "..."
