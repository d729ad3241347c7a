"""TankPicker: a tank's shape, heads and size, its levels, surface and vent, with a sketch.

The panel builds a :class:`kit.core.tank.Tank` — a vertical or horizontal cylinder with
heads, a sphere, or a strapping table — and holds it with the drain's level data in a
:class:`TankSetup`: start and target level, levels of interest, the surface condition
(vented, padded or under vacuum, with its pressure) and the vent for the air-inflow check.

Beside the fields a **sketch** is drawn as inline SVG from the tank's own geometry: for a
vertical tank or a sphere the half-width at each level is sqrt(A(h)/π) from the exact
surface area :meth:`kit.core.tank.Tank.area` (the outline of the body of revolution); a
horizontal tank is drawn from the side, each head's profile taken from the same tank
stood upright; a strapping table is drawn as the round tank of the same surface area at
each level. The liquid is shown at the start level, the target as a dashed line, the levels
of interest dotted, and the outlet where :meth:`TankPicker.set_outlet` puts it. The sketch
is our own plain drawing, redrawn in the same widget on every change.

Levels are on the tank's level datum: its lowest inside point (a strapping table's own
datum). Levels of interest are typed one a line as ``level[, label]`` ("350 mm, low-level
switch"); a strapping table one row a line as ``level, volume`` ("1.2 m, 3.4 m3").

Example
-------
>>> p = TankPicker()
>>> s = p.value
>>> s.tank.shape, round(s.tank.V_total, 3), s.start, s.target
('cylinder', 6.283, 1.8, 0.1)
>>> p.diameter.set_text("1 m")
>>> round(p.value.tank.V_total, 4)
1.5708
>>> "<svg" in p.sketch.value
True
"""

from __future__ import annotations

import html
import itertools
import math
from dataclasses import dataclass

import ipywidgets as widgets
import numpy as np
import traitlets

from kit import units
from kit.core import tank as core_tank
from kit.core.drain import Vent
from kit.core.tank import HEAD_KINDS, TORISPHERICAL_STANDARDS, Head, Tank
from kit.errors import InputError, check_range
from kit.panels.base import (
    KIT_ERRORS,
    InvalidInput,
    Panel,
    display_message,
    error_html,
    error_widget,
    field_value,
    locate_field,
)
from kit.panels.fields import QuantityField, text_for

__all__ = ["TankPicker", "TankSetup", "OutletMark", "SHAPE_LABELS", "SURFACE_LABELS",
           "tank_sketch_svg", "parse_levels", "parse_table"]

#: Shapes offered: key -> label (keys as in the scenario, kit.studies.tank_drainage).
SHAPE_LABELS = {
    "vertical_cylinder": "vertical cylinder",
    "horizontal_cylinder": "horizontal cylinder",
    "sphere": "sphere",
    "strapping_table": "strapping table (level against volume)",
}
#: Surface conditions: key -> label.
SURFACE_LABELS = {"vented": "vented (atmospheric)", "padded": "padded (gas blanket)",
                  "vacuum": "under vacuum"}
_HEAD_LABELS = {"flat": "flat", "conical": "conical", "ellipsoidal": "ellipsoidal",
                "torispherical": "torispherical (dished)", "spherical": "spherical cap"}
_CUSTOM = "custom"
_clip_ids = itertools.count(1)


@dataclass(frozen=True)
class TankSetup:
    """A tank and the level data of its drain.

    Attributes
    ----------
    tank : Tank
    start, target : float
        Start and target level on the tank's datum [m].
    levels : tuple of (str, float)
        Levels of interest: (label, level [m]).
    surface : str
        'vented', 'padded' or 'vacuum'.
    p_surface : float or None
        Absolute surface pressure [Pa] of a padded or vacuum tank (None when vented).
    vent : Vent or None
        The vent for the air-inflow check (None: not checked).
    """

    tank: Tank
    start: float
    target: float
    levels: tuple = ()
    surface: str = "vented"
    p_surface: float | None = None
    vent: Vent | None = None


@dataclass(frozen=True)
class OutletMark:
    """Where the sketch marks the outlet: ``kind`` 'orifice' or 'line', elevation on the tank
    datum [m], bore [m] and a label."""

    kind: str
    elevation: float
    diameter: float
    label: str = ""


