"""Text from a file, made safe to show on a terminal.

A worksheet may come from a stranger.  Its comments, statements and recorded
lines are printed by ``run``, quoted under error carets and shown by
``verify``; a control character among them (an escape sequence that clears
the screen, sets the window title or recolours the text, a carriage return
that overwrites a line, a right-to-left override that reorders it) would be
obeyed by the terminal.  :func:`visible` writes every such character as a
visible escape (``\\x1b``, ``\\u202e``), so that it is shown, never sent.
"""

from __future__ import annotations

import re
import unicodedata

# Characters a terminal acts on instead of showing (the tab is shown as space and kept):
# C0 and C1 controls and DEL, the line and paragraph separators, and the bidirectional
# marks, embeddings, overrides and isolates that reorder what is shown around them.
BIDI = "\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069"
CONTROL = re.compile("[\x00-\x08\x0a-\x1f\x7f-\x9f\u2028\u2029" + BIDI + "]")


def escape(ch: str) -> str:
    code = ord(ch)
    return f"\\x{code:02x}" if code <= 0xFF else f"\\u{code:04x}"


def visible(text: str) -> str:
    """``text`` with every character a terminal would obey written as an escape."""
    return CONTROL.sub(lambda m: escape(m.group()), text)


def has_controls(text: str) -> bool:
    return CONTROL.search(text) is not None


def described(ch: str) -> str:
    """A control character by its escape and name, for messages."""
    return f"{escape(ch)} ({unicodedata.name(ch, 'a control character').lower()})"
