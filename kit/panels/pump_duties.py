"""The pump set, its staging and its energy, as panels: what the duties study found, shown.

:class:`PumpDutiesView` shows a :class:`kit.studies.pump_duties.DutiesStudy` (nothing here
computes hydraulics: the study does):

- ``composition`` (CSS ``hl-pump-set``): the installed units (duty and standby) and the
  running set at each band condition, with each unit's flow and whether its check valve is
  closed (dead-headed); ``set_chart`` (``hl-set-chart``): each unit's curve, the running
  set's combined curve and the set's operating points (:func:`set_figure`);
- ``chart`` (a :class:`~kit.panels.plot_view.PlotView`, CSS ``hl-staging-chart``): the
  required head along the band condition the energy is priced on, the band of required heads,
  and for each step the running pumps' combined curve at the drive's top speed and at the
  lowest speed of that step; the operating path coloured by pumps running, the stage-up
  points and the load-profile steps;
- ``steps`` (``hl-staging-steps``): the staging steps of every band condition;
- ``energy`` (``hl-energy-table``): energy a year over the load profile per strategy, and
  per step;
- ``checks`` (``hl-duties-checks``): the drive's speed range, minimum flow, recirculation
  orifice and viscosity correction;
- ``viscous_chart`` (``hl-viscous-chart``): each corrected candidate's water curve (dashed)
  against its viscous curve (solid), head and efficiency (:func:`viscous_figure`).

:func:`staging_spec` (and ``set_spec``, ``viscous_spec``) build the charts as plain dicts for
the views; :func:`staging_figure` and the others turn them into static plotly ``Figure``
objects for the record.

Example
-------
>>> from kit.notebook import open_scenario
>>> from kit.studies.pump_selection import study
>>> v = PumpDutiesView(study(open_scenario("wrenfield_duty_standby.toml")).duties)
>>> "every running pump on a drive" in v.energy.value, len(v.plot.data) > 4
(True, True)
"""

from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.panels.charts import axis_title, to_display
from kit.panels.plot_view import PlotView
from kit.panels.pump_profiles import as_figure, scatter, subplot_layout
from kit.panels.tables import Column, results_table_html

__all__ = ["PumpDutiesView", "staging_figure", "viscous_figure", "set_figure",
           "staging_spec", "set_spec", "viscous_spec", "STEP_COLOURS",
           "STRATEGY_LABELS", "STEP_COLUMNS", "ENERGY_COLUMNS", "STRATEGY_COLUMNS"]

#: Our own colours, one per number of pumps running.
STEP_COLOURS = ("#1f4e9c", "#c0392b", "#2f7d32", "#8e44ad", "#d68910", "#17707a")
#: Trade words for the strategies of :data:`kit.core.staging.STRATEGIES`.
STRATEGY_LABELS = {"fixed": "fixed speed, throttled", "one_vfd": "one drive, others fixed",
                   "all_vfd": "every running pump on a drive"}

STEP_COLUMNS = (
    Column("condition", "band condition"), Column("pumps", "pumps running"),
    Column("from_flow", "from flow", "flow"), Column("stage_up_flow", "stage up at", "flow"),
    Column("stage_down_flow", "stage down at", "flow"),
    Column("speed_min", "speed ratio, least"), Column("speed_max", "speed ratio, most"),
    Column("shortfall", "head short"),
)
STRATEGY_COLUMNS = (
    Column("strategy_text", "strategy"), Column("total", "energy a year", "energy", digits=4),
    Column("saving", "saving against fixed speed", "energy", digits=4),
    Column("band_min", "over the band, least", "energy", digits=4),
    Column("band_max", "over the band, most", "energy", digits=4),
)
ENERGY_COLUMNS = (
    Column("strategy", "strategy"), Column("Q", "flow", "flow"), Column("hours", "hours a year"),
    Column("pumps", "pumps running"), Column("speed_pct", "speed [%]"),
    Column("input_power", "power drawn", "power"),
    Column("energy", "energy a year", "energy", digits=4),
)
SET_COLUMNS = (
    Column("condition", "band condition"), Column("Q_set", "set flow", "flow"),
    Column("H", "head", "head"), Column("pump", "unit"), Column("Q", "unit flow", "flow"),
    Column("eta", "efficiency", "fraction"), Column("shaft_power", "shaft power", "power"),
    Column("status", "status"),
)
UNIT_COLUMNS = (
    Column("unit", "unit"), Column("role", "role"), Column("pump", "pump"),
    Column("speed", "curve speed", "speed", digits=4),
    Column("shutoff_head", "shut-off head", "head"), Column("bep_flow", "BEP flow", "flow"),
    Column("q_end", "last datasheet flow", "flow"),
)


