"""The page's inputs: the demo scenario, the targets and the section typed in the
sidebar (display units -> SI for the library), the service conditions, price
sheets, the heat analysis, the clevis-pin load case and the sweep diameters.
Each reader returns a value or a message naming the field, the value and what is
allowed; no physics and no selection logic."""
from __future__ import annotations

import json
import math
from typing import Mapping, Sequence

import selector
from selector import user_files as studies
from selector.catalogue.grades import FAMILIES
from selector.catalogue.heat import parse_heat_text
from selector.design.pins import DEMO_CASE, DEMO_PIN_KEYS, pin_report, pin_targets
from selector.design.sweep import diameter_range, pin_length_mm
from selector.errors import DataFileError, InputError, safe_repr, SelectorError
from selector.inputs import MAX_RANGE_VALUES
from selector.rules.cautions import check_context
from selector.views.cli.args import parse_step_text
from selector.views.units import SI, US, to_display, to_si, unit

from .units import DIGITS, si_key


# --------------------------------------------------------------------------- demo

def _demo() -> dict:
    """The example the user loads on purpose: the invented scenario of ``docs/demo.md``
    (``selector.design.pins.DEMO_CASE``), its targets from
    :func:`selector.design.pins.pin_targets` and its grip length from
    :func:`selector.design.sweep.pin_length_mm`."""
    c = DEMO_CASE
    grip_mm = pin_length_mm(c["shear_planes"], c["lug_thickness_mm"], c["clevis_thickness_mm"], c["gap_mm"])
    return {"title": (f"Demo (invented scenario, demo data): {c['company']}, {c['part']}: "
                      f"Ø{c['diameter_mm']:g} mm pin, {c['load_kn']:g} kN design load in double shear, "
                      f"safety factor {c['safety_factor']:g}; see docs/demo.md"),
            "shape": "round", "diameter_mm": float(c["diameter_mm"]), "thickness_mm": 20.0,
            "length_mm": float(grip_mm), "robust_only": True,
            "targets": pin_targets(**{k: c[k] for k in DEMO_PIN_KEYS}),
            "service": {"plated": bool(c["plated"]), "plating": c["plating"],
                        "mating_material": c["mating_material"], "environment": c["environment"],
                        "service_temp_c": float(c["service_temp_c"])},
            "pin": {**{k: c[k] for k in DEMO_PIN_KEYS},
                    "sweep_diameters_mm": [float(v) for v in c["sweep_diameters_mm"]]}}


#: The example part and targets (see :func:`_demo`).
DEMO = _demo()


def demo_title(system: str) -> str:
    """The example's one-line description in the display units of ``system``."""
    c = DEMO_CASE
    lu, fu = unit("length", system), unit("force", system)
    return (f"Demo (invented scenario, demo data): {c['company']}, {c['part']}: "
            f"Ø {to_display(c['diameter_mm'], 'length', system):.4g} {lu} pin, "
            f"{to_display(c['load_kn'], 'force', system):{',.0f' if system == US else 'g'}} {fu} design load in "
            f"{'double' if c['shear_planes'] == 2 else 'single'} shear, safety factor {c['safety_factor']:g}; "
            "see docs/demo.md")


def si_targets(targets: Mapping) -> dict:
    """SI targets with the unit-bearing values rounded by :func:`si_key` (the others unchanged)."""
    out = dict(targets)
    for key, (_w, q, _label) in TARGET_FIELDS.items():
        if q and out.get(key) is not None:
            out[key] = si_key(out[key], q)
    return out


#: target key -> (page widget key, quantity or None, label)
TARGET_FIELDS = {
    "min_yield_mpa": ("min_yield", "stress", "Minimum yield strength"),
    "max_yield_mpa": ("max_yield", "stress", "Maximum yield strength"),
    "min_uts_mpa": ("min_uts", "stress", "Minimum tensile strength"),
    "max_uts_mpa": ("max_uts", "stress", "Maximum tensile strength"),
    "min_elongation_pct": ("min_elong", None, "Minimum elongation (%)"),
    "min_hardness_hrc": ("min_hrc", None, "Minimum hardness (HRC)"),
    "max_hardness_hrc": ("max_hrc", None, "Maximum hardness (HRC)"),
    "min_surface_hardness_hrc": ("min_surface_hrc", None, "Minimum surface hardness (HRC)"),
    "min_case_depth_mm": ("min_case_depth", "length", "Minimum case depth"),
    "max_relative_cost": ("max_cost", None, "Maximum relative cost per kg"),
}

