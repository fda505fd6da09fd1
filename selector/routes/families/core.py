"""The core under a surface treatment, shared by the nitride and induction families
(and, through them, their bought-bar forms ``supply_nitride`` and ``supply_induction``).

A surface treatment (gas nitriding, induction hardening) leaves the core as the prior
cycle made it: quenched and tempered at the real section
(:func:`selector.routes.families.quench_temper.through_harden`: Grossmann H, conduction
cooling, ASTM A255 Jominy curve, Hollomon–Jaffe tempering) where the route has a prior
harden and temper, else the grade's annealed catalogue baseline.  The core profile is
given on the case-hardening positions (:func:`selector.routes.families.carburize.merged_positions`)
so that the case can be laid over it.
"""
from __future__ import annotations

from typing import Mapping

import numpy as np

from ...catalogue.grades import Grade
from ...models import conversions
from ..model_inputs import restrict
from .base import Batch
from .carburize import merged_positions, resample
from .quench_temper import default_austenitize_c, through_harden

#: keys of a prior harden-and-temper cycle, in the order a family's parameters name them
PRIOR_KEYS = ("quench", "agitation", "austenitize_c", "temper_temp_c", "temper_hours")
#: core properties replaced by the annealed baseline where there is no prior cycle
_BASELINE = (("uts_mpa", "base_uts_mpa"), ("yield_mpa", "base_yield_mpa"),
             ("elongation_pct", "base_elongation_pct"))


def prior_cycle_params(harden: Mapping, temper: Mapping, grade: Grade, prefix: str = "") -> dict:
    """Parameters of a prior ``harden → temper`` cycle from its two steps: quench,
    agitation (default ``moderate``), austenitize_c (default: the grade's,
    :func:`~selector.routes.families.quench_temper.default_austenitize_c`), temper_temp_c
    and temper_hours (default 2 h), each key with ``prefix``."""
    aust = float(harden["austenitize_c"]) if "austenitize_c" in harden else default_austenitize_c(grade)
    values = (str(harden["quench"]), str(harden.get("agitation", "moderate")), aust,
              float(temper["temp_c"]), float(temper.get("hours", 2.0)))
    return {prefix + k: v for k, v in zip(PRIOR_KEYS, values)}


def no_prior_cycle_params(prefix: str = "") -> dict:
    """The same keys where there is no prior cycle (placeholders: oil, moderate, NaN)."""
    values = ("oil", "moderate", float("nan"), float("nan"), float("nan"))
    return {prefix + k: v for k, v in zip(PRIOR_KEYS, values)}


def core_profile(batch: Batch, prior_qt: np.ndarray, quench, agitation, austenitize_c, temper_temp_c,
                 temper_hours) -> tuple[dict, np.ndarray, np.ndarray]:
    """Core properties and hardness profile under a surface treatment.

    Parameters
    ----------
    batch : Batch
        The states.
    prior_qt : ndarray of bool, shape (n,)
        True where the core was hardened and tempered before the treatment.
    quench, agitation : array_like of str, shape (n,)
        The prior hardening's quench medium and agitation.
    austenitize_c, temper_temp_c, temper_hours : array_like, shape (n,)
        The prior cycle, °C and hours (any finite placeholder where ``prior_qt`` is False).

    Returns
    -------
    (res, positions, core_hv)
        ``res``: the through-hardening result where ``prior_qt``, with the annealed
        baseline's strength, ductility and hardness elsewhere (reduction of area NaN,
        martensite 0 %); ``positions``: r/R from 1 to 0; ``core_hv``: (n, len(positions)).
    """
    n = batch.n
    if prior_qt.any():
        res = through_harden(batch, quench, agitation, austenitize_c, temper_temp_c, temper_hours)
        restrict(res, "core", prior_qt)      # the states without a prior cycle ran with placeholders
        core_pos = np.asarray(res["profile_positions"], float)
        pos = merged_positions(core_pos)
        core_hv = resample(res["profile_hv"], core_pos, pos)
    else:
        res = {"model_inputs": {"core": np.zeros(n, bool)}}
        pos = merged_positions(np.linspace(1.0, 0.0, 11))
        core_hv = np.zeros((n, len(pos)))
    # the annealed baseline where there is no prior hardening
    base_hv = conversions.hb_to_hv(batch.attr("base_hardness_hb"))
    core_hv = np.where(prior_qt[:, None], core_hv, base_hv[:, None])
    if not prior_qt.all():
        for k, attr in _BASELINE:
            v = batch.attr(attr)
            res[k] = np.where(prior_qt, res.get(k, v), v)
            res["center_" + k] = np.where(prior_qt, res.get("center_" + k, v), v)
        res["hardness_hv"] = np.where(prior_qt, res.get("hardness_hv", base_hv), base_hv)
        res["center_hardness_hv"] = np.where(prior_qt, res.get("center_hardness_hv", base_hv), base_hv)
        if "reduction_area_pct" in res:
            res["reduction_area_pct"] = np.where(prior_qt, res["reduction_area_pct"], np.nan)
        if "center_martensite_pct" in res:
            res["center_martensite_pct"] = np.where(prior_qt, res["center_martensite_pct"], 0.0)
    return res, pos, core_hv
