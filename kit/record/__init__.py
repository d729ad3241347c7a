"""The checker's record: one offline HTML sheet and one JSON file per study, and its re-check.

- :func:`build_record` (``kit.record.build``) turns a scenario and its
  :class:`~kit.results.Results` into a :class:`Record`: header from the scenario's
  ``[project]`` table (checked-by left blank for the checker), the inputs as written, the
  methods with their published references, the results in the display system and in SI, the
  findings, the cautions (always the general one), a stamp of the software, and SHA-256
  hashes of the inputs and of the results.
- :func:`write_record` writes ``<stem>.html`` (self-contained, opens offline, prints on A4 and
  Letter; ``kit.record.html``) and ``<stem>.json`` (``format = "headline-record/1"``).
- ``python -m kit check RECORD.json`` (``kit.record.check.check_main``) recomputes the
  scenario carried by the JSON file with the installed kit and compares every value.

Contract with the notebooks (``python -m kit run``)
---------------------------------------------------
``kit.runner`` executes a notebook headless with these environment variables set:

``HEADLINE_SCENARIO``
    Absolute path of the scenario TOML file. The notebook's **first cell** reads it
    (``os.environ.get("HEADLINE_SCENARIO", <its own demo scenario>)``).
``HEADLINE_RECORD_DIR``
    Absolute path of the output folder. The notebook's **last section** writes the record
    with one call::

        from kit.record import save_record
        save_record(edited, results, figures=[fig1, fig2], base=sc)

    which writes into ``HEADLINE_RECORD_DIR`` when it is set and into ``records/`` beside the
    notebook otherwise (the README's path: no environment variable needed). ``base`` is the
    scenario as loaded from its file, so the record lists the inputs edited in the notebook.
    ``write_if_requested(scenario, results, figures=[...])`` still writes only when the
    variable is set.
``HEADLINE_RECORD_STEM``
    The file stem the runner expects (the scenario file's stem); ``write_if_requested`` uses
    it by default.

Figures are plotly ``go.Figure`` or ``FigureWidget`` objects; the record draws them as static
figures (plotly.js inlined once) and never loads anything from the network.

Example
-------
>>> from kit.results import Results
>>> from kit.scenario import Scenario
>>> sc = Scenario({"schema": "headline-scenario/1", "kind": "line_sizing", "title": "t"})
>>> build_record(sc, Results("line_sizing")).data["format"]
'headline-record/1'
"""

from kit.record.build import (
    FORMAT,
    Record,
    RecordFiles,
    build_record,
    input_edits,
    save_record,
    write_if_requested,
    write_record,
)

__all__ = ["FORMAT", "Record", "RecordFiles", "build_record", "write_record", "save_record",
           "write_if_requested", "input_edits"]