#: library field -> (page label, quantity) for error messages
FIELD_LABELS = {k: (lab, q) for k, (_, q, lab) in TARGET_FIELDS.items()}
FIELD_LABELS.update({"diameter_mm": ("Diameter", "length"), "thickness_mm": ("Plate thickness", "length"),
                     "length_mm": ("Part length", "length"), "families": ("Families", None)})


def targets_from_inputs(values: Mapping, system: str, families: Sequence[str] | None = None,
                        corrosion_resistant: bool = False) -> dict:
    """SI targets for the library from the page's inputs (widget key -> value in the
    display units; blank = no target).  ``families`` is passed only when it narrows
    the catalogue."""
    t = {}
    for key, (wkey, q, _) in TARGET_FIELDS.items():
        v = values.get(wkey)
        if v is None:
            continue
        t[key] = float(to_si(v, q, system)) if q else float(v)
    if families is not None and set(families) != set(FAMILIES):
        t["families"] = list(families)
    if corrosion_resistant:
        t["corrosion_resistant"] = True
    return t


def explain(exc: Exception, system: str, labels: Mapping | None = None) -> str:
    """The library's message, led by the page's name of the field and the value in
    the units the user typed (``Diameter = 0.01 in (0.254 mm): diameter_mm=0.254 …``).
    ``labels``: library field -> (page label, quantity); default the main inputs'."""
    msg = str(exc)
    labels = FIELD_LABELS if labels is None else labels
    if isinstance(exc, InputError) and exc.field in labels:
        label, q = labels[exc.field]
        v = exc.value
        if q and isinstance(v, (int, float)) and not isinstance(v, bool) and system == US:
            shown = f"{to_display(v, q, system):.4g} {unit(q, system)} ({v:.4g} {unit(q, SI)})"
        elif q and isinstance(v, (int, float)) and not isinstance(v, bool):
            shown = f"{v:.4g} {unit(q, SI)}"
        else:
            shown = safe_repr(v)
        return f"{label} = {shown}: {msg}"
    return msg


def check_families(families: Sequence[str]) -> str | None:
    """A message when no family is chosen (the page's own multiselect), else None."""
    if not families:
        return ("Families: none chosen; allowed: one or more of " + ", ".join(FAMILIES))
    return None


def read_price_sheet(data: bytes | str | None, name: str = "price sheet") -> tuple[dict | None, str | None]:
    """Read an uploaded or pasted price sheet with the library's user-file reader
    (:func:`selector.studies.load_price_sheet`: UTF-8 check with the line and column
    of a bad byte, then the price-sheet schema).  Pasted text is passed as its UTF-8
    bytes (a ``str`` would be taken for a path).

    Returns ``(prices, None)``, or ``(None, message)`` with the
    :class:`~selector.errors.DataFileError` text (file, line, column) when it is
    bad, so that nothing of a bad sheet is applied.  Empty input gives ``(None, None)``.
    """
    if data is None or (isinstance(data, (bytes, str)) and not data.strip()):
        return None, None

    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    try:
        return studies.load_price_sheet(raw, name), None
    except (DataFileError, SelectorError) as exc:
        return None, str(exc)


def read_heat(text: str | None) -> tuple[str | None, str | None]:
    """The heat-analysis field: ``(heat_json, None)``, ``(None, None)`` when blank, or
    ``(None, message)`` naming the element, its value and what is allowed."""
    if text is None or not str(text).strip():
        return None, None

    try:
        return json.dumps(parse_heat_text(text, "heat analysis"), sort_keys=True), None
    except SelectorError as exc:
        return None, str(exc)

CAUTION_COLUMNS = ("grade", "family", "route_family", "quench", "temper_temp_c", "age_temp_c", "peak_ratio",
                   "designation", "c_pct", "hardness_hrc", "surface_hardness_hrc", "uts_mpa")


ENVIRONMENTS = ("harsh", "normal", "controlled")


