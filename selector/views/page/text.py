"""Words of the page: candidate labels, parameter names, the band line, the
cautions of a candidate, percentages and the ranking summary, and the route in
words in the chosen units."""
from __future__ import annotations

import json
from typing import Mapping, Sequence

import pandas as pd

from selector.errors import SelectorError
from selector.routes import families
from selector.routes.describe import case_words, describe_step, parameter_words
from selector.rules.cautions import AVOID_CODES, CAUTIONS, cautions_for
from selector.views.export import to_csv_text
from selector.views.units import SI, UNIT_QUANTITY, route_words, to_display, unit, value_formatter


#: columns the caution rules read (selector.rules.cautions), when present
CAUTION_COLUMNS = ("grade", "family", "route_family", "quench", "temper_temp_c", "age_temp_c", "peak_ratio",
                   "designation", "c_pct", "hardness_hrc", "surface_hardness_hrc", "uts_mpa")

# --------------------------------------------------------------------------- candidate labels

def family_label(name: str) -> str:
    """The route family's own label (``harden + temper``), from the library's registry
    of families; a name the registry does not model reads as its words."""
    try:
        return families.get(name).label or name.replace("_", " ")
    except SelectorError:
        return str(name).replace("_", " ")


def param_label(name: str, family: str | None = None) -> str:
    """A process parameter in words (:func:`selector.routes.describe.parameter_words`)."""
    return parameter_words(name, family)[0]


def param_unit(name: str, system: str, family: str | None = None) -> str:
    """The unit of a process parameter in ``system`` (``°F`` for a temperature in US units)."""
    si_unit = parameter_words(name, family)[1]
    q = UNIT_QUANTITY.get(si_unit)
    return unit(q, system) if q else si_unit


def _quench_extra(q) -> str:
    """" (oil)" after a candidate's label where its route names a quench, else ""."""
    return f" ({q})" if isinstance(q, str) and q else ""


def label_candidates(cand: pd.DataFrame) -> pd.DataFrame:
    """Add ``id`` (C1, C2 … in the engine's order) and ``label`` (id, grade and a
    short route name) to a candidates table."""
    out = cand.reset_index(drop=True)        # copy-on-write: ``cand`` is never changed through it
    ids = [f"C{i + 1}" for i in range(len(out))]
    out.insert(0, "id", ids)
    quench = out["quench"].tolist() if "quench" in out.columns else [None] * len(out)
    out["label"] = [f"{i} {g} · {family_label(r)}{_quench_extra(q)}"
                    for i, g, r, q in zip(ids, out["grade"].tolist(), out["route_family"].tolist(), quench)]
    return out



def band_text(ev: Mapping, system: str) -> str:
    """One line with the 90 % prediction band of each estimate, in display units."""
    parts = []
    for key, label, q in (("yield_mpa", "yield", "stress"), ("uts_mpa", "tensile", "stress"),
                          ("elongation_pct", "elongation", None), ("hardness_hrc", "hardness", None)):
        lo, hi = ev.get(key + "_lo"), ev.get(key + "_hi")
        if lo is None or hi is None:
            continue
        if q:
            lo, hi, u = to_display(lo, q, system), to_display(hi, q, system), unit(q, system)
        else:
            u = "%" if key == "elongation_pct" else "HRC"
        nd = 1 if key in ("elongation_pct", "hardness_hrc") else 0
        parts.append(f"{label} {lo:.{nd}f}–{hi:.{nd}f} {u}")
    return ("90 % band (the range that held 90 % of independent published values for similar states): "
            + "; ".join(parts)) if parts else ""



def candidate_cautions(row: Mapping, warnings: Sequence[str] = (), context: Mapping | None = None) -> list[str]:
    """Every caution of one candidate, without repeats: the route model's notes and
    ``evaluate`` warnings, then the rules of :mod:`selector.rules.cautions` (when
    that module is present) under the service ``context``, as ``title: reason``."""
    out = [w for w in warnings if w]
    notes = row.get("notes")
    if isinstance(notes, str) and notes:
        out += [n.strip() for n in notes.split(" | ") if n.strip()]
    frame = pd.DataFrame([{c: row.get(c) for c in CAUTION_COLUMNS if c in row}])
    try:
        found = cautions_for(frame, **dict(context or {}))[0]
    except SelectorError:
        found = []
    out += [f"{c['title']}: {c['reason']}" for c in found]
    return list(dict.fromkeys(out))


def avoid_rules() -> list[str]:
    """Codes of the caution rules of severity ``avoid`` (for the page's allow list)."""
    return list(AVOID_CODES)


def avoid_rule_label(code: str) -> str:
    """The title of a caution rule (its code when unknown)."""
    c = CAUTIONS.get(code)
    return c.title if c is not None else code


def percent(p) -> str:
    """A probability as a percentage for display (``0.905`` -> ``"90.5 %"``, NaN -> ``"—"``)."""
    try:
        v = float(p)
    except (TypeError, ValueError):
        return "—"
    return "—" if v != v else f"{100.0 * v:.1f} %"


