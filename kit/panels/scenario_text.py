"""Writing the panels' state back into a scenario document, and the "save" row of an app.

A scenario holds every quantity as a string with its unit, as the engineer wrote it. The
helpers here turn what a panel holds into such strings, in this order of preference:

1. the document's own string, when the panel's value is the value that string stands for
   (an input nobody changed is saved exactly as it was written);
2. the text typed in a :class:`~kit.panels.fields.QuantityField` (the engineer's own words);
3. for a value set from code (a default, a scaled length), the shortest text in the display
   system that reads back as that value (relative 1e-12), else the SI value in full.

:class:`SaveRow` is a path box and a "Save scenario" button: it writes an app's
``to_scenario()`` with :func:`kit.scenario.save`, refuses to overwrite an existing file until
pressed a second time, and shows "saved to …" or the kit's error beside the button.

CSS classes: ``hl-save`` (the row), ``hl-save-path``, ``hl-save-button``, ``hl-save-message``.

Example
-------
>>> from kit.panels.fields import QuantityField
>>> q = QuantityField("flow", "design flow", text="350 gpm")
>>> field_text(q, "350 gpm"), field_text(q)
('350 gpm', '350 gpm')
>>> q.value = 0.02
>>> field_text(q)
'72.00 m³/h'
>>> exact_text(0.0254 * 4.026, "diameter", "US")
'4.026 in'
"""

from __future__ import annotations

import html
import math
from collections.abc import Callable
from pathlib import Path

import ipywidgets as widgets

from kit import scenario as scn
from kit import units
from kit.errors import DimensionError, HeadlineError, InputError
from kit.panels.base import KIT_ERRORS, error_html
from kit.panels.fields import text_for

__all__ = ["exact_text", "field_text", "same_value", "pipe_doc", "fitting_doc",
           "fitting_rows", "liquid_doc", "default_save_path", "SaveRow"]

#: Relative tolerance within which a text "reads back as" a value.
_REL = 1e-12
#: Fitting parameter units written as strings with a unit (as kit.scenario.build_fitting reads).
_PARAM_KIND = {"m": "length", "m/s": "velocity", "Pa": "pressure_difference"}


def _close(a: float, b: float) -> bool:
    return a == b or math.isclose(a, b, rel_tol=_REL, abs_tol=1e-300)


def same_value(text, value: float | None, kind: str, p_baro: float = 101325.0) -> bool:
    """True when ``text`` (a document string) reads as ``value`` [SI] within 1e-12."""
    if value is None or not isinstance(text, str):
        return False
    try:
        return _close(units.parse(text, kind, "text", p_baro=p_baro), float(value))
    except (HeadlineError, DimensionError):
        return False


def exact_text(value_si: float, kind: str, system: str = "SI", gauge: bool = False,
               p_baro: float = 101325.0) -> str:
    """The shortest text (4 to 17 significant figures, in ``system``) that
    :func:`kit.units.parse` reads back as ``value_si`` within 1e-12; else the SI value in full.

    >>> exact_text(0.3048 * 1450, "length", "US")
    '1450 ft'
    """
    for digits in (4, 6, 8, 10, 12, 14, 17):
        t = text_for(value_si, kind, system, digits, gauge, p_baro)
        if same_value(t, value_si, kind, p_baro):
            return t
    unit = "Pa(a)" if kind == "pressure" else units.KINDS[kind][0]
    return f"{float(value_si)!r} {unit}".strip()


def field_text(f, original=None) -> str | None:
    """The text to save for a :class:`~kit.panels.fields.QuantityField`: ``original`` when
    the field holds its value, else the typed text, else :func:`exact_text` of the value.
    None for an empty optional field; the kit's error for an invalid one."""
    if not f.valid:
        raise InputError(f.field, f.text, f"cannot be saved: {f.error or 'not valid'}")
    if f.value is None:
        if f.optional:
            return None
        raise InputError(f.field, f.text, "is required")
    if same_value(original, f.value, f.kind, f.p_baro):
        return original
    exact = getattr(f, "_exact", None)
    typed = exact is None or exact[0] != f.text
    if typed:
        text = f.text.strip()
        if same_value(text, f.value, f.kind, f.p_baro):
            return text
        if f.default_unit and same_value(f"{text} {f.default_unit}", f.value, f.kind, f.p_baro):
            return f"{text} {f.default_unit}"
    return exact_text(f.value, f.kind, f.system, f.gauge, f.p_baro)


