"""The record's stamp and hashes: what software built it, when, and digests of its parts.

The stamp names the kit version, the versions of the libraries the numbers depend on
(read with :mod:`importlib.metadata`, so nothing heavy is imported), the Python version,
the platform and the UTC time of the build.

The hashes are SHA-256 digests (NIST FIPS 180-4) of *canonical JSON*: keys sorted, no
insignificant whitespace, UTF-8, non-finite floats written as the strings ``"NaN"``,
``"Infinity"``, ``"-Infinity"`` and dates as ISO 8601 text (see :func:`jsonable`). One digest
covers the inputs (the scenario document), one covers the results. A digest detects an
edited or damaged file; it is not a signature — whoever edits a file can recompute it. The
real guard is ``python -m kit check``, which recomputes every value from the inputs.

Example
-------
>>> sha256_of({"b": 1, "a": [1.5, "x"]}) == sha256_of({"a": [1.5, "x"], "b": 1})
True
>>> canonical_json({"b": float("nan"), "a": 1})
'{"a":1,"b":"NaN"}'
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import platform
import sys
from enum import Enum
from importlib import metadata

__all__ = ["LIBRARIES", "stamp", "jsonable", "canonical_json", "sha256_of", "version_of"]

#: Distributions whose versions are stamped: (name shown, distribution name).
LIBRARIES: tuple[tuple[str, str], ...] = (
    ("numpy", "numpy"),
    ("scipy", "scipy"),
    ("fluids", "fluids"),
    ("CoolProp", "CoolProp"),
    ("pint", "pint"),
    ("plotly", "plotly"),
)


def version_of(distribution: str) -> str:
    """Installed version of a distribution, or ``"not installed"``.

    >>> version_of("no-such-distribution-xyz")
    'not installed'
    """
    try:
        return metadata.version(distribution)
    except metadata.PackageNotFoundError:
        return "not installed"


def stamp(now: _dt.datetime | None = None) -> dict:
    """The build stamp: kit, library and Python versions, platform and UTC time.

    Returns
    -------
    stamp : dict
        ``{"kit": "0.1.0", "libraries": {"numpy": ..., ...}, "python": "3.11.7",
        "platform": ..., "built_utc": "2025-01-01T12:00:00Z"}``.
    """
    import kit

    now = now or _dt.datetime.now(_dt.UTC)
    return {
        "kit": kit.__version__,
        "libraries": {shown: version_of(dist) for shown, dist in LIBRARIES},
        "python": platform.python_version(),
        "implementation": sys.implementation.name,
        "platform": platform.platform(),
        "built_utc": now.astimezone(_dt.UTC).strftime("%Y-%m-%dT%H:%M:%SZ"),
    }


def jsonable(obj):
    """A copy of ``obj`` made of JSON types only, the same way every time.

    dict keys become strings; tuples become lists; numpy scalars and arrays become Python
    numbers and lists; non-finite floats become ``"NaN"``/``"Infinity"``/``"-Infinity"``
    (``float()`` reads them back); dates and times become ISO 8601 text.

    >>> jsonable({"x": (1, float("inf")), 2: True})
    {'x': [1, 'Infinity'], '2': True}
    """
    if isinstance(obj, Enum):
        return jsonable(obj.value)
    if obj is None or isinstance(obj, bool):
        return obj
    if isinstance(obj, str):
        return str(obj)
    if isinstance(obj, int):
        return int(obj)
    if isinstance(obj, float):
        return _float(obj)
    if isinstance(obj, dict):
        return {str(k): jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [jsonable(v) for v in obj]
    if isinstance(obj, (_dt.datetime, _dt.date, _dt.time)):
        return obj.isoformat()
    if hasattr(obj, "tolist"):  # numpy scalar or array, without importing numpy
        return jsonable(obj.tolist())
    return str(obj)


def _float(x: float):
    if math.isfinite(x):
        return float(x)
    if math.isnan(x):
        return "NaN"
    return "Infinity" if x > 0 else "-Infinity"


def canonical_json(obj) -> str:
    """Canonical JSON text of ``obj``: sorted keys, compact separators, no NaN tokens."""
    return json.dumps(jsonable(obj), sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False)


def sha256_of(obj) -> str:
    """SHA-256 hex digest of the canonical JSON of ``obj`` (NIST FIPS 180-4)."""
    return hashlib.sha256(canonical_json(obj).encode("utf-8")).hexdigest()
