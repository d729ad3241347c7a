"""Sizing of a line list: each typed row (:class:`kit.inputs.line_list.LineRow`) gets the
smallest size of its schedule that meets its duty class, all rows of a pipe family at once.

Method
------
For each row, Darcy–Weisbach with the Darcy friction factor of
:func:`kit.core.friction.darcy_friction` (Colebrook 1939 solved exactly by Clamond 2009 in
turbulent flow, 64/Re laminar) gives the velocity ``V = Q/A`` and the friction pressure drop
``dp/L = f ρ V²/(2D)`` at every bore of the row's schedule. The verdict follows
:func:`kit.core.sizing.size_line`'s rule: the smallest size meeting every criterion with the
10 % margin (``V ≥ v_min``, ``V ≤ 0.9 v_max``, ``dp/L ≤ 0.9 dp_max``) is a 'pass'; else the
smallest within the limits themselves (``V ≤ v_max``, ``dp/L ≤ dp_max``) a 'check'; else a
'fail', reported with its nearest miss (the size whose worse ratio to a limit is least, the
criterion it misses and by how much). The head loss of the chosen size is
``(f L/D + K) V²/(2g)`` with the row's total K.

The work is vectorised: rows sharing a pipe family (standard, schedule, material, condition)
are evaluated together with numpy, each row's density, viscosity and duty limits entering as
columns (the liquid states computed once per distinct liquid and temperature). A first pass
takes each row over a window of :data:`WINDOW` bores starting just below the first bore
whose velocity is within ``v_max`` (velocity falls as the bore grows, so no smaller bore can
pass or check); a row that passes there has its answer. The other rows ('check', 'fail', or a
pass further up) are evaluated over every bore of the family. Time is linear in the rows.

Example
-------
>>> from kit.inputs.line_list import read_line_list
>>> from kit.core.liquids import make_liquid
>>> ll = read_line_list("tag,flow,length,duty\\nL-1,150 gpm,100 m,pump_discharge\\n")
>>> b = size_batch(ll, make_liquid("water"))
>>> b[0].size, b[0].verdict, b[0].row
('3-1/2', 'pass', 2)
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from operator import attrgetter, itemgetter

import numpy as np

from kit.core.criteria import DUTY_CLASSES, MARGINAL_FRACTION
from kit.core.line import G
from kit.core.sizing import batch_friction
from kit.errors import HeadlineError, InputError, ScenarioError
from kit.inputs.line_list import LineList, gc_paused

__all__ = ["BatchRow", "size_batch", "family_bores"]

_NAN = float("nan")


@dataclass(frozen=True)
class BatchRow:
    """One sized row of a line list (SI).

    ``verdict`` is 'pass', 'check', 'fail' or 'error'; ``row`` is the spreadsheet row of the
    list (header = 1). For a 'fail', ``nearest`` is the size that comes closest and ``miss``
    says which limit it misses by how much (``size`` stays empty and the numbers NaN, as
    for any row without a size).
    """

    tag: str
    size: str
    bore: float
    velocity: float
    dp_per_m: float
    head_loss: float
    rise: float
    verdict: str
    reason: str
    row: int = 0
    nearest: str = ""
    miss: str = ""


@lru_cache(maxsize=256)
def family_bores(standard: str, schedule: str, material: str, condition: str):
    """Nominal sizes, bores [m] and roughnesses [m] of one pipe family, smallest first
    (sizes without that schedule are skipped).

    >>> noms, D, eps = family_bores("asme_b36_10m", "40", "carbon_steel", "new")
    >>> noms[0], round(float(D[0]) * 1000, 2)
    ('1/8', 6.84)
    """
    from kit.core import pipes

    out = [pipes.catalogue_pipe(standard, nom, schedule, material, condition)
           for nom in pipes.nominal_sizes(standard)
           if schedule in pipes.schedules(standard, nom)]
    if not out:
        raise InputError("schedule", schedule, f"is not a schedule of any size of {standard}")
    return (tuple(p.nominal for p in out), np.array([p.Di for p in out]),
            np.array([p.roughness for p in out]))


def _liquid_of(key, conc, default_liquid, cache):
    from kit.core.liquids import make_liquid

    if key is None:
        if default_liquid is None:
            raise ScenarioError("liquid", "the row names the scenario's liquid, but there is "
                                "none")
        return default_liquid
    k = (key, conc)
    if k not in cache:
        cache[k] = make_liquid(key, conc)
    return cache[k]


def _miss_text(ratio_v, ratio_dp, V, dp, v_max, dp_max, label) -> str:
    if ratio_v >= ratio_dp:
        return (f"velocity {V:.3g} m/s is {100 * (ratio_v - 1):.0f} % above the {label} "
                f"limit of {v_max:.3g} m/s")
    return (f"pressure drop {dp / 1000 * 100:.3g} kPa/100 m is {100 * (ratio_dp - 1):.0f} % "
            f"above the {label} limit of {dp_max / 1000 * 100:.3g} kPa/100 m")


def size_batch(lines, default_liquid=None, p_baro: float = 101325.0,
               duties: dict | None = None) -> list[BatchRow]:
    """Size every row of a line list (see the module's method), in row order.

    Parameters
    ----------
    lines : LineList or iterable of LineRow and RowError
        From :func:`kit.inputs.line_list.read_line_list`; a :class:`RowError` becomes an
        'error' row carrying its message [-]
    default_liquid : Liquid or UserLiquid, optional
        The liquid of rows whose ``liquid`` is None (``scenario`` in the list) [-]
    p_baro : float
        Barometric pressure: the pressure of the liquid states [Pa]
    duties : dict, optional
        Duty classes by key (default :data:`kit.core.criteria.DUTY_CLASSES`; a scenario's
        edited class replaces its key) [-]

    Returns
    -------
    list of BatchRow
        One per row, ordered by ``row``.

    Examples
    --------
    >>> from kit.inputs.line_list import read_line_list
    >>> ll = read_line_list("tag,flow,length,liquid\\nA,2000 gpm,10 m,water\\nB,1 gpm,9 m,x\\n")
    >>> a, b = size_batch(ll)
    >>> a.verdict, a.size, round(a.velocity, 2)
    ('pass', '12', 1.75)
    >>> b.verdict
    'error'
    """
    if not isinstance(lines, LineList):
        lines = LineList.from_rows(lines)
    with gc_paused():
        return _size(lines, default_liquid, p_baro,
                     DUTY_CLASSES if duties is None else duties)


def _codes(*cols) -> tuple[np.ndarray, list]:
    """Integer code per row of the distinct tuples of ``cols``, and those tuples."""
    keys = list(zip(*cols, strict=True))
    uniq = {k: i for i, k in enumerate(dict.fromkeys(keys))}
    return np.fromiter(map(uniq.__getitem__, keys), np.intp, len(keys)), list(uniq)


def _size(ll: LineList, default_liquid, p_baro: float, duties: dict) -> list[BatchRow]:
    out = [BatchRow(e.tag, "", _NAN, _NAN, _NAN, _NAN, _NAN, "error", e.message, e.row)
           for e in ll.errors]
    failed = {}  # index -> error, for rows that cannot be sized
    # duty limits per row
    dcode, dkeys = _codes(ll.duty)
    lim = np.full((len(dkeys), 3), np.nan)
    for c, (k,) in enumerate(dkeys):
        d = duties.get(k)
        if d is not None:
            lim[c] = (d.v_min, d.v_max, d.dp_max)
    vmin, vmax, dpmax = lim[dcode].T
    # liquid state per distinct (liquid, concentration, temperature)
    scode, skeys = _codes(ll.liquid, ll.concentration, ll.T.tolist())
    prop = np.full((len(skeys), 2), np.nan)
    state_err = {}
    liquids: dict = {}
    for c, (key, conc, T) in enumerate(skeys):
        try:
            st = _liquid_of(key, conc, default_liquid, liquids).state(T, p_baro)
            prop[c] = (st.rho, st.mu)
        except HeadlineError as exc:
            state_err[c] = exc
    rho, mu = prop[scode].T
    # pipe family per row
    fcode, fkeys = _codes(ll.standard, ll.schedule, ll.material, ll.condition)
    fam_err = {}
    for c, fam in enumerate(fkeys):
        try:
            family_bores(*fam)
        except HeadlineError as exc:
            fam_err[c] = exc
    bad = np.isnan(vmin) | np.isnan(rho)
    for c in fam_err:
        bad |= fcode == c
    for i in np.flatnonzero(bad).tolist():
        if np.isnan(vmin[i]):
            failed[i] = InputError(f"batch row {ll.row[i]} (tag {ll.tag[i]}): duty", ll.duty[i],
                                   f"must be one of {', '.join(map(repr, duties))}")
        elif np.isnan(rho[i]):
            failed[i] = state_err[int(scode[i])]
        else:
            failed[i] = fam_err[int(fcode[i])]
    rows = ll.row.tolist()
    for i, exc in failed.items():
        text = str(exc)
        where = f"batch row {rows[i]} (tag {ll.tag[i]})"
        out.append(BatchRow(ll.tag[i], "", _NAN, _NAN, _NAN, _NAN, _NAN, "error",
                            text if where in text else f"{where}: {text}", rows[i]))
    labels = {k: duties[k].label for (k,) in dkeys if k in duties}
    for c, fam in enumerate(fkeys):
        if c in fam_err:
            continue
        idx = np.flatnonzero((fcode == c) & ~bad)
        if len(idx):
            out.extend(_size_family(ll, idx, fam, rho, mu, vmin, vmax, dpmax, labels))
    out.sort(key=attrgetter("row"))
    return out


def _take(seq, ii: list) -> list:
    """``[seq[i] for i in ii]`` at C speed."""
    if len(ii) == len(seq):
        return list(seq)
    if len(ii) == 1:
        return [seq[ii[0]]]
    return list(itemgetter(*ii)(seq))


#: Bores evaluated per row in the first pass (from the first bore slow enough for v_max).
WINDOW = 4


def _grade(Q, rho, mu, vmin, vmax, dpmax, D, eps):
    """Verdict code (0 pass, 1 check, 2 fail), chosen column, V, dp/L, f at it, for rows
    (column vectors) over bores ``D`` (a row of bores, or one row of bores per row)."""
    V, _, f, dp = batch_friction(Q, D, eps, rho, mu)
    top = 1.0 - MARGINAL_FRACTION
    passes = (V <= vmax * top) & (dp <= dpmax * top) & (V >= vmin)
    ok = (V <= vmax) & (dp <= dpmax)
    any_pass, any_ok = passes.any(axis=1), ok.any(axis=1)
    j = np.where(any_pass, passes.argmax(axis=1),
                 np.where(any_ok, ok.argmax(axis=1),
                          np.maximum(V / vmax, dp / dpmax).argmin(axis=1)))
    r = np.arange(len(j))
    return np.where(any_pass, 0, np.where(any_ok, 1, 2)), j, V[r, j], dp[r, j], f[r, j]


def _size_family(ll, idx, fam, rho, mu, vmin, vmax, dpmax, labels) -> list[BatchRow]:
    """All rows ``idx`` of one pipe family over its bores in numpy passes.

    First pass: each row over a window of :data:`WINDOW` bores starting one below the first
    bore whose velocity is within ``v_max`` (no smaller bore can pass or check, velocity
    falling as the bore grows); a row that passes there has its answer, the smallest passing
    size. Second pass: the other rows ('check', 'fail' or a pass further up) over every bore.
    """
    noms, D, eps = family_bores(*fam)
    Q, L, K = ll.Q[idx], ll.L[idx], ll.K[idx]
    args = (Q[:, None], rho[idx, None], mu[idx, None], vmin[idx, None], vmax[idx, None],
            dpmax[idx, None])
    m = len(D)
    if m > WINDOW and np.all(np.diff(D) > 0):
        area = np.pi / 4 * D * D
        start = np.clip(np.searchsorted(area, Q / vmax[idx]) - 1, 0, m - WINDOW)
        cols = start[:, None] + np.arange(WINDOW)
        verdict, j, Vj, dpj, fj = _grade(*args, D[cols], eps[cols])
        j = start + j
        redo = np.flatnonzero(verdict != 0)
        if len(redo):
            v2, j2, V2, dp2, f2 = _grade(*(a[redo] for a in args), D[None, :], eps[None, :])
            verdict[redo], j[redo], Vj[redo], dpj[redo], fj[redo] = v2, j2, V2, dp2, f2
    else:
        verdict, j, Vj, dpj, fj = _grade(*args, D[None, :], eps[None, :])
    vmax, dpmax = vmax[idx, None], dpmax[idx, None]
    Dj = D[j]
    hl = (fj * L / Dj + K) * Vj * Vj / (2 * G)
    ii = idx.tolist()
    tags = _take(ll.tag, ii)
    rows = ll.row[idx].tolist()
    rise = ll.rise[idx].tolist()
    duty = _take(ll.duty, ii)
    size = [noms[k] for k in j.tolist()]
    out = list(map(BatchRow, tags, size, Dj.tolist(), Vj.tolist(), dpj.tolist(), hl.tolist(),
                   rise, [_VERDICTS[v] for v in verdict.tolist()],
                   list(map(_why, verdict.tolist(), map(labels.__getitem__, duty))),
                   rows))
    for k in np.flatnonzero(verdict == 2).tolist():
        lab = labels[duty[k]]
        miss = _miss_text(Vj[k] / vmax[k, 0], dpj[k] / dpmax[k, 0], Vj[k], dpj[k],
                          vmax[k, 0], dpmax[k, 0], lab)
        out[k] = BatchRow(tags[k], "", _NAN, _NAN, _NAN, _NAN, rise[k], "fail",
                          f"no size of the schedule meets the {lab} velocity and pressure-drop "
                          f"limits; nearest: {size[k]}, whose {miss}", rows[k], size[k], miss)
    return out


_VERDICTS = ("pass", "check", "fail")


@lru_cache(maxsize=64)
def _why(verdict: int, label: str) -> str:
    if verdict == 0:
        return f"smallest size meeting every {label} criterion"
    if verdict == 1:
        return (f"smallest size within the {label} limits, but near one or below the "
                "velocity range")
    return ""
