"""Exceptions that carry a one-line message for the user."""


class InputError(ValueError):
    """Bad input: the message names what is wrong, in one line."""


class ConvergenceError(RuntimeError):
    """The solver could not meet its tolerance; the message says where and why."""
