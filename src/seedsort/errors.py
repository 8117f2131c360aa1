"""The one exception hierarchy of seedsort, and its warnings.

Errors raised for bad input carry a message that is one readable sentence saying what
to do; the CLI prints it as it is.
"""

from __future__ import annotations


class SeedsortError(Exception):
    """Base class of every error seedsort raises on purpose."""


class InputError(SeedsortError):
    """The documents could not be read as asked (missing folder, missing column, ...)."""


class SeedError(SeedsortError):
    """The seed labels are unusable (unknown documents, conflicts, too few categories)."""


class SeedsortWarning(UserWarning):
    """Base class of seedsort's soft problems."""


class SpreadingNotConvergedWarning(SeedsortWarning):
    """Label spreading stopped at its iteration cap before reaching the tolerance."""