def service_context(plated: bool, plating: str | None, mating_material: str | None, environment: str,
                    service_temp_c: float | None) -> dict:
    """The service conditions the caution rules read, blanks dropped."""
    ctx = {"plated": bool(plated), "environment": environment}
    if plated and plating and plating.strip():
        ctx["plating"] = plating.strip()
    if mating_material and mating_material.strip():
        ctx["mating_material"] = mating_material.strip()
    if service_temp_c is not None:
        ctx["service_temp_c"] = float(service_temp_c)
    return ctx


def check_service(context: Mapping) -> str | None:
    """The library's message when the service conditions are not valid (an unknown
    mating material, say), else None."""

    try:
        check_context(context, "service")
    except SelectorError as exc:
        return f"Service conditions: {exc}"
    return None


def targets_key(targets: Mapping) -> str:
    return json.dumps(dict(targets), sort_keys=True)


def page_targets(values: Mapping, system: str) -> dict:
    """The SI targets of a run of the page from its inputs (widget key -> value in the
    display units), rounded like the cache keys; not yet validated."""
    return si_targets(targets_from_inputs({w: values.get(w) for w, _, _ in TARGET_FIELDS.values()}, system,
                                          values.get("families") or None, bool(values.get("corrosion"))))


def page_service(values: Mapping, system: str) -> dict:
    """The service conditions of a run of the page from its inputs (see :func:`service_context`)."""
    return service_context(values.get("plated"), values.get("plating"), values.get("mating"),
                           values.get("environment", "normal"),
                           si_key(to_si(values.get("service_temp"), "temperature", system), "temperature"))


def rank_args_of(prepare_args: tuple, targets: Mapping, service: Mapping, values: Mapping) -> tuple:
    """The arguments (and cache key) of the page's ranking: ``prepare_args`` then the
    targets, the robust-only switch, the required p_meet, the allowed rules and the service."""
    return prepare_args + (targets_key(targets), bool(values.get("robust_only")),
                           float(values.get("min_p_pct") or 90.0) / 100.0, tuple(values.get("allow") or ()),
                           targets_key(service))


def route_json(route) -> str:
    return json.dumps(list(route), sort_keys=True)


# --------------------------------------------------------------------------- clevis pin and diameter sweep

#: pin inputs of the page: widget key -> (argument of pin_report, quantity or None, page label)
PIN_FIELDS = {
    "pin_load": ("load", "force", "Pin load"),
    "pin_diameter": ("diameter_mm", "length", "Pin diameter"),
    "pin_lug": ("lug_thickness_mm", "length", "Lug thickness"),
    "pin_clevis": ("clevis_thickness_mm", "length", "Clevis arm thickness"),
    "pin_gap": ("gap_mm", "length", "Gap each side"),
    "pin_sf": ("safety_factor", None, "Safety factor"),
    "pin_wear_hrc": ("wear_surface_hardness_hrc", None, "Wear surface hardness (HRC)"),
}
#: every widget key of the pin inputs
PIN_INPUT_KEYS = tuple(PIN_FIELDS) + ("pin_planes", "pin_model")
#: the pin inputs that may not be blank (the wear hardness may)
PIN_REQUIRED = ("pin_load", "pin_diameter", "pin_lug", "pin_clevis", "pin_gap", "pin_sf")

#: targets the pin sets; "use these targets" replaces exactly these in the sidebar
PIN_TARGET_KEYS = ("min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc")

SHEAR_PLANE_LABELS = {2: "2 (double shear)", 1: "1 (single shear)"}
LOAD_MODEL_LABELS = {"uniform": "uniform bearing", "concentrated": "concentrated (conservative)"}

#: library field -> (page label, quantity) for the messages of the pin section
PIN_LABELS = {"load_kn": ("Pin load (kN)", None), "load_lbf": ("Pin load (lbf)", None),
              "diameter_mm": ("Pin diameter", "length"), "gap_mm": ("Gap each side", "length"),
              "lug_thickness_mm": ("Lug thickness", "length"),
              "clevis_thickness_mm": ("Clevis arm thickness", "length"),
              "shear_planes": ("Shear planes", None), "safety_factor": ("Safety factor", None),
              "wear_surface_hardness_hrc": ("Wear surface hardness (HRC)", None),
              "load_model": ("Bending model", None)}
