"""Transitional re-export: the conversion lives in :mod:`ketsplit.language.coerce`."""
from ..language.coerce import *  # noqa: F401,F403
from ..language.coerce import as_expr  # noqa: F401
