"""Solution treat and age: the precipitation-hardened route.

Accepted sequences: ``solution_treat`` (quench and natural aging: T4; Condition A of
17-4PH / 15-5PH; TB00 of C17200), ``solution_treat → age`` (artificial aging: T6,
T7x, H900…H1150, TF00) and ``age`` (aging the supplied solution-treated material).
An ``age`` step takes ``temp_c`` and ``hours``, or a temper ``designation``
(:data:`DESIGNATIONS`) that stands for its schedule; an age below 60 °C is natural
aging.  Two-step schedules (7075-T73) add their temperature-compensated times.

Model: Shercliff & Ashby (1990) process model, calibrated per alloy
(:mod:`selector.models.aging`, ``data/aging_calibration.csv``; 17-4PH / 15-5PH from the
offline fit ``data/fits/aging_ph_coefficients.csv``); the over-aging ratio
P/P_p is returned as ``peak_ratio`` and past the peak a note warns.
"""
from __future__ import annotations

import numpy as np

from ...errors import NotModelledError, RouteError
from ...models import aging as ag, conversions
from ..model_inputs import uses
from .base import Batch, RouteFamily

#: the calibrated aging models (``aging.AgingConstants.model``), one per alloy class
AGING_MODELS = ("shercliff_ashby_aluminium", "shercliff_ashby_ph_stainless", "shercliff_ashby_c17200")

ROUTE = "age"

#: below this aging temperature (°C) an age is natural aging at room temperature
NATURAL_LIMIT_C = 60.0

#: natural-aging time of a T4 when none is given, h (stable after about 4 days, common practice)
NATURAL_DEFAULT_H = 96.0

#: temper designation -> (steps of the age as [(temp_c, hours), ...], source); an empty
#: list = solution treated and naturally aged / as solution treated
DESIGNATIONS = {
    "6061": {"T4": ([], "ANSI H35.1 T4: solution heat treated and naturally aged (about 4 days, common practice)"),
             "T6": ([(175.0, 8.0)], "175 °C x 8 h (or 160 °C x 18 h), AMS 2770 / ASTM B918 (common practice)")},
    "6082": {"T4": ([], "ANSI H35.1 T4 (common practice)"),
             "T6": ([(175.0, 8.0)], "175 °C x 8 h (common practice)")},
    "2024": {"T4": ([], "ANSI H35.1 T4: naturally aged, stable after about 96 h (common practice)"),
             "T6": ([(191.0, 9.0)], "191 °C x 9 h from T4 (AMS 2770, from memory)")},
    "7075": {"T6": ([(121.0, 24.0)], "121 °C x 24 h (AMS 2770 / ASTM B918, common practice)"),
             "T73": ([(107.0, 7.0), (163.0, 27.0)], "107 °C x 6-8 h + 163 °C x 24-30 h (AMS 2770, from memory)")},
    "17-4PH": {"A": ([], "Condition A, solution treated 1040 °C (ASTM A564)"),
               **{f"H{f}": ([(round((f - 32) / 1.8), 1.0 if f == 900 else 4.0)],
                            f"{f} °F for {'1' if f == 900 else '4'} h (ASTM A564 / AMS 5622)")
                  for f in (900, 925, 1025, 1075, 1100, 1150)}},
    "C17200": {"TB00": ([], "solution annealed (ASTM B196)"),
               "TF00": ([(316.0, 3.0)], "316 °C (600 °F) x 3 h, peak aged AT temper (ASTM B196; common practice)")},
}
DESIGNATIONS["15-5PH"] = DESIGNATIONS["17-4PH"]


def designation_steps(grade_id: str, designation: str):
    """Aging steps ``[(temp_c, hours), ...]`` of a temper designation for a grade."""
    table = DESIGNATIONS.get(grade_id, {})
    key = str(designation).strip().upper().replace(" ", "")
    for name, (steps, _src) in table.items():
        if name.upper() == key:
            return list(steps), name
    allowed = ", ".join(table) or f"(none: {grade_id} has no aging tempers)"
    raise RouteError("designation", designation, f"a temper of {grade_id}: {allowed}", "age")


