"""A minimal read-eval-print loop over one Session (the full shell replaces it)."""

from __future__ import annotations

from ..language.errors import InputError
from ..session import Session, split_statements


def start() -> int:
    session = Session()
    while True:
        try:
            text = input("ket› ")
        except (EOFError, KeyboardInterrupt):
            print()
            return 0
        for statement, line in split_statements(text):
            try:
                print(session.execute(statement, line).text())
            except InputError as err:
                print(f"error: {err}")
            except KeyboardInterrupt:
                print("cancelled")
