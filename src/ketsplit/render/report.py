"""Transitional re-export: the document model lives in :mod:`ketsplit.base.document` (removed
once every importer uses the new place)."""
from ..base.document import *  # noqa: F401,F403
from ..base.document import Cell, Digits, Field, Item, Kets, Note, Plot, Report, Table  # noqa: F401
