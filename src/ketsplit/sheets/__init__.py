"""Worksheets: a session kept as plain text that replays and verifies.

- :mod:`.format`   the ``.kss`` file format: reading (with damage reports) and writing
- :mod:`.reading`  the bytes of a file, bounded in size and in time (devices and FIFOs too)
- :mod:`.header`   the settings a header may set, never above the reader's
- :mod:`.visible`  control characters from a file shown as escapes, never sent
- :mod:`.runner`   replaying a worksheet through a Session, comparing with what it recorded
- :mod:`.matching` when a result computed now agrees with a recorded one
- :mod:`.export`   LaTeX and Markdown
- :mod:`ketsplit.base.files` (used here) writes a file so that a crash never leaves half of it (through links;
                   litter of killed saves swept)

From Python::

    from ketsplit.sheets import read_sheet, replay, differences
    session, outcomes = replay(read_sheet("worksheets/photon-pair.kss"))
    differences(outcomes, session)   # [] when every recorded result comes out again
"""

from __future__ import annotations

from .format import Sheet, SheetError, read_sheet
from .runner import differences, replay

__all__ = ["Sheet", "SheetError", "read_sheet", "replay", "differences"]
