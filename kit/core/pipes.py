"""Pipes: a catalogue bore (standard → nominal size → schedule or class) or a custom bore.

Dimensions come from the schedule tables that fluids carries (``fluids.piping.schedule_lookup``,
the data behind ``nearest_pipe``), read directly by exact key: no nearest-match search, so a
size or schedule that is not in the table is refused with the list of those that are. The
tables are in mm; everything here is in metres.

fluids' ``nearest_pipe`` traps that this module avoids (and tests that it does):

- called with no size it raises ``UnboundLocalError``;
- ``Di=-1`` silently returns the smallest pipe;
- a numeric schedule 40.5 is truncated to '40';
- BS 1387 and F441-SI tables take DN in the NPS slot.

Standards (our keys and labels) map to fluids' schedule keys in :data:`STANDARDS`. Nominal
sizes are text: NPS as ``"1/2"``, ``"1-1/4"``, ``"4"``; DN-sized standards (BS 1387) as
``"15"``. DN labels for NPS sizes follow ISO 6708 / common practice (NPS 4 = DN 100).

Example
-------
>>> p = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
>>> round(p.Di / 0.0254, 3), p.label
(4.026, 'NPS 4 Sch 40 (DN 100), ASME B36.10M')
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, replace
from fractions import Fraction

from fluids.piping import schedule_lookup

from kit.core.roughness import CONDITIONS, ROUGHNESS
from kit.errors import InputError, UnknownChoiceError, check_choice, check_range

__all__ = [
    "Pipe", "Standard", "STANDARDS", "NPS_TO_DN", "DN_SOURCE", "DI_RANGE", "ROUGHNESS_RANGE",
    "standards", "nominal_sizes", "schedules", "catalogue_pipe", "custom_pipe", "dn_label",
    "nps_text",
]

#: Allowed inside diameter for any pipe [m]: (low exclusive, high inclusive).
DI_RANGE = (0.0, 5.0)
#: Allowed user-given absolute roughness [m]: (low inclusive, high inclusive).
ROUGHNESS_RANGE = (0.0, 0.01)

#: Source of the NPS ↔ DN correspondence.
DN_SOURCE = "ISO 6708 / common practice"

#: NPS [in] → DN [-] for sizes below NPS 14; from NPS 14 up, DN = 25 × NPS (ISO 6708 /
#: common practice).
_NPS_DN_SMALL = {
    0.125: 6, 0.25: 8, 0.375: 10, 0.5: 15, 0.75: 20, 1.0: 25, 1.25: 32, 1.5: 40, 2.0: 50,
    2.5: 65, 3.0: 80, 3.5: 90, 4.0: 100, 4.5: 115, 5.0: 125, 6.0: 150, 8.0: 200, 10.0: 250,
    12.0: 300,
}


def _dn_of(nps: float) -> int | None:
    if nps in _NPS_DN_SMALL:
        return _NPS_DN_SMALL[nps]
    if nps >= 14.0 and float(nps).is_integer():
        return int(round(25 * nps))
    return None


#: NPS [in] → DN for every NPS in the NPS-sized standards below (ISO 6708 / common practice).
NPS_TO_DN: dict[float, int] = {}


@dataclass(frozen=True)
class Standard:
    """One pipe standard of the catalogue.

    Attributes
    ----------
    key, label : str
        Our key and display label.
    short : str
        Short name used in pipe labels ("ASME B36.10M").
    sizing : str
        'NPS' (nominal in inches), 'CTS' (copper tube size, inches) or 'DN'.
    classes : tuple of (our schedule/class key, fluids schedule key)
        In display order.
    schedule_word : str
        Prefix shown before a schedule key in labels ("Sch", "" for DR/SDR classes).
    source : str
        The standard's citation (as referenced by fluids.piping).
    """

    key: str
    label: str
    short: str
    sizing: str
    classes: tuple
    schedule_word: str
    source: str


def _dr(prefix, pairs):
    return tuple((f"{prefix} {ours}", theirs) for ours, theirs in pairs)


_B3610_SCHED = ("5", "10", "20", "30", "40", "STD", "60", "XS", "80", "100", "120", "140",
                "160", "XXS")

#: The catalogue's standards, keyed by our keys.
STANDARDS: dict[str, Standard] = {s.key: s for s in (
    Standard("asme_b36_10m", "ASME B36.10M (carbon steel)", "ASME B36.10M", "NPS",
             tuple((s, s) for s in _B3610_SCHED), "Sch",
             "ASME B36.10M-2004, Welded and Seamless Wrought Steel Pipe (as tabulated in "
             "fluids.piping; fluids also files schedule 5 here)"),
    Standard("asme_b36_19m", "ASME B36.19M (stainless steel)", "ASME B36.19M", "NPS",
             tuple((s, s) for s in ("5S", "10S", "40S", "80S")), "Sch",
             "ASME B36.19M-2004, Stainless Steel Pipe (as tabulated in fluids.piping)"),
    Standard("astm_d1785", "ASTM D1785 (PVC, Sch 40/80/120)", "ASTM D1785", "NPS",
             (("40", "40D1785"), ("80", "80D1785"), ("120", "120D1785")), "Sch",
             "ASTM D1785-15e1, PVC Plastic Pipe, Schedules 40, 80, and 120 (as tabulated in "
             "fluids.piping)"),
    Standard("astm_d2241", "ASTM D2241 (PVC pressure-rated, SDR, IPS OD)", "ASTM D2241", "NPS",
             _dr("SDR", (("13.5", "DR135D2241"), ("17", "DR17D2241"), ("21", "DR21D2241"),
                         ("26", "DR26D2241"), ("32.5", "DR325D2241"), ("41", "DR41D2241"),
                         ("64", "DR64D2241"))), "",
             "ASTM D2241, PVC Pressure-Rated Pipe (SDR Series), IPS outside diameters (as "
             "tabulated in fluids.piping)"),
    Standard("astm_d2241_cts", "ASTM D2241 (PVC pressure-rated, SDR, CTS OD)", "ASTM D2241 CTS",
             "CTS",
             _dr("SDR", (("11", "DR11D2241CTS"), ("13.5", "DR135D2241CTS"),
                         ("17", "DR17D2241CTS"), ("21", "DR21D2241CTS"))), "",
             "ASTM D2241, PVC Pressure-Rated Pipe (SDR Series), copper-tube-size outside "
             "diameters (as tabulated in fluids.piping)"),
    Standard("awwa_c900", "AWWA C900 (PVC pressure pipe, 4-12 in, CI OD)", "AWWA C900", "NPS",
             _dr("DR", (("14", "DR14C900"), ("18", "DR18C900"), ("25", "DR25C900"))), "",
             "AWWA C900-07, PVC Pressure Pipe, 4 In. Through 12 In. (as tabulated in "
             "fluids.piping)"),
    Standard("awwa_c905", "AWWA C905 (PVC pressure pipe, 14 in and up, CI OD)", "AWWA C905",
             "NPS",
             _dr("DR", (("14", "CIDR14C905"), ("18", "CIDR18C905"), ("21", "CIDR21C905"),
                        ("25", "CIDR25C905"), ("32.5", "CIDR325C905"), ("41", "CIDR41C905"),
                        ("51", "CIDR51C905"))), "",
             "AWWA C905-97, PVC Pressure Pipe, 14 In. Through 48 In., cast-iron outside "
             "diameters (as tabulated in fluids.piping)"),
    Standard("awwa_c905_ips", "AWWA C905 (PVC pressure pipe, 14 in and up, IPS OD)",
             "AWWA C905 IPS", "NPS",
             _dr("DR", (("21", "IPSDR21"), ("26", "IPSDR26"), ("32.5", "IPSDR325"),
                        ("41", "IPSDR41"))), "",
             "AWWA C905-97, PVC Pressure Pipe, 14 In. Through 48 In., IPS outside diameters "
             "(as tabulated in fluids.piping)"),
    Standard("astm_f2619", "ASTM F2619 (HDPE line pipe, IPS OD)", "ASTM F2619", "NPS",
             _dr("DR", (("7", "DR7F2619IPS"), ("7.3", "DR73F2619IPS"), ("9", "DR9F2619IPS"),
                        ("11", "DR11F2619IPS"), ("13.5", "DR135F2619IPS"),
                        ("17", "DR17F2619IPS"), ("21", "DR21F2619IPS"),
                        ("26", "DR26F2619IPS"), ("32.5", "DR325F2619IPS"))), "",
             "ASTM F2619/F2619M-20, High-Density Polyethylene (PE) Line Pipe (as tabulated in "
             "fluids.piping)"),
    Standard("bs_1387", "BS 1387 (steel tubes for screwing, DN)", "BS 1387", "DN",
             (("Light", "BS1387LIGHT"), ("Medium", "BS1387MEDIUM"), ("Heavy", "BS1387HEAVY")),
             "",
             "BS 1387:1985, Screwed and socketed steel tubes and tubulars (as tabulated in "
             "fluids.piping)"),
    Standard("astm_f441", "ASTM F441 (CPVC, Sch 40/80)", "ASTM F441", "NPS",
             (("40", "S40F441IPS"), ("80", "S80F441IPS")), "Sch",
             "ASTM F441/F441M-15, CPVC Plastic Pipe, Schedules 40 and 80 (as tabulated in "
             "fluids.piping)"),
)}


def nps_text(nps: float) -> str:
    """Trade text of an NPS value: 0.5 → '1/2', 1.25 → '1-1/4', 4.0 → '4'.

    >>> nps_text(2.5)
    '2-1/2'
    """
    fr = Fraction(nps).limit_denominator(8)
    whole, rest = divmod(fr, 1)
    if rest == 0:
        return str(int(whole))
    if whole == 0:
        return f"{rest.numerator}/{rest.denominator}"
    return f"{int(whole)}-{rest.numerator}/{rest.denominator}"


def _nominal_key(standard: Standard, value: float) -> str:
    return str(int(value)) if standard.sizing == "DN" else nps_text(value)


def _build_tables():
    """(standard key) → {nominal key: {our class key: (nominal value, Di, Do, t) [m]}}."""
    out = {}
    for s in STANDARDS.values():
        table: dict[str, dict[str, tuple]] = {}
        values: dict[str, float] = {}
        for ours, theirs in s.classes:
            nps_list, di, do, t = schedule_lookup[theirs]
            for n, a, b, c in zip(nps_list, di, do, t, strict=True):
                key = _nominal_key(s, n)
                values[key] = n
                table.setdefault(key, {})[ours] = (float(n), a * 1e-3, b * 1e-3, c * 1e-3)
                if s.sizing == "NPS":
                    dn = _dn_of(float(n))
                    if dn is not None:
                        NPS_TO_DN[float(n)] = dn
        order = sorted(table, key=values.__getitem__)
        class_order = [c for c, _ in s.classes]
        out[s.key] = {k: {c: table[k][c] for c in class_order if c in table[k]} for k in order}
    return out


_TABLES = _build_tables()


def standards() -> list[tuple[str, str]]:
    """``(key, label)`` of every standard in the catalogue.

    >>> standards()[0]
    ('asme_b36_10m', 'ASME B36.10M (carbon steel)')
    """
    return [(s.key, s.label) for s in STANDARDS.values()]


def _standard(standard: str) -> Standard:
    check_choice("pipe standard", standard, STANDARDS)
    return STANDARDS[standard]


def _resolve_nominal(std: Standard, nominal) -> str:
    """Our nominal key for user text or number; refuse what is not in the table."""
    table = _TABLES[std.key]
    if isinstance(nominal, bool):
        raise UnknownChoiceError(f"nominal size ({std.short})", nominal, list(table))
    if isinstance(nominal, (int, float)):
        if math.isfinite(nominal) and nominal > 0:
            key = _nominal_key(std, float(nominal))
            value = _TABLES[std.key].get(key)
            if value is not None and next(iter(value.values()))[0] == float(nominal):
                return key
        raise UnknownChoiceError(f"nominal size ({std.short})", nominal, list(table))
    if isinstance(nominal, str):
        text = nominal.strip()
        for prefix in ("NPS", "DN", "CTS"):
            if text.upper().startswith(prefix) and prefix == std.sizing:
                text = text[len(prefix):].strip()
        if text in table:
            return text
    raise UnknownChoiceError(f"nominal size ({std.short})", nominal, list(table))


def nominal_sizes(standard: str) -> list[str]:
    """Nominal sizes (our text keys, smallest first) that ``standard`` tabulates.

    >>> nominal_sizes("bs_1387")[:3]
    ['8', '10', '15']
    """
    return list(_TABLES[_standard(standard).key])


def _resolve_schedule(std: Standard, nominal_key: str, schedule) -> str:
    valid = list(_TABLES[std.key][nominal_key])
    field = f"schedule/class ({std.short} {std.sizing} {nominal_key})"
    if isinstance(schedule, bool):
        raise UnknownChoiceError(field, schedule, valid)
    if isinstance(schedule, (int, float)):
        # 40 → '40'; 40.5 stays '40.5' and is refused (fluids truncates it to '40').
        text = str(int(schedule)) if float(schedule).is_integer() else repr(schedule)
    elif isinstance(schedule, str):
        text = schedule.strip()
        if text.lower().startswith("sch"):
            text = text[3:].strip()
        for v in valid:
            if text.lower() == v.lower():
                text = v
    else:
        raise UnknownChoiceError(field, schedule, valid)
    if text not in valid:
        raise UnknownChoiceError(field, schedule, valid)
    return text


def schedules(standard: str, nominal) -> list[str]:
    """Schedules or pressure classes that ``standard`` tabulates at ``nominal``.

    >>> schedules("astm_d1785", "2")
    ['40', '80', '120']
    """
    std = _standard(standard)
    return list(_TABLES[std.key][_resolve_nominal(std, nominal)])


def dn_label(nps: float) -> str | None:
    """'DN 100' for NPS 4 (ISO 6708 / common practice), or None if there is no DN.

    >>> dn_label(4.0)
    'DN 100'
    """
    dn = _dn_of(float(nps))
    return None if dn is None else f"DN {dn}"


def _check_material(material: str, condition: str) -> None:
    check_choice("pipe material", material, ROUGHNESS)
    check_choice("pipe condition", condition, CONDITIONS)


@dataclass(frozen=True)
class Pipe:
    """A pipe bore with its roughness.

    Attributes
    ----------
    Di : float
        Inside diameter [m].
    Do : float or None
        Outside diameter [m].
    wall : float or None
        Wall thickness [m].
    material : str
        Key of :data:`kit.core.roughness.ROUGHNESS`.
    condition : str
        'new' or 'aged'.
    standard, nominal, schedule : str or None
        Our catalogue keys; None for a custom bore.
    roughness_override : float or None
        A user-given absolute roughness [m], used for both conditions.
    """

    Di: float
    Do: float | None
    wall: float | None
    material: str
    condition: str = "new"
    standard: str | None = None
    nominal: str | None = None
    schedule: str | None = None
    roughness_override: float | None = None

    def __post_init__(self):
        check_range("pipe inside diameter", self.Di, "m", *DI_RANGE)
        if self.Do is not None:
            check_range("pipe outside diameter", self.Do, "m", low=self.Di, high=DI_RANGE[1] * 1.2)
        if self.wall is not None:
            check_range("pipe wall thickness", self.wall, "m", low=0.0, high=self.Di)
        _check_material(self.material, self.condition)
        if self.roughness_override is not None:
            check_range("pipe roughness", self.roughness_override, "m", *ROUGHNESS_RANGE,
                        low_inclusive=True)
        if self.standard is not None:
            std = _standard(self.standard)
            self_key = _resolve_nominal(std, self.nominal)
            _resolve_schedule(std, self_key, self.schedule)

    @property
    def area(self) -> float:
        """Bore area [m²]."""
        return math.pi / 4.0 * self.Di * self.Di

    @property
    def roughness(self) -> float:
        """Absolute roughness at the pipe's condition [m]."""
        if self.roughness_override is not None:
            return float(self.roughness_override)
        return ROUGHNESS[self.material].value(self.condition)

    @property
    def label(self) -> str:
        """Trade label, e.g. 'NPS 4 Sch 40 (DN 100), ASME B36.10M'."""
        if self.standard is None:
            return f"custom bore {self.Di * 1e3:.4g} mm"
        std = STANDARDS[self.standard]
        sched = f"{std.schedule_word} {self.schedule}".strip()
        if std.sizing == "DN":
            nps = [k for k, v in NPS_TO_DN.items() if v == int(self.nominal)]
            extra = f" (NPS {nps_text(nps[0])})" if nps else ""
            return f"DN {self.nominal} {sched}{extra}, {std.short}"
        if std.sizing == "CTS":
            return f"CTS {self.nominal} {sched}, {std.short}"
        value = _TABLES[std.key][self.nominal][self.schedule][0]
        dn = dn_label(value)
        extra = f" ({dn})" if dn else ""
        return f"NPS {self.nominal} {sched}{extra}, {std.short}"

    @property
    def sources(self) -> dict[str, str]:
        """Where the dimensions and the roughness come from."""
        if self.standard is None:
            dims = "user-given bore"
        else:
            std = STANDARDS[self.standard]
            dims = std.source
            if std.sizing == "NPS":
                dims += f"; DN label: {DN_SOURCE}"
        if self.roughness_override is not None:
            rough = "user-given roughness (same for new and aged)"
        else:
            rough = ROUGHNESS[self.material].source(self.condition)
        return {"dimensions": dims, "roughness": rough}

    def with_condition(self, condition: str) -> Pipe:
        """A copy at ``condition`` ('new' or 'aged')."""
        check_choice("pipe condition", condition, CONDITIONS)
        return replace(self, condition=condition)

    def as_dict(self) -> dict:
        """Fields plus area, roughness, label and sources; ``Pipe.from_dict`` reads it back."""
        d = asdict(self)
        d.update(area=self.area, roughness=self.roughness, label=self.label,
                 sources=self.sources)
        return d

    @classmethod
    def from_dict(cls, d: dict) -> Pipe:
        """Rebuild a pipe from :meth:`as_dict` output (derived keys are ignored)."""
        names = ("Di", "Do", "wall", "material", "condition", "standard", "nominal",
                 "schedule", "roughness_override")
        return cls(**{k: d[k] for k in names if k in d})