# ------------------------------------------------------------------------- text parsing

def parse_levels(text: str, field: str = "levels of interest", exact: dict | None = None):
    """Levels of interest from text, one ``level[, label]`` a line; blank lines skipped.

    A line without a label is labelled with its level as typed. ``exact`` maps level text
    the panel wrote to the exact SI value it stands for.

    >>> [(label, round(z, 9)) for label, z in parse_levels("1.5 m\\n350 mm, low-level switch")]
    [('1.5 m', 1.5), ('low-level switch', 0.35)]
    """
    out = []
    for i, raw in enumerate(text.splitlines()):
        line = raw.strip()
        if not line:
            continue
        level_text, _, label = (part.strip() for part in line.partition(","))
        if exact and level_text in exact:
            z = exact[level_text]
        else:
            z = units.parse(level_text, "elevation", f"{field}, line {i + 1}")
        out.append((label or level_text, float(z)))
    return tuple(out)


def parse_table(text: str, field: str = "strapping table"):
    """Strapping-table rows from text, one ``level, volume`` a line: (levels [m], volumes [m³]).

    >>> levels, volumes = parse_table("0 m, 0 m3\\n2 m, 6000 L")
    >>> levels, [round(v, 9) for v in volumes]
    ((0.0, 2.0), [0.0, 6.0])
    """
    levels, volumes = [], []
    for i, raw in enumerate(text.splitlines()):
        line = raw.strip()
        if not line:
            continue
        parts = [p.strip() for p in line.split(",")]
        if len(parts) != 2:
            raise InputError(f"{field}, line {i + 1}", line, "must be 'level, volume' "
                             "(two values with units, e.g. '1.2 m, 3.4 m3')")
        levels.append(units.parse(parts[0], "elevation", f"{field} level, line {i + 1}"))
        volumes.append(units.parse(parts[1], "volume", f"{field} volume, line {i + 1}"))
    return tuple(levels), tuple(volumes)


def _levels_text(levels, system: str) -> tuple[str, dict]:
    lines, exact = [], {}
    for label, z in levels:
        try:
            same = abs(units.parse(label, "elevation", "label") - z) <= 1e-9
        except KIT_ERRORS:
            same = False
        if same:
            lines.append(label)
            exact[label] = z
        else:
            t = _short_text(z, "elevation", system)
            lines.append(f"{t}, {label}")
            exact[t] = z
    return "\n".join(lines), exact


def _short_text(x: float, kind: str, system: str) -> str:
    """The shortest text (3 to 7 significant figures) that reads back as ``x``."""
    for digits in (3, 4, 5, 6):
        t = text_for(x, kind, system, digits)
        try:
            if abs(units.parse(t, kind, "text") - x) <= 1e-9 * max(abs(x), 1e-3):
                return t
        except KIT_ERRORS:
            break
    return text_for(x, kind, system, 7)


def _table_text(tank: Tank, system: str) -> str:
    return "\n".join(f"{_short_text(h, 'elevation', system)}, {_short_text(v, 'volume', system)}"
                      for h, v in zip(tank.levels, tank.volumes, strict=True))


# ------------------------------------------------------------------------------ the sketch

def _profile(tank: Tank, n: int = 121) -> tuple[np.ndarray, np.ndarray]:
    """Levels [m] and half-widths [m] of the upright body (sqrt(A/π))."""
    h = np.linspace(tank.h_min, tank.h_max, n)
    if tank.shape == "table":
        h = np.unique(np.concatenate([h, tank.levels]))
    r = np.sqrt(np.asarray(tank.area(h), dtype=float) / math.pi)
    return h, r


def _head_profile(D: float, head: Head, n: int = 41):
    """(protrusion beyond the tangent line [m], radius [m]) from the tip to the tangent."""
    a = head.depth_for(D)
    if a <= 0:
        return np.array([0.0, 0.0]), np.array([0.0, D / 2])
    upright = core_tank.vertical_cylinder(D, D, head, "flat")
    z = np.linspace(0.0, a, n)
    r = np.sqrt(np.asarray(upright.area(z), dtype=float) / math.pi)
    r[-1] = D / 2
    return a - z, r


