"""Real-gas properties for lhsim: a thin adapter over CoolProp's low-level interface.

This is the only package of lhsim that imports CoolProp.  Everything it returns is in SI
units (K, Pa, J/kg, J/(kg K), kg/m3).
"""

from properties.errors import PropertyRangeError
from properties.state import State
from properties.fluids import resolve_fluid_name
from properties.fluid import Fluid, get_fluid

__all__ = ["Fluid", "State", "PropertyRangeError", "get_fluid", "resolve_fluid_name"]