def catalogue_pipe(standard: str, nominal, schedule, material: str,
                   condition: str = "new") -> Pipe:
    """A catalogue pipe: dimensions from the standard's table, roughness from our table.

    Reads fluids' schedule tables (``fluids.piping.schedule_lookup``; ASME B36.10M-2004,
    B36.19M-2004, ASTM D1785, D2241, F2619, F441, AWWA C900/C905, BS 1387) by exact key.

    Parameters
    ----------
    standard : str
        Key of :data:`STANDARDS` [-]
    nominal : str or float
        Nominal size, one of :func:`nominal_sizes` ('4', '1-1/2'; DN '15' for BS 1387);
        a number must equal a tabulated size exactly [-]
    schedule : str or int
        Schedule or class, one of :func:`schedules` ('40', 'XS', 'SDR 21', 'Medium');
        an integer is read as its text, any other number is refused [-]
    material : str
        Key of :data:`kit.core.roughness.ROUGHNESS` [-]
    condition : str
        'new' or 'aged' [-]

    Returns
    -------
    pipe : Pipe
        Inside and outside diameter and wall [m], roughness [m]

    Notes
    -----
    Unknown standards, sizes or schedules raise :class:`~kit.errors.UnknownChoiceError`
    listing the valid ones.

    Examples
    --------
    >>> round(catalogue_pipe("asme_b36_10m", "2", "40", "carbon_steel").Di, 5)
    0.05248

    References
    ----------
    .. [1] ASME B36.10M-2004: Welded and Seamless Wrought Steel Pipe. New York: ASME, 2004.
    .. [2] ASME B36.19M-2004: Stainless Steel Pipe. New York: ASME, 2004.
    """
    std = _standard(standard)
    key = _resolve_nominal(std, nominal)
    sched = _resolve_schedule(std, key, schedule)
    _check_material(material, condition)
    _, di, do, t = _TABLES[std.key][key][sched]
    return Pipe(Di=di, Do=do, wall=t, material=material, condition=condition,
                standard=std.key, nominal=key, schedule=sched)


