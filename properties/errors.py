"""Exceptions raised by the property layer."""


class PropertyRangeError(ValueError):
    """A state was asked for outside the range the equation of state covers.

    The message names the fluid, the state that was asked for and the valid range.
    """
