"""PipePicker: a catalogue pipe (standard → nominal size → schedule/class) or a custom bore.

Material and condition (new / aged) pick the roughness from the keyed table
:data:`kit.core.roughness.ROUGHNESS`. The panel shows bore, wall, outside diameter, flow area
and roughness, and the source of the dimensions and of the roughness. It builds the pipe
through :func:`kit.core.pipes.catalogue_pipe` or :func:`kit.core.pipes.custom_pipe`; a
refused input shows the kit's message beside the field.

Example
-------
>>> p = PipePicker()
>>> p.standard.value, p.nominal.value, p.schedule.value
('asme_b36_10m', '4', '40')
>>> round(p.value.Di * 1e3, 2)
102.26
>>> p.mode.value = "custom"
>>> p.bore.set_text("250 mm")
>>> p.value.label
'custom bore 250 mm'
"""

from __future__ import annotations

import html
from fractions import Fraction

import ipywidgets as widgets

from kit import units
from kit.core import pipes
from kit.core.pipes import DI_RANGE, ROUGHNESS_RANGE, STANDARDS, Pipe
from kit.core.roughness import CONDITIONS, materials
from kit.errors import check_range
from kit.panels.base import KIT_ERRORS, Panel, error_html, error_widget
from kit.panels.fields import QuantityField

__all__ = ["STANDARD_MATERIALS", "materials_for", "fill_materials", "PipePicker", "nominal_label",
           "schedule_label"]

_MODES = [("Catalogue pipe", "catalogue"), ("Custom bore", "custom")]


def _nps_value(text: str) -> float | None:
    """'1-1/4' -> 1.25, '4' -> 4.0; None if it is not NPS text."""
    try:
        if "-" in text:
            whole, frac = text.split("-", 1)
            return float(int(whole) + Fraction(frac))
        return float(Fraction(text))
    except (ValueError, ZeroDivisionError):
        return None


def nominal_label(standard: str, nominal: str) -> str:
    """Dropdown label of a nominal size: 'NPS 4 (DN 100)', 'DN 15', 'CTS 1'.

    >>> nominal_label("asme_b36_10m", "1-1/2")
    'NPS 1-1/2 (DN 40)'
    """
    std = STANDARDS[standard]
    if std.sizing == "NPS":
        nps = _nps_value(nominal)
        dn = pipes.dn_label(nps) if nps is not None else None
        return f"NPS {nominal} ({dn})" if dn else f"NPS {nominal}"
    return f"{std.sizing} {nominal}"


def schedule_label(standard: str, schedule: str) -> str:
    """Dropdown label of a schedule or class: 'Sch 40', 'SDR 21', 'Medium'.

    >>> schedule_label("asme_b36_10m", "XS")
    'Sch XS'
    """
    return f"{STANDARDS[standard].schedule_word} {schedule}".strip()


def _check_bore(d: float) -> None:
    check_range("pipe inside diameter", d, "m", *DI_RANGE)


def _check_roughness(e: float) -> None:
    check_range("pipe roughness", e, "m", *ROUGHNESS_RANGE, low_inclusive=True)


