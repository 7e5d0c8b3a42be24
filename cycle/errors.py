"""Exceptions and warnings of the cycle layer."""


class ScenarioError(ValueError):
    """An invalid scenario: unknown key, wrong unit, missing or non-physical value."""


class PressureCollapseError(ScenarioError):
    """A recuperator's passages so narrow for the flow that the pressure would fall to zero."""


class NoLiquefactionError(RuntimeError):
    """The cycle as specified makes no liquid; the message says why."""


class CoolerTooSmallError(NoLiquefactionError):
    """A precooler whose cooler cannot carry the load at any temperature of its capacity curve."""


class UnreachableSizingError(NoLiquefactionError):
    """A recuperator sizing that no exchanger between these streams can meet."""


class TemperatureCrossError(NoLiquefactionError):
    """A recuperator effectiveness that would make the stream temperatures cross inside it."""


class RecycleNotConvergedWarning(RuntimeWarning):
    """The recycle solve stopped before meeting its tolerance."""
