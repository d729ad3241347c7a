"""Absolute roughness of pipe bores: our keyed table, new and aged, each value with its source.

Keys and display names are ours. Each value is in metres and carries where it comes from:
``fluids.friction._roughness`` (the Moody 1944 list as tabulated by fluids),
``fluids.friction.HHR_roughness`` (Idel'chik's *Handbook of Hydraulic Resistance*, as tabulated
by fluids, metres), or a recalled handbook value marked "from memory".

Two traps in fluids are avoided on purpose:

- ``fluids.friction.material_roughness`` fuzzy-matches free text and returns absurd values
  (``'PVC'`` → 0.8 mm). It is never called here; only our keys are accepted.
- ``fluids.friction._roughness['Steel']`` is the *drawn tubing* value 0.0015 mm, not commercial
  steel pipe (≈ 0.045 mm, Moody 1944 0.00015 ft, from memory). Our ``carbon_steel`` uses the
  commercial-steel value; drawn tubing has its own key.

"Aged" means a pipe after years in ordinary liquid (water) service: corrosion, tubercles,
scale or slime. Aged values are design allowances, not measurements of a particular pipe; a
pipe in aggressive service can be far rougher. Plastics and copper barely age; their aged
values are small allowances for deposits.

Example
-------
>>> value, source = roughness("carbon_steel", "new")
>>> round(value * 1e3, 3)
0.045
"""

from __future__ import annotations

from dataclasses import dataclass

from kit.errors import check_choice

__all__ = ["RoughnessEntry", "ROUGHNESS", "CONDITIONS", "roughness", "materials"]

#: The two pipe conditions every entry carries.
CONDITIONS = ("new", "aged")

_MOODY = ("Moody, L. F. (1944). Friction factors for pipe flow. Trans. ASME 66(8), 671-684; "
          "value as tabulated in fluids.friction._roughness")
_IDELCHIK = ("Idel'chik, I. E. Handbook of Hydraulic Resistance (1966 transl.), as tabulated in "
             "fluids.friction.HHR_roughness")


@dataclass(frozen=True)
class RoughnessEntry:
    """One material in the roughness table.

    Attributes
    ----------
    display : str
        Display name [-].
    new : float
        Absolute roughness of new, clean pipe [m].
    aged : float
        Absolute roughness after years of liquid service, a design allowance [m].
    source_new : str
        Where ``new`` comes from.
    source_aged : str
        Where ``aged`` comes from, with its basis.
    """

    display: str
    new: float
    aged: float
    source_new: str
    source_aged: str

    def value(self, condition: str) -> float:
        """Roughness [m] at ``condition`` ('new' or 'aged')."""
        check_choice("pipe condition", condition, CONDITIONS)
        return self.new if condition == "new" else self.aged

    def source(self, condition: str) -> str:
        """Source of the value at ``condition``."""
        check_choice("pipe condition", condition, CONDITIONS)
        return self.source_new if condition == "new" else self.source_aged