def _f(values, kind, system):
    return to_display(values, kind, system)


def chart_condition(d) -> int:
    """The band condition the staging chart shows: the energy's reference condition, else
    the one with the highest required head at the top flow."""
    if d.reference is not None:
        return int(d.reference)
    return int(np.argmax(d.staging.H_req[:, -1]))


def _frame(height: int, bottom: int, title: str) -> dict:
    """A one-chart layout as a plain dict (the staging and set charts)."""
    return {"height": height, "margin": dict(l=70, r=20, t=60, b=bottom),
            "legend": dict(orientation="h", x=0.0, y=0.0, yanchor="bottom", yref="container"),
            "hovermode": "closest", "title": dict(text=title), "xaxis": {}, "yaxis": {}}


def staging_figure(d, system: str = "SI", title: str = ""):
    """The staging chart of a duties study as a static plotly ``Figure`` (see the module
    docstring and :func:`staging_spec`); a figure with a note when there is no staging
    study."""
    return as_figure(staging_spec(d, system, title))


def staging_spec(d, system: str = "SI", title: str = "") -> dict:
    """The staging chart as a plain dict for :meth:`kit.panels.plot_view.PlotView.show`."""
    layout = _frame(560, 130, title or "staging along the system curve")
    data: list = []
    spec = {"data": data, "layout": layout}
    s = None if d is None else d.staging
    if s is None:
        why = ("no staging study: " + "; ".join(d.notes)) if d is not None and d.notes else \
            "no staging study in this scenario (give [pump_set], [drive], [staging] or " \
            "[load_profile])"
        layout["annotations"] = [dict(text=html.escape(why), showarrow=False, x=0.5, y=0.5,
                                      xref="paper", yref="paper")]
        return spec
    c = chart_condition(d)
    unit = d.unit
    Q = s.Q
    fx = lambda q: _f(q, "flow", system)  # noqa: E731
    fh = lambda h: _f(h, "head", system)  # noqa: E731
    xq = fx(Q)
    data.append(scatter(xq, fh(s.H_req.min(axis=0)), mode="lines",
                        line=dict(color="rgba(90,90,90,0.5)", width=1), showlegend=False,
                        hoverinfo="skip", name="required head, least"))
    data.append(scatter(xq, fh(s.H_req.max(axis=0)), mode="lines", fill="tonexty",
                        fillcolor="rgba(120,120,120,0.15)",
                        line=dict(color="rgba(90,90,90,0.5)", width=1),
                        name="required head over the band", hoverinfo="skip"))
    data.append(scatter(xq, fh(s.H_req[c]), mode="lines", line=dict(color="black", width=2),
                        name=f"required head: {s.labels[c]}"))
    q = np.linspace(0.0, unit.q_end, 81)
    h = unit.head(q)
    r_hi = s.speed_range.max_ratio if s.strategy != "fixed" else 1.0
    h_top = float(np.nanmax(s.H_req)) * 1.0
    for k in range(1, s.n_duty + 1):
        col = STEP_COLOURS[(k - 1) % len(STEP_COLOURS)]
        on = s.count[c] == k
        data.append(scatter(fx(k * r_hi * q), fh(r_hi ** 2 * h), mode="lines",
                            legendgroup=f"k{k}", line=dict(color=col, width=2),
                            name=f"{k} running at {r_hi:.0%} speed"))
        h_top = max(h_top, float(r_hi ** 2 * h[0]))
        rs = s.speed_ratio[c][on]
        rs = rs[np.isfinite(rs)]
        if rs.size and s.strategy == "all_vfd":
            r0 = float(rs.min())
            data.append(scatter(fx(k * r0 * q), fh(r0 ** 2 * h), mode="lines",
                                legendgroup=f"k{k}", line=dict(color=col, width=1.5,
                                                               dash="dash"),
                                name=f"{k} running at {r0:.0%} speed (lowest of the step)"))
        text = [f"{k} running, speed {r:.0%}" for r in s.speed_ratio[c][on]]
        data.append(scatter(fx(Q[on]), fh(s.H_req[c][on]), mode="markers", legendgroup=f"k{k}",
                            marker=dict(color=col, size=6), name=f"operating path, {k} running",
                            text=text, hovertemplate="%{text}<extra></extra>",
                            showlegend=False))
    up = s.stage_up[c]
    up = up[np.isfinite(up)]
    if up.size:
        hu = np.interp(up, Q, s.H_req[c])
        data.append(scatter(fx(up), fh(hu), mode="markers",
                            marker=dict(color="black", size=12, symbol="x"), name="stage up"))
    prof = d.inputs.profile
    if prof:
        pq = np.array([p for p, _ in prof])
        ph = np.interp(pq, Q, s.H_req[c])
        data.append(scatter(
            fx(pq), fh(ph), mode="markers+text",
            marker=dict(color="#d68910", size=12, symbol="diamond",
                        line=dict(color="black", width=1)),
            text=[f"{t:,.0f} h" for _, t in prof], textposition="top center",
            name="load-profile steps (hours a year)"))
    x_top = float(fx(s.n_duty * r_hi * unit.q_end)) * 1.02
    layout["xaxis"] = {"title": {"text": axis_title("flow", "flow", system)},
                       "range": [0, x_top]}
    layout["yaxis"] = {"title": {"text": axis_title("head", "head", system)},
                       "range": [0, float(fh(1.1 * h_top))]}
    return spec


