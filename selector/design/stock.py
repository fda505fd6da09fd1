"""Rationalised stock list: the few grades that cover a whole parts list at the
least annual cost, as a mixed-integer linear program solved by HiGHS.

Model (a capacitated-free facility-location / set-covering form).  Items ``i`` are
the stock items (a grade; with a ``supply_condition`` column in the batch result,
a grade in a supply condition); ``j`` runs over the feasible candidates of the
batch result (``status == "candidate"``), one per part and stock item (the
cheapest route of that item for that part).  Binary variables: ``x_j`` (part
``p(j)`` is made from candidate ``j``) and ``y_i`` (item ``i`` is stocked)::

    minimise    sum_j q_p(j) c_j x_j  +  H sum_i y_i
    subject to  sum_{j in p} x_j = 1          every part with a candidate
                x_j <= y_i(j)                 a part is made only from a stocked item
                sum_i y_i <= K                optional: at most K stock items

with ``q_p`` the part's ``quantity_per_year``, ``c_j`` its ``part_cost`` and ``H``
the holding cost of one stocked item a year (same cost unit as ``part_cost``).
The disaggregated linking ``x_j <= y_i`` gives a tighter LP relaxation than the
aggregated ``sum_j x_j <= n y_i`` (Cornuéjols, Nemhauser & Wolsey 1990).  Parts whose
candidate costs are proportional (the same items at the same cost ratios, as parts
of one section and targets that differ only in length and quantity) choose the same
item for any stocked set, so they are merged into one unit of summed weight before
the solve (same optimum, far fewer variables on a long parts list); the reported
costs are summed from the parts' own rows.

Solver: ``scipy.optimize.milp`` (HiGHS branch and cut: Huangfu & Hall, "Parallelizing
the dual revised simplex method", Math. Prog. Comp. 10 (2018) 119-142); ``gap`` is
the solver's relative optimality gap (0 when proven optimal).

The choice is made among the candidates present in the batch result: a larger
``top`` in :func:`selector.batch` (or ``top=None``) gives the program more room.
A part with no feasible candidate (only nearest misses) cannot be assigned; it is
listed in ``unassigned`` and in the assignment with an empty grade, never dropped.

References
----------
G. Cornuéjols, G.L. Nemhauser and L.A. Wolsey, "The uncapacitated facility location
problem", in *Discrete Location Theory*, Wiley, 1990, ch. 3 (strong formulation).
Q. Huangfu and J.A.J. Hall, Math. Prog. Comp. 10 (2018) 119-142 (HiGHS).
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from ..errors import InputError
from .parts_list import read_parts

ASSIGNMENT_COLUMNS = ["part_id", "grade", "route_text", "part_cost", "annual_cost", "quantity_per_year",
                      "stock_item", "rank", "robust", "status"]
COST_BY_COUNT_COLUMNS = ["max_grades", "n_grades", "total_cost", "material_cost", "holding_cost", "grades",
                         "feasible", "gap"]


def _items(res: pd.DataFrame) -> pd.Series:
    if "supply_condition" in res.columns:
        cond = res["supply_condition"].fillna("").astype(str)
        return res["grade"].astype(str) + np.where(cond != "", " / " + cond, "")
    return res["grade"].astype(str)


def _problem(batch_result: pd.DataFrame, qty: dict, robust_only: bool) -> pd.DataFrame:
    need = {"part_id", "status", "grade", "route_text", "part_cost"}
    missing = sorted(need - set(batch_result.columns))
    if missing:
        raise InputError("batch_result", ", ".join(missing), "the output of selector.batch (columns "
                         + ", ".join(sorted(need)) + ")")
    unknown = sorted(set(batch_result["part_id"].astype(str)) - set(qty))
    if unknown:
        raise InputError("batch_result", unknown[0], "part ids of the parts list given")
    c = batch_result[batch_result["status"] == "candidate"].copy()
    if robust_only and "robust" in c:
        c = c[c["robust"].astype(bool)]
    c = c[np.isfinite(c["part_cost"].astype(float))]
    c["part_id"] = c["part_id"].astype(str)
    c["stock_item"] = _items(c).to_numpy()
    c["quantity_per_year"] = c["part_id"].map(qty).astype(float)
    c["annual_cost"] = c["quantity_per_year"] * c["part_cost"].astype(float)
    if "rank" not in c:
        c["rank"] = 1
    # per part and item only the cheapest route can be in an optimum
    c = c.sort_values(["part_id", "stock_item", "part_cost", "rank"], kind="stable")
    return c.drop_duplicates(["part_id", "stock_item"]).reset_index(drop=True)


def _units(cand: pd.DataFrame) -> tuple[np.ndarray, pd.DataFrame]:
    """Merge parts whose candidate costs are proportional (same items, same cost
    ratios: e.g. parts of one section and targets that differ only in length and
    quantity).  For any set of stocked items such parts pick the same item, so the
    program over the merged units, with weight ``sum q_p min_j c_j``, has the same
    optimum.  Returns the unit of each candidate row and the merged rows (``unit``,
    ``stock_item``, ``annual_cost``)."""
    pc = cand["part_cost"].to_numpy(float)
    pmin = cand.groupby("part_id", sort=False)["part_cost"].transform("min").to_numpy(float)
    ratio = pc / pmin
    tag = cand["stock_item"].astype(str) + "=" + pd.Series([f"{r:.12g}" for r in ratio], index=cand.index)
    key = tag.groupby(cand["part_id"], sort=False).transform(lambda t: "|".join(sorted(t)))
    unit = pd.factorize(key)[0]
    weight = pd.Series(cand["quantity_per_year"].to_numpy(float) * pmin).groupby(
        [unit, cand["part_id"].to_numpy()]).first().groupby(level=0).sum()
    merged = pd.DataFrame({"unit": unit, "stock_item": cand["stock_item"].to_numpy(), "ratio": ratio})
    merged = merged.drop_duplicates(["unit", "stock_item"]).reset_index(drop=True)
    merged["annual_cost"] = merged["ratio"].to_numpy() * weight.loc[merged["unit"]].to_numpy()
    return unit, merged


def _solve(cand: pd.DataFrame, holding: float, k: int | None, time_limit_s: float, units=None):
    from scipy.optimize import LinearConstraint, milp
    from scipy.sparse import coo_matrix, csr_matrix, hstack, vstack

    unit_of_row, merged = units if units is not None else _units(cand)
    items, item_idx = np.unique(merged["stock_item"].to_numpy(), return_inverse=True)
    part_idx = merged["unit"].to_numpy()
    nj, ni, npart = len(merged), len(items), int(part_idx.max()) + 1
    cost = np.r_[merged["annual_cost"].to_numpy(float), np.full(ni, holding)]
    jj = np.arange(nj)
    assign = coo_matrix((np.ones(nj), (part_idx, jj)), shape=(npart, nj + ni))
    link = hstack([coo_matrix((np.ones(nj), (jj, jj)), shape=(nj, nj)),
                   coo_matrix((-np.ones(nj), (jj, item_idx)), shape=(nj, ni))])
    rows = [csr_matrix(assign), csr_matrix(link)]
    lo = [np.ones(npart), np.full(nj, -np.inf)]
    hi = [np.ones(npart), np.zeros(nj)]
    if k is not None:
        rows.append(csr_matrix(np.r_[np.zeros(nj), np.ones(ni)][None, :]))
        lo.append(np.array([-np.inf]))
        hi.append(np.array([float(k)]))
    cons = LinearConstraint(vstack(rows).tocsr(), np.concatenate(lo), np.concatenate(hi))
    res = milp(cost, constraints=cons, integrality=np.ones(nj + ni), bounds=(0, 1),
               options={"time_limit": float(time_limit_s), "mip_rel_gap": 0.0})
    if res.x is None:
        return None
    pick = merged[res.x[:nj] > 0.5]
    chosen = set(zip(pick["unit"], pick["stock_item"]))
    x = np.array([(u, it) in chosen for u, it in zip(unit_of_row, cand["stock_item"])], bool)
    y = res.x[nj:] > 0.5
    material = float(cand["annual_cost"].to_numpy(float)[x].sum())
    gap = getattr(res, "mip_gap", None)
    return {"x": x, "items": [str(s) for s in items[y]], "objective": material + holding * int(y.sum()),
            "material": material, "holding": holding * int(y.sum()),
            "gap": 0.0 if gap is None or not math.isfinite(gap) else float(gap), "status": int(res.status),
            "message": str(res.message), "units": npart}


def rationalise(batch_result: pd.DataFrame, parts, holding_cost_per_grade: float, max_grades: int | None = None,
                *, robust_only: bool = False, time_limit_s: float = 60.0) -> dict:
    """The stock items and the part-to-item assignment of least annual cost.

    Parameters
    ----------
    batch_result : pandas.DataFrame
        The output of :func:`selector.batch`; its ``candidate`` rows are the choices.
    parts : path, bytes or pandas.DataFrame
        The parts list the batch was run on (its ``quantity_per_year``).
    holding_cost_per_grade : float
        Annual cost of holding one stock item (>= 0), in the unit of ``part_cost``
        (relative cost, 1018 bar = 1 per kg, or the price sheet's currency).
    max_grades : int, optional
        At most this many stock items (>= 1); default no limit.
    robust_only : bool
        Use only candidates that meet their targets at every composition corner.
    time_limit_s : float
        Solver time limit per program, s (1 to 3600).

    Returns
    -------
    dict
        ``grades`` (list of the stocked items), ``assignment`` (DataFrame, columns
        :data:`ASSIGNMENT_COLUMNS`: one row per part, an empty ``grade`` and
        ``status = "unassigned"`` for a part with no feasible candidate),
        ``total_cost`` (Σ quantity × part cost + holding cost × items, assigned
        parts), ``material_cost``, ``holding_cost``, ``gap`` (the solver's relative
        optimality gap), ``cost_by_count`` (DataFrame, :data:`COST_BY_COUNT_COLUMNS`:
        least total cost with at most 1, 2, ... items up to the number of the
        unconstrained optimum), ``unassigned`` (part ids), ``max_grades``.

    Raises
    ------
    InputError
        A bad argument, a batch result not from these parts, or a ``max_grades``
        below the fewest items that cover every part (the message gives that number).
    """
    if isinstance(holding_cost_per_grade, bool) or not isinstance(holding_cost_per_grade, (int, float)) or \
            not math.isfinite(holding_cost_per_grade) or holding_cost_per_grade < 0:
        raise InputError("holding_cost_per_grade", holding_cost_per_grade,
                         "a finite number >= 0 (annual cost of one stocked grade, unit of part_cost)")
    if max_grades is not None and (isinstance(max_grades, bool) or not isinstance(max_grades, (int, np.integer))
                                   or max_grades < 1):
        raise InputError("max_grades", max_grades, "a whole number >= 1, or None for no limit")
    if isinstance(time_limit_s, bool) or not isinstance(time_limit_s, (int, float)) or \
            not 1 <= time_limit_s <= 3600:
        raise InputError("time_limit_s", time_limit_s, "a number of seconds in [1, 3600]")
    if not isinstance(batch_result, pd.DataFrame):
        raise InputError("batch_result", type(batch_result).__name__, "the DataFrame returned by selector.batch")
    table = read_parts(parts)
    qty = dict(zip(table["part_id"].astype(str), table["quantity_per_year"].astype(float)))
    cand = _problem(batch_result, qty, robust_only)
    holding = float(holding_cost_per_grade)
    covered = set(cand["part_id"])
    unassigned = [p for p in table["part_id"].astype(str) if p not in covered]

    curve, free = [], None
    if len(cand):
        units = _units(cand)
        free = _solve(cand, holding, None, time_limit_s, units)
        k_star = len(free["items"])
        for k in range(1, k_star + 1):
            sol = free if k == k_star else _solve(cand, holding, k, time_limit_s, units)
            curve.append({"max_grades": k, "n_grades": len(sol["items"]) if sol else 0,
                          "total_cost": sol["objective"] if sol else np.nan,
                          "material_cost": sol["material"] if sol else np.nan,
                          "holding_cost": sol["holding"] if sol else np.nan,
                          "grades": ";".join(sol["items"]) if sol else "", "feasible": sol is not None,
                          "gap": sol["gap"] if sol else np.nan})
    cost_by_count = pd.DataFrame(curve, columns=COST_BY_COUNT_COLUMNS)

    sol = free
    if len(cand) and max_grades is not None and max_grades < len(free["items"]):
        sol = _solve(cand, holding, int(max_grades), time_limit_s, units)
        if sol is None:
            ok = cost_by_count[cost_by_count["feasible"]]
            fewest = int(ok["max_grades"].min()) if len(ok) else len(free["items"])
            raise InputError("max_grades", max_grades,
                             f"at least {fewest}: fewer stock items cannot cover every part's candidates")
    if sol is None:
        chosen = cand.iloc[0:0]
        grades, total, material, hold, gap = [], 0.0, 0.0, 0.0, 0.0
    else:
        chosen = cand[sol["x"]]
        grades, total, material, hold, gap = (sol["items"], sol["objective"], sol["material"], sol["holding"],
                                              sol["gap"])
    chosen = chosen.assign(status="assigned")
    order = {p: i for i, p in enumerate(table["part_id"].astype(str))}
    rest = pd.DataFrame({"part_id": unassigned, "grade": "", "route_text": "", "part_cost": np.nan,
                         "annual_cost": np.nan, "quantity_per_year": [qty[p] for p in unassigned],
                         "stock_item": "", "rank": 0, "robust": False, "status": "unassigned"})
    assignment = pd.concat([chosen[[c for c in ASSIGNMENT_COLUMNS if c in chosen]], rest], ignore_index=True)
    assignment = assignment.assign(_o=assignment["part_id"].map(order)).sort_values("_o", kind="stable") \
        .drop(columns="_o").reset_index(drop=True)
    assignment["quantity_per_year"] = assignment["quantity_per_year"].astype(int)
    return {"grades": sorted(grades), "assignment": assignment[ASSIGNMENT_COLUMNS], "total_cost": float(total),
            "material_cost": float(material), "holding_cost": float(hold), "gap": float(gap),
            "cost_by_count": cost_by_count, "unassigned": unassigned, "max_grades": max_grades}
