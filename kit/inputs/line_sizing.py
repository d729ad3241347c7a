"""Reader of ``line_sizing`` scenarios: the typed inputs of a sizing.

The scenario was checked against :data:`kit.inputs.line_sizing_schema.ROOT` when it was loaded
(and :func:`inputs` checks a document edited in memory again); reading maps checked text to
core objects (SI). Two rules live here once, for the reader and the app alike:
:func:`edited_duty` (a duty class with the engineer's own limits, labelled so) and
:func:`candidates` (the catalogue sizes of one schedule in reach of the duty).

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> inp = inputs(scn.load(scenario_path("harlow_flats_diesel_transfer.toml")))
>>> inp.duty.key, inp.schedule, round(inp.Q_design * 15850.32, 1)
('pump_discharge', '40', 350.0)
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import lru_cache

from kit.core.criteria import DUTY_CLASSES, DutyClass
from kit.core.sizing import Route
from kit.errors import HeadlineError, ScenarioError, check_range
from kit.inputs import common as scn
from kit.inputs.common import IntegrityOptions
from kit.inputs.line_sizing_schema import ROOT

__all__ = ["SizingInputs", "inputs", "candidate_pipes", "sizes_in_reach", "candidates",
           "edited_duty", "route_of"]


@dataclass(frozen=True)
class SizingInputs:
    """Everything one sizing needs, in SI (built from a scenario or from the panels)."""

    route: Route
    liquid: object
    state: object
    duty: DutyClass
    Q_design: float
    Q_min: float
    Q_max: float
    standard: str
    schedule: str
    material: str
    condition: str
    sizes: tuple
    p_end: float
    p_baro: float
    vapour_margin: float
    erosional_C: float
    integrity: IntegrityOptions = IntegrityOptions()


def edited_duty(key: str, note: str, **limits) -> DutyClass:
    """Duty class ``key`` with the engineer's own limits (``v_min``, ``v_max``, ``dp_max`` in
    SI; None or absent keeps the class's); its source starts with ``note`` (where they were
    set).

    >>> d = edited_duty("pump_discharge", "user-set in a test", v_max=2.0)
    >>> d.v_max, d.source.startswith("user-set in a test; others:")
    (2.0, True)
    """
    duty = DUTY_CLASSES[key]
    changes = {k: v for k, v in limits.items() if v is not None and v != getattr(duty, k)}
    if not changes:
        return duty
    return replace(duty, source=f"{note}; others: " + duty.source, **changes)


def _duty(doc) -> DutyClass:
    key = scn.get(doc, "sizing.duty", "general_transfer")
    crit = doc.get("criteria", {})
    limits = {k: scn.quantity(crit, k, kind, prefix="criteria.") for k, kind in
              (("v_min", "velocity"), ("v_max", "velocity"), ("dp_max", "pressure_per_length"))
              if k in crit}
    try:
        return edited_duty(key, "user-set in [criteria]", **limits)
    except HeadlineError as exc:
        raise ScenarioError("criteria", str(exc)) from None


@lru_cache(maxsize=256)
def candidate_pipes(standard, schedule, material, condition, sizes=None) -> tuple:
    """Catalogue pipes of one schedule, smallest first (sizes without that schedule skipped).

    Cached: a pure function of its arguments (``sizes`` a tuple of nominal sizes or None).
    """
    from kit.core import pipes

    out = []
    for nom in sizes or pipes.nominal_sizes(standard):
        if schedule in pipes.schedules(standard, nom):
            out.append(pipes.catalogue_pipe(standard, nom, schedule, material, condition))
    return tuple(out)


#: Larger sizes kept beyond the velocity reach: a viscous liquid's pressure drop can call for a
#: pipe whose velocity is below the duty's range (common practice, no source).
EXTRA_LARGER_SIZES = 3


def sizes_in_reach(pipes, Q: float, duty: DutyClass) -> tuple:
    """The pipes whose design velocity is within reach of the duty's range (a quarter of
    ``v_min`` to 2.5 × ``v_max``) and the next :data:`EXTRA_LARGER_SIZES` larger ones; all of
    them if none is in reach. ``pipes`` are smallest first."""
    pipes = tuple(pipes)
    idx = [i for i, p in enumerate(pipes) if 0.25 * duty.v_min <= Q / p.area <= 2.5 * duty.v_max]
    if not idx:
        return pipes
    return pipes[idx[0]:idx[-1] + 1 + EXTRA_LARGER_SIZES]


def route_of(doc) -> Route:
    """The route of ``[route]``: length, profile points, fittings."""
    sec = doc.get("route")
    if not isinstance(sec, dict):
        raise ScenarioError("route", "section is missing")
    length = scn.quantity(sec, "length", "length", prefix="route.")
    z0 = scn.quantity(sec, "start_elevation", "elevation", default=0.0, prefix="route.")
    pts = []
    for i, p in enumerate(sec.get("points", [])):
        key = f"route.points[{i}]"
        pts.append((p.get("name", f"point {i + 1}"),
                    scn.quantity(p, "chainage", "length", prefix=f"{key}."),
                    scn.quantity(p, "elevation", "elevation", prefix=f"{key}.")))
    fits = tuple(scn.build_fitting(f, f"route.fittings[{i}]")
                 for i, f in enumerate(sec.get("fittings", [])))
    try:
        return Route(length, tuple(pts), fits, z0, sec.get("start_name", "start"))
    except HeadlineError as exc:
        raise ScenarioError("route", str(exc)) from None


def candidates(standard: str, schedule: str, material: str, condition: str, sizes, Q: float,
               duty: DutyClass) -> tuple:
    """The candidate pipes of a sizing: the given ``sizes`` of the schedule, else every size
    of it within reach of the duty at flow ``Q`` (:func:`sizes_in_reach`).

    Raises :class:`~kit.errors.InputError` naming the schedule when no size has it.
    """
    from kit.errors import InputError

    pipes = candidate_pipes(standard, schedule, material, condition, sizes)
    if not pipes:
        raise InputError("schedule", schedule, f"is not a schedule of any size of {standard}")
    return pipes if sizes is not None else sizes_in_reach(pipes, Q, duty)


def inputs(sc) -> SizingInputs:
    """Read a line-sizing scenario into core inputs (SI), checked against its schema."""
    from kit.inputs.schema import check

    doc = sc.doc
    check(doc, ROOT, None, scn.build_site(doc))
    p_baro = scn.build_site(doc)
    liquid = scn.build_liquid(doc)
    T, _ = scn.build_temperatures(doc)
    try:
        state = liquid.state(T, p_baro)
    except HeadlineError as exc:
        raise ScenarioError("liquid", str(exc)) from None
    s = doc.get("sizing")
    if not isinstance(s, dict):
        raise ScenarioError("sizing", "section is missing")
    Qd = scn.quantity(s, "flow_design", "flow", prefix="sizing.")
    Qmin = scn.quantity(s, "flow_min", "flow", default=Qd, prefix="sizing.")
    Qmax = scn.quantity(s, "flow_max", "flow", default=Qd, prefix="sizing.")
    standard = s.get("standard", "asme_b36_10m")
    schedule = str(s.get("schedule", "40"))
    sizes = tuple(str(x) for x in s.get("sizes", ())) or None
    material = s.get("material", "carbon_steel")
    condition = s.get("condition", "new")
    duty = _duty(doc)
    try:
        pipes = candidates(standard, schedule, material, condition, sizes, Qd, duty)
    except HeadlineError as exc:
        raise ScenarioError("sizing.schedule", str(exc)) from None
    try:
        C = check_range("sizing.erosional_C", s.get("erosional_C", 100.0), "-", low=0.0,
                        high=300.0)
    except HeadlineError as exc:
        raise ScenarioError("sizing.erosional_C", str(exc)) from None
    return SizingInputs(
        route_of(doc), liquid, state, duty, Qd, Qmin, Qmax, standard, schedule, material,
        condition, tuple(pipes),
        scn.quantity(s, "end_pressure", "pressure", default=p_baro, p_baro=p_baro,
                     prefix="sizing."),
        p_baro, scn.quantity(s, "vapour_margin", "head", default=2.0, prefix="sizing."), C,
        scn.build_integrity(doc))