def set_figure(d, system: str = "SI", title: str = ""):
    """The set's curves as a static plotly ``Figure`` (see :func:`set_spec`)."""
    return as_figure(set_spec(d, system, title))


def set_spec(d, system: str = "SI", title: str = "") -> dict:
    """The set's curves as a plain dict for :meth:`kit.panels.plot_view.PlotView.show`:
    each distinct unit's datasheet curve, the running duty units' combined curve (flows
    added at equal head, each unit's check valve closed above its shut-off), and at each
    band condition the set's operating point with every running unit's flow at that head
    (a closed unit at zero flow)."""
    layout = _frame(480, 110, title or "the set: units and their combined curve")
    data: list = []
    spec = {"data": data, "layout": layout}
    if d is None:
        return spec
    fx = lambda q: _f(q, "flow", system)  # noqa: E731
    fh = lambda h: _f(h, "head", system)  # noqa: E731
    seen = []
    for u in d.units:
        if any(u is v for v in seen):
            continue
        seen.append(u)
        col = STEP_COLOURS[(len(seen) - 1) % len(STEP_COLOURS)]
        q = np.linspace(0.0, u.q_end, 81)
        data.append(scatter(fx(q), fh(u.head(q)), mode="lines",
                            line=dict(color=col, width=1.5, dash="dash"),
                            name=f"unit: {u.name}"))
    run = d.running
    q = np.linspace(0.0, run.q_end, 121)
    data.append(scatter(fx(q), fh(run.head(q)), mode="lines",
                        line=dict(color="black", width=2.5),
                        name=f"running set: {d.n_duty} duty unit(s) combined"))
    pts = [sd for sd in d.set_points if sd is not None]
    text = [f"{html.escape(lab)}" for lab, sd in zip(d.labels, d.set_points, strict=True)
            if sd is not None]
    data.append(scatter(fx([sd.Q for sd in pts]), fh([sd.H for sd in pts]),
                        mode="markers", marker=dict(color="black", size=9),
                        name="set operating points (band)", text=text,
                        hovertemplate="%{text}<extra></extra>"))
    mq = [m.Q for sd in pts for m in sd.members]
    mh = [sd.H for sd in pts for m in sd.members]
    mt = [f"{html.escape(m.name)}: {m.status}" for sd in pts for m in sd.members]
    closed = [m.status != "running" for sd in pts for m in sd.members]
    data.append(scatter(fx(mq), fh(mh), mode="markers", text=mt,
                        marker=dict(color=["#c0392b" if c else "#555" for c in closed],
                                    size=8, symbol=["x" if c else "circle-open"
                                                    for c in closed]),
                        name="each unit at the set's head (× check valve closed)",
                        hovertemplate="%{text}<extra></extra>"))
    layout["xaxis"] = {"title": {"text": axis_title("flow", "flow", system)},
                       "rangemode": "tozero"}
    layout["yaxis"] = {"title": {"text": axis_title("head", "head", system)},
                       "rangemode": "tozero"}
    return spec