def _outline(tank: Tank):
    """Polygon (x, y) [m] of the sketch outline, y = level on the tank datum; and the tank's
    x extent."""
    if tank.shape == "cylinder" and tank.orientation == "horizontal":
        R = tank.D / 2
        p1, r1 = _head_profile(tank.D, tank.head1)
        p2, r2 = _head_profile(tank.D, tank.head2)
        top_x = np.concatenate([-p1, tank.L + p2[::-1]])
        top_r = np.concatenate([r1, r2[::-1]])
        x = np.concatenate([top_x, top_x[::-1]])
        y = np.concatenate([R + top_r, R - top_r[::-1]])
        return x, y
    h, r = _profile(tank)
    x = np.concatenate([r, -r[::-1]])
    y = np.concatenate([h, h[::-1]])
    return x, y


def tank_sketch_svg(tank: Tank, start: float | None = None, target: float | None = None,
                    levels=(), outlet: OutletMark | None = None, system: str = "SI",
                    width: int = 420, height: int = 360) -> str:
    """An SVG sketch of ``tank`` with its liquid at ``start``, the ``target`` dashed, the
    ``levels`` (label, level) dotted and the ``outlet`` marked; lengths in ``system``.

    >>> svg = tank_sketch_svg(core_tank.vertical_cylinder(2.0, 3.0), 2.5, 0.2)
    >>> svg.startswith("<svg") and "stroke-dasharray" in svg
    True
    """
    x, y = _outline(tank)
    x0, x1 = float(x.min()), float(x.max())
    y0, y1 = float(y.min()), float(y.max())
    left, right, top, bottom = 58, 180, 34, 46
    s = min((width - left - right) / max(x1 - x0, 1e-9),
            (height - top - bottom) / max(y1 - y0, 1e-9))
    ox = left + 0.5 * ((width - left - right) - s * (x1 - x0)) - s * x0
    oy = height - bottom + s * y0

    def X(v):
        return ox + s * v

    def Y(v):
        return oy - s * v

    def fmt(v):
        return html.escape(units.fmt(v, "elevation", system))

    pts = " ".join(f"{X(a):.1f},{Y(b):.1f}" for a, b in zip(x, y, strict=True))
    cid = f"hl-tank-clip-{next(_clip_ids)}"
    xl, xr = X(x0), X(x1)
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" class="hl-tank-svg" font-family="sans-serif" '
           'font-size="11">',
           f'<defs><clipPath id="{cid}"><polygon points="{pts}"/></clipPath></defs>',
           f'<text x="{width / 2:.0f}" y="16" text-anchor="middle" font-weight="bold">'
           f"{html.escape(tank.name)}</text>"]
    if start is not None:
        ys = Y(start)
        out.append(f'<rect class="hl-liquid" x="{xl - 2:.1f}" y="{ys:.1f}" '
                   f'width="{xr - xl + 4:.1f}" height="{max(Y(y0) - ys, 0) + 2:.1f}" '
                   f'fill="#a9d3ee" clip-path="url(#{cid})"/>')
    out.append(f'<polygon points="{pts}" fill="none" stroke="#333" stroke-width="2"/>')
    if tank.shape == "cylinder" and tank.orientation == "horizontal":
        for xt in (0.0, tank.L):   # tangent lines
            out.append(f'<line x1="{X(xt):.1f}" y1="{Y(y0):.1f}" x2="{X(xt):.1f}" '
                       f'y2="{Y(y1):.1f}" stroke="#999" stroke-width="0.8"/>')

    marks = []   # (z, text, dash, colour, weight)
    for label, z in levels:
        short = label if len(label) <= 20 else label[:19] + "…"
        try:
            same = abs(units.parse(label, "elevation", "label") - z) <= 1e-9
        except KIT_ERRORS:
            same = False
        text = units.fmt(z, "elevation", system) if same else \
            f"{short} {units.fmt(z, 'elevation', system)}"
        marks.append((z, text, "2,3", "#555", 0.9))
    if target is not None:
        marks.append((target, f"target {units.fmt(target, 'elevation', system)}", "7,4",
                      "#c0392b", 1.6))
    if start is not None:
        marks.append((start, f"start {units.fmt(start, 'elevation', system)}", "", "#1f5fa8",
                      1.6))
    marks.sort(key=lambda m: -m[0])    # top of the drawing first
    last = -1e9
    for z, text, dash, colour, weight in marks:
        yz = Y(z)
        yt = max(yz + 4, last + 12)    # labels kept 12 px apart
        last = yt
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        out.append(f'<line x1="{xl - 8:.1f}" y1="{yz:.1f}" x2="{xr + 8:.1f}" y2="{yz:.1f}" '
                   f'stroke="{colour}" stroke-width="{weight}"{dash_attr}/>'
                   f'<text x="{xr + 12:.1f}" y="{yt:.1f}" fill="{colour}">'
                   f"{html.escape(text)}</text>")
    if outlet is not None:
        out.append(_outlet_svg(tank, outlet, X, Y, s, system))
    # dimensions
    out.append(f'<line x1="{left - 22}" y1="{Y(y0):.1f}" x2="{left - 22}" y2="{Y(y1):.1f}" '
               'stroke="#777" stroke-width="0.8"/>')
    out.append(f'<text x="{left - 26}" y="{(Y(y0) + Y(y1)) / 2:.1f}" text-anchor="middle" '
               f'transform="rotate(-90 {left - 26} {(Y(y0) + Y(y1)) / 2:.1f})" fill="#555">'
               f"height {fmt(tank.h_max - tank.h_min)}</text>")
    if tank.shape == "table":
        dim = "strapping table: drawn as the round tank of the same area"
    elif tank.shape == "sphere":
        dim = f"D {fmt(tank.D)}"
    else:
        dim = f"D {fmt(tank.D)}, straight length {fmt(tank.L)}"
    out.append(f'<text x="{(xl + xr) / 2:.1f}" y="{height - 10}" text-anchor="middle" '
               f'fill="#555">{html.escape(dim) if tank.shape == "table" else dim}</text>')
    out.append("</svg>")
    return "".join(out)