#: ... and of the sweep (its select calls report the sidebar's targets by their labels)
SWEEP_LABELS = {**FIELD_LABELS, **PIN_LABELS, "diameter_mm": ("Sweep diameter", "length"),
                "diameters_mm": ("Sweep diameters", None), "start_mm": ("Sweep from", "length"),
                "stop_mm": ("Sweep to", "length"), "step_mm": ("Sweep step", "length")}

SWEEP_MODES = ("listed", "from / to / step")
#: most diameters one press of the page's button sweeps (the CLI ``selector sweep`` takes up to 200)
MAX_SWEEP_DIAMETERS = 25
#: seconds per diameter of the sweep on the demo case, measured here (0.6-0.8 s on 2 CPUs); the
#: button's estimate until a sweep of the session has measured its own
SWEEP_SECONDS_PER_DIAMETER = 0.8


def pin_case_from_inputs(values: Mapping, system: str) -> tuple[dict | None, list[str]]:
    """The load case for :func:`selector.design.pins.pin_report` from the pin inputs
    (widget key -> value in display units, plus ``pin_planes`` and ``pin_model``).

    Lengths go to mm; the load is passed as ``load_kn`` in SI and as ``load_lbf`` in
    US units (the library converts it).  Returns ``(case, [])``, or
    ``(None, messages)`` naming each blank required input and what is allowed.
    """
    msgs = []
    for key in PIN_REQUIRED:
        if values.get(key) is None:
            _, q, label = PIN_FIELDS[key]
            what = f"a value in {unit(q, system)}" if q else "a number in [1, 10]"
            msgs.append(f"{label}: blank; allowed: {what}")
    if msgs:
        return None, msgs
    case = {"shear_planes": values.get("pin_planes", 2), "load_model": values.get("pin_model", "uniform")}
    case["load_lbf" if system == US else "load_kn"] = float(values["pin_load"])
    for key in ("pin_diameter", "pin_lug", "pin_clevis", "pin_gap"):
        case[PIN_FIELDS[key][0]] = float(to_si(values[key], "length", system))
    case["safety_factor"] = float(values["pin_sf"])
    wear = values.get("pin_wear_hrc")
    case["wear_surface_hardness_hrc"] = None if wear is None else float(wear)
    return case, []


def pin_report_for(case: Mapping, system: str) -> tuple[dict | None, str | None]:
    """:func:`selector.design.pins.pin_report` of a load case: ``(report, None)``, or
    ``(None, message)`` led by the page's name of the field."""
    try:
        return pin_report(**case), None
    except SelectorError as exc:
        return None, explain(exc, system, PIN_LABELS)


def pin_grip_mm(case: Mapping) -> float:
    """Grip length of the pin (lug + clevis arms + gaps), mm: the length the page
    uses for its mass (:func:`selector.design.sweep.pin_length_mm`)."""
    return pin_length_mm(case["shear_planes"], case["lug_thickness_mm"], case["clevis_thickness_mm"],
                         case["gap_mm"])


def inputs_from_pin(report: Mapping, case: Mapping, system: str) -> dict:
    """Sidebar widget values that take over the pin's targets (the keys of
    :data:`PIN_TARGET_KEYS`; a target the pin does not set is cleared) and its
    section (round bar of the pin's diameter, the grip length), in display units."""
    t = report["targets"]
    out = {}
    for key in PIN_TARGET_KEYS:
        wkey, q, _ = TARGET_FIELDS[key]
        v = t.get(key)
        out[wkey] = None if v is None else (float(to_display(v, q, system)) if q else float(v))
    out["shape"] = "round bar"
    out["diameter"] = float(to_display(case["diameter_mm"], "length", system))
    out["length"] = float(to_display(pin_grip_mm(case), "length", system))
    return out


def format_lengths(values_mm: Sequence[float], system: str) -> str:
    """Diameters in mm as the comma-separated text of the sweep input (display units)."""
    return ", ".join(f"{to_display(float(v), 'length', system):.4g}" for v in values_mm)


