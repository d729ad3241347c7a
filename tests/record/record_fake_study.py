"""A small stand-in study for the record tests (not the kit's line-sizing study).

It reads a straight catalogue pipe (the first of ``sizing.sizes``) from the scenario and
reports its Darcy–Weisbach head loss, with the Swamee–Jain (1976) explicit friction factor,
written here from the published equations:

    h_f = f (L/D) V² / (2 g)                        (Darcy–Weisbach)
    f   = 0.25 / [log10(ε/(3.7 D) + 5.74 / Re^0.9)]²   (Swamee & Jain 1976, turbulent)

The record tests only need a deterministic computation from the scenario; the kit's own
hydraulics are tested against published values in tests/core.
"""

from __future__ import annotations

import math

from kit.core.findings import Finding, Severity, cautions_for
from kit.results import Results
from kit.units import parse

__all__ = ["compute", "SCENARIO_TOML", "MODULE", "scenario", "use_fake_study", "write_fake_record",
           "reforge"]

MODULE = "record_fake_study"
G = 9.80665  # standard gravity [m/s²] (CGPM 1901)

#: An invented scenario; user text carries markup to test escaping.
SCENARIO_TOML = '''
schema = "headline-scenario/1"
kind = "line_sizing"
title = "Cooling water header <script>alert(1)</script>"
note = "<script>alert(2)</script> a note that looks like markup"

[project]
name = "Marlow Creek test rig <b>bold</b>"
calc_number = "HL-0042"
revision = "B"
prepared_by = "A. Engineer"
date = "2025-03-14"

[display]
system = "SI"

[liquid.user]
name = "cooling water"
temperature = "20 degC"
density = "998 kg/m3"
viscosity = "0.998 mPa*s"

[sizing]
flow_design = "54 m3/h"
standard = "asme_b36_10m"
schedule = "40"
material = "carbon_steel"
sizes = ["4"]

[route]
length = "120 m"
'''


def compute(scenario) -> Results:
    from kit.core.pipes import catalogue_pipe

    doc = scenario.doc
    sz, user = doc["sizing"], doc["liquid"]["user"]
    Q = parse(sz["flow_design"], "flow", "sizing.flow_design")
    pipe = catalogue_pipe(sz["standard"], sz["sizes"][0], sz["schedule"], sz["material"])
    D, eps = pipe.Di, pipe.roughness
    L = parse(doc["route"]["length"], "length", "route.length")
    rho = parse(user["density"], "density", "liquid.user.density")
    nu = parse(user["viscosity"], "viscosity", "liquid.user.viscosity") / rho
    V = Q / (math.pi * D**2 / 4)
    Re = V * D / nu
    f = 0.25 / math.log10(eps / (3.7 * D) + 5.74 / Re**0.9) ** 2
    h = f * L / D * V**2 / (2 * G)
    r = Results("line_sizing")
    r.add("design.flow", "design flow", Q, "flow")
    r.add("pipe.velocity", "mean velocity", V, "velocity")
    r.add("pipe.reynolds", "Reynolds number", Re, "dimensionless")
    r.add("pipe.friction", "Darcy friction factor", f, "dimensionless")
    r.add("pipe.head_loss", "friction head loss", h, "head")
    r.add("pipe.pressure_drop", "friction pressure drop", rho * G * h, "pressure_difference")
    sev = Severity.PASS if V <= 3.0 else Severity.CHECK
    r.findings.append(Finding(sev, "pipe <main>", "velocity", V, "m/s", "<= 3.0 m/s",
                              "velocity limit for a water header", "common practice, no source"))
    r.findings.append(Finding(Severity.CHECK, "pipe <main>", "note", float("nan"), "-", "-",
                              "a finding without a number", "common practice, no source"))
    r.method("Darcy–Weisbach head loss", "Darcy (1857); Weisbach (1845)")
    r.method("Swamee–Jain friction factor",
             "Swamee, P.K., Jain, A.K. (1976), J. Hydraulics Div. ASCE 102(5), 657-664")
    r.cautions.extend(cautions_for("pump"))
    r.tables["losses"] = [{"segment": "main <pipe>", "length_m": L, "head_loss_m": h}]
    return r


# ---------------------------------------------------------------- helpers for the tests


def scenario(text: str = SCENARIO_TOML, source: str = "marlow_creek.toml"):
    """The invented scenario above, as a kit Scenario."""
    from kit.scenario import loads

    return loads(text, source)


def use_fake_study(monkeypatch) -> None:
    """Point kind 'line_sizing' at this module for kit.results.compute."""
    import kit.results

    monkeypatch.setitem(kit.results.STUDIES, "line_sizing", MODULE)


def write_fake_record(out_dir, figures=(), text: str = SCENARIO_TOML, stem: str = "marlow"):
    """Build and write the record of the invented scenario; returns (html_path, json_path)."""
    from kit.record import build_record, write_record

    sc = scenario(text)
    return write_record(build_record(sc, compute(sc), figures=figures), out_dir, stem)


def reforge(data: dict) -> dict:
    """Recompute both hashes after an edit (what a careless or deliberate editor could do)."""
    from kit.record.build import input_hash, result_hash

    data["hashes"]["inputs"] = input_hash(data["scenario"])
    data["hashes"]["results"] = result_hash(data)
    return data
