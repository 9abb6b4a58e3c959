"""Transitional re-export: the printer lives in :mod:`ketsplit.language.printer`."""
from ..language.printer import *  # noqa: F401,F403
from ..language.printer import label_text, terms_text, text  # noqa: F401