def pipe_doc(pipe, original=None, system: str = "SI") -> dict:
    """The ``pipe = {...}`` table of a core Pipe (``original`` kept when it builds ``pipe``)."""
    if isinstance(original, dict):
        try:
            if scn.build_pipe(original, "pipe") == pipe:
                return dict(original)
        except HeadlineError:
            pass
    if pipe.standard is not None:
        return {"standard": pipe.standard, "nominal": str(pipe.nominal),
                "schedule": str(pipe.schedule), "material": pipe.material,
                "condition": pipe.condition}
    out = {"bore": exact_text(pipe.Di, "diameter", system), "material": pipe.material,
           "condition": pipe.condition}
    if pipe.roughness_override is not None:
        out["roughness"] = exact_text(pipe.roughness_override, "roughness", system)
    return out


def _built_pool(rows, key: str) -> list:
    pool = []
    for i, d in enumerate(rows or ()):
        try:
            pool.append((scn.build_fitting(d, f"{key}[{i}]"), d))
        except HeadlineError:
            continue
    return pool


def fitting_doc(fit, pool: list | None = None, fields: dict | None = None,
                system: str = "SI") -> dict:
    """One fitting row ``{kind, count, label, params…}`` of a core Fitting.

    ``pool`` is a list of (Fitting, row dict) of the document's rows: a row that builds an
    equal fitting is taken (and removed from the pool) as written. ``fields`` maps parameter
    names to the row's QuantityFields, whose typed text is kept. Parameters at their default
    are left out; lengths, velocities and pressures carry their unit.
    """
    from kit.core.fittings import FITTING_KINDS

    for j, (built, row) in enumerate(pool or ()):
        if built == fit:
            del pool[j]
            return dict(row)
    out: dict = {"kind": fit.kind}
    if int(fit.count) != 1:
        out["count"] = int(fit.count)
    if fit.label:
        out["label"] = str(fit.label)
    for spec in FITTING_KINDS[fit.kind].params:
        v = fit.params[spec.name]
        if spec.default is not None and v == spec.default:
            continue
        kind = _PARAM_KIND.get(getattr(spec, "unit", "-"))
        if kind is not None:
            f = (fields or {}).get(spec.name)
            text = None
            if f is not None and f.valid and f.value is not None and _close(f.value, v):
                text = field_text(f)
            out[spec.name] = text if text is not None else exact_text(float(v), kind, system)
        elif isinstance(v, str):
            out[spec.name] = v
        else:
            v = float(v)
            out[spec.name] = int(v) if v.is_integer() else v
    return out


def fitting_rows(fitting_list, original_rows=(), key: str = "fittings",
                 system: str = "SI") -> list[dict]:
    """The rows of a :class:`~kit.panels.fitting_list.FittingList` for a document, the
    document's own rows kept where they build the same fitting; a kit error if a row is bad."""
    fits = fitting_list.value
    if fits is None:
        raise InputError("fittings", "", f"cannot be saved: {fitting_list.error or 'a row is not valid'}")
    pool = _built_pool(original_rows, key)
    return [fitting_doc(fit, pool, row.fields, system)
            for row, fit in zip(fitting_list.kept, fits, strict=True)]


