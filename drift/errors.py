"""The project's error types.

Every error a user can cause by input derives from :class:`DriftError`; the command line turns
it into a one-line message and exit status 2.
"""


class DriftError(Exception):
    """Base class of every error drift raises on purpose."""


class OutOfRangeError(DriftError, ValueError):
    """A physical condition lies outside the range a model is valid for."""


class InputFileError(DriftError, ValueError):
    """An instrument, climate or materials file is unreadable or has a bad key or value."""