def ranking_summary(cand: pd.DataFrame) -> str:
    """One line on the candidates table: how many, the Pareto set and its objectives,
    how many reach the required probability, how many carry an avoid caution."""
    n = len(cand)
    p_req = float(cand["min_p_meet"].iloc[0]) if n and "min_p_meet" in cand else 0.9
    n_avoid = int((cand["avoid"] != "").sum()) if "avoid" in cand else 0
    return (f"**{n}** candidates meet the targets: **{int(cand['pareto'].sum())}** in the Pareto set "
            f"(min part cost, max probability of meeting the targets, max elongation), "
            f"**{int(cand['robust'].sum())}** meet them with a probability of at least {percent(p_req)} "
            f"(heats within the specification and the model's 90 % band), **{n_avoid}** carry an avoid "
            f"caution and are listed last.")


def to_csv(df: pd.DataFrame) -> bytes:
    """The table as UTF-8 CSV, text cells that could start a spreadsheet formula
    neutralised (:func:`selector.views.export.neutralise`)."""

    return to_csv_text(df).encode("utf-8")


# --------------------------------------------------------------------------- readable route

def route_steps(route: Sequence[Mapping], system: str) -> list[str]:
    """Numbered steps of a route in words, values in ``system``'s units
    (:func:`selector.routes.describe.describe_step`): ``1. austenitize 845 °C, quench in oil``."""
    fmt = value_formatter(system)
    return [f"{i}. {describe_step(s, fmt)}" for i, s in enumerate(route, 1)]


def route_line(route: Sequence[Mapping], system: str, si_text: str | None = None) -> str:
    """One-line route in words in ``system``'s units (:func:`selector.views.units.route_words`);
    ``si_text`` (the library's ``route_text``) where the steps are not known."""
    if isinstance(route, str):
        route = json.loads(route) if route.strip().startswith("[") else None
    if route:
        return route_words(list(route), system)
    return si_text or ""


def pick_label(grade: str, route_family: str) -> str:
    """``4140 · harden+temper`` (or ``no robust candidate``)."""
    if not grade:
        return "no robust candidate"
    return f"{grade} · {family_label(route_family)}"





# --------------------------------------------------------------------------- the settings in force

#: short names of the targets in the settings line: target key -> (words, quantity or unit text)
TARGET_WORDS = {
    "min_yield_mpa": ("yield ≥", "stress"), "max_yield_mpa": ("yield ≤", "stress"),
    "min_uts_mpa": ("tensile ≥", "stress"), "max_uts_mpa": ("tensile ≤", "stress"),
    "min_elongation_pct": ("elongation ≥", "%"), "min_hardness_hrc": ("hardness ≥", "HRC"),
    "max_hardness_hrc": ("hardness ≤", "HRC"), "min_surface_hardness_hrc": ("surface ≥", "HRC"),
    "min_case_depth_mm": ("case depth ≥", "length"), "max_relative_cost": ("cost per kg ≤", ""),
}


def _shown(v, what: str, system: str) -> str:
    if what in ("stress", "length", "temperature"):
        return f"{to_display(v, what, system):.4g} {unit(what, system)}"
    return f"{v:.4g} {what}".strip()


def settings_line(*, diameter_mm, thickness_mm, length_mm, targets: Mapping, families: Sequence[str],
                  all_families: Sequence[str], corrosion_resistant: bool, robust_only: bool, min_p_meet: float,
                  allow: Sequence[str], service: Mapping, prices: str, system: str) -> str:
    """One line naming every setting in force (values in display units): the section,
    each target, the families, the filters, the service conditions for the cautions,
    the prices and the units.  Nothing that steers the ranking is left out."""
    if diameter_mm is not None:
        section = f"round bar Ø {_shown(diameter_mm, 'length', system)}"
    elif thickness_mm is not None:
        section = f"plate {_shown(thickness_mm, 'length', system)} thick"
    else:
        section = "no section"
    if length_mm is not None:
        section += f" × {_shown(length_mm, 'length', system)} long"
    tl = [f"{TARGET_WORDS[k][0]} {_shown(v, TARGET_WORDS[k][1], system)}" for k, v in targets.items()
          if k in TARGET_WORDS and v is not None]
    fams = ("all families" if set(families) == set(all_families) else
            "families: " + ", ".join(f.replace("_", " ") for f in families) if families else "no family")
    if corrosion_resistant:
        fams += ", corrosion-resistant only"
    filt = (f"only candidates that meet the targets with a probability ≥ {100 * min_p_meet:.0f} %" if robust_only
            else "every candidate that meets the targets at the estimate")
    if allow:
        filt += "; cautions not ranked last: " + ", ".join(allow)
    sv = []
    if service.get("plated"):
        sv.append(service.get("plating") or "electroplated")
    if service.get("mating_material"):
        sv.append(f"mating {service['mating_material']}")
    sv.append(f"{service.get('environment', 'normal')} environment")
    if service.get("service_temp_c") is not None:
        sv.append(f"up to {_shown(service['service_temp_c'], 'temperature', system)}")
    units = ("SI (MPa, mm, °C)" if system == SI else "US customary (ksi, in, °F)")
    return (f"**In force** · {section} · targets: {', '.join(tl) if tl else 'none'} · {fams} · {filt} · "
            f"service: {', '.join(sv)} · prices: {prices} · units: {units}")


