"""Exceptions and warnings of the cycle layer."""


class ScenarioError(ValueError):
    """An invalid scenario: unknown key, wrong unit, missing or non-physical value."""


class NoLiquefactionError(RuntimeError):
    """The cycle as specified makes no liquid; the message says why."""


class RecycleNotConvergedWarning(RuntimeWarning):
    """The recycle solve stopped before meeting its tolerance."""
