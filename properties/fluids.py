"""Fluid names: what a user may type, and the CoolProp name it stands for."""

from functools import lru_cache

# Common names engineers use, mapped to CoolProp's canonical fluid names.  Keys are
# compared after lower-casing and removing spaces, hyphens and underscores.
_ALIASES = {
    "nitrogen": "Nitrogen",
    "n2": "Nitrogen",
    "argon": "Argon",
    "ar": "Argon",
    "oxygen": "Oxygen",
    "o2": "Oxygen",
    "air": "Air",
    "methane": "Methane",
    "ch4": "Methane",
    "naturalgas": "Methane",
    "hydrogen": "Hydrogen",
    "normalhydrogen": "Hydrogen",
    "h2": "Hydrogen",
    "parahydrogen": "ParaHydrogen",
    "ph2": "ParaHydrogen",
    "orthohydrogen": "OrthoHydrogen",
    "helium": "Helium",
    "helium4": "Helium",
    "he": "Helium",
    "neon": "Neon",
    "ne": "Neon",
    "ethane": "Ethane",
    "c2h6": "Ethane",
    "ethylene": "Ethylene",
    "ethene": "Ethylene",
    "c2h4": "Ethylene",
    "carbondioxide": "CarbonDioxide",
    "co2": "CarbonDioxide",
    "carbonmonoxide": "CarbonMonoxide",
    "co": "CarbonMonoxide",
    "krypton": "Krypton",
    "xenon": "Xenon",
    "propane": "n-Propane",
}


def _key(name):
    return "".join(ch for ch in name.lower() if ch not in " -_")


@lru_cache(maxsize=None)
def _coolprop_names():
    from CoolProp import CoolProp as CP

    names = {}
    for fluid in CP.get_global_param_string("FluidsList").split(","):
        names[_key(fluid)] = fluid
        for alias in CP.get_fluid_param_string(fluid, "aliases").split(","):
            if alias:
                names.setdefault(_key(alias), fluid)
    return names


def resolve_fluid_name(name):
    """Return CoolProp's name for a fluid given by a common name or alias.

    Parameters
    ----------
    name : str
        Fluid name, case-insensitive (``"nitrogen"``, ``"N2"``, ``"carbon dioxide"``).

    Returns
    -------
    str
        The canonical CoolProp fluid name.

    Raises
    ------
    ValueError
        If no pure fluid of that name is known; the message suggests close names.
    """
    if not isinstance(name, str) or not name.strip():
        raise ValueError(f"gas must be a fluid name, got {name!r}")
    key = _key(name)
    if key in _ALIASES:
        return _ALIASES[key]
    names = _coolprop_names()
    if key in names:
        return names[key]
    import difflib

    close = difflib.get_close_matches(key, list(_ALIASES) + list(names), n=3, cutoff=0.6)
    hint = f"; did you mean {', '.join(sorted({_ALIASES.get(c, names.get(c)) for c in close}))}?" if close else ""
    raise ValueError(f"gas must be a known pure fluid (nitrogen, argon, methane, ...), got {name!r}{hint}")
