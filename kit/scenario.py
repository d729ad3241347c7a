"""Scenario files: TOML calc-input sheets, every quantity a string with its unit.

A :class:`Scenario` keeps the document exactly as read (nested dicts of strings, numbers
and lists), so saving writes back everything the file held — nothing is lost or rounded.
The ``build_*`` functions turn parts of the document into core objects (SI) and name the
key of anything malformed in a :class:`~kit.errors.ScenarioError`.

Layout (keys common to every kind)::

    schema = "headline-scenario/1"
    kind = "pump_selection"          # line_sizing | pump_selection | tank_drainage
    title = "..."
    [project]  name, calc_number, revision, prepared_by, date, checked_by, checked_date
    [site]     elevation = "85 m"    (or barometric_pressure = "100.3 kPa(a)")
    [display]  system = "SI"         (or "US")
    [liquid]   key, concentration, temperature_min, temperature_max   (or [liquid.user])
    [source] / [destination]   name, level_low, level_high, pressure, discharge
    [suction] / [discharge]    name, start_station, start_elevation, [[….segments]]

A segment::

    [[discharge.segments]]
    name = "riser"
    length = "24 m"
    rise = "18 m"
    pipe = { standard = "asme_b36_10m", nominal = "4", schedule = "40",
             material = "carbon_steel", condition = "new" }
    fittings = [ { kind = "fixed_k", K = 0.5, count = 2, label = "strainer" },
                 { kind = "bend", angle = 90, R_D = 1.5 } ]

Example
-------
>>> sc = loads('schema = "headline-scenario/1"\\nkind = "line_sizing"\\ntitle = "t"\\n')
>>> sc.kind
'line_sizing'
"""

from __future__ import annotations

import copy
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from kit import units
from kit.errors import DimensionError, HeadlineError, ScenarioError

__all__ = [
    "SCHEMA", "KINDS", "Scenario", "load", "loads", "dumps", "save", "get", "quantity",
    "build_site", "build_liquid", "build_temperatures", "build_pipe", "build_fitting",
    "build_segment", "build_line", "build_endpoint", "build_system",
]

SCHEMA = "headline-scenario/1"
KINDS = ("line_sizing", "pump_selection", "tank_drainage")


@dataclass
class Scenario:
    """A scenario document and where it came from."""

    doc: dict
    source: str = "<memory>"
    _built: dict = field(default_factory=dict, repr=False, compare=False)

    @property
    def kind(self) -> str:
        return self.doc["kind"]

    @property
    def title(self) -> str:
        return self.doc.get("title", "")

    @property
    def display_system(self) -> str:
        return self.doc.get("display", {}).get("system", "SI")

    def copy(self) -> Scenario:
        return Scenario(copy.deepcopy(self.doc), self.source)

    def set(self, path: str, value) -> None:
        """Set a dotted key (``"liquid.temperature_max"``) in the document."""
        node = self.doc
        *head, last = path.split(".")
        for k in head:
            node = node.setdefault(k, {})
        node[last] = value
        self._built.clear()

    def get(self, path: str, default=None):
        return get(self.doc, path, default)

    def self_contained(self) -> Scenario:
        """A copy whose files referred to by name (``[batch] file``) are carried inline as
        ``text``, so the scenario recomputes anywhere (the record stores this form)."""
        out = self.copy()
        file = get(out.doc, "batch.file")
        if file and "text" not in out.doc.get("batch", {}):
            base = Path(self.source).parent if self.source not in ("<memory>", "<string>") \
                else Path.cwd()
            try:
                out.doc["batch"]["text"] = (base / file).read_text(encoding="utf-8")
            except OSError as exc:
                raise ScenarioError("batch.file", f"cannot be read: {exc.strerror}",
                                    self.source) from None
        return out


def get(doc: dict, path: str, default=None):
    """Read a dotted key from a nested dict, or ``default``."""
    node = doc
    for k in path.split("."):
        if not isinstance(node, dict) or k not in node:
            return default
        node = node[k]
    return node


def _err(key: str, exc: Exception, source: str | None = None) -> ScenarioError:
    return ScenarioError(key, str(exc), source)


def quantity(doc: dict, key: str, kind: str, default=None, p_baro: float = 101325.0,
             prefix: str = "") -> float:
    """Parse ``doc[key]`` (a string with unit) as ``kind`` into SI, naming the key on error.

    >>> quantity({"length": "10 ft"}, "length", "length")
    3.048
    """
    full = f"{prefix}{key}"
    if key not in doc:
        if default is not None:
            return default
        raise ScenarioError(full, f"is missing (a {units.KINDS[kind][1]} is required)")
    try:
        return units.parse(doc[key], kind, field=full, p_baro=p_baro)
    except (HeadlineError, DimensionError) as exc:
        raise _err(full, exc) from None


