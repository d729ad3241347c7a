"""FluidPicker: liquid family → liquid → concentration → temperature and pressure.

Shows density, viscosity and vapour pressure of the state with the source of each figure
and the temperature range where it holds. A state the model refuses (frozen, boiling,
outside a fit's range, concentration out of range) shows the kit's message beside the
field it concerns, and ``.value`` is None until the input is corrected. Properties come
from :meth:`kit.core.liquids.Liquid.state`.

Example
-------
>>> f = FluidPicker()
>>> sel = f.value
>>> sel.liquid.key, round(sel.state.rho, 1)
('water', 998.2)
>>> f.temperature.set_text("120 degC")
>>> f.value is None, "saturation temperature" in f.temperature.error
(True, True)
"""

from __future__ import annotations

import html
from dataclasses import dataclass

import ipywidgets as widgets

from kit import units
from kit.core import liquids
from kit.core.liquids import FAMILIES, LIQUIDS, P_ATM, Liquid, LiquidState, UserLiquid
from kit.panels.base import KIT_ERRORS, Panel, display_message, error_html, error_widget
from kit.panels.fields import QuantityField

__all__ = ["FluidPicker", "FluidSelection"]

_USER = "user-defined"


@dataclass(frozen=True)
class FluidSelection:
    """A liquid and its state at the picked temperature and pressure.

    Attributes
    ----------
    liquid : Liquid or UserLiquid
    state : LiquidState
        At ``state.T`` [K] and ``state.P`` [Pa abs].
    """

    liquid: Liquid | UserLiquid
    state: LiquidState

    @property
    def T(self) -> float:
        """Temperature [K]."""
        return self.state.T

    @property
    def P(self) -> float:
        """Absolute pressure [Pa]."""
        return self.state.P


def _family_label(family: str) -> str:
    return family[:1].upper() + family[1:]