def _outlet_svg(tank: Tank, mark: OutletMark, X, Y, s, system: str) -> str:
    colour = "#1f5fa8"
    w = max(mark.diameter * s, 4.0)
    z = mark.elevation
    horizontal = tank.shape == "cylinder" and tank.orientation == "horizontal"
    label = html.escape(mark.label or mark.kind)
    if z <= tank.h_min + 1e-9:
        cx = X(tank.L / 2) if horizontal else X(0.0)
        yb = Y(tank.h_min)
        return (f'<rect class="hl-outlet" x="{cx - w / 2:.1f}" y="{yb:.1f}" width="{w:.1f}" '
                f'height="22" fill="{colour}"/>'
                f'<text x="{cx + w / 2 + 4:.1f}" y="{yb + 18:.1f}" fill="{colour}">{label}</text>')
    # a side nozzle at elevation z on the right wall
    if horizontal:
        R = tank.D / 2
        xw = tank.L + _head_depth_at(tank.D, tank.head2, abs(z - R))
    else:
        xw = float(np.sqrt(tank.area(min(z, tank.h_max)) / math.pi))
    xa, yz = X(xw), Y(z)
    return (f'<rect class="hl-outlet" x="{xa:.1f}" y="{yz - w / 2:.1f}" width="24" '
            f'height="{w:.1f}" fill="{colour}"/>'
            f'<text x="{xa + 4:.1f}" y="{yz + w / 2 + 12:.1f}" fill="{colour}">{label}</text>')


def _head_depth_at(D: float, head: Head, y: float) -> float:
    """Protrusion of a head [m] at distance ``y`` [m] from the axis (for the outlet mark)."""
    p, r = _head_profile(D, head)
    return float(np.interp(min(y, D / 2), r, p)) if r[-1] > r[0] else 0.0


# --------------------------------------------------------------------------------- heads