def loads(text: str, source: str = "<string>") -> Scenario:
    """Read a scenario from TOML text; check its schema and kind."""
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError("(file)", f"is not valid TOML: {exc}", source) from None
    schema = doc.get("schema")
    if schema != SCHEMA:
        raise ScenarioError("schema", f"must be {SCHEMA!r}, not {schema!r}", source)
    if doc.get("kind") not in KINDS:
        raise ScenarioError("kind", f"must be one of {', '.join(KINDS)}, not {doc.get('kind')!r}",
                            source)
    disp = get(doc, "display.system", "SI")
    if disp not in units.DISPLAY:
        raise ScenarioError("display.system", f"must be 'SI' or 'US', not {disp!r}", source)
    return Scenario(doc, source)


def load(path) -> Scenario:
    """Read a scenario file."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except OSError as exc:
        raise ScenarioError("(file)", f"cannot be read: {exc.strerror}", str(p)) from None
    return loads(text, str(p))


def dumps(sc: Scenario) -> str:
    """The scenario document as TOML text."""
    import tomli_w

    return tomli_w.dumps(sc.doc)


def save(sc: Scenario, path) -> None:
    """Write the scenario document to ``path`` (TOML)."""
    Path(path).write_text(dumps(sc), encoding="utf-8")


# ---------------------------------------------------------------- builders


def build_site(doc: dict) -> float:
    """Barometric pressure [Pa]: given, or from site elevation (US Std Atmosphere 1976)."""
    from kit.core.site import barometric_pressure

    site = doc.get("site", {})
    if "barometric_pressure" in site:
        return quantity(site, "barometric_pressure", "pressure", prefix="site.")
    z = quantity(site, "elevation", "elevation", default=0.0, prefix="site.")
    try:
        return barometric_pressure(z)
    except HeadlineError as exc:
        raise _err("site.elevation", exc) from None


def build_liquid(doc: dict):
    """The liquid of ``[liquid]``: a catalogue entry or ``[liquid.user]``."""
    from kit.core import liquids

    sec = doc.get("liquid")
    if not isinstance(sec, dict):
        raise ScenarioError("liquid", "section is missing")
    try:
        if "user" in sec:
            u = sec["user"]
            def column(key, kind, required=True):
                raw = u.get(key)
                if raw is None:
                    if required:
                        raise ScenarioError(f"liquid.user.{key}", "is missing")
                    return None
                vals = tuple(units.parse(t, kind, f"liquid.user.{key}") for t in _as_list(raw, key))
                return vals if isinstance(raw, list) else vals[0]  # one value: a constant

            T = column("temperature", "temperature")
            return liquids.UserLiquid(
                u.get("name", "user liquid"), T=T if isinstance(T, tuple) else (T,),
                rho=column("density", "density"), mu=column("viscosity", "viscosity"),
                pv=column("vapour_pressure", "pressure", required=False),
                flammable=bool(u.get("flammable", False)))
        conc = sec.get("concentration")
        conc = None if conc is None else units.parse(conc, "fraction", "liquid.concentration")
        return liquids.make_liquid(sec.get("key"), conc)
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise _err("liquid", exc) from None


def _as_list(value, key: str) -> list:
    if value is None:
        raise ScenarioError(key, "is missing")
    return value if isinstance(value, list) else [value]


def build_temperatures(doc: dict) -> tuple[float, float]:
    """(T_min, T_max) [K] from ``[liquid]``; one ``temperature`` key serves for both."""
    sec = doc.get("liquid", {})
    if "temperature" in sec:
        T = quantity(sec, "temperature", "temperature", prefix="liquid.")
        return T, T
    lo = quantity(sec, "temperature_min", "temperature", prefix="liquid.")
    hi = quantity(sec, "temperature_max", "temperature", prefix="liquid.")
    if hi < lo:
        raise ScenarioError("liquid.temperature_max", "must not be below temperature_min")
    return lo, hi


def build_pipe(spec: dict, key: str):
    """A catalogue pipe (standard, nominal, schedule) or a custom bore (``bore``)."""
    from kit.core import pipes

    if not isinstance(spec, dict):
        raise ScenarioError(key, "must be a table with standard/nominal/schedule or bore")
    material = spec.get("material", "carbon_steel")
    condition = spec.get("condition", "new")
    try:
        if "bore" in spec:
            Di = quantity(spec, "bore", "diameter", prefix=f"{key}.")
            rough = spec.get("roughness")
            rough = None if rough is None else quantity(spec, "roughness", "roughness",
                                                        prefix=f"{key}.")
            return pipes.custom_pipe(Di, material, condition, roughness=rough)
        return pipes.catalogue_pipe(spec.get("standard"), str(spec.get("nominal")),
                                    str(spec.get("schedule")), material, condition)
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise _err(key, exc) from None


_PARAM_KIND = {"m": "length", "m/s": "velocity", "Pa": "pressure_difference"}


def build_fitting(spec: dict, key: str):
    """One fitting row: ``kind``, ``count``, ``label`` and the kind's parameters."""
    from kit.core import fittings

    if not isinstance(spec, dict) or "kind" not in spec:
        raise ScenarioError(key, "must be a table with a 'kind'")
    kind = spec["kind"]
    if kind not in fittings.FITTING_KINDS:
        raise ScenarioError(f"{key}.kind", f"must be one of {', '.join(fittings.FITTING_KINDS)}, "
                            f"not {kind!r}")
    specs = {p.name: p for p in fittings.FITTING_KINDS[kind].params}
    params = {}
    for name, value in spec.items():
        if name in ("kind", "count", "label"):
            continue
        if name not in specs:
            raise ScenarioError(f"{key}.{name}", f"is not a parameter of '{kind}' (choices: "
                                f"{', '.join(specs) or 'none'})")
        unit = getattr(specs[name], "unit", "-")
        if isinstance(value, str) and unit in _PARAM_KIND:
            params[name] = quantity(spec, name, _PARAM_KIND[unit], prefix=f"{key}.")
        else:
            params[name] = value
    try:
        return fittings.Fitting(kind, int(spec.get("count", 1)), params, spec.get("label", ""))
    except (HeadlineError, DimensionError, TypeError) as exc:
        raise _err(key, exc) from None