def viscous_figure(d, system: str = "SI", title: str = ""):
    """Water curves against the curves corrected for viscosity (head above, efficiency
    below), a static plotly ``Figure`` (see :func:`viscous_spec`)."""
    return as_figure(viscous_spec(d, system, title))


def viscous_spec(d, system: str = "SI", title: str = "") -> dict:
    """The viscosity-correction chart as a plain dict for
    :meth:`kit.panels.plot_view.PlotView.show`: the study's water and corrected curves, as
    fitted, head above and efficiency below."""
    layout = subplot_layout((0.6, 0.4), 0.08, ("head: water (dashed) and corrected (solid)",
                                               "efficiency: water (dashed) and corrected "
                                               "(solid)"))
    layout.update(height=600, margin=dict(l=70, r=20, t=70, b=110),
                  legend=dict(orientation="h", x=0.0, y=0.0, yanchor="bottom",
                              yref="container"),
                  title=dict(text=title or "viscosity correction (ANSI/HI 9.6.7, "
                             "from memory)"))
    data: list = []
    pairs = [] if d is None else list(zip(d.viscous, d.viscous_water, strict=True))
    for i, (vc, w) in enumerate(pairs):
        col = STEP_COLOURS[i % len(STEP_COLOURS)]
        for curve, dash, what in ((w, "dash", "water"), (vc.curve, "solid",
                                                          f"{vc.nu * 1e6:.4g} cSt")):
            qq = np.linspace(0.0, curve.q_end, 81)
            data.append(scatter(_f(qq, "flow", system), _f(curve.head(qq), "head", system),
                                mode="lines", line=dict(color=col, dash=dash, width=2),
                                name=f"{vc.curve.name}: {what}"))
            data.append(scatter(_f(curve.flow, "flow", system),
                                _f(curve.head_points, "head", system), mode="markers",
                                marker=dict(color=col, size=6), showlegend=False,
                                hoverinfo="skip"))
            if curve.has_efficiency:
                data.append(scatter(_f(qq, "flow", system),
                                    100 * np.clip(curve.efficiency(qq), 0, 1), row=2,
                                    mode="lines", line=dict(color=col, dash=dash),
                                    showlegend=False,
                                    name=f"{vc.curve.name}: {what} efficiency"))
    layout["yaxis"].update(title={"text": axis_title("head", "head", system)},
                           rangemode="tozero")
    layout["yaxis2"].update(title={"text": "efficiency [%]"}, rangemode="tozero")
    layout["xaxis2"].update(title={"text": axis_title("flow", "flow", system)},
                            rangemode="tozero")
    return {"data": data, "layout": layout}