class FluidPicker(Panel):
    """Pick a liquid and its state.

    Parameters
    ----------
    liquid : Liquid or UserLiquid, optional
        Default water.
    T : float
        Temperature [K] (default 293.15 K).
    P : float
        Absolute pressure [Pa] (default 101325 Pa).
    system : str
        'SI' or 'US'.
    p_baro : float
        Barometric pressure for gauge entries in the pressure field [Pa].
    title : str
        Heading ('' for none).

    Attributes
    ----------
    value : FluidSelection or None
        None while an input is invalid or the state is refused.
    family, liquid : ipywidgets.Dropdown
        (label, key) options; ``liquid.value`` is a key of :data:`kit.core.liquids.LIQUIDS`
        (or 'user' for a user liquid given to the panel).
    concentration, temperature, pressure : QuantityField
        Kinds 'fraction', 'temperature', 'pressure'.
    basis : ipywidgets.HTML
        The concentration basis and range (CSS ``hl-basis``).
    info : ipywidgets.HTML
        Properties with sources (CSS ``hl-fluid-info``).
    message : ipywidgets.HTML
        Panel-level error (CSS ``hl-error``).

    CSS class: ``hl-fluid-picker``.
    """

    css_class = "hl-fluid-picker"

    def __init__(self, liquid: Liquid | UserLiquid | None = None, T: float = 293.15,
                 P: float = P_ATM, system: str = "SI", p_baro: float = P_ATM,
                 title: str = "Liquid"):
        self._user: UserLiquid | None = None
        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.family = widgets.Dropdown(options=[(_family_label(f), f) for f in FAMILIES],
                                       value="water", description="Family")
        self.liquid = widgets.Dropdown(description="Liquid")
        for w in (self.family, self.liquid):
            w.style.description_width = "9em"
            w.layout.width = "30em"
        self.concentration = QuantityField("fraction", "Concentration", text="30 %",
                                           system=system, field="concentration")
        self.basis = widgets.HTML("")
        self.basis.add_class("hl-basis")
        self.conc_box = widgets.HBox([self.concentration, self.basis])
        self.temperature = QuantityField("temperature", "Temperature", value_si=T,
                                         system=system, field="temperature")
        self.pressure = QuantityField("pressure", "Pressure", value_si=P, system=system,
                                      field="pressure", p_baro=p_baro)
        self.info = widgets.HTML("")
        self.info.add_class("hl-fluid-info")
        self.message = error_widget()
        super().__init__([self.heading, self.family, self.liquid, self.conc_box,
                          self.temperature, self.pressure, self.message, self.info],
                         system=system)
        self.fields = {"concentration": self.concentration, "temperature": self.temperature,
                       "pressure": self.pressure}
        with self._quiet():
            self._fill_liquids(None)
            self._show_concentration()
        self._wire()
        if liquid is None:
            self._recompute()
        else:
            self._store_selection(liquid, T, P)

    # -- wiring
    def _wire(self) -> None:
        self.family.observe(self._on_family, names="value")
        self.liquid.observe(self._on_liquid, names="value")
        for f in self.fields.values():
            f.observe(self._on_change, names=["value", "valid"])

    def _on_family(self, change) -> None:
        if self._busy:
            return
        with self._quiet():
            self._fill_liquids(None)
            self._show_concentration()
        self._recompute()

    def _on_liquid(self, change) -> None:
        if self._busy:
            return
        self._show_concentration()
        self._recompute()

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    # -- options
    def _fill_liquids(self, keep: str | None) -> None:
        fam = self.family.value
        if fam == _USER:
            self.liquid.options = [(self._user.name, "user")]
            self.liquid.value = "user"
            return
        keys = liquids.families()[fam]
        self.liquid.options = [(LIQUIDS[k].name, k) for k in keys]
        self.liquid.value = keep if keep in keys else keys[0]

    def _spec(self):
        key = self.liquid.value
        return self._user.spec if key == "user" else LIQUIDS[key]

    def _show_concentration(self) -> None:
        spec = self._spec()
        if spec.needs_concentration:
            lo, hi = spec.concentration_range
            self.basis.value = html.escape(
                f"{spec.basis}, {lo * 100:g} to {hi * 100:g} % (kg solute per kg solution)")
            self.conc_box.layout.display = ""
        else:
            self.basis.value = ""
            self.conc_box.layout.display = "none"

    # -- widgets -> FluidSelection
    def _liquid_obj(self):
        if self.liquid.value == "user":
            return self._user
        spec = LIQUIDS[self.liquid.value]
        x = self.concentration.value if spec.needs_concentration else None
        return liquids.make_liquid(spec.key, x)

    def _recompute(self) -> None:
        self.message.value = ""
        spec = self._spec()
        needed = [self.temperature, self.pressure]
        if spec.needs_concentration:
            needed.insert(0, self.concentration)
        with self._quiet():
            # re-read each box: a message this panel put there (a refused state) clears,
            # a parse error stays
            for f in needed:
                f.clear_error()
        bad = [f for f in needed if not f.valid or f.value is None]
        if bad:
            self._set_valid(False, bad[0].error or f"'{bad[0].field}' is required")
            self._store(None)
            self._render_info()
            return
        try:
            liq = self._liquid_obj()
            state = liq.state(self.temperature.value, self.pressure.value)
        except KIT_ERRORS as exc:
            self._route_error(exc)
            self._store(None)
            self._render_info()
            return
        self._set_valid(True, "")
        self._store(FluidSelection(liq, state))
        self._render_info()

    def _route_error(self, exc) -> None:
        """Show the kit's message beside the field it names (else on the panel)."""
        name = getattr(exc, "field", "")
        target = self.fields.get(name)
        with self._quiet():
            if target is not None:
                # in the field's display unit: °F for a °F field, not K
                message = target.explain_any(exc)
                target.show_error(message)
            else:
                message = display_message(exc, self.system)
                self.message.value = error_html(message)
        self._set_valid(False, message)

    # -- FluidSelection -> widgets
    def _store_selection(self, liquid, T, P) -> None:
        with self._quiet():
            self._show_liquid(liquid)
            self.temperature.value = T
            self.pressure.value = P
        self._recompute()

    def _show_liquid(self, liquid) -> None:
        if isinstance(liquid, UserLiquid):
            self._user = liquid
            if (_family_label(_USER), _USER) not in self.family.options:
                self.family.options = [*self.family.options, (_family_label(_USER), _USER)]
            self.family.value = _USER
            self._fill_liquids("user")
        elif isinstance(liquid, Liquid):
            self.family.value = liquid.spec.family
            self._fill_liquids(liquid.key)
            if liquid.concentration is not None:
                self.concentration.value = liquid.concentration
        else:
            raise TypeError(f"FluidPicker shows a Liquid or UserLiquid, not {type(liquid).__name__}")
        self._show_concentration()

    def _show(self, sel) -> None:
        if sel is None:
            return
        if not isinstance(sel, FluidSelection):
            raise TypeError(f"FluidPicker shows a FluidSelection, not {type(sel).__name__}")
        self.message.value = ""
        self._show_liquid(sel.liquid)
        self.temperature.value = sel.state.T
        self.pressure.value = sel.state.P

    def _after_show(self) -> None:
        self._render_info()

    def set_liquid(self, liquid, T: float | None = None, P: float | None = None) -> None:
        """Show ``liquid`` at ``T`` [K] and ``P`` [Pa abs] (current values where None)."""
        T = self.temperature.value if T is None else T
        P = self.pressure.value if P is None else P
        self._store_selection(liquid, T, P)

    def _render_system(self) -> None:
        for f in self.fields.values():
            f.set_system(self.system)
        self._render_info()

    def _render_info(self) -> None:
        sel = self.value
        if sel is None:
            self.info.value = '<div class="hl-muted">no state: correct the input above</div>'
            return
        s, st, sys_ = sel.state, sel.state, self.system

        def rng(key):
            r = st.ranges.get(key)
            if r is None:
                return ""
            lo = units.fmt(r[0], "temperature", sys_)
            hi = units.fmt(r[1], "temperature", sys_)
            return f"holds {lo} to {hi}"

        pv = "none (no model)" if s.pv is None else units.fmt_pressure(s.pv, sys_, gauge=False)
        rows = [
            ("liquid", st.name, "", ""),
            ("density", units.fmt(s.rho, "density", sys_, digits=5), st.sources.get("rho", ""),
             rng("rho")),
            ("viscosity", units.fmt(s.mu, "viscosity", sys_, digits=4), st.sources.get("mu", ""),
             rng("mu")),
            ("kinematic viscosity", units.fmt(s.nu, "kinematic_viscosity", sys_, digits=4), "", ""),
            ("vapour pressure", pv, st.sources.get("pv", ""), rng("pv")),
        ]
        body = "".join(
            f"<tr><td>{html.escape(a)}</td><td>{html.escape(b)}</td>"
            f"<td class='hl-source'>{html.escape(c)}</td><td>{html.escape(d)}</td></tr>"
            for a, b, c, d in rows)
        flam = ""
        if st.flammable:
            flam = ('<div class="hl-caution">Flammable liquid: hazardous-area classification, '
                    "static control and fire codes apply; local codes and licensed professional "
                    "practice govern.</div>")
        self.info.value = f'<table class="hl-fluid-table">{body}</table>{flam}'