class Age(RouteFamily):
    name = "age"
    label = "solution treat + age"
    patterns = (("solution_treat",), ("age",), ("solution_treat", "age"))
    main_parameter = "age_hours"
    parameters = ("solution_temp_c", "age_temp_c", "age_hours", "age2_temp_c", "age2_hours", "designation")
    families = ("aluminium", "stainless_ph", "copper_alloy")
    model_inputs = sum((uses(m, temp_c="aging_temp_c", hours="aging_hours", where=m) for m in AGING_MODELS), ())
    references = (
        "H.R. Shercliff & M.F. Ashby, Acta Metall. Mater. 38 (1990) 1789-1802 and 1803-1812 (aging process model)",
        "calibration: Aluminum Association typical tempers, ASTM B196 (C17200): data/aging_calibration.csv; "
        "17-4PH / 15-5PH: typical values (Aerospace Structural Metals Handbook, from memory) fitted offline by "
        "scripts/fit_aging_ph.py (data/fits/aging_ph_coefficients.csv); ASTM A564 minimums checked",
        "ANSI H35.1 (T tempers); AMS 2770 / ASTM B918 (aluminium schedules); AMS 5622 (17-4PH schedules)",
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        if grade.id not in ag.alloys():
            raise NotModelledError(f"aging of {grade.id} is not calibrated (calibrated: {', '.join(ag.alloys())}); "
                                   "no estimate is given rather than an invented one")
        st = next((s for s in steps if s["op"] == "solution_treat"), None)
        a = next((s for s in steps if s["op"] == "age"), None)
        sol = st.get("temp_c") if st else None
        sol = float(self.window_value(grade, ROUTE, "solution_temp_c", sol, float("nan")))
        des = ""
        sched: list = []
        if a is not None and "designation" in a:
            sched, des = designation_steps(grade.id, a["designation"])
            if "temp_c" in a or "hours" in a:
                raise RouteError("designation", a["designation"], "either a designation or temp_c/hours", "age")
        elif a is not None:
            t = float(self.window_value(grade, ROUTE, "age_temp_c", a.get("temp_c"), 175.0))
            h = float(self.window_value(grade, ROUTE, "age_hours", a.get("hours"), 8.0))
            sched = [(t, h)] if t >= NATURAL_LIMIT_C else []
            if t < NATURAL_LIMIT_C:
                sched = [("natural", h)]
        nat_h = NATURAL_DEFAULT_H
        if sched and sched[0][0] == "natural":
            nat_h = float(sched[0][1])
            sched = []
        if len(sched) > 2:
            raise RouteError("designation", des, "a schedule of at most two steps", "age")
        (t1, h1) = sched[0] if sched else (float("nan"), nat_h)
        (t2, h2) = sched[1] if len(sched) > 1 else (float("nan"), float("nan"))
        params = {"solution_temp_c": sol, "age_temp_c": float(t1), "age_hours": float(h1),
                  "age2_temp_c": float(t2), "age2_hours": float(h2), "designation": des}
        warns = self.window_warnings(grade, ROUTE, {"solution_temp_c": sol} if sol == sol else {})
        if st is None and grade.family == "aluminium":
            warns.append("age without solution_treat: the supplied aluminium is assumed solution treated and "
                         "quenched (W or T4); from the O temper aging gives no strength (common practice)")
        return params, warns

    def to_steps(self, params):
        steps = []
        sol = float(params.get("solution_temp_c", float("nan")))
        steps.append({"op": "solution_treat", **({"temp_c": sol} if sol == sol else {})})
        if params.get("designation"):
            desig = str(params["designation"])
            if np.isfinite(float(params["age_temp_c"])):
                steps.append({"op": "age", "designation": desig})
            return steps
        t1 = float(params["age_temp_c"])
        if np.isfinite(t1):
            steps.append({"op": "age", "temp_c": t1, "hours": float(params["age_hours"])})
        elif float(params["age_hours"]) != NATURAL_DEFAULT_H:
            steps.append({"op": "age", "temp_c": 20.0, "hours": float(params["age_hours"])})
        t2 = float(params.get("age2_temp_c", float("nan")))
        if np.isfinite(t2):
            steps.append({"op": "age", "temp_c": t2, "hours": float(params["age2_hours"])})
        return steps

    def grid(self, grade):
        if grade.id not in ag.alloys():
            return {k: np.array([], float) for k in self.parameters}
        rows = []
        for name, (sched, _src) in DESIGNATIONS.get(grade.id, {}).items():
            t1, h1 = sched[0] if sched else (float("nan"), NATURAL_DEFAULT_H)
            t2, h2 = sched[1] if len(sched) > 1 else (float("nan"), float("nan"))
            rows.append((t1, h1, t2, h2, name))
        c = ag.aging_constants(grade.id)
        w = grade.window(ROUTE, "age_temp_c")
        t_def = float(w.default) if w is not None and w.default == w.default and w.default >= NATURAL_LIMIT_C \
            else (rows[-1][0] if rows and rows[-1][0] == rows[-1][0] else 175.0)
        tp = float(ag.peak_time_h(c, t_def))
        for f in (0.25, 0.5, 2.0, 4.0):
            rows.append((t_def, round(tp * f, 3), float("nan"), float("nan"), ""))
        sol = float(self.window_value(grade, ROUTE, "solution_temp_c", None, float("nan")))
        n = len(rows)
        return {"solution_temp_c": np.full(n, sol),
                "age_temp_c": np.array([r[0] for r in rows], float), "age_hours": np.array([r[1] for r in rows], float),
                "age2_temp_c": np.array([r[2] for r in rows], float), "age2_hours": np.array([r[3] for r in rows], float),
                "designation": np.array([r[4] for r in rows], dtype=object)}

    def compute(self, batch: Batch):
        p = batch.params
        n = batch.n
        ids = [batch.grades[i].id for i in batch.gidx]
        c = ag.aging_constants(ids)
        t1 = np.asarray(p["age_temp_c"], float)
        h1 = np.asarray(p["age_hours"], float)
        t2 = np.asarray(p["age2_temp_c"], float)
        h2 = np.asarray(p["age2_hours"], float)
        natural = ~np.isfinite(t1)
        two = np.isfinite(t2)
        nat = ag.natural_aged_properties(c, np.where(natural, h1, NATURAL_DEFAULT_H))
        t1s, h1s = np.where(natural, 100.0, t1), np.where(natural, 0.0, h1)
        p1 = np.where(two, ag.temperature_compensated_time(t1s, h1s, c.q_kj_mol), 0.0)
        art = ag.aged_properties(c, np.where(two, t2, t1s), np.where(two, h2, h1s), prior_p=p1)
        out = {}
        for k in ("yield_mpa", "uts_mpa", "elongation_pct", "peak_ratio"):
            out[k] = np.where(natural, nat[k], art[k])
        for k in ("uts_mpa", "yield_mpa", "elongation_pct"):
            out["center_" + k] = out[k]
        steel = batch.attr("family").astype(str) == "stainless_ph"
        hv = np.where(steel, conversions.uts_to_hv(np.where(steel, out["uts_mpa"], 1000.0)), np.nan)
        out.update(hardness_hv=hv, surface_hardness_hv=hv, center_hardness_hv=hv, case_depth_mm=np.zeros(n))
        overaged = ~natural & art["overaged"]
        t_last = np.where(two, t2, t1)
        notes = [
            ("over-aged: strength has passed its peak (P/P_p > 1.1, Shercliff & Ashby 1990); intended for "
             "T7x / H1025-H1150 tempers, otherwise age shorter or cooler", overaged),
            ("naturally aged state not yet stable (T4 needs about 4 days at room temperature; 7075-W keeps "
             "hardening): the estimate is the stable T4 value (common practice)", natural & ~nat["stable"]),
            ("thick aluminium sections quench slowly and age to lower strength (quench sensitivity not "
             "modelled; common practice)", (batch.attr("family").astype(str) == "aluminium")
             & (batch.section_mm > 75.0)),
        ]
        # the schedule's last step against the calibrated range of the state's own model
        out["model_inputs"] = {"aging_temp_c": t_last, "aging_hours": np.where(two, h2, h1),
                               **{m: (np.asarray(c.model, dtype=object) == m) & ~natural for m in AGING_MODELS}}
        out["notes"] = notes
        return out


FAMILIES = [Age()]