class PumpDutiesView(widgets.VBox):
    """The duties study shown (see the module docstring).

    Parameters
    ----------
    duties : kit.studies.pump_duties.DutiesStudy or None
    system : str
        'SI' or 'US'.
    currency : str, tariff : float
        For the energy cost line.
    """

    def __init__(self, duties=None, system: str = "SI", currency: str = "",
                 tariff: float = 0.0):
        super().__init__()
        self.system = system
        self.composition = widgets.HTML("")
        self.composition.add_class("hl-pump-set")
        self.set_plot = PlotView()
        self.set_chart = widgets.VBox([self.set_plot])
        self.set_chart.add_class("hl-set-chart")
        self.plot = PlotView()
        self.chart = widgets.VBox([self.plot])
        self.chart.add_class("hl-staging-chart")
        self.steps = widgets.HTML("")
        self.steps.add_class("hl-staging-steps")
        self.energy = widgets.HTML("")
        self.energy.add_class("hl-energy-table")
        self.checks = widgets.HTML("")
        self.checks.add_class("hl-duties-checks")
        self.viscous_plot = PlotView()
        self.viscous_chart = widgets.VBox([self.viscous_plot])
        self.viscous_chart.add_class("hl-viscous-chart")
        self.children = [self.composition, self.set_chart, self.chart, self.steps,
                         self.energy, self.checks, self.viscous_chart]
        self.add_class("hl-pump-duties")
        self.show(duties, currency=currency, tariff=tariff)

    def show(self, duties, currency: str = "", tariff: float = 0.0) -> None:
        """Show ``duties`` (None: say there is nothing to show)."""
        self.duties, self.currency, self.tariff = duties, currency, tariff
        sysm = self.system
        self.plot.show(staging_spec(duties, sysm))
        self.set_chart.layout.display = None if duties is not None else "none"
        if duties is not None:
            self.set_plot.show(set_spec(duties, sysm))
        has_v = duties is not None and bool(duties.viscous)
        self.viscous_chart.layout.display = None if has_v else "none"
        if has_v:
            self.viscous_plot.show(viscous_spec(duties, sysm))
        if duties is None:
            none = ("<div class='hl-note'>This scenario gives no pump set, staging, load "
                    "profile, minimum flow or viscosity correction ([pump_set], [drive], "
                    "[staging], [load_profile], [min_flow], [recirculation], [viscous]).</div>")
            self.composition.value = none
            self.steps.value = self.energy.value = self.checks.value = ""
            return
        self.composition.value = self._composition_html()
        self.steps.value = self._steps_html()
        self.energy.value = self._energy_html()
        self.checks.value = self._checks_html()

    def set_system(self, system: str) -> None:
        self.system = system
        self.show(self.duties, self.currency, self.tariff)

    # ------------------------------------------------------------------ html
    def _composition_html(self) -> str:
        d, sysm = self.duties, self.system
        head = (f"<b>Set composition</b> — {d.n_duty} duty + {d.n_standby} standby "
                f"({'identical' if d.identical else 'unlike'} units"
                f"{'' if d.identical else ', each with its own check valve'})")
        notes = "".join(f"<div class='hl-note'>{html.escape(n)}</div>" for n in d.notes)
        return (head + results_table_html(d.composition_rows(), UNIT_COLUMNS, sysm)
                + "<b>The running set at each band condition</b> (full speed, no control)"
                + results_table_html(self._set_rows(), SET_COLUMNS, sysm) + notes)

    def _set_rows(self) -> list[dict]:
        d = self.duties
        rows = []
        for lab, sd in zip(d.labels, d.set_points, strict=True):
            if sd is None:
                rows.append({"condition": lab, "status": d.set_errors.get(lab, "no point")})
                continue
            members = sd.members
            if d.identical and len(members) > 1:   # identical units share one row
                members = members[:1]
            for j, m in enumerate(members):
                who = (f"each of {len(sd.members)}: {m.name}" if len(members) < len(sd.members)
                       else f"{j + 1}: {m.name}")
                rows.append({"condition": lab, "Q_set": sd.Q, "H": sd.H, "pump": who,
                             "Q": m.Q, "eta": m.efficiency if np.isfinite(m.efficiency)
                             else None, "shaft_power": m.shaft_power
                             if np.isfinite(m.shaft_power) else None, "status": m.status})
        return rows

    def _steps_html(self) -> str:
        d = self.duties
        if d.staging is None:
            return ""
        rows = []
        for r in d.step_rows():
            r = dict(r)
            r["shortfall"] = "yes" if r["shortfall"] else "no"
            for k in ("speed_min", "speed_max"):
                r[k] = None if not np.isfinite(r[k]) else round(r[k], 3)
            rows.append(r)
        s = d.staging
        cap = (f"staging by {s.rule.basis}, strategy "
               f"'{STRATEGY_LABELS.get(s.strategy, s.strategy)}', hysteresis "
               f"{s.rule.hysteresis:.0%}; speed ratio to the curve speed, drive range "
               f"{s.speed_range.min_ratio:.0%}–{s.speed_range.max_ratio:.0%}")
        return ("<b>Staging steps</b>"
                + results_table_html(rows, STEP_COLUMNS, self.system, caption=cap))

    def _energy_html(self) -> str:
        d = self.duties
        if d.energy is None:
            return ("<b>Energy over the load profile</b><div class='hl-note'>Not compared: "
                    + html.escape("; ".join(n for n in d.notes if "energy" in n or "staging"
                                            in n) or "no staging study or no load profile")
                    + ".</div>")
        srows = []
        for r in d.strategy_rows():
            srows.append({"strategy_text": STRATEGY_LABELS.get(r["strategy"], r["strategy"]),
                          "total": r["total_kWh"] * 3.6e6, "saving": r["saving_kWh"] * 3.6e6,
                          "band_min": r["band_min_kWh"] * 3.6e6,
                          "band_max": r["band_max_kWh"] * 3.6e6})
        erows = []
        for r in d.energy_rows():
            erows.append({"strategy": STRATEGY_LABELS.get(r["strategy"], r["strategy"]),
                          "Q": r["Q"], "hours": f"{r['hours']:,.0f}", "pumps": r["pumps"],
                          "speed_pct": f"{100 * r['speed_ratio']:.1f}",
                          "input_power": r["input_power"], "energy": r["energy_kWh"] * 3.6e6})
        ref = d.labels[d.reference]
        best = min(d.energy.rows, key=lambda r: r.total_kWh if np.isfinite(r.total_kWh)
                   else np.inf)
        cost = ""
        if self.tariff:
            save = d.energy.saving_kWh.get(best.strategy, 0.0) * self.tariff
            cost = (f" — {html.escape(self.currency)} {save:,.0f} a year against fixed speed "
                    f"at {self.tariff:g} per kWh")
        return ("<b>Energy over the load profile</b>"
                + results_table_html(srows, STRATEGY_COLUMNS, self.system, caption=(
                    f"priced on the band condition '{ref}' (the highest system head at the "
                    "design flow); drive losses from a generic PWM drive table, motor "
                    "efficiency constant over load"))
                + f"<div class='hl-energy-best'>Least energy: <b>"
                  f"{html.escape(STRATEGY_LABELS.get(best.strategy, best.strategy))}</b>{cost}"
                  "</div>"
                + "<b>Per step</b>"
                + results_table_html(erows, ENERGY_COLUMNS, self.system))

    def _checks_html(self) -> str:
        d, sysm = self.duties, self.system
        parts = []
        if d.speed_ratios is not None:
            lo, hi = d.speed_ratios
            n = d.unit.speed_rpm
            parts.append(f"<li>Drive speed range {lo:.0%}–{hi:.0%} of the curve speed "
                         f"({units.fmt(lo * n, 'speed', sysm)} to "
                         f"{units.fmt(hi * n, 'speed', sysm)}); the affinity laws are "
                         f"flagged below {d.speed.accuracy_ratio:.0%}.</li>")
        if d.min_flow is not None:
            mf = d.min_flow
            parts.append(f"<li>Minimum continuous flow {units.fmt(mf.Q_min, 'flow', sysm)} "
                         f"({html.escape(mf.basis)}).</li>")
        if d.recirculation is not None:
            ro = d.recirculation
            by = ("" if d.bypass_at_duty is None else
                  f"; at the highest duty head it passes "
                  f"{units.fmt(d.bypass_at_duty, 'flow', sysm)} continuously (lost to the "
                  "duty, and its energy)")
            parts.append(f"<li>Recirculation orifice: bore {units.fmt(ro.d, 'diameter', sysm)}"
                         f" in a {units.fmt(ro.D, 'diameter', sysm)} line (β {ro.beta:.3f}, "
                         f"C {ro.C:.3f}), permanent loss "
                         f"{units.fmt(ro.dp_loss, 'pressure_difference', sysm)} at the "
                         f"minimum flow{by}.</li>")
        for vc in d.viscous:
            parts.append(f"<li>Viscosity correction of '{html.escape(vc.curve.name)}' at "
                         f"{vc.nu * 1e6:.4g} cSt: B = {vc.B:.3g}, C_Q = {vc.C_Q:.3f}, "
                         f"C_H at BEP = {vc.C_Q:.3f}, C_η = {vc.C_eta:.3f} (ANSI/HI 9.6.7, "
                         "equations from memory; the maker's viscous performance "
                         "governs).</li>")
        if not parts:
            return ""
        return "<b>Drive, minimum flow, recirculation, viscosity</b><ul>" + "".join(parts) \
            + "</ul>"
