"""The project's exceptions and warnings, in one place.

Two families: :class:`InputError` for what the user gave us (files, specs, options) and
:class:`CalculationError` for a run that cannot finish (e.g. a Fermi level that cannot be
bracketed). The CLI prints the message of any :class:`ValbandError` and exits non-zero;
``--debug`` shows the traceback.
"""

__all__ = [
    "ValbandError",
    "InputError",
    "StructureError",
    "ParameterError",
    "SettingsError",
    "CalculationError",
    "ValbandWarning",
    "SymmetryWarning",
]


class ValbandError(Exception):
    """Base class of every error valband raises on purpose."""


class InputError(ValbandError, ValueError):
    """Something the user supplied is malformed, missing or out of range."""


class StructureError(InputError):
    """A crystal structure cannot be read or is unphysical (overlapping atoms, unknown element)."""


class ParameterError(InputError):
    """A parameter set is malformed or lacks what a model needs."""


class SettingsError(InputError):
    """A numerical setting (mesh, smearing, window, electron count) is invalid."""


class CalculationError(ValbandError, RuntimeError):
    """A calculation could not be completed with valid input."""


class ValbandWarning(UserWarning):
    """Base class of valband's warnings (recoverable fallbacks)."""


class SymmetryWarning(ValbandWarning):
    """Symmetry could not be used as asked; the calculation went on without it."""
