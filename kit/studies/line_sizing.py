"""Line sizing study: candidate sizes for one line, and a line list sized in one go.

Scenario keys of this kind (besides the common ones of :mod:`kit.scenario`)::

    [sizing]   duty = "pump_discharge"  (key of kit.core.criteria.DUTY_CLASSES)
               flow_design, flow_min, flow_max
               standard, schedule, material, condition
               sizes = ["2", "3", ...]   (optional; default: every size of the schedule
                                          whose design velocity is within reach of the range)
               end_pressure = "0 psig", vapour_margin = "2 m", erosional_C = 100
    [criteria] v_min, v_max, dp_max      (optional overrides of the duty class, with units;
                                          dp_max as a pressure per 100 m or per 100 ft)
    [route]    length, start_elevation, start_name,
               points = [{ name, chainage, elevation }, ...], fittings = [...]
    [batch]    file = "line_list.csv"    (optional: a line list beside the scenario)
               text = "tag,flow,..."  (or the list itself; the record carries it so)

The line list is CSV with a header row; every cell a number with its unit::

    tag,flow,liquid,temperature,length,rise,duty,standard,schedule,material,condition,k_total

``liquid`` is a catalogue key (``water``, ``propylene_glycol_aq:0.3`` with a mass fraction)
or ``scenario`` for the scenario's own liquid. Errors are reported per row: a bad row gets
the verdict ``error`` and the kit's message, and the other rows go on.

Example
-------
>>> rows = read_line_list("tag,flow,length,duty\\nL-1,150 gpm,100 m,pump_discharge\\n")
>>> from kit.core.liquids import make_liquid
>>> b = size_batch(rows, make_liquid("water"))
>>> b[0].size, b[0].verdict
('3-1/2', 'pass')
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

from kit import scenario as scn
from kit.core.criteria import DUTY_CLASSES
from kit.core.findings import Finding, Severity, cautions_for
from kit.core.friction import FRICTION_METHOD
from kit.core.sizing import SizingResult, size_line
from kit.errors import HeadlineError, ScenarioError
from kit.inputs.line_list import LINE_LIST_COLUMNS, read_line_list
from kit.inputs.line_sizing import (
    SizingInputs,
    candidate_pipes,
    inputs,
    sizes_in_reach,
)
from kit.results import Alternative, Results
from kit.studies.integrity import METHODS as INTEGRITY_METHODS
from kit.studies.line_list import BatchRow, size_batch

__all__ = ["SizingInputs", "SizingStudy", "inputs", "study", "run", "compute", "size_batch",
           "read_line_list", "candidate_pipes", "sizes_in_reach", "BatchRow", "LINE_LIST_COLUMNS",
           "candidate_rows", "batch_rows", "batch_text", "caution_topics"]


@dataclass(frozen=True)
class SizingStudy:
    """A sizing: its inputs and its result (candidates, recommendation, profiles)."""

    inputs: SizingInputs
    result: SizingResult

    @property
    def recommended(self):
        r = self.result.recommended
        return None if r is None else self.result.candidates[r]

    @cached_property
    def integrity(self) -> dict:
        """Pressure rating and water-hammer screen of every computed candidate, by nominal size
        (:func:`kit.studies.integrity.screen_line`; computed on first use)."""
        return {c.pipe.nominal: integrity_of(self.inputs, c) for c in self.result.candidates
                if not c.error}

    def index_of(self, nominal: str) -> int | None:
        """Index of the candidate of nominal size ``nominal`` (None if absent)."""
        for i, c in enumerate(self.result.candidates):
            if c.pipe.nominal == nominal:
                return i
        return None


def integrity_of(inp: SizingInputs, c):
    """Rating and surge screen of one candidate: the highest of the running inlet pressure,
    the standing column from the route's end down to its lowest point (at the end pressure),
    and the closure surge at the design velocity over the route length."""
    from kit.studies.integrity import screen_line

    r = inp.route
    zs = [r.start_elevation] + [p[2] for p in r.points]
    z_end, z_low = zs[-1], min(zs)
    st = inp.state
    return screen_line(
        f"NPS {c.pipe.nominal} ({c.pipe.label})", c.pipe, inp.liquid, st.T, inp.p_baro, st.pv,
        length=r.length, velocity=c.velocity, running_pressure=max(c.p_start, inp.p_baro),
        opts=inp.integrity, standing=(z_end - z_low, inp.p_end), rho=st.rho)


def run(inp: SizingInputs) -> SizingResult:
    """Size the line of ``inp`` (see :func:`kit.core.sizing.size_line`)."""
    return size_line(inp.route, inp.state, inp.Q_design, inp.sizes, inp.duty, inp.Q_min,
                     inp.Q_max, inp.p_end, inp.p_baro, inp.vapour_margin, inp.erosional_C)


def study(sc, inp: SizingInputs | None = None) -> SizingStudy:
    """The sizing of a scenario (or of ready inputs): inputs and result."""
    inp = inp or inputs(sc)
    try:
        res = run(inp)
    except HeadlineError as exc:
        raise ScenarioError("sizing", str(exc)) from None
    return SizingStudy(inp, res)


def candidate_rows(st: SizingStudy) -> list[dict]:
    """One row dict (SI values) per candidate, for the candidates table and the record."""
    rows = []
    rec = st.result.recommended
    for i, c in enumerate(st.result.candidates):
        rows.append({
            "size": c.pipe.nominal, "label": c.pipe.label, "bore": c.pipe.Di,
            "velocity": c.velocity, "velocity_min": c.velocity_min,
            "velocity_max": c.velocity_max, "Re": c.Re, "friction": c.friction,
            "dp_per_m": c.dp_per_m, "head_loss": c.head_loss, "p_start": c.p_start,
            "lowest": c.p_lowest, "lowest_station": c.lowest_station,
            "verdict": c.verdict, "governing": c.governing,
            "mark": "◀ recommended" if i == rec else "", **_integrity_row(st, c)})
    return rows


def _integrity_row(st: SizingStudy, c) -> dict:
    s = st.integrity.get(c.pipe.nominal) if not c.error else None
    if s is None:
        return {"p_max": float("nan"), "p_allow": float("nan"), "surge_rise": float("nan"),
                "integrity": ""}
    return {"p_max": s.p_max, "p_allow": float("nan") if s.rating is None else s.rating.P_allow,
            "surge_rise": float("nan") if s.surge_rise is None else s.surge_rise,
            "integrity": s.verdict}


# ------------------------------------------------------------------ batch

def batch_rows(batch) -> list[dict]:
    """Row dicts (SI) of a sized line list, for tables and the record."""
    return [vars(x).copy() for x in batch]


def batch_text(sc) -> str | None:
    """The text of the scenario's line list file (``[batch] file``), or None."""
    inline = scn.get(sc.doc, "batch.text")
    if inline is not None:  # a line list carried in the scenario (records are self-contained)
        return str(inline)
    file = scn.get(sc.doc, "batch.file")
    if not file:
        return None
    path = Path(sc.source).parent / file if sc.source not in ("<memory>", "<string>") else Path(file)
    try:
        return path.read_text(encoding="utf-8")
    except OSError as exc:
        raise ScenarioError("batch.file", f"cannot be read: {exc.strerror}") from None