class _HeadRow(widgets.HBox):
    """One head: kind, depth or depth ratio a/D, torispherical standard."""

    def __init__(self, label: str, css: str, system: str):
        self.title = widgets.Label(label, layout=widgets.Layout(min_width="9em"))
        self.kind = widgets.Dropdown(options=[(_HEAD_LABELS[k], k) for k in HEAD_KINDS],
                                     value="flat", layout=widgets.Layout(width="14em"))
        self.kind.add_class("hl-head-kind")
        self.depth = QuantityField("length", "depth", system=system, optional=True,
                                   field=f"{label} depth", width="7em")
        self.ratio = QuantityField("dimensionless", "or a/D", system=system, optional=True,
                                   field=f"{label} depth ratio a/D", width="5em")
        for f in (self.depth, self.ratio):
            f.label.layout.min_width = "3.5em"
        self.standard = widgets.Dropdown(options=[(k, k) for k in TORISPHERICAL_STANDARDS],
                                         value="ASME F&D", layout=widgets.Layout(width="13em"))
        self.standard.add_class("hl-head-standard")
        self.custom_fk: tuple[float, float] | None = None
        super().__init__([self.title, self.kind, self.depth, self.ratio, self.standard])
        self.add_class("hl-head")
        self.add_class(css)
        self.show_kind()

    def show_kind(self) -> None:
        kind = self.kind.value
        sized = kind in ("conical", "ellipsoidal", "spherical")
        self.depth.layout.display = "" if sized else "none"
        self.ratio.layout.display = "" if sized else "none"
        self.standard.layout.display = "" if kind == "torispherical" else "none"

    def read(self) -> Head:
        kind = self.kind.value
        if kind == "torispherical":
            if self.standard.value == _CUSTOM:
                f, k = self.custom_fk
            else:
                f, k = TORISPHERICAL_STANDARDS[self.standard.value]
            return Head(kind, f=f, k=k)
        if kind == "flat":
            return Head("flat")
        for fld in (self.depth, self.ratio):
            if not fld.valid:
                raise InvalidInput(fld.error)
        return Head(kind, self.depth.value, self.ratio.value)

    def show(self, head: Head) -> None:
        self.kind.value = head.kind
        self.depth.value = head.depth
        self.ratio.value = head.ratio
        if head.kind == "torispherical":
            key = next((k for k, fk in TORISPHERICAL_STANDARDS.items()
                        if fk == (head.f, head.k)), None)
            if key is None:
                self.custom_fk = (head.f, head.k)
                opts = [(k, k) for k in TORISPHERICAL_STANDARDS]
                opts.append((f"f = {head.f:g}, k = {head.k:g}", _CUSTOM))
                self.standard.options = opts
                key = _CUSTOM
            self.standard.value = key
        self.show_kind()

    def set_system(self, system: str) -> None:
        self.depth.set_system(system)
        self.ratio.set_system(system)


# --------------------------------------------------------------------------------- panel