# --------------------------------------------------------------------------- the pin's targets explained

def pin_target_explanations(report: Mapping, system: str) -> list[str]:
    """One sentence per target the pin sets (markdown), with its working in display
    units: which stress governs the yield target and by how much, the shear-to-tensile
    factor behind the tensile target (and why that target can sit below the yield
    target), and where the surface-hardness target comes from."""
    s, t = report["stresses"], report["targets"]
    sf, kb = report["safety_factor"], report["bearing_factor"]
    ratio = report["shear_to_tensile"]
    su = unit("stress", system)

    def v(x):
        return f"{to_display(x, 'stress', system):.4g} {su}"
    dem = report["yield_candidates_mpa"]
    gov = report["governing"]
    others = ", ".join(f"{m} {v(dem[m])}" for m in ("bending", "shear", "bearing") if m != gov)
    out = [f"**Minimum yield {v(t['min_yield_mpa'])}: {gov} governs.** Each mode's yield demand is the safety "
           f"factor {sf:g} × its stress: bending {v(s['bending_mpa'])} × {sf:g}; shear √3 × {v(s['shear_mpa'])} "
           f"× {sf:g} (von Mises: shear yield = yield / √3); bearing {v(s['bearing_mpa'])} / {kb:g} × {sf:g}. "
           f"The largest, {gov}, sets the target (the others: {others})."]
    out.append(f"**Minimum tensile {v(t['min_uts_mpa'])}: from shear only.** Safety factor {sf:g} × shear "
               f"{v(s['shear_mpa'])} / {ratio['ratio']:g}, the ratio of ultimate shear to ultimate tensile "
               f"strength ({ratio['source']}; {ratio['confidence']}).  It guards against shearing the pin off, "
               "so it can be far below the yield target, which bending sets; a candidate meeting the yield "
               "target meets it as a rule, since tensile strength exceeds yield strength.")
    if t.get("min_surface_hardness_hrc") is not None:
        out.append(f"**Minimum surface hardness {t['min_surface_hardness_hrc']:g} HRC: for wear,** as typed "
                   "(not derived from the load); it calls for a hardened case or a through-hardened bar that "
                   "hard at the surface.")
    else:
        out.append("**No surface-hardness target:** the wear hardness is blank.")
    return out


def first_through_and_case(cand: pd.DataFrame) -> list:
    """The ``variant`` of the first through-hardened candidate and of the first
    case-hardened one, in the table's order (the library's reading of each route,
    :func:`selector.routes.describe.case_words`): the pair the side-by-side view starts
    from.  Either may be missing."""
    kinds = [case_words(list(r)) for r in cand["route"]]
    through = [v for v, k in zip(cand["variant"], kinds) if k == "through-hardened"][:1]
    case = [v for v, k in zip(cand["variant"], kinds) if k is None][:1]
    return through + case


def prices_in_use(name: str | None, prices: Mapping | None) -> str:
    """The prices the ranking uses, named: the accepted price sheet (and how many
    grades it prices) or the catalogue's indicative prices."""
    if not prices:
        return "catalogue prices (indicative, 1018 bar = 1 per kg)"
    return (f"price sheet '{name or 'price sheet'}' ({len(prices)} grade{'s' if len(prices) != 1 else ''} priced; "
            "catalogue prices for the others)")


def hardness_text(row: Mapping, which: str, scale: str) -> str:
    """``row[which + '_hrc' | '_hb' | '_hv']`` as text in ``scale`` (``—`` where the model
    gives none, e.g. below the Rockwell C range)."""
    v = row.get(f"{which}_{scale.lower()}")
    try:
        v = float(v)
    except (TypeError, ValueError):
        return "—"
    return "—" if v != v else (f"{v:.3g}" if scale == "HRC" else f"{v:.0f}")


def case_text(row: Mapping, system: str, scale: str = "HRC") -> str:
    """The surface hardness and case depth of a case-hardened candidate
    (``58 HRC, 0.8 mm``), or what the route is instead (``through-hardened``, ``no case``:
    :func:`selector.routes.describe.case_words`), never a case depth of zero."""
    depth = row.get("case_depth_mm")
    try:
        depth = float(depth)
    except (TypeError, ValueError):
        depth = float("nan")
    surf = hardness_text(row, "surface_hardness", scale)
    if depth == depth and depth > 0:
        return f"{surf} {scale}, {to_display(depth, 'length', system):.2g} {unit('length', system)}"
    words = case_words(list(row.get("route") or [])) or "no case"
    return words


def mass_unit(system: str) -> str:
    """``kg`` or ``lb``: the mass a price is quoted per in ``system`` (the shared units table's
    ``cost_per_mass``)."""
    return unit("mass", system)


def per_mass_text(value_per_kg, system: str) -> str:
    """A relative price per kg as text per kg or per lb (3 significant figures)."""
    return f"{to_display(float(value_per_kg), 'cost_per_mass', system):.3g}"
