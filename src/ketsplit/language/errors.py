"""Transitional re-export: the errors live in :mod:`ketsplit.base.errors` (removed once every
importer uses the new place)."""
from ..base.errors import *  # noqa: F401,F403
from ..base.errors import InputError, LimitError, Span  # noqa: F401
