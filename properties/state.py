"""Immutable thermodynamic states."""

from dataclasses import dataclass, asdict
from typing import Optional


@dataclass(frozen=True, slots=True)
class State:
    """One equilibrium state of a pure fluid, in SI units.

    Attributes
    ----------
    fluid : str
        CoolProp name of the fluid.
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    h : float
        Specific enthalpy [J/kg], on CoolProp's reference state for the fluid.
    s : float
        Specific entropy [J/(kg K)], on the same reference state.
    density : float
        Mass density [kg/m3].
    quality : float or None
        Vapour mass fraction for a two-phase or saturated state, None in a single phase.
    phase : str
        One of ``liquid``, ``gas``, ``two-phase``, ``supercritical``,
        ``supercritical gas``, ``supercritical liquid``, ``critical point``.
    """

    fluid: str
    T: float
    p: float
    h: float
    s: float
    density: float
    quality: Optional[float]
    phase: str

    def to_dict(self):
        """Return the state as a plain dictionary of SI numbers."""
        return asdict(self)