class TankPicker(Panel):
    """Pick a tank (shape, heads, size), its levels, surface condition and vent.

    Parameters
    ----------
    setup : TankSetup, optional
        What to show first (default: a flat-ended vertical cylinder D 2 m × 2 m from 1.8 m
        to 0.1 m, vented).
    system : str
        'SI' or 'US'.
    p_baro : float
        Barometric pressure [Pa] for the gauge surface pressure.
    title : str

    Attributes
    ----------
    value : TankSetup or None
        None while an input is invalid (the message shows beside the field or in
        ``message``).
    name : ipywidgets.Text
    shape : ipywidgets.Dropdown
        Keys of :data:`SHAPE_LABELS`.
    diameter, length, start, target, surface_pressure, vent_diameter, vent_cd,
    allowable_vacuum : QuantityField
    bottom, top : head rows (``kind``, ``depth``, ``ratio``, ``standard``)
        A horizontal tank takes ``bottom`` for both ends.
    table : ipywidgets.Textarea
        Strapping table, ``level, volume`` a line.
    levels : ipywidgets.Textarea
        Levels of interest, ``level[, label]`` a line.
    surface : ipywidgets.ToggleButtons
        Keys of :data:`SURFACE_LABELS`.
    sketch : ipywidgets.HTML
        The SVG sketch (CSS ``hl-tank-sketch``).
    info : ipywidgets.HTML
        Volumes and height (CSS ``hl-tank-info``).
    message : ipywidgets.HTML
        Panel-level error (CSS ``hl-error``).

    CSS class: ``hl-tank-picker``; fields ``hl-tank-diameter``, ``hl-tank-length``,
    ``hl-level-start``, ``hl-level-target``, ``hl-levels-interest``, ``hl-tank-table``,
    ``hl-surface``, ``hl-surface-pressure``, ``hl-vent-diameter``; head rows ``hl-head-bottom``
    and ``hl-head-top``.
    """

    css_class = "hl-tank-picker"

    def __init__(self, setup: TankSetup | None = None, system: str = "SI",
                 p_baro: float = 101325.0, title: str = "Tank"):
        self.p_baro = float(p_baro)
        self.outlet: OutletMark | None = None
        self._level_exact: dict = {}
        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.name = widgets.Text(value="tank", description="tag / name")
        self.shape = widgets.Dropdown(options=[(v, k) for k, v in SHAPE_LABELS.items()],
                                      value="vertical_cylinder", description="shape")
        for w in (self.name, self.shape):
            w.style.description_width = "9em"
            w.layout.width = "30em"
        self.shape.add_class("hl-tank-shape")

        def qf(kind, label, css, **kw):
            f = QuantityField(kind, label, system=system, **kw)
            f.add_class(css)
            return f

        self.diameter = qf("diameter", "inside diameter", "hl-tank-diameter", text="2 m")
        self.length = qf("length", "straight length", "hl-tank-length", text="2 m",
                         field="straight length (tangent to tangent)")
        self.bottom = _HeadRow("bottom head", "hl-head-bottom", system)
        self.top = _HeadRow("top head", "hl-head-top", system)
        self.table = widgets.Textarea(value="", rows=6, placeholder="level, volume  (one row a "
                                      "line, e.g. 1.2 m, 3.4 m3)",
                                      layout=widgets.Layout(width="30em"))
        self.table.add_class("hl-tank-table")
        self.table_box = widgets.VBox([widgets.Label("strapping table: level, volume"),
                                       self.table])
        self.start = qf("elevation", "start level", "hl-level-start", text="1.8 m")
        self.target = qf("elevation", "target level", "hl-level-target", text="0.1 m")
        self.levels = widgets.Textarea(value="", rows=3, placeholder="level[, label] — one a "
                                       "line, e.g. 350 mm, low-level switch",
                                       layout=widgets.Layout(width="30em"))
        self.levels.add_class("hl-levels-interest")
        self.surface = widgets.ToggleButtons(
            options=[(v, k) for k, v in SURFACE_LABELS.items()], value="vented")
        self.surface.add_class("hl-surface")
        self.surface.style.button_width = "12em"
        self.surface_pressure = qf("pressure", "surface pressure", "hl-surface-pressure",
                                   text="0 kPa(g)", gauge=True, p_baro=self.p_baro)
        self.vent_diameter = qf("diameter", "vent bore", "hl-vent-diameter", optional=True,
                                field="vent diameter")
        self.vent_cd = qf("dimensionless", "vent Cd", "hl-vent-cd", text="0.61",
                          field="vent discharge coefficient Cd")
        self.allowable_vacuum = qf("pressure_difference", "allowable vacuum",
                                   "hl-vent-vacuum", text="0.25 kPa")
        self.vent_note = widgets.HTML("")
        self.vent_note.add_class("hl-vent-note")
        self.sketch = widgets.HTML("")
        self.sketch.add_class("hl-tank-sketch")
        self.info = widgets.HTML("")
        self.info.add_class("hl-tank-info")
        self.message = error_widget()
        self.levels_message = error_widget()
        self.levels_message.add_class("hl-levels-message")
        self.geometry_box = widgets.VBox([self.diameter, self.length, self.bottom, self.top])
        fields = widgets.VBox([
            self.heading, self.name, self.shape, self.geometry_box, self.table_box,
            widgets.HTML("<b>Levels</b> <span class='hl-note'>(on the tank's datum: its lowest "
                         "inside point)</span>"),
            self.start, self.target, widgets.Label("levels of interest"), self.levels,
            self.levels_message,
            widgets.HTML("<b>Surface and vent</b>"), self.surface, self.surface_pressure,
            self.vent_diameter, self.vent_cd, self.allowable_vacuum, self.vent_note,
            self.message])
        fields.layout.width = "62%"
        right = widgets.VBox([self.sketch, self.info])
        super().__init__([widgets.HBox([fields, right])], system=system)
        self.quantity_fields = (self.diameter, self.length, self.start, self.target,
                                self.surface_pressure, self.vent_diameter, self.vent_cd,
                                self.allowable_vacuum)
        self._refused: list = []
        self._show_shape()
        self._wire()
        if setup is None:
            self._recompute()
        else:
            self.value = setup

    # -- wiring: every observer in one place
    def _wire(self) -> None:
        for w in (self.name, self.table, self.levels):
            w.observe(self._on_change, names="value")
        self.shape.observe(self._on_shape, names="value")
        self.surface.observe(self._on_shape, names="value")
        for row in (self.bottom, self.top):
            row.kind.observe(lambda ch, r=row: self._on_kind(r), names="value")
            row.standard.observe(self._on_change, names="value")
            for f in (row.depth, row.ratio):
                f.observe(self._on_change, names=["value", "valid"])
        for f in self.quantity_fields:
            f.observe(self._on_change, names=["value", "valid"])

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    def _on_shape(self, change) -> None:
        if self._busy:
            return
        self._show_shape()
        self._recompute()

    def _on_kind(self, row) -> None:
        row.show_kind()
        self._on_change(None)

    def _show_shape(self) -> None:
        shape = self.shape.value
        table = shape == "strapping_table"
        self.geometry_box.layout.display = "none" if table else ""
        self.table_box.layout.display = "" if table else "none"
        self.length.layout.display = "" if shape in ("vertical_cylinder",
                                                     "horizontal_cylinder") else "none"
        cyl = shape in ("vertical_cylinder", "horizontal_cylinder")
        self.bottom.layout.display = "" if cyl else "none"
        self.top.layout.display = "" if shape == "vertical_cylinder" else "none"
        self.bottom.title.value = "heads (both ends)" if shape == "horizontal_cylinder" \
            else "bottom head"
        self.surface_pressure.layout.display = "none" if self.surface.value == "vented" else ""

    # -- widgets -> TankSetup
    def _read_tank(self) -> Tank:
        shape, name = self.shape.value, self.name.value.strip() or "tank"
        if shape == "strapping_table":
            levels, volumes = parse_table(self.table.value)
            return core_tank.strapping_table(levels, volumes, name=name)
        D = field_value(self.diameter)
        if shape == "sphere":
            return core_tank.sphere(D, name=name)
        L = field_value(self.length)
        if shape == "horizontal_cylinder":
            return core_tank.horizontal_cylinder(D, L, self.bottom.read(), name=name)
        return core_tank.vertical_cylinder(D, L, self.bottom.read(), self.top.read(), name=name)

    def _read(self) -> TankSetup:
        tank = self._read_tank()
        start = field_value(self.start)
        target = field_value(self.target)
        check_range(f"start level in '{tank.name}'", start, "m", low=tank.h_min,
                    high=tank.h_max, low_inclusive=True)
        check_range("target level", target, "m", low=tank.h_min, high=start,
                    low_inclusive=True, high_inclusive=False)
        levels = parse_levels(self.levels.value, exact=self._level_exact)
        for label, z in levels:
            check_range(f"level of interest '{label}'", z, "m", low=target, high=start,
                        low_inclusive=True)
        surface = self.surface.value
        p_s = None if surface == "vented" else field_value(self.surface_pressure)
        if surface == "padded":
            check_range("padded surface pressure", p_s, "Pa", low=self.p_baro, high=1e8)
        elif surface == "vacuum":
            check_range("vacuum surface pressure", p_s, "Pa", low=0.0, high=self.p_baro,
                        high_inclusive=False)
        d_vent = field_value(self.vent_diameter, required=False)
        vent = None
        if d_vent is not None:
            vent = Vent(d_vent, field_value(self.vent_cd), field_value(self.allowable_vacuum))
        return TankSetup(tank, start, target, levels, surface, p_s, vent)

    def _recompute(self) -> None:
        self.message.value = ""
        for f in self._refused:
            if hasattr(f, "unrefuse"):
                f.unrefuse()
            else:
                f.remove_class("hl-field-error")
                self.levels_message.value = ""
        self._refused = []
        try:
            setup = self._read()
        except InvalidInput as exc:
            self._set_valid(False, str(exc))
            self._store(None)
            self._render()
            return
        except KIT_ERRORS as exc:
            # a check across inputs (a start level above the top, a target above the start):
            # shown beside the field it names, in its display units
            field = locate_field(self.quantity_fields, exc)
            if field is not None:
                field.refuse(field.explain_any(exc))
                self._refused.append(field)
            elif str(getattr(exc, "field", "")).startswith("level of interest"):
                self.levels_message.value = error_html(
                    display_message(exc, self.system, "elevation"))
                self.levels.add_class("hl-field-error")
                self._refused.append(self.levels)
            else:
                self.message.value = error_html(str(exc))
            self._set_valid(False, str(exc))
            self._store(None)
            self._render()
            return
        self._set_valid(True, "")
        self._store(setup)
        self._render()

    # -- TankSetup -> widgets
    def _show(self, setup) -> None:
        if setup is None:
            return
        if not isinstance(setup, TankSetup):
            raise TypeError(f"TankPicker shows a TankSetup, not {type(setup).__name__}")
        t = setup.tank
        self.message.value = ""
        self.name.value = t.name
        if t.shape == "table":
            self.shape.value = "strapping_table"
            self.table.value = _table_text(t, self.system)
        elif t.shape == "sphere":
            self.shape.value = "sphere"
            self.diameter.value = t.D
        else:
            self.shape.value = f"{t.orientation}_cylinder"
            self.diameter.value = t.D
            self.length.value = t.L
            self.bottom.show(t.head1)
            self.top.show(t.head2)
        self.start.value = setup.start
        self.target.value = setup.target
        self.levels.value, self._level_exact = _levels_text(setup.levels, self.system)
        self.surface.value = setup.surface
        if setup.p_surface is not None:
            self.surface_pressure.value = setup.p_surface
        v = setup.vent
        self.vent_diameter.value = None if v is None else v.diameter
        if v is not None:
            self.vent_cd.value = v.Cd
            self.allowable_vacuum.value = v.allowable_vacuum
        self._show_shape()

    @traitlets.validate("value")
    def _coerce(self, proposal):
        return proposal["value"]

    def _after_show(self) -> None:
        self._render()

    # -- outlet mark and display
    def set_outlet(self, mark: OutletMark | None) -> None:
        """Mark the outlet on the sketch (None: no mark)."""
        self.outlet = mark
        self._render()

    def _render_system(self) -> None:
        for f in (*self.quantity_fields, self.bottom, self.top):
            f.set_system(self.system)
        self._render()

    def _render_vent_note(self) -> None:
        """What the vent check does with the bore given (or that none is given)."""
        d = self.vent_diameter.value if self.vent_diameter.valid else None
        if d is None:
            text = ("empty vent bore: vent capacity not checked; the tank's own vacuum "
                    "rating governs")
        else:
            sys_ = self.system
            vac = self.allowable_vacuum.value
            cd = self.vent_cd.value
            text = (f"vent bore {units.fmt(d, 'diameter', sys_, digits=3)}"
                    + (f", Cd {cd:g}" if cd is not None else "")
                    + ": the pressure drop of the air drawn in at the peak drain rate is "
                    "checked against the allowable vacuum"
                    + (f" {units.fmt(vac, 'pressure_difference', sys_, digits=2)}"
                       if vac is not None else ""))
        self.vent_note.value = f'<span class="hl-note">{html.escape(text)}</span>'

    def _render(self) -> None:
        self._render_vent_note()
        s = self.value
        if s is None:
            try:
                tank = self._read_tank()
            except (InvalidInput, *KIT_ERRORS):
                self.sketch.value = ('<div class="hl-muted">no sketch: correct the input '
                                     "</div>")
                self.info.value = ""
                return
            self.sketch.value = tank_sketch_svg(tank, system=self.system)
            self.info.value = ""
            return
        t, sys_ = s.tank, self.system
        mark = self.outlet
        if mark is not None and not (t.h_min <= mark.elevation <= t.h_max):
            mark = None
        self.sketch.value = tank_sketch_svg(t, s.start, s.target, s.levels, mark, sys_)
        V0, V1 = t.volume(s.start), t.volume(s.target)
        rows = [("volume when full", units.fmt(t.V_total, "volume", sys_)),
                ("height", units.fmt(t.h_max, "elevation", sys_)),
                ("volume at start", units.fmt(V0, "volume", sys_)),
                ("volume to drain", units.fmt(V0 - V1, "volume", sys_))]
        body = "".join(f"<tr><td>{html.escape(a)}</td><td>{html.escape(b)}</td></tr>"
                       for a, b in rows)
        self.info.value = (f'<table class="hl-tank-table">{body}</table>'
                           f'<div class="hl-note">{html.escape(t.description)}</div>')