#: The roughness table, keyed by our material keys. Values in metres.
ROUGHNESS: dict[str, RoughnessEntry] = {
    "carbon_steel": RoughnessEntry(
        "Carbon steel, commercial (welded or seamless)", 4.5e-5, 4.0e-4,
        "Moody (1944) commercial steel 0.00015 ft = 0.045 mm (from memory); note that "
        "fluids' _roughness['Steel'] is drawn tubing, not this",
        f"{_IDELCHIK}: 'Seamless steel tubes, Corroded, moderately' 0.4 mm; "
        "basis: steel after years in water service"),
    "stainless_steel": RoughnessEntry(
        "Stainless steel pipe", 1.5e-5, 4.5e-5,
        "common handbook value 0.015 mm for commercial stainless pipe (from memory)",
        "allowance for deposits, set equal to new commercial steel 0.045 mm "
        "(from memory, no source); stainless does not corrode in ordinary water"),
    "cast_iron": RoughnessEntry(
        "Cast iron, unlined", 2.59e-4, 1.4e-3,
        f"{_MOODY}: 'Cast iron' 0.259 mm",
        f"{_IDELCHIK}: 'Cast-iron tubes, Used water pipelines' 1.4 mm"),
    "cast_iron_asphalted": RoughnessEntry(
        "Cast iron, asphalt (bitumen) coated", 1.22e-4, 1.4e-3,
        f"{_MOODY}: 'Asphalted cast iron' 0.122 mm",
        f"{_IDELCHIK}: 'Cast-iron tubes, Used water pipelines' 1.4 mm (coating assumed lost)"),
    "ductile_iron_lined": RoughnessEntry(
        "Ductile iron, cement-mortar lined", 5.0e-5, 2.2e-4,
        f"{_IDELCHIK}: 'Cement-mortar plaster channels, Plaster, cement, smoothed joints "
        "and protrusions' lower value 0.05 mm",
        f"{_IDELCHIK}: same entry, upper value 0.22 mm; basis: lining after years in water "
        "service (slime, minor deposits)"),
    "galvanised_steel": RoughnessEntry(
        "Galvanised steel", 1.52e-4, 4.0e-4,
        f"{_MOODY}: 'Galvanized iron' 0.152 mm",
        f"{_IDELCHIK}: 'Seamless steel tubes, Corroded, moderately' 0.4 mm; basis: zinc "
        "layer consumed, steel corroding"),
    "pvc": RoughnessEntry(
        "PVC / CPVC", 1.5e-6, 1.0e-5,
        "smooth-plastic value 0.0015 mm, as for drawn tubing (from memory)",
        "allowance 0.01 mm for biofilm and deposits (from memory, no source)"),
    "hdpe": RoughnessEntry(
        "HDPE (polyethylene)", 1.5e-6, 1.0e-5,
        "smooth-plastic value 0.0015 mm, as for drawn tubing (from memory)",
        "allowance 0.01 mm for biofilm and deposits (from memory, no source)"),
    "copper": RoughnessEntry(
        "Copper or brass tube", 1.5e-6, 1.0e-5,
        f"{_IDELCHIK}: 'Seamless tubes made from brass, copper, lead, aluminum, "
        "Commercially smooth' lower value 0.0015 mm",
        f"{_IDELCHIK}: same entry, upper value 0.01 mm"),
    "concrete": RoughnessEntry(
        "Concrete pipe", 3.05e-4, 1.0e-3,
        f"{_MOODY}: 'Concrete' 0.305 mm",
        f"{_IDELCHIK}: 'Concrete water conduits, no finish, Used and corroded; with a wavy "
        "surface' lower value 1 mm"),
    "drawn_tubing": RoughnessEntry(
        "Drawn tubing (glass, brass, drawn steel)", 1.52e-6, 1.0e-5,
        f"{_MOODY}: 'Steel' / 'Brass' / 'Glass' drawn tubing 0.00152 mm",
        f"{_IDELCHIK}: 'Seamless tubes made from brass, copper, lead, aluminum, "
        "Commercially smooth' upper value 0.01 mm"),
}


def materials() -> list[tuple[str, str]]:
    """``(key, display name)`` pairs of the roughness table, in table order."""
    return [(k, e.display) for k, e in ROUGHNESS.items()]


def roughness(material: str, condition: str = "new") -> tuple[float, str]:
    """Absolute roughness [m] of a material at a condition, and the source of the value.

    Looks up our keyed table :data:`ROUGHNESS` (values from Moody 1944 and Idel'chik's
    *Handbook of Hydraulic Resistance* as tabulated by fluids, or recalled handbook values
    marked "from memory"). Free text is never fuzzy-matched.

    Parameters
    ----------
    material : str
        A key of :data:`ROUGHNESS` ('carbon_steel', 'pvc', ...) [-]
    condition : str
        'new' or 'aged' [-]

    Returns
    -------
    value : float
        Absolute roughness [m]
    source : str
        Where the value comes from [-]

    Notes
    -----
    Unknown keys raise :class:`~kit.errors.UnknownChoiceError` listing the valid keys.

    Examples
    --------
    >>> roughness("cast_iron", "new")[0]
    0.000259

    References
    ----------
    .. [1] Moody, L. F. "Friction Factors for Pipe Flow." Trans. ASME 66 (1944): 671-684.
    .. [2] Idel'chik, I. E. Handbook of Hydraulic Resistance. 1966 (transl.).
    """
    check_choice("pipe material", material, ROUGHNESS)
    entry = ROUGHNESS[material]
    return entry.value(condition), entry.source(condition)