def build_segment(spec: dict, key: str):
    """One segment: name, pipe, length, rise, fittings, station."""
    from kit.core.line import Segment

    name = spec.get("name")
    if not name:
        raise ScenarioError(f"{key}.name", "is missing")
    pipe = build_pipe(spec.get("pipe"), f"{key}.pipe")
    length = quantity(spec, "length", "length", prefix=f"{key}.")
    rise = quantity(spec, "rise", "length", default=0.0, prefix=f"{key}.")
    fits = tuple(build_fitting(f, f"{key}.fittings[{i}]")
                 for i, f in enumerate(spec.get("fittings", [])))
    try:
        return Segment(name, pipe, length, rise, fits, spec.get("station"))
    except HeadlineError as exc:
        raise _err(key, exc) from None


def build_line(doc: dict, which: str):
    """The line of section ``which`` (``"suction"``/``"discharge"``), or None if absent."""
    from kit.core.line import Line

    sec = doc.get(which)
    if sec is None:
        return None
    segs = sec.get("segments")
    if not segs:
        raise ScenarioError(f"{which}.segments", "must list at least one segment")
    built = tuple(build_segment(s, f"{which}.segments[{i}]") for i, s in enumerate(segs))
    z0 = quantity(sec, "start_elevation", "elevation", default=0.0, prefix=f"{which}.")
    try:
        return Line(sec.get("name", which), built, sec.get("start_station", "start"), z0)
    except HeadlineError as exc:
        raise _err(which, exc) from None


def build_endpoint(doc: dict, which: str, p_baro: float):
    """Source or destination endpoint; pressures may be gauge (against ``p_baro``)."""
    from kit.core.system import Endpoint

    sec = doc.get(which)
    if not isinstance(sec, dict):
        raise ScenarioError(which, "section is missing")
    if "level" in sec:
        lo = hi = quantity(sec, "level", "elevation", prefix=f"{which}.")
    else:
        lo = quantity(sec, "level_low", "elevation", prefix=f"{which}.")
        hi = quantity(sec, "level_high", "elevation", prefix=f"{which}.")
    p = quantity(sec, "pressure", "pressure", default=p_baro, p_baro=p_baro, prefix=f"{which}.")
    try:
        return Endpoint(sec.get("name", which), lo, hi, p, sec.get("discharge", "submerged"))
    except HeadlineError as exc:
        raise _err(which, exc) from None


def build_system(sc: Scenario):
    """The :class:`~kit.core.system.System` of a scenario (cached on the scenario)."""
    from kit.core.system import System

    if "system" in sc._built:
        return sc._built["system"]
    doc = sc.doc
    p_baro = build_site(doc)
    liquid = build_liquid(doc)
    T_min, T_max = build_temperatures(doc)
    src = build_endpoint(doc, "source", p_baro)
    dst = build_endpoint(doc, "destination", p_baro)
    suction = build_line(doc, "suction")
    discharge = build_line(doc, "discharge")
    z_pump = get(doc, "pump_elevation")
    z_pump = None if z_pump is None else quantity(doc, "pump_elevation", "elevation")
    try:
        for T in {T_min, T_max}:
            liquid.state(T, max(src.pressure, p_baro))
        out = System(doc.get("title", "system"), src, dst, suction, discharge, liquid, T_min,
                     T_max, p_baro, z_pump)
    except HeadlineError as exc:
        raise _err("liquid", exc) from None
    sc._built["system"] = out
    return out