def parse_lengths(text: str | None, system: str) -> tuple[list | None, str | None]:
    """The sweep's comma-separated diameters (display units) in mm: ``(values, None)``
    or ``(None, message)``."""
    allowed = f"diameters in {unit('length', system)} separated by commas, e.g. " + (
        "0.75, 1, 1.25" if system == US else "20, 25, 30")

    if len(text or "") > 20 * MAX_RANGE_VALUES:
        return None, f"Sweep diameters: {len(text)} characters; allowed: {allowed} (at most {MAX_RANGE_VALUES})"
    parts = [p.strip() for p in (text or "").replace(";", ",").split(",") if p.strip()]
    if not parts:
        return None, f"Sweep diameters: blank; allowed: {allowed}"
    if len(parts) > MAX_RANGE_VALUES:
        return None, f"Sweep diameters: {len(parts)} values; allowed: {allowed} (at most {MAX_RANGE_VALUES})"
    out = []
    for p in parts:
        try:
            v = float(p)
        except ValueError:
            return None, f"Sweep diameters: {p!r} is not a number; allowed: {allowed}"
        if not math.isfinite(v) or v <= 0:
            return None, f"Sweep diameters: {p} is not a diameter; allowed: {allowed} (each > 0)"
        out.append(float(to_si(v, "length", system)))
    return out, None


def convert_length_text(text: str | None, old: str, new: str) -> str | None:
    """The sweep's diameter list converted on a unit switch; text that does not
    parse is left as typed."""
    values, msg = parse_lengths(text, old)
    if msg or old == new:
        return text
    return format_lengths(values, new)


def sweep_diameters(mode: str, text: str | None, start, stop, step, system: str) -> tuple[tuple, str | None]:
    """The sweep's diameters in mm from the listed text or from / to / step (display
    units): ``(diameters, None)`` or ``((), message)``; at most
    :data:`MAX_SWEEP_DIAMETERS`."""
    if mode == SWEEP_MODES[0]:
        values, msg = parse_lengths(text, system)
        if msg:
            return (), msg
    else:
        blank = [lab for lab, v in (("Sweep from", start), ("Sweep to", stop), ("Sweep step", step)) if v is None]
        if blank:
            return (), f"{', '.join(blank)}: blank; allowed: a diameter in {unit('length', system)}"
        try:
            values = diameter_range(*(float(to_si(v, "length", system)) for v in (start, stop, step)))
        except SelectorError as exc:
            return (), explain(exc, system, SWEEP_LABELS)
    values = sorted({round(float(v), 6) for v in values})
    if len(values) > MAX_SWEEP_DIAMETERS:
        return (), (f"Sweep diameters: {len(values)} diameters; allowed: at most {MAX_SWEEP_DIAMETERS} on the "
                    f"page (about {SWEEP_SECONDS_PER_DIAMETER:g} s each); the command `selector sweep` "
                    "takes more")
    return tuple(values), None


# --------------------------------------------------------------------------- pin capacity, fatigue through the depth

#: page label of each field of :func:`selector.design.capacity.pin_capacity`
CAPACITY_LABELS = {"hardness_hrc": ("Specified hardness (HRC)", None), "route": ("Route steps", None),
                   "route/hardness_hrc": ("Route or hardness", None), "grade": ("Pin grade", None)}


def capacity_for(case: Mapping, grade: str, steps_text: str | None, hardness_hrc, system: str
                 ) -> tuple[dict | None, str | None]:
    """:func:`selector.pin_capacity` for the pin tab's geometry (``case`` as from
    :func:`pin_case_from_inputs`; its load is not used), a grade and either route
    steps (``"harden quench=oil; temper temp_c=540"``) or a specified hardness.
    Returns ``(capacity, None)`` or ``(None, message)``."""

    route = None
    if steps_text and steps_text.strip():
        route, msg = read_route_steps(steps_text)
        if msg:
            return None, msg
    try:
        cap = selector.pin_capacity(grade, route, case["diameter_mm"], case.get("gap_mm", 0.0),
                                    case["lug_thickness_mm"], case["clevis_thickness_mm"],
                                    shear_planes=case.get("shear_planes", 2),
                                    safety_factor=case.get("safety_factor", 2.0), hardness_hrc=hardness_hrc,
                                    load_model=case.get("load_model", "uniform"))
        return cap, None
    except SelectorError as exc:
        return None, explain(exc, system, {**PIN_LABELS, **CAPACITY_LABELS})




# --------------------------------------------------------------------------- the example and a new part