class PipePicker(Panel):
    """Pick a pipe: catalogue entry or custom bore, material and condition.

    Parameters
    ----------
    pipe : Pipe, optional
        The pipe to show first (default NPS 4 Sch 40, ASME B36.10M, carbon steel, new).
    system : str
        'SI' or 'US' for the displayed dimensions.
    title : str
        Heading shown above the fields ('' for none).

    Attributes
    ----------
    value : Pipe or None
        The picked pipe; None while an input is invalid.
    mode : ipywidgets.ToggleButtons
        'catalogue' or 'custom'.
    standard, nominal, schedule, material, condition : ipywidgets.Dropdown
        Options are (label, key) pairs; ``.value`` is our key.
    bore : QuantityField
        Custom inside diameter (kind 'diameter').
    roughness_override : QuantityField
        Optional custom roughness (kind 'roughness'); empty uses the table.
    info : ipywidgets.HTML
        Bore, wall, OD, area, roughness and sources (CSS ``hl-pipe-info``).
    message : ipywidgets.HTML
        Panel-level error line (CSS ``hl-error``).

    CSS class: ``hl-pipe-picker``.
    """

    css_class = "hl-pipe-picker"

    def __init__(self, pipe: Pipe | None = None, system: str = "SI", title: str = "Pipe"):
        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.mode = widgets.ToggleButtons(options=_MODES, value="catalogue")
        self.mode.add_class("hl-pipe-mode")
        self.standard = widgets.Dropdown(options=[(lbl, key) for key, lbl in pipes.standards()],
                                         value="asme_b36_10m", description="Standard")
        self.nominal = widgets.Dropdown(description="Nominal size")
        self.schedule = widgets.Dropdown(description="Schedule / class")
        for w in (self.standard, self.nominal, self.schedule):
            w.style.description_width = "9em"
            w.layout.width = "30em"
        self.bore = QuantityField("diameter", "Inside diameter", text="100 mm", system=system,
                                  field="pipe inside diameter", validator=_check_bore)
        self.roughness_override = QuantityField(
            "roughness", "Roughness (optional)", system=system, field="pipe roughness",
            optional=True, validator=_check_roughness)
        self.material = widgets.Dropdown(options=[(lbl, key) for key, lbl in materials()],
                                         value="carbon_steel", description="Material")
        self.condition = widgets.ToggleButtons(
            options=[(c, c) for c in CONDITIONS], value="new", description="Condition")
        for w in (self.material, self.condition):
            w.style.description_width = "9em"
        self.material.layout.width = "30em"
        self.catalogue_box = widgets.VBox([self.standard, self.nominal, self.schedule])
        self.custom_box = widgets.VBox([self.bore, self.roughness_override])
        self.info = widgets.HTML("")
        self.info.add_class("hl-pipe-info")
        self.message = error_widget()
        super().__init__([self.heading, self.mode, self.catalogue_box, self.custom_box,
                          self.material, self.condition, self.message, self.info], system=system)
        self.fields = {"bore": self.bore, "roughness": self.roughness_override}
        with self._quiet():
            self._fill_nominal("4")
            self._fill_schedule("40")
            self._fill_materials()
            self._show_mode()
        self._wire()
        if pipe is None:
            self._recompute()
        else:
            self.value = pipe

    # -- wiring: every observer in one place
    def _wire(self) -> None:
        self.mode.observe(self._on_mode, names="value")
        self.standard.observe(self._on_standard, names="value")
        self.nominal.observe(self._on_nominal, names="value")
        for w in (self.schedule, self.material, self.condition):
            w.observe(self._on_change, names="value")
        for f in self.fields.values():
            f.observe(self._on_change, names=["value", "valid"])

    def _on_mode(self, change) -> None:
        self._show_mode()
        with self._quiet():
            self._fill_materials()
        self._on_change(change)

    def _on_standard(self, change) -> None:
        if self._busy:
            return
        with self._quiet():
            self._fill_nominal(self.nominal.value)
            self._fill_schedule(self.schedule.value)
            self._fill_materials()
        self._recompute()

    def _fill_materials(self, show_given: bool = False) -> None:
        std = self.standard.value if self.mode.value == "catalogue" else None
        fill_materials(self.material, std, self.material.value, show_given)

    def _on_nominal(self, change) -> None:
        if self._busy:
            return
        with self._quiet():
            self._fill_schedule(self.schedule.value)
        self._recompute()

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    # -- cascading options
    def _fill_nominal(self, keep: str | None) -> None:
        std = self.standard.value
        sizes = pipes.nominal_sizes(std)
        self.nominal.options = [(nominal_label(std, n), n) for n in sizes]
        if keep in sizes:
            self.nominal.value = keep
        else:
            self.nominal.value = sizes[len(sizes) // 2]

    def _fill_schedule(self, keep: str | None) -> None:
        std = self.standard.value
        scheds = pipes.schedules(std, self.nominal.value)
        self.schedule.options = [(schedule_label(std, s), s) for s in scheds]
        if keep in scheds:
            self.schedule.value = keep
        else:
            self.schedule.value = "40" if "40" in scheds else scheds[0]

    def _show_mode(self) -> None:
        custom = self.mode.value == "custom"
        self.catalogue_box.layout.display = "" if not custom else "none"
        self.custom_box.layout.display = "" if custom else "none"

    # -- widgets -> Pipe
    def _read(self) -> Pipe:
        if self.mode.value == "catalogue":
            return pipes.catalogue_pipe(self.standard.value, self.nominal.value,
                                        self.schedule.value, self.material.value,
                                        self.condition.value)
        if not self.bore.valid or self.bore.value is None:
            raise _FieldInvalid(self.bore.error or "inside diameter is required")
        if not self.roughness_override.valid:
            raise _FieldInvalid(self.roughness_override.error)
        return pipes.custom_pipe(self.bore.value, self.material.value, self.condition.value,
                                 roughness=self.roughness_override.value)

    def _recompute(self) -> None:
        self.message.value = ""
        try:
            pipe = self._read()
        except _FieldInvalid as exc:
            self._set_valid(False, str(exc))
            self._store(None)
            self._render_info()
            return
        except KIT_ERRORS as exc:
            self.message.value = error_html(str(exc))
            self._set_valid(False, str(exc))
            self._store(None)
            self._render_info()
            return
        self._set_valid(True, "")
        self._store(pipe)
        self._render_info()

    # -- Pipe -> widgets
    def _show(self, pipe) -> None:
        if pipe is None:
            return
        if not isinstance(pipe, Pipe):
            raise TypeError(f"PipePicker shows a kit.core.pipes.Pipe, not {type(pipe).__name__}")
        self.message.value = ""
        self.condition.value = pipe.condition
        if pipe.standard is not None:
            self.mode.value = "catalogue"
            self.standard.value = pipe.standard
            self._fill_nominal(pipe.nominal)
            self._fill_schedule(pipe.schedule)
        else:
            self.mode.value = "custom"
            self.bore.value = pipe.Di
            self.roughness_override.value = pipe.roughness_override
        std = pipe.standard if pipe.standard is not None else None
        fill_materials(self.material, std, pipe.material, show_given=True)
        self._show_mode()

    def _after_show(self) -> None:
        self._render_info()

    def _render_system(self) -> None:
        for f in self.fields.values():
            f.set_system(self.system)
        self._render_info()

    def _render_info(self) -> None:
        p = self.value
        if p is None:
            self.info.value = '<div class="hl-muted">no pipe: correct the input above</div>'
            return
        s = self.system

        def q(x, kind, digits=4):
            return "—" if x is None else html.escape(units.fmt(x, kind, s, digits=digits))

        src = p.sources
        rows = [
            ("pipe", html.escape(p.label), ""),
            ("inside diameter", q(p.Di, "diameter"), html.escape(src["dimensions"])),
            ("outside diameter", q(p.Do, "diameter"), ""),
            ("wall", q(p.wall, "diameter", 3), ""),
            ("flow area", q(p.area, "area"), ""),
            (f"roughness ({html.escape(p.condition)})", q(p.roughness, "roughness", 3),
             html.escape(src["roughness"])),
        ]
        body = "".join(f"<tr><td>{a}</td><td>{b}</td><td class='hl-source'>{c}</td></tr>"
                       for a, b, c in rows)
        self.info.value = f'<table class="hl-pipe-table">{body}</table>'


#: The materials a catalogue pipe of each standard is made in (common practice, no source):
#: the material dropdown follows the standard (no PVC standard with a stainless material). A
#: standard not listed here offers every material of the roughness table.
STANDARD_MATERIALS = {
    "asme_b36_10m": ("carbon_steel", "galvanised_steel", "stainless_steel"),
    "asme_b36_19m": ("stainless_steel",),
    "astm_d1785": ("pvc",), "astm_d2241": ("pvc",), "astm_d2241_cts": ("pvc",),
    "awwa_c900": ("pvc",), "awwa_c905": ("pvc",), "awwa_c905_ips": ("pvc",),
    "astm_f441": ("pvc",),
    "astm_f2619": ("hdpe",),
    "bs_1387": ("carbon_steel", "galvanised_steel"),
}


def materials_for(standard: str | None) -> list[tuple[str, str]]:
    """``(label, key)`` options of the material dropdown for a pipe standard (None: a custom
    bore, every material).

    >>> [k for _l, k in materials_for("astm_d1785")]
    ['pvc']
    """
    allowed = STANDARD_MATERIALS.get(standard) if standard is not None else None
    return [(lbl, k) for k, lbl in materials() if allowed is None or k in allowed]


def fill_materials(dropdown, standard: str | None, keep: str | None,
                   show_given: bool = False) -> None:
    """Offer the materials of ``standard`` in ``dropdown``, keeping ``keep`` if it is one of
    them (else the first). With ``show_given`` (a pipe shown from a scenario) a material the
    standard does not list is kept and labelled so, never changed silently."""
    options = materials_for(standard)
    keys = [k for _l, k in options]
    if show_given and keep is not None and keep not in keys:
        label = dict((k, lbl) for k, lbl in materials()).get(keep, keep)
        options = [*options, (f"{label} (not usual for this standard)", keep)]
        keys.append(keep)
    if tuple(tuple(o) for o in dropdown.options) != tuple(options):
        dropdown.options = options
    dropdown.value = keep if keep in keys else keys[0]


class _FieldInvalid(Exception):
    """Internal: a sub-field shows its own error; the panel value is None."""