def custom_pipe(Di: float, material: str, condition: str = "new", roughness: float | None = None,
                Do: float | None = None) -> Pipe:
    """A pipe of a given bore, not from a catalogue.

    Parameters
    ----------
    Di : float
        Inside diameter, 0 < Di <= 5 m [m]
    material : str
        Key of :data:`kit.core.roughness.ROUGHNESS` [-]
    condition : str
        'new' or 'aged' [-]
    roughness : float, optional
        Absolute roughness overriding the table, 0 to 10 mm, used for both conditions [m]
    Do : float, optional
        Outside diameter, > Di [m]

    Returns
    -------
    pipe : Pipe
        The pipe [-]

    Examples
    --------
    >>> custom_pipe(0.1, "pvc").label
    'custom bore 100 mm'
    """
    Di = check_range("pipe inside diameter", Di, "m", *DI_RANGE)
    wall = None
    if Do is not None:
        Do = check_range("pipe outside diameter", Do, "m", low=Di, high=DI_RANGE[1] * 1.2)
        wall = (Do - Di) / 2.0
    if roughness is not None and not isinstance(roughness, (int, float)):
        raise InputError("pipe roughness", roughness, "must be a number in metres")
    return Pipe(Di=Di, Do=Do, wall=wall, material=material, condition=condition,
                roughness_override=None if roughness is None else float(roughness))