def compute(sc) -> Results:
    """Line-sizing results: every candidate, the recommended size, the batch verdicts."""
    st = study(sc)
    inp, res = st.inputs, st.result
    r = Results("line_sizing")
    r.add("design.flow", "design flow", inp.Q_design, "flow")
    r.add("liquid.density", "density", inp.state.rho, "density")
    r.add("liquid.viscosity", "viscosity", inp.state.mu, "viscosity")
    for c in res.candidates:
        if c.error:
            continue
        nom = c.pipe.nominal
        r.add(f"size.{nom}.velocity", f"NPS {nom}: velocity", c.velocity, "velocity")
        r.add(f"size.{nom}.dp", f"NPS {nom}: pressure drop", c.dp_per_m, "pressure_per_length")
        r.add(f"size.{nom}.head_loss", f"NPS {nom}: head loss", c.head_loss, "head")
        scr = st.integrity[nom]
        r.add(f"size.{nom}.max_pressure", f"NPS {nom}: highest pressure ({scr.governing})",
              scr.p_max, "pressure")
        if scr.rating is not None:
            r.add(f"size.{nom}.rated_pressure", f"NPS {nom}: maximum allowable pressure "
                  "(gauge)", scr.rating.P_allow, "pressure_difference")
        if scr.surge_rise is not None:
            r.add(f"size.{nom}.surge_rise", f"NPS {nom}: surge rise at the design velocity",
                  scr.surge_rise, "pressure_difference")
    r.tables["candidates"] = candidate_rows(st)
    if res.recommended is not None:
        c = res.candidates[res.recommended]
        r.tables["recommended"] = [{"size": c.pipe.nominal, "label": c.pipe.label,
                                    "reason": res.reason}]
        r.add("recommended.bore", f"recommended: {c.pipe.label}, bore", c.pipe.Di, "diameter")
        r.add("recommended.start_pressure", "recommended: pressure needed at start",
              c.p_start - inp.p_baro, "pressure_difference")
        r.add("recommended.lowest_pressure", f"recommended: lowest pressure ({c.lowest_station})",
              c.p_lowest - inp.p_baro, "pressure_difference")
        r.findings += list(c.findings)
        r.findings += list(st.integrity[c.pipe.nominal].findings)
        r.selected = c.pipe.label
    else:
        r.findings += _no_size_findings(res)
    for i, c in enumerate(res.candidates):
        if i != res.recommended:
            r.alternatives.append(Alternative(
                c.pipe.label, c.error or c.governing or f"{c.verdict}: not the smallest that "
                "meets the criteria", "fail" if c.error else c.verdict,
                subjects=(c.pipe.label, f"NPS {c.pipe.nominal}:")))
    text = batch_text(sc)
    if text is not None:
        duties = dict(DUTY_CLASSES)
        duties[inp.duty.key] = inp.duty
        b = size_batch(read_line_list(text), inp.liquid, inp.p_baro, duties)
        r.tables["batch"] = batch_rows(b)
        for x in b:
            if x.verdict in ("pass", "check"):
                r.add(f"batch.{x.tag}.bore", f"line {x.tag}: bore", x.bore, "diameter")
            elif x.verdict in ("fail", "error"):
                r.findings.append(Finding(
                    Severity.FAIL, f"line-list row {x.row} ({x.tag})",
                    "input" if x.verdict == "error" else "size", float("nan"), "-",
                    "a valid row sized by the duty's criteria" if x.verdict == "error" else
                    "a size of the schedule meeting the duty's criteria", x.reason,
                    "the line list"))
    r.method("Pipe friction", FRICTION_METHOD["name"] + "; " + " ".join(FRICTION_METHOD["references"]))
    r.method("Sizing criteria", f"{inp.duty.label}: {inp.duty.source}")
    for name, text_ in INTEGRITY_METHODS:
        r.method(name, text_)
    r.method("Erosional velocity", f"API RP 14E (1991), C = {inp.erosional_C:g}")
    r.method("Pipe dimensions", "ASME B36.10M / B36.19M and the other tables of fluids.piping")
    r.method("Fittings", "kit.core.fittings: Crane TP-410 (2009) valves, Rennels & Hudson (2012) "
             "geometry, Hooper (1981) 2-K, Darby (2001) 3-K, as chosen per row")
    r.cautions = cautions_for(*caution_topics(inp))
    return r


def _no_size_findings(res) -> list:
    """Where no candidate passes or checks: one FAIL per size with its reason, and the nearest
    miss named — never an empty verdict."""
    out = [Finding(Severity.FAIL, "line sizing", "recommended size", float("nan"), "-",
                   "a candidate meeting every criterion",
                   f"no candidate size meets the criteria ({len(res.candidates)} tried)",
                   "the duty's criteria")]
    near = res.nearest_miss
    for i, row in enumerate(res.reasons):
        miss = " — the nearest miss" if near is not None and near[0] == i else ""
        out.append(Finding(Severity.FAIL, f"line sizing: {row['label']}", "verdict",
                           float("nan"), "-", "pass or check",
                           f"{row['reason'] or row['verdict']}{miss}", "the duty's criteria"))
    return out


def caution_topics(inp: SizingInputs) -> tuple:
    """Caution topics of a sizing: pressure, water hammer, vacuum; flammable if it is."""
    topics = ("pressure", "water_hammer", "vacuum")
    if getattr(inp.state, "flammable", False) or getattr(inp.liquid, "flammable", False):
        topics += ("flammable",)
    return topics