#: the sidebar's service-condition widgets and the pin widgets, with their blank values
SERVICE_BLANK = {"plated": False, "plating": "", "mating": "", "environment": "normal", "service_temp": None}
PIN_BLANK = {"pin_load": None, "pin_diameter": None, "pin_planes": 2, "pin_model": "uniform", "pin_lug": None,
             "pin_clevis": None, "pin_gap": 0.0, "pin_sf": 2.0, "pin_wear_hrc": None}
#: widgets a new part clears besides the targets, section, service and pin inputs
OTHER_BLANK = {"families": list(FAMILIES), "corrosion": False, "robust_only": False, "min_p_pct": 90.0,
               "allow": [], "price_text": "", "heat_text": "", "compare": [], "pick": None}


def blank_inputs(system: str) -> dict:
    """Widget values of a new part: no section, no targets, no service conditions,
    no pin, every family, catalogue prices, no filter (``system``: the units kept)."""
    out = {"shape": "round bar", "diameter": None, "thickness": None, "length": None}
    out.update({wkey: None for wkey, _, _ in TARGET_FIELDS.values()})
    out.update(SERVICE_BLANK)
    out.update(PIN_BLANK)
    out.update({k: (list(v) if isinstance(v, list) else v) for k, v in OTHER_BLANK.items()})
    out["sweep_mode"] = SWEEP_MODES[0]
    out["sweep_list"] = ""
    out["sweep_from"], out["sweep_to"], out["sweep_step"] = None, None, None
    return out


def example_inputs(system: str) -> dict:
    """Widget values of the example (:data:`DEMO`), in the display units of ``system``:
    the section, the targets, the service conditions and the pin load case, every one
    visible in the sidebar and the pin tab."""
    d = DEMO
    out = blank_inputs(system)

    def disp(v, q):
        if v is None:
            return None
        shown = float(to_display(v, q, system))
        return round(shown, DIGITS[(q, system)]) if system == US else shown
    out.update({"shape": "round bar" if d["shape"] == "round" else "plate",
                "diameter": disp(d["diameter_mm"], "length"), "thickness": disp(d["thickness_mm"], "length"),
                "length": disp(d["length_mm"], "length"), "robust_only": bool(d.get("robust_only"))})
    for key, (wkey, q, _) in TARGET_FIELDS.items():
        v = d["targets"].get(key)
        out[wkey] = None if v is None else (disp(v, q) if q else float(v))
    sv = d.get("service", {})
    out.update({"plated": bool(sv.get("plated", False)), "plating": sv.get("plating", ""),
                "mating": sv.get("mating_material", ""), "environment": sv.get("environment", "normal"),
                "service_temp": disp(sv.get("service_temp_c"), "temperature")})
    pin = d.get("pin") or {}
    if pin:
        out.update({"pin_load": disp(pin["load_kn"], "force"),
                    "pin_diameter": disp(pin["diameter_mm"], "length"), "pin_planes": int(pin["shear_planes"]),
                    "pin_lug": disp(pin["lug_thickness_mm"], "length"),
                    "pin_clevis": disp(pin["clevis_thickness_mm"], "length"), "pin_gap": disp(pin["gap_mm"], "length"),
                    "pin_sf": float(pin["safety_factor"]), "pin_wear_hrc": pin.get("wear_surface_hardness_hrc")})
        sweep_d = pin.get("sweep_diameters_mm") or []
        out["sweep_list"] = format_lengths(sweep_d, system)
        if sweep_d:
            out["sweep_from"], out["sweep_to"] = disp(min(sweep_d), "length"), disp(max(sweep_d), "length")
            out["sweep_step"] = disp(2.0, "length")
    return out



def read_route_steps(text: str | None) -> tuple[list | None, str | None]:
    """Route steps typed as ``"harden quench=oil; temper temp_c=540"`` (one step per
    ``;``, each ``op key=value ...``): ``(steps, None)`` or ``(None, message)``."""
    if text is None or not text.strip():
        return None, "Route steps: blank; allowed: steps separated by ';', e.g. 'harden quench=oil; temper temp_c=540'"
    try:
        return [parse_step_text(s) for s in text.split(";") if s.strip()], None
    except SelectorError as exc:
        return None, f"Route steps: {exc}"
