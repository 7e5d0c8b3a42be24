"""Ortho-para conversion in a hydrogen liquefier: where the catalyst sits, the para fraction each
stream carries, and the heat the conversion releases and the exergy it destroys.

Away from a catalyst a stream keeps its para fraction (self-conversion takes days).  In a
precooled hydrogen cycle the catalyst can sit

- ``precooler``: in the precooler; the stream leaves it at the equilibrium para fraction of the
  precooling temperature, and the conversion heat goes to the coolant or refrigerator;
- ``continuous``: in the cold recuperator's high-pressure passage; the stream is at equilibrium
  zone by zone (:class:`properties.hydrogen_stream.EquilibriumHydrogen`), the conversion heat is
  part of its enthalpy and so passes to the returning gas.  A stream that enters the passage
  away from equilibrium (no precooler catalyst) converts at the passage inlet as in an
  adiabatic bed: it warms before it cools;
- ``separator``: in the separator's liquid; the product leaves at the equilibrium para fraction
  of its boiling point, and the conversion heat boils off part of the liquid.

In steady state the loop's para fractions follow from the catalyst places: the return gas
leaves the separator with the fraction of the separator's feed; at the compressor suction it
mixes with normal make-up gas (para fraction 0.25) in the ratio of the yield.
"""

from dataclasses import dataclass, field

from cycle.errors import ScenarioError

# Catalyst places in flow order.
PLACES = ("precooler", "continuous", "separator")
WHERE = {
    "precooler": "in the precooler",
    "continuous": "in the cold recuperator's high-pressure passage",
    "separator": "in the separator's liquid",
}
# The loop's para fractions are found by successive passes of the whole solve: the most passes,
# and the change of either fraction [-] below which they have settled.
PASSES = 30
FRACTION_TOLERANCE = 1e-10


def parse_places(value, gas, key="hydrogen_conversion"):
    """The catalyst places of a scenario value: a tuple in flow order (empty for ``none``).

    ``value`` is ``none``, one place, places separated by commas or ``+``, or a list of places.
    """
    if value is None:
        return ()
    items = value if isinstance(value, (list, tuple)) else None
    if items is None:
        if not isinstance(value, str):
            raise ScenarioError(f"{key} must be none, {', '.join(PLACES)} or a list of them, got {value!r}")
        items = [part for chunk in value.split(",") for part in chunk.split("+")]
    names = []
    for item in items:
        if not isinstance(item, str):
            raise ScenarioError(f"{key} must be none, {', '.join(PLACES)} or a list of them, got {item!r}")
        name = item.strip().lower()
        if name not in PLACES + ("none",):
            raise ScenarioError(f"{key} must be none, {', '.join(PLACES)} or a list of them, got {item.strip()!r}")
        if name in names:
            raise ScenarioError(f"{key} names {name} twice")
        names.append(name)
    if "none" in names:
        if len(names) > 1:
            raise ScenarioError(f"{key}: none cannot be combined with a catalyst place, got {', '.join(names)}")
        return ()
    if not names:
        raise ScenarioError(f"{key} must be none, {', '.join(PLACES)} or a list of them, got an empty list")
    if gas != "Hydrogen":
        raise ScenarioError(f"{key} is for gas hydrogen (the ortho-para conversion of normal hydrogen), got gas "
                            f"{gas}")
    return tuple(p for p in PLACES if p in names)


@dataclass(frozen=True)
class ConversionResult:
    """What the ortho-para conversion does in a hydrogen cycle.

    Attributes
    ----------
    places : tuple of str
        Catalyst places in flow order (empty: no catalyst).
    product_para_fraction : float
        Para fraction of the liquid product [-].
    heat : dict of str to float
        Conversion heat released at each catalyst place [J per kg of compressor flow].
    ideal_work_basis : str
        The product the ideal work of liquefaction is for, in words.
    """

    places: tuple
    product_para_fraction: float
    heat: dict = field(default_factory=dict)
    ideal_work_basis: str = ""

    @property
    def total_heat(self):
        """Conversion heat released inside the cold box [J per kg of compressor flow]."""
        return sum(self.heat.values())


def ideal_work_basis(places, x_product):
    """Words for the product the ideal work is for."""
    if not places:
        return f"normal hydrogen (para fraction {x_product:.2f}), as made: no catalyst"
    if "separator" in places:
        return f"equilibrium hydrogen at the separator (para fraction {x_product:.4f}), as made"
    return f"hydrogen of para fraction {x_product:.4f}, as made (catalyst {', '.join(WHERE[p] for p in places)})"


class Conversion:
    """The catalyst places of a precooled hydrogen cycle, and the fluids of its streams.

    The loop is described by two para fractions: ``x_hot``, that of the high-pressure stream
    leaving the precooler, and ``x_feed``, that of the stream leaving the cold recuperator
    (the valve, the separator's feed and the return gas).

    Parameters
    ----------
    places : tuple of str
        From :func:`parse_places`, not empty.
    """

    def __init__(self, places):
        from properties.hydrogen_stream import EquilibriumHydrogen

        self.places = tuple(places)
        self.equilibrium = EquilibriumHydrogen()

    def __contains__(self, place):
        return place in self.places

    @staticmethod
    def frozen(x):
        from properties.hydrogen_stream import frozen_hydrogen

        return frozen_hydrogen(x)

    @staticmethod
    def equilibrium_fraction(T):
        from properties.orthopara import equilibrium_para_fraction

        return equilibrium_para_fraction(T)

    def first_guess(self, T_precool, T_boil):
        """(x_hot, x_feed) to start the passes from."""
        from properties.orthopara import NORMAL_PARA_FRACTION

        if "continuous" in self:  # the return gas comes back nearly all para
            x_feed = self.equilibrium_fraction(T_boil + 5.0)
            x_hot = self.equilibrium_fraction(T_precool) if "precooler" in self else x_feed
            return x_hot, x_feed
        x_hot = self.equilibrium_fraction(T_precool) if "precooler" in self else NORMAL_PARA_FRACTION
        return x_hot, x_hot

    def passage_fluid(self, x_hot):
        """The fluid of the cold recuperator's high-pressure side."""
        return self.equilibrium if "continuous" in self else self.frozen(x_hot)

    def product_fraction(self, x_feed, feed_fluid, p):
        """Para fraction of the liquid product at separator pressure ``p`` [Pa]."""
        if "separator" not in self:
            return x_feed
        return self.equilibrium.saturated_liquid(p).para_fraction

    def settled(self, x_hot, x_feed, y, T_cold_out):
        """The loop's fractions (x_hot, x_feed) that follow from a pass with these, at yield
        ``y`` and cold recuperator high-pressure outlet temperature ``T_cold_out`` [K]."""
        from properties.orthopara import NORMAL_PARA_FRACTION

        x_suction = (1.0 - y) * x_feed + y * NORMAL_PARA_FRACTION
        new_hot = x_hot if "precooler" in self else x_suction
        new_feed = self.equilibrium_fraction(T_cold_out) if "continuous" in self else new_hot
        return new_hot, new_feed

    def conversion_loss(self, before, after, T, flow=1.0):
        """Entropy generated [J/(kg K) per kg compressed] by converting ``flow`` from state
        ``before`` to ``after`` (same T and p, another para fraction), its heat released at ``T``."""
        return flow * ((after.s - before.s) + (before.h - after.h) / T)