def liquid_doc(picker, original: dict | None, one_temperature: bool = False) -> dict:
    """The ``[liquid]`` table of a :class:`~kit.panels.fluid_picker.FluidPicker`: the liquid
    key (and concentration), or the document's ``[liquid.user]`` kept, and the temperature
    (``temperature``; a ``temperature_min``/``_max`` pair kept when its lower end is the
    panel's temperature and ``one_temperature`` is False)."""
    sel = picker.value
    if sel is None:
        raise InputError("liquid", "", f"cannot be saved: {picker.error or 'not valid'}")
    out = dict(original or {})
    if picker.liquid.value == "user":
        if "user" not in out:
            raise InputError("liquid", sel.liquid.name, "is a user liquid the scenario does "
                             "not describe; it cannot be saved")
    else:
        out.pop("user", None)
        out["key"] = picker.liquid.value
        if sel.liquid.spec.needs_concentration:
            out["concentration"] = field_text(picker.concentration, out.get("concentration"))
        else:
            out.pop("concentration", None)
    t = picker.temperature
    if "temperature" in out or one_temperature or not same_value(
            out.get("temperature_min"), t.value, "temperature"):
        orig = out.get("temperature", out.get("temperature_min"))
        out.pop("temperature_min", None)
        out.pop("temperature_max", None)
        out["temperature"] = field_text(t, orig)
    return out


def default_save_path(sc) -> Path:
    """The scenario's own file name with ``_edited`` before ``.toml``, in its folder (the
    working folder for a scenario not read from a file)."""
    src = getattr(sc, "source", "<memory>")
    if src in ("<memory>", "<string>", "", None):
        return Path.cwd() / "scenario_edited.toml"
    p = Path(src)
    return p.with_name(f"{p.stem}_edited.toml")


class SaveRow(widgets.HBox):
    """A file path and a "Save scenario" button writing ``to_scenario()`` to it.

    Parameters
    ----------
    to_scenario : callable
        Returns the :class:`kit.scenario.Scenario` to write; a kit error is shown.
    path : str or Path
        The path shown first.

    Attributes
    ----------
    path : ipywidgets.Text
        CSS ``hl-save-path``.
    button : ipywidgets.Button
        CSS ``hl-save-button``.
    message : ipywidgets.HTML
        "saved to …", "… exists: press again to overwrite", or the error (``hl-save-message``).
    """

    def __init__(self, to_scenario: Callable[[], object], path):
        self._to_scenario = to_scenario
        self._armed: str | None = None
        self.path = widgets.Text(value=str(path), description="save to",
                                 layout=widgets.Layout(width="44em"))
        self.path.style.description_width = "5em"
        self.path.add_class("hl-save-path")
        self.button = widgets.Button(description="Save scenario", icon="save")
        self.button.add_class("hl-save-button")
        self.message = widgets.HTML("")
        self.message.add_class("hl-save-message")
        super().__init__([self.path, self.button, self.message])
        self.add_class("hl-save")
        self.button.on_click(lambda _b: self.save())
        self.path.observe(self._disarm, names="value")

    def _disarm(self, _change=None) -> None:
        self._armed = None

    def _say(self, text: str, error: bool = False) -> None:
        self.message.value = error_html(text) if error else \
            f'<span class="hl-save-text">{html.escape(text)}</span>'

    def save(self) -> Path | None:
        """Write the scenario (the button's action); the path written, or None."""
        raw = self.path.value.strip()
        if not raw:
            self._say("give a file path to save to", error=True)
            return None
        path = Path(raw).expanduser()
        if path.is_dir():
            self._armed = None
            self._say(f"cannot save: {path} is a folder, not a file", error=True)
            return None
        try:
            sc = self._to_scenario()
            src = Path(sc.source) if sc.source not in ("<memory>", "<string>") else None
            if src is None or src.resolve().parent != path.resolve().parent:
                sc = sc.self_contained()  # a line list named relative to the old folder goes inline
        except KIT_ERRORS as exc:
            self._armed = None
            self._say(f"not saved: {exc}", error=True)
            return None
        if path.exists() and self._armed != str(path):
            self._armed = str(path)
            self._say(f"{path} exists: press again to overwrite")
            return None
        try:
            scn.save(sc, path)
        except OSError as exc:
            self._armed = None
            self._say(f"cannot save to {path}: {exc.strerror or exc}", error=True)
            return None
        self._armed = None
        self._say(f"saved to {path}")
        return path
