"""The local page of ``selector``: ``streamlit run app.py`` (serves on 127.0.0.1 only).

Layout, widgets and calls only.  Every number comes from the library through the
cached wrappers of :mod:`selector.views.page`; unit conversion is for display and
input, the library works in SI.  Results are estimates for preliminary selection.
"""
from __future__ import annotations

import time

import streamlit as st

import selector
from selector.catalogue.grades import FAMILIES
from selector.design.sweep import changes
from selector.errors import SelectorError
from selector.selection.targets import validate_targets
from selector.routes.transformation_curves import candidate_curves
from selector.views import page as pg
from selector.views.charts_beyond import transformation_diagram

st.set_page_config(page_title="selector · grade and route finder", page_icon="🔩", layout="wide")

#: the views; only the open one is computed (``st.tabs`` tracks the open tab in ``ss["view"]``)
TAB_LABELS = ["Map and list", "One candidate", "Side by side", "Alternatives", "Clevis pin", "Parts list"]
#: widgets that live inside a view: kept across runs in which their view is closed
#: (Streamlit drops the state of a widget that a run does not draw unless the script
#: writes it back, "Widget behavior" in the Streamlit documentation)
VIEW_KEYS = ("pick", "heat_text", "compare", "alt_mode", "alt_pick", "alt_grade", "alt_steps", *pg.PIN_INPUT_KEYS,
             "cap_grade", "cap_steps", "cap_hrc", "sweep_mode", "sweep_list", "sweep_from", "sweep_to", "sweep_step",
             "parts_top", "parts_holding", "parts_max", "all_columns", "miss_pick")
#: first values of the view widgets that are not part of a scenario (set once per session)
VIEW_DEFAULTS = {"alt_grade": "4140", "alt_steps": "harden quench=oil; temper temp_c=540", "cap_grade": "4140",
                 "cap_steps": "harden quench=oil; temper temp_c=540", "cap_hrc": None, "parts_top": 10,
                 "parts_max": 0, "all_columns": False}


# ----------------------------------------------------------------------------- state defaults
def _set_inputs(values: dict) -> None:
    for k, v in values.items():
        st.session_state[k] = v


def _defaults():
    """First run: the example is loaded (labelled as such); "New part" clears it."""
    ss = st.session_state
    if "_init" in ss:
        return
    ss["_init"] = True
    ss["units"] = pg.SI
    ss["_units_prev"] = pg.SI
    _set_inputs(pg.example_inputs(pg.SI))
    ss["_scenario"] = "example"
    ss["_upload_gen"] = 0
    ss["hardness_scale"] = "HRC"
    for k, v in VIEW_DEFAULTS.items():
        ss[k] = v
    from selector.views import page_parts as pp      # lazy: the parts list is a view of its own
    ss["parts_holding"] = pp.DEMO_HOLDING_COST


def _new_part():
    """Everything back to blank: no section, no targets, no service conditions, no pin,
    catalogue prices (a loaded price file is dropped), every family, no filter."""
    ss = st.session_state
    _set_inputs(pg.blank_inputs(ss["units"]))
    for k in ("_prices_ok", "_prices_name", "_sweep", "_parts", "_prefill_compare"):
        ss.pop(k, None)
    ss["_upload_gen"] = ss.get("_upload_gen", 0) + 1
    ss["_scenario"] = "new"


def _load_example():
    ss = st.session_state
    _set_inputs(pg.example_inputs(ss["units"]))
    for k in ("_sweep", "_prefill_compare"):
        ss.pop(k, None)
    ss["_scenario"] = "example"


def _units_changed():
    ss = st.session_state
    new, old = ss["units"], ss.get("_units_prev", pg.SI)
    for k, v in pg.convert_inputs({k: ss.get(k) for k in pg.UNIT_INPUTS}, old, new).items():
        ss[k] = v
    ss["sweep_list"] = pg.convert_length_text(ss.get("sweep_list"), old, new)
    ss["_units_prev"] = new


def _apply_pin():
    """'Use these targets': the sidebar takes over the pin's targets and section
    (computed from the pin inputs as they are when the button is pressed)."""
    system = ss["units"]
    case, msgs = pg.pin_case_from_inputs({k: ss.get(k) for k in pg.PIN_INPUT_KEYS}, system)
    rep = pg.pin_report_for(case, system)[0] if case else None
    if rep is None:
        return
    for k, v in pg.inputs_from_pin(rep, case, system).items():
        ss[k] = v
    ss["_pin_applied"] = True
    ss["_prefill_compare"] = True      # side by side: first through-hardened and first case-hardened
    ss["_full_rerun"] = True           # the section is outside the results' fragment: the whole page reruns


_defaults()
ss = st.session_state
ss["_runs"] = ss.get("_runs", 0) + 1        # this session's runs (the footer's "This run: #n")
for _k in VIEW_KEYS:              # the state of the closed views' widgets stays
    if _k in ss:
        ss[_k] = ss[_k]
T0 = time.perf_counter()
LIB0 = pg.library_seconds()        # the library's part of this run: the cached wrappers' misses
timings = {}


def draw(chart, where=None) -> None:
    """One chart at the width of its column, sent as its Vega-Lite spec (built without
    Altair's schema check, which costs a few tenths of a second per chart and run; the
    tests check the specs)."""
    (where or st).vega_lite_chart(pg.chart_spec(chart), width="stretch")


def message(text: str) -> None:
    """An input message: after "New part" a blank input is the next step (info), else an error."""
    (st.info if ss.get("_scenario") == "new" and ": blank;" in text else st.error)(text)


def notice(where: str):
    """The caution and the notice to defer to codes and review (every view)."""
    st.warning(f"**{selector.CAUTION}** {pg.DEFER_NOTICE}", icon="⚠️")


# ----------------------------------------------------------------------------- inputs (sidebar)
with st.sidebar:
    st.button("New part (clear everything)", key="new_part", on_click=_new_part, width="stretch",
              help="Clear everything: section, targets, service conditions, pin, filters and price sheet.")
    st.button("Load the example", key="load_example", on_click=_load_example, width="stretch",
              help="The invented demo part of docs/demo.md, with its targets and service conditions.")
    st.markdown("### Part")
    st.radio("Units", pg.UNIT_SYSTEMS, key="units", horizontal=True, on_change=_units_changed,
             help="SI: MPa, mm, °C.  US customary: ksi, in, °F.  The library computes in SI.")
    st.radio("Hardness scale", pg.HARDNESS_SCALES, key="hardness_scale", horizontal=True,
             help="One scale in every view: Rockwell C (ASTM E18), Brinell (ASTM E10) or Vickers (ASTM E92); "
                  "HRC and HB from the library's HV on the steel table of ASTM E140.")
    system = ss["units"]
    hs = ss.get("hardness_scale", "HRC")
    su, lu, mu = pg.unit("stress", system), pg.unit("length", system), pg.mass_unit(system)
    lfmt = "%.3f" if system == pg.US else "%.1f"
    sfmt = "%.1f" if system == pg.US else "%.0f"
    st.radio("Section", ("round bar", "plate"), key="shape", horizontal=True)
    # both inputs stay on the page (the unused one disabled) so that each keeps its value
    st.number_input(f"Diameter ({lu})", key="diameter", value=None, step=0.1 if system == pg.US else 1.0,
                    format=lfmt, disabled=ss["shape"] != "round bar")
    st.number_input(f"Plate thickness ({lu})", key="thickness", value=None,
                    step=0.1 if system == pg.US else 1.0, format=lfmt, disabled=ss["shape"] == "round bar")
    st.number_input(f"Part length ({lu})", key="length", value=None, step=0.5 if system == pg.US else 10.0,
                    format=lfmt)

    st.markdown("### Targets")
    # the target inputs are drawn by the results' fragment (see ``results`` below) into this box, at
    # their place in the sidebar: a change of target reruns only that fragment
    targets_box = st.container()

    st.markdown("### Scope")
    st.multiselect("Families", list(FAMILIES), key="families", format_func=lambda f: f.replace("_", " "))
    st.checkbox("Corrosion-resistant grades only", key="corrosion")
    st.checkbox("Only candidates that meet the targets with the required probability", key="robust_only")
    st.number_input("Required probability of meeting the targets (%)", min_value=1.0, max_value=100.0,
                    step=5.0, format="%.0f", key="min_p_pct",
                    help="Share of heats within the grade's specification, processed by the route, that meet "
                         "every target, counting the model's 90 % band (Monte Carlo, 200 draws: standard "
                         "error at most 3.5 points).")
    st.multiselect("Do not rank these cautions last", pg.avoid_rules(), key="allow",
                   format_func=pg.avoid_rule_label,
                   help="Cautions of severity 'avoid' put a route after every route without one; "
                        "allow a rule here when your process controls it.")

    with st.expander("Service conditions (for the cautions)", expanded=bool(
            ss.get("plated") or ss.get("mating") or ss.get("service_temp") is not None
            or ss.get("environment", "normal") != "normal")):
        st.checkbox("Electroplated", key="plated")
        st.text_input("Plating", key="plating", placeholder="zinc plated")
        st.text_input("Mating material", key="mating", placeholder="structural steel, brass, 6061 …")
        st.selectbox("Environment", pg.ENVIRONMENTS, key="environment")
        st.number_input(f"Highest service temperature ({pg.unit('temperature', system)})", key="service_temp",
                        value=None, format="%.0f")

    st.markdown("### Prices")
    upload = st.file_uploader("Price sheet (CSV: grade, relative_price[, source])", type=["csv"],
                              key=f"price_file_{ss.get('_upload_gen', 0)}")
    with st.expander("…or paste one", expanded=bool(ss.get("price_text"))):
        st.text_area("Price sheet text", key="price_text", height=90,
                     placeholder="grade,relative_price\n4140,1.9\n1045,1.2")

    st.markdown("### Chart")
    st.radio("Strength axis", ("yield", "tensile"), key="chart_y", horizontal=True)
    st.slider("Candidates drawn", 3, 30, 15, key="chart_n")


# ----------------------------------------------------------------------------- header
st.title("selector · grade and route finder")
if ss.get("_scenario") == "example":
    st.info(f"**Example loaded** (press *New part* in the sidebar to start from blank): {pg.demo_title(system)}.  "
            "Its section, targets and service conditions are in the sidebar, its load case in the pin tab.")
notice("top")

# ----------------------------------------------------------------------------- validation
errors = []
round_bar = ss["shape"] == "round bar"
# SI values rounded for the cache keys (pg.si_key): a unit switch recomputes nothing
d_si = pg.si_key(pg.to_si(ss.get("diameter"), "length", system), "length") if round_bar else None
t_si = None if round_bar else pg.si_key(pg.to_si(ss.get("thickness"), "length", system), "length")
len_si = pg.si_key(pg.to_si(ss.get("length"), "length", system), "length")
if round_bar and d_si is None:
    errors.append(f"Diameter: blank; allowed: a diameter in {lu}")
if not round_bar and t_si is None:
    errors.append(f"Plate thickness: blank; allowed: a thickness in {lu}")
if len_si is None:
    errors.append(f"Part length: blank; allowed: a length in {lu}")

fam_msg = pg.check_families(ss["families"])
if fam_msg:
    errors.append(fam_msg)
i_target_errors = len(errors)          # the target messages go here (see ``results``)

service = pg.page_service(ss, system)
svc_msg = pg.check_service(service)
if svc_msg:
    errors.append(svc_msg)

prices_file = upload.getvalue() if upload is not None else None
price_name = getattr(upload, "name", None) or "price sheet"
prices, price_msg = pg.read_price_sheet(prices_file, price_name)
if price_msg is None and prices is None:
    price_name = "pasted price sheet"
    prices, price_msg = pg.read_price_sheet(ss.get("price_text") or None, price_name)
if price_msg:
    # the sheet is rejected whole; the prices in use stay what they were, and the page says which
    prices = ss.get("_prices_ok")
    price_name = ss.get("_prices_name") if prices else None
elif prices is not None:
    ss["_prices_ok"], ss["_prices_name"] = prices, price_name
else:
    ss["_prices_ok"], ss["_prices_name"] = None, None
    price_name = None
prices_in_use = pg.prices_in_use(price_name, prices)
price_items = tuple(sorted(prices.items())) if prices else ()

if price_msg:
    st.error(f"Price sheet rejected, nothing of it is used: {price_msg}")
    st.warning(f"Prices in use: **{prices_in_use}**.  " + (
        "That sheet was accepted before this one; clear the rejected sheet or load a corrected one."
        if prices else "The catalogue's indicative prices apply."))
prepare_args = (d_si, t_si, len_si, price_items)
targets, prepared_ok, cand, pick, rank_args = {}, False, None, None, None


# ----------------------------------------------------------------------------- views
def evaluation_metrics(ev: dict, prefix: str = "", extra: tuple | None = None) -> None:
    """Yield, tensile, elongation and hardness of one ``evaluate()`` result, three a row
    (display units, the page's hardness scale; "—" where the model gives none);
    ``extra``: one more ``(label, value)`` metric."""
    def shown(key, fmt):
        return "—" if ev.get(key) is None else fmt(ev[key])
    items = [(f"{prefix}{'yield' if prefix else 'Yield'} ({su})",
              shown("yield_mpa", lambda v: f"{pg.to_display(v, 'stress', system):.4g}")),
             (f"{prefix}{'tensile' if prefix else 'Tensile'} ({su})",
              shown("uts_mpa", lambda v: f"{pg.to_display(v, 'stress', system):.4g}")),
             (f"{prefix}{'elongation' if prefix else 'Elongation'} (%)", shown("elongation_pct", lambda v: f"{v:.3g}")),
             (f"{prefix}{'hardness' if prefix else 'Hardness'} ({hs})", pg.hardness_text(ev, "hardness", hs))]
    if extra:
        items.append(extra)
    for i in range(0, len(items), 3):
        cols = st.columns(3)
        for c, (label, value) in zip(cols, items[i:i + 3]):
            c.metric(label, value)


def pick_candidate(cand, key):
    """A select box of the candidates (kept in ``ss[key]``, the first by default); the chosen row."""
    ids = list(cand["variant"])
    labels = dict(zip(cand["variant"], cand["label"]))
    if ss.get(key) not in ids:
        ss[key] = ids[0]
    st.selectbox("Candidate", ids, key=key, format_func=lambda v: labels.get(v, v))
    return cand.set_index("variant").loc[ss[key]]


def candidate_view(cand, states):
    row = pick_candidate(cand, "pick")
    ev = pg.cached_evaluate(row["grade"], pg.route_json(row["route"]), d_si, t_si)
    g = selector.grade(row["grade"])
    st.subheader(f"{row['id']} · {g.name} · {pg.route_line(row['route'], system, row['route_text'])}")
    # three metrics a row: labels and values stay whole at 1024 px
    m = st.columns(3)
    m[0].metric(f"Yield ({su})", f"{pg.to_display(row['yield_mpa'], 'stress', system):.4g}")
    m[1].metric(f"Tensile ({su})", f"{pg.to_display(row['uts_mpa'], 'stress', system):.4g}")
    m[2].metric("Elongation (%)", f"{row['elongation_pct']:.3g}")
    m = st.columns(3)
    m[0].metric(f"Hardness ({hs})", pg.hardness_text(row, "hardness", hs))
    m[1].metric(f"Surface ({hs})", pg.hardness_text(row, "surface_hardness", hs))
    m[2].metric("Meets the targets", pg.percent(row.get("p_meet")),
                help="Probability that a heat within the specification meets every target (model band "
                     "included); every composition corner at once: "
                     + ("yes" if row.get("corners_meet") else "no"))
    m = st.columns(3)
    m[0].metric(f"Material / {mu}", pg.per_mass_text(row["material_cost_per_kg"], system),
                help=f"Relative price of the bar per {mu} ({row.get('price_source', '')}); 1 kg of 1018 bar = 1.")
    m[1].metric(f"Processing / {mu}", pg.per_mass_text(row["processing_cost_per_kg"], system),
                help=f"Indicative processing adder of the route family per {mu} (data/route_costs.csv).")
    m[2].metric("Part cost", f"{row['part_cost']:.3g}", help=f"Per kg × the part's mass ({row['mass_kg']:.3g} kg).")
    st.markdown(f"**Surface and case:** {pg.case_text(row, system, hs)}")
    st.caption(pg.band_text(ev, system))
    heat_text = st.text_input("Heat analysis from the mill certificate (wt %)", key="heat_text",
                              placeholder="e.g. C=0.41 Mn=0.86 Cr=0.95 Mo=0.18 (other elements: nominal)",
                              help="Evaluates this route for one heat instead of the grade's nominal "
                                   "composition. An element outside the grade's specification is named in a "
                                   "warning.")
    heat_json, heat_err = pg.read_heat(heat_text)
    if heat_err:
        st.error(heat_err)
    elif heat_json:
        try:
            hv = pg.cached_evaluate(row["grade"], pg.route_json(row["route"]), d_si, t_si, "nominal", heat_json)
        except SelectorError as exc:
            st.error(str(exc))
        else:
            evaluation_metrics(hv, "Heat: ")
            st.caption(pg.band_text(hv, system))
            heat_warn = [w for w in hv.get("warnings", []) if w.startswith("heat analysis")]
            if heat_warn:
                st.warning("\n".join(f"- {w}" for w in heat_warn))
    left, right = st.columns(2)
    with left:
        st.markdown("**Route**")
        st.markdown("\n".join(pg.route_steps(row["route"], system)))
        param = row["window_parameter"]
        if param:
            win = pg.fmt_window(row['window_min'], row['window_max'], param, system)
            st.markdown(f"**Process window** (clear of avoid cautions): "
                        f"{win or 'none clear of avoid cautions: ' + str(row.get('avoid') or '')}")
            rw = pg.fmt_window(row["robust_window_min"], row["robust_window_max"], param, system)
            st.markdown(f"**Window at the required probability**: {rw or 'none: meets at the estimate only'}")
    with right:
        st.markdown("**Cautions**")
        cautions = pg.candidate_cautions(row, ev.get("warnings", []), service)
        if cautions:
            st.warning("\n".join(f"- {c}" for c in cautions))
        else:
            st.info("No route-specific caution raised; the general notice above still applies.")
    # charts one under the other at full width: legends and titles stay whole at 1024 px
    with st.container():
        param = row["window_parameter"]
        if param:
            pf = pg.parameter_frame(states, ss["pick"], system)
            for chart in pg.parameter_charts(pf, param, (row["window_min"], row["window_max"]),
                                             (row["robust_window_min"], row["robust_window_max"]), targets,
                                             system, row["main_value"]):
                draw(chart)
            st.caption("Line: nominal composition; band: lean to rich corner; light shading: the window that "
                       "meets the targets; darker: where it holds at every corner.")
        else:
            st.info("This route has no main process parameter to vary.")
    with st.container():
        if ev.get("profile"):
            pfr = pg.profile_frame({row["label"]: ev["profile"]}, system, {row["label"]: row["family"]})
            draw(pg.profile_chart(pfr, system, [row["label"]], scale=hs))
        else:
            st.info("This route family reports no hardness profile across the section.")
        ffr = pg.fatigue_depth_frame(ev, system)
        if len(ffr):
            draw(pg.fatigue_depth_chart(ffr, system))
            st.caption("Rotating bending, machined surface, 50 % reliability; compressive residual stress of a "
                       "hardened case credited (data/residual_stress.csv).  The curves touch at the governing depth.")
        curves = candidate_curves(ev)
        if len(curves["curves"]):
            draw(transformation_diagram(curves, fahrenheit=system == pg.US,
                                                   title="Transformation start and finish, and this route's cooling"))
            st.caption("Shaded: each reaction from its start to its finish (Li et al. 1998 kinetics); lines: the "
                       "surface and centre cooling paths of this route at this section.")
    st.markdown("**Sources**")
    st.markdown("\n".join(f"- {s}" for s in ev.get("sources", [])))


def comparison_view(cand):
    ids = list(cand["variant"])
    labels = dict(zip(cand["variant"], cand["label"]))
    cur = [v for v in ss.get("compare", []) if v in ids]
    if ss.pop("_prefill_compare", False) or not cur:
        pair = pg.first_through_and_case(cand)
        cur = pair if len(pair) >= 2 else ids[:2]
    ss["compare"] = cur[:3]
    st.multiselect("Candidates to compare (two or three)", ids, key="compare", max_selections=3,
                   format_func=lambda v: labels.get(v, v))
    chosen = ss["compare"]
    if len(chosen) < 2:
        st.info("Pick two or three candidates.")
        return
    sub = cand[cand["variant"].isin(chosen)]
    cids = list(sub["id"])
    lab = list(sub["label"])
    st.dataframe(pg.comparison_table(cand, cids, system, hs), width="stretch")
    frame = pg.comparison_frame(cand, cids, system, hs)
    b1, b2 = st.columns(2)
    draw(pg.comparison_bars(frame, f"strength ({su})", lab, legend=True), where=b1)
    draw(pg.comparison_bars(frame, "relative cost", lab, legend=True), where=b2)
    b3, b4 = st.columns(2)
    draw(pg.comparison_bars(frame, "elongation (%)", lab, height=200), where=b3)
    draw(pg.comparison_bars(frame, f"hardness ({hs})", lab, height=200), where=b4)
    profiles = {}
    for _, r in sub.iterrows():
        ev = pg.cached_evaluate(r["grade"], pg.route_json(r["route"]), d_si, t_si)
        if ev.get("profile"):
            profiles[r["label"]] = ev["profile"]
    if profiles:
        draw(pg.profile_chart(pg.profile_frame(profiles, system, dict(zip(sub["label"], sub["family"]))), system,
                                         list(profiles),
                                         title="Hardness across the section (shared axes)", scale=hs,
                                         colours=[pg.COMPARE_COLOURS[lab.index(k)] for k in profiles]))
    for _, r in sub.iterrows():
        ev = pg.cached_evaluate(r["grade"], pg.route_json(r["route"]), d_si, t_si)
        cautions = pg.candidate_cautions(r, ev.get("warnings", []), service)
        if cautions:
            st.warning(f"**{r['label']}**\n" + "\n".join(f"- {c}" for c in cautions))


def capacity_view(case):
    """What a given pin (grade and route, or a specified hardness) can carry, at the pin tab's geometry."""
    with st.expander("Capacity of a given pin (grade and route, or the drawing's hardness)"):
        c = st.columns(3)
        c[0].text_input("Pin grade", key="cap_grade")
        c[1].text_input("Route steps (';'-separated)", key="cap_steps",
                        help="Leave blank and give a hardness when the drawing specifies one.")
        c[2].number_input("Specified hardness (HRC)", key="cap_hrc", value=None, format="%.1f",
                          help="The bottom of the drawing's range; only with blank route steps.")
        cap, msg = pg.capacity_for(case, ss.get("cap_grade", ""), ss.get("cap_steps"), ss.get("cap_hrc"), system)
        if msg:
            st.error(msg)
        else:
            st.dataframe(pg.capacity_table(cap, system), hide_index=True, key="cap_table")
            st.caption(f"Allowable load governed by **{cap['governing']}**; strength: {cap['strength_basis']}.  "
                       "Lug and clevis (net section, tear-out) are not checked.")


def pin_view():
    """The clevis-pin load case -> stresses and targets, and the diameter sweep."""
    fu = pg.unit("force", system)
    st.markdown("**Clevis pin.** The lug sits between the two arms of the clevis (double shear), or two "
                "members meet across one shear plane (single shear).  Stresses by elementary beam theory "
                "(Budynas & Nisbett 2015, ch. 3; docs/methods/pins.md); the targets multiply them by the "
                "safety factor.")
    # inputs above, results below at full width: metric labels and values stay whole at 1024 px
    inputs, results = st.container(), st.container()
    with inputs:
        c1, c2, c3 = st.columns(3)
        c1.number_input(f"Load ({fu})", key="pin_load", value=None, format="%.0f" if system == pg.US else "%.2f",
                        help="The load the joint carries (the design load, shock included).")
        c2.number_input(f"Pin diameter ({lu})", key="pin_diameter", value=None, format=lfmt)
        c3.number_input("Safety factor", key="pin_sf", value=None, format="%.2f", help="1 to 10.")
        c1.radio("Shear planes", (2, 1), key="pin_planes", format_func=pg.SHEAR_PLANE_LABELS.get)
        c2.radio("Bending model", tuple(pg.LOAD_MODEL_LABELS), key="pin_model",
                 format_func=pg.LOAD_MODEL_LABELS.get,
                 help="Uniform: bearing pressure spread over each member's thickness.  Concentrated: loads "
                      "at the bearing centres, a higher moment (double shear only; single shear is always "
                      "the clamped cantilever).")
        c3.number_input("Wear surface hardness (HRC)", key="pin_wear_hrc", value=None, format="%.1f",
                        help="Optional: the minimum surface hardness for wear (20 to 70 HRC).  Blank: none.")
        c1.number_input(f"Lug thickness ({lu})", key="pin_lug", value=None, format=lfmt,
                        help="The middle member in double shear; the member the pin is clamped in, in single shear.")
        c2.number_input(f"Clevis arm ({lu})", key="pin_clevis", value=None, format=lfmt,
                        help="Thickness of one arm of the clevis (double shear), or of the other member (single "
                             "shear).")
        c3.number_input(f"Gap each side ({lu})", key="pin_gap", value=None, format=lfmt)
    case, msgs = pg.pin_case_from_inputs({k: ss.get(k) for k in pg.PIN_INPUT_KEYS}, system)
    rep = None
    if case is not None:
        rep, msg = pg.pin_report_for(case, system)
        msgs = [msg] if msg else []
    with results:
        for m in msgs:
            message(m)
        if rep is not None:
            s = rep["stresses"]
            t = rep["targets"]
            wear = t.get("min_surface_hardness_hrc")
            # three metrics a row: labels and values stay whole at 1024 px
            m = st.columns(3)
            m[0].metric(f"Min yield ({su})", f"{pg.to_display(t['min_yield_mpa'], 'stress', system):.4g}")
            m[1].metric(f"Min tensile ({su})", f"{pg.to_display(t['min_uts_mpa'], 'stress', system):.4g}")
            m[2].metric("Min surface (HRC)", "—" if wear is None else f"{wear:.3g}")
            m = st.columns(3)
            m[0].metric("Governing", rep["governing"])
            m[1].metric(f"Grip length ({lu})", f"{pg.to_display(pg.pin_grip_mm(case), 'length', system):.4g}")
            m[2].metric("Shear/tensile", f"{rep['shear_to_tensile']['ratio']:g}")
            st.markdown("**Where each target comes from**")
            st.markdown("\n".join(f"- {line}" for line in pg.pin_target_explanations(rep, system)))
            st.dataframe(pg.pin_stress_table(rep, system), hide_index=True, width="stretch", key="pin_stresses")
            ratio = rep["shear_to_tensile"]
            with st.expander("Formulas and assumptions"):
                st.markdown("\n".join(f"- {k}: `{v}`" for k, v in s["formulas"].items()))
                st.markdown(f"- yield target = SF × max(bending, √3 × shear (von Mises), bearing / "
                            f"{rep['bearing_factor']:g}); tensile target = SF × shear / {ratio['ratio']:g} "
                            f"({ratio['source']}; {ratio['confidence']})")
                st.markdown("\n".join(f"- {a}" for a in s["assumptions"]))
            st.button("Use these targets in the candidate table", key="pin_apply", on_click=_apply_pin,
                      type="primary",
                      help="The sidebar takes over the minimum yield, tensile and surface hardness (a blank wear "
                           "hardness clears the surface target) and the section: a round bar of the pin's "
                           "diameter, the grip length.  Other targets stay.")
            if ss.pop("_pin_applied", False):
                st.success("The sidebar now holds the pin's targets and section; the other tabs are ranked on them, "
                           "and *Side by side* starts from the first through-hardened and the first "
                           "case-hardened candidate.")
    if case is not None:
        capacity_view(case)

    st.divider()
    st.subheader("Diameter sweep")
    st.caption("At each diameter the pin's targets are recomputed and the cheapest robust candidate (lowest "
               "part cost; targets met at every composition corner) is picked at that section.  A larger pin "
               "needs less strength but hardens less deeply, so the pick need not change monotonically.  The "
               "sidebar's other targets, prices and service conditions apply too.")
    w = st.columns([2, 1, 1, 1])
    w[0].radio("Diameters", pg.SWEEP_MODES, key="sweep_mode", horizontal=True)
    listed = ss["sweep_mode"] == pg.SWEEP_MODES[0]
    w[0].text_input(f"Diameters ({lu}, comma-separated)", key="sweep_list", disabled=not listed)
    w[1].number_input(f"From ({lu})", key="sweep_from", value=None, format=lfmt, disabled=listed)
    w[2].number_input(f"To ({lu})", key="sweep_to", value=None, format=lfmt, disabled=listed)
    w[3].number_input(f"Step ({lu})", key="sweep_step", value=None, format=lfmt, disabled=listed)
    diam, dmsg = pg.sweep_diameters(ss["sweep_mode"], ss.get("sweep_list"), ss.get("sweep_from"),
                                    ss.get("sweep_to"), ss.get("sweep_step"), system)
    if dmsg:
        message(dmsg)
    args = None
    if rep is not None and not dmsg:
        extra = {k: v for k, v in targets.items() if k not in pg.PIN_TARGET_KEYS}
        args = (diam, pg.targets_key({k: v for k, v in case.items() if k != "diameter_mm"}),
                pg.targets_key(extra), price_items, pg.targets_key(service))
    n = len(diam)
    rate = ss.get("_sweep_rate", pg.SWEEP_SECONDS_PER_DIAMETER)
    pressed = st.button(f"Run the sweep ({n} diameters, about {max(n * rate, 1):.0f} s)" if n else "Run the sweep",
                        key="sweep_run", disabled=args is None, type="primary")
    if pressed and args is not None:
        t = time.perf_counter()
        try:
            with st.spinner(f"Sweeping {n} diameters: the whole catalogue at each section…"):
                sw = pg.cached_sweep(*args)
            took = time.perf_counter() - t
            if took > 0.05 * n:            # a real run, not a cache hit: the session's own rate
                ss["_sweep_rate"] = took / n
            ss["_sweep"] = {"args": args, "table": sw, "seconds": took}
        except SelectorError as exc:
            ss.pop("_sweep", None)
            st.error(pg.explain(exc, system, pg.SWEEP_LABELS))
        timings["sweep"] = time.perf_counter() - t
    res = ss.get("_sweep")
    if res is None:
        st.info("Press **Run the sweep** (it runs the selection once per diameter).")
        return
    if res["args"] != args:
        st.info("The inputs have changed since this sweep was run; press **Run the sweep** to update it.")
    sw = res["table"]
    draw(pg.sweep_chart(sw, system))
    ch = changes(sw)
    moves = [f"**{pg.to_display(r['diameter_mm'], 'length', system):.4g} {lu}**: "
             f"{pg.pick_label(r['grade'], r['route_family'])}" for _, r in ch.iloc[1:].iterrows()]
    first = ch.iloc[0]
    st.markdown(f"From {pg.to_display(first['diameter_mm'], 'length', system):.4g} {lu}: "
                f"{pg.pick_label(first['grade'], first['route_family'])}; "
                + (("the pick changes at " + ", ".join(moves)) if moves else "the pick does not change")
                + f".  {len(sw)} diameters in {res['seconds']:.1f} s; the same inputs again are served "
                  "from the cache.")
    table = pg.sweep_table(sw, system)
    st.dataframe(table, width="stretch", hide_index=True, key="sweep_table")
    st.download_button("Download the sweep (CSV)", pg.to_csv(table), file_name="diameter_sweep.csv",
                       mime="text/csv", key="sweep_download")
    st.caption(sw.attrs.get("notice", selector.CAUTION) + f"  Pin length for the part cost: "
               f"{pg.to_display(sw.attrs.get('length_mm', float('nan')), 'length', system):.4g} {lu} (grip length).")


def alternatives_view(cand):
    """Procurement: cheaper candidates that reach the properties of a chosen one (or of a
    grade and route typed here), material and processing cost apart."""
    st.markdown("**Cheaper alternatives.** The chosen grade and route is evaluated at the section in force; its "
                "yield and tensile strength (its case when case-hardened) become minimum targets and its "
                "elongation less one point (docs/methods/selection.md); every cheaper candidate per kg is listed, "
                "cheapest first.  Material (the bar) and processing (the route's indicative adder) are shown apart.")
    have = cand is not None and len(cand) > 0
    modes = ("a candidate of the list", "a grade and route I type") if have else ("a grade and route I type",)
    if ss.get("alt_mode") not in modes:
        ss["alt_mode"] = modes[0]
    st.radio("Alternatives to", modes, key="alt_mode", horizontal=True)
    if ss["alt_mode"] == "a candidate of the list":
        row = pick_candidate(cand, "alt_pick")
        grade, route = row["grade"], list(row["route"])
    else:
        c = st.columns(2)
        c[0].text_input("Grade", key="alt_grade", help="Any designation of a catalogue grade.")
        c[1].text_input("Route steps (';'-separated)", key="alt_steps")
        grade = (ss.get("alt_grade") or "").strip()
        route, msg = pg.read_route_steps(ss.get("alt_steps"))
        if msg or not grade:
            st.error(msg or "Grade: blank; allowed: a catalogue grade, e.g. 4140")
            return
    if not prepared_ok:
        st.info("Give a valid section and length in the sidebar first (see the messages above).")
        return
    try:
        alt = pg.cached_alternatives(grade, pg.route_json(route), d_si, t_si, len_si, price_items)
    except SelectorError as exc:
        st.error(pg.explain(exc, system))
        return
    ref = alt.attrs["reference"]
    st.markdown(f"**Reference:** {ref['grade']} · {pg.route_line(route, system, ref.get('route_text'))}")
    m = st.columns(3)
    m[0].metric(f"Material / {mu}", pg.per_mass_text(ref["material_cost_per_kg"], system))
    m[1].metric(f"Processing / {mu}", pg.per_mass_text(ref["processing_cost_per_kg"], system))
    m[2].metric(f"Total / {mu}", pg.per_mass_text(ref["relative_cost"], system))
    st.caption("Matched on its " + ("strength" if ref["basis"] == "strength" else "hardness (its strength is beyond "
               "the tensile column of ASTM A370 Table 3)") + "; prices in use: " + prices_in_use + ".")
    if len(alt) == 0:
        st.info("No cheaper candidate reaches these properties at this section.")
    else:
        st.dataframe(pg.alternatives_table(alt, system), hide_index=True, width="stretch", key="alternatives")
        st.download_button("Download the alternatives (CSV)", pg.to_csv(pg.alternatives_table(alt, system)),
                           file_name="alternatives.csv", mime="text/csv", key="alternatives_download")
    st.caption(selector.CAUTION)


def parts_view():
    """A parts list: candidates per part, the rationalised stock list and its cost curve."""
    from selector.views import page_parts as pp

    st.markdown("**Parts list.** One row per part (CSV or Parquet: `part_id`, `diameter_mm` or `thickness_mm`, "
                "`length_mm`, `quantity_per_year`, and targets or a pin load case; docs/batch.md).  Each part is "
                "ranked at its own section; then the fewest grades that cover the list at the least annual cost "
                "are chosen (a mixed-integer program, HiGHS).  The example is an invented maker's list "
                "(docs/demo_parts_list.csv, demo data only).")
    up = st.file_uploader("Parts list (CSV or Parquet)", type=["csv", "parquet"], key="parts_file")
    data, name = (up.getvalue(), up.name) if up is not None else (pp.demo_bytes(), "demo_parts_list.csv (invented)")
    parts, problems = pp.load_parts(data, name)
    if problems:
        st.error(f"The parts list has {len(problems)} problem(s); nothing was computed:\n\n"
                 + "\n".join(f"- {m}" for m in problems[:50]))
        return
    st.caption(f"{name}: {len(parts)} parts at {parts[['diameter_mm', 'thickness_mm']].drop_duplicates().shape[0]} "
               "sections.")
    c = st.columns(3)
    c[0].number_input("Grades considered per part", key="parts_top", min_value=1, max_value=100,
                      help="The cheapest route of each of the part's N cheapest grades is offered to the stock choice.")
    c[1].number_input("Holding cost per grade a year (relative units)", key="parts_holding", min_value=0.0,
                      help="Same unit as the part cost (1018 bar = 1 per kg, or your "
                      "price sheet's currency).  The default is an invented demo value.")
    c[2].number_input("At most this many grades (0: no limit)", key="parts_max", min_value=0, max_value=50)
    args = (name, len(data), hash(data), int(ss["parts_top"]), float(ss["parts_holding"]), int(ss["parts_max"]),
            price_items)
    if st.button(f"Run the parts list ({len(parts)} parts)", key="parts_run", type="primary"):
        bar = st.progress(0.0, text="starting")

        def tick(done, total):
            bar.progress(done / total, text=f"parts {done}/{total}")

        t = time.perf_counter()
        try:
            out = pp.run(data, name, int(ss["parts_top"]), float(ss["parts_holding"]),
                         int(ss["parts_max"]) or None, progress=tick, price_sheet=dict(price_items) or None)
            ss["_parts"] = {"args": args, **out, "seconds": time.perf_counter() - t}
        except SelectorError as exc:
            ss.pop("_parts", None)
            st.error(str(exc))
    res = ss.get("_parts")
    if res is None:
        st.info("Press **Run the parts list** (each distinct section is expanded once).")
        return
    if res["args"] != args:
        st.info("The inputs have changed since this run; press **Run the parts list** to update it.")
    stock = res["stock"]
    st.subheader("Rationalised stock list")
    st.markdown(f"**{len(stock['grades'])} grades** ({', '.join(stock['grades'])}): least annual cost "
                f"**{stock['total_cost']:,.0f}** = parts {stock['material_cost']:,.0f} + holding "
                f"{stock['holding_cost']:,.0f} (optimality gap {stock['gap']:.2g}).  "
                f"{res['batch']['part_id'].nunique()} parts in {res['seconds']:.1f} s.")
    if stock["unassigned"]:
        st.warning("No candidate meets the targets of: " + ", ".join(stock["unassigned"])
                   + " (their nearest misses are in the per-part table).")
    left, right = st.columns([2, 3])
    left.dataframe(pp.stock_table(stock), hide_index=True, width="stretch", key="parts_stock")
    draw(pp.cost_by_count_chart(stock["cost_by_count"], len(stock["grades"])), where=right)
    st.dataframe(stock["assignment"], hide_index=True, width="stretch", key="parts_assignment")
    st.download_button("Download the assignment (CSV)", pg.to_csv(stock["assignment"]), file_name="stock_list.csv",
                       mime="text/csv", key="parts_stock_download")
    st.subheader("Candidates per part")
    table = pp.part_table(res["batch"])
    st.dataframe(table, hide_index=True, width="stretch", key="parts_table")
    st.download_button("Download the candidates (CSV)", pg.to_csv(table), file_name="parts_candidates.csv",
                       mime="text/csv", key="parts_download")
    st.caption(selector.CAUTION)


def candidate_states(variants) -> "pd.DataFrame":
    """The reachable region (every corner and main value) of ``variants`` (cached)."""
    t = time.perf_counter()
    out = pg.cached_variant_states(d_si, t_si, len_si, price_items, tuple(sorted(set(variants))))
    timings["regions"] = timings.get("regions", 0.0) + time.perf_counter() - t
    return out


def misses_view():
    st.subheader("No candidate meets every target")
    st.markdown("The nearest misses: how far each target would have to move for the candidate to "
                "qualify at the nominal composition (`move_*`, in the units shown), smallest total first.")
    try:
        misses = pg.cached_nearest_misses(d_si, t_si, len_si, price_items, pg.targets_key(targets))
        st.dataframe(pg.miss_table(misses, system), width="stretch", hide_index=True,
                     key="misses")
        report = pg.cached_miss_analysis(d_si, t_si, len_si, price_items, pg.targets_key(targets))
        st.markdown("**What can be reached**: the best value of each target with the other targets met "
                    "(at the nominal composition).")
        st.dataframe(pg.reachable_table(report["reachable"], system), width="stretch", hide_index=True,
                     key="reachable")
        fchart = pg.frontier_chart(report["frontier"], report["axes"], targets, system)
        if fchart is not None:
            draw(fchart)
        if len(misses):
            labels = {i: f"{r['grade']} · {pg.route_line(r['route'], system, r['route_text'])}"
                      for i, r in misses.iterrows()}
            i = st.selectbox("Open a near miss", list(labels), key="miss_pick", format_func=labels.get)
            r = misses.loc[i]
            ev = pg.cached_evaluate(r["grade"], pg.route_json(r["route"]), d_si, t_si)
            evaluation_metrics(ev, extra=("Meets the targets", pg.percent(r.get("p_meet"))))
            st.caption(pg.band_text(ev, system))
            st.markdown("\n".join(pg.route_steps(r["route"], system)))
            mc = pg.candidate_cautions(r, ev.get("warnings", []), service)
            if mc:
                st.warning("\n".join(f"- {c}" for c in mc))
    except SelectorError as exc:
        st.error(pg.explain(exc, system))


def map_view(cand):
    """The answer: the strength-elongation map of the first candidates and the candidate table."""
    t = time.perf_counter()
    top = cand.head(int(ss.get("chart_n", 15)))
    y = "yield_mpa" if ss.get("chart_y", "yield") == "yield" else "uts_mpa"
    st.vega_lite_chart(pg.cached_map(prepare_args, rank_args, pg.targets_key(targets), len(top), y, system, pick),
                       width="stretch")
    timings["map"] = time.perf_counter() - t
    st.caption(f"Each line is a candidate's process path at the nominal composition, its main parameter "
               f"written at the ends (along the whole path for the candidate in focus, marked ✛); the dotted "
               f"edges bound its scatter over the composition range and the window; colour: route family; "
               f"■ Pareto set, □ other candidates, each at its chosen state; dashed: the targets.  "
               f"Top {len(top)} of {len(cand)} drawn.")
    st.toggle("All columns", key="all_columns",
              help="Every column of the library's table after the readable ones: internal names, full "
                   "precision, the route steps as JSON (docs/columns.md).")
    table = pg.display_table(cand, system, hs, all_columns=bool(ss.get("all_columns")))
    st.dataframe(table, width="stretch", hide_index=True, key="candidates")
    # the CSV is written when the button is pressed (not at every run: no file stored and fetched per change)
    st.download_button("Download the table (CSV)", lambda: pg.to_csv(table), file_name="candidates.csv",
                       mime="text/csv", key="download")


def target_inputs():
    """The target inputs (drawn by :func:`results` into ``targets_box`` in the sidebar)."""
    st.caption("Blank means no limit.  Strength and hardness at the ASTM A370 test location.")
    c1, c2 = st.columns(2)
    c1.number_input(f"Min yield ({su})", key="min_yield", value=None, format=sfmt)
    c2.number_input(f"Max yield ({su})", key="max_yield", value=None, format=sfmt)
    c1.number_input(f"Min tensile ({su})", key="min_uts", value=None, format=sfmt)
    c2.number_input(f"Max tensile ({su})", key="max_uts", value=None, format=sfmt)
    c1.number_input("Min elongation (%)", key="min_elong", value=None, format="%.1f")
    c2.number_input("Max rel. cost / kg", key="max_cost", value=None, format="%.2f")
    with st.expander("Hardness and case", expanded=any(
            ss.get(k) is not None for k in ("min_hrc", "max_hrc", "min_surface_hrc", "min_case_depth"))):
        h1, h2 = st.columns(2)
        h1.number_input("Min hardness (HRC)", key="min_hrc", value=None, format="%.1f")
        h2.number_input("Max hardness (HRC)", key="max_hrc", value=None, format="%.1f")
        h1.number_input("Min surface (HRC)", key="min_surface_hrc", value=None, format="%.1f")
        h2.number_input(f"Min case depth ({lu})", key="min_case_depth", value=None,
                        format="%.3f" if system == pg.US else "%.2f")


@st.fragment
def results():
    """Everything that depends on the targets: their inputs (in the sidebar's ``targets_box``),
    their check, the expansion (cached per section), the ranking, the views and the footer.
    A change of target, a view's input or the open tab reruns only this fragment (Streamlit
    sends only its elements: the rest of the page stays as drawn); every other input of the
    sidebar reruns the whole page, this fragment with it."""
    global targets, prepared_ok, cand, pick, rank_args
    if ss.pop("_full_rerun", False):          # a view's button changed inputs outside the fragment
        st.rerun()
    full = ss.pop("_full_run", False)
    t0, lib0 = (T0, LIB0) if full else (time.perf_counter(), pg.library_seconds())
    if not full:
        ss["_runs"] = ss.get("_runs", 0) + 1
        timings.clear()
        for k in VIEW_KEYS:           # a fragment run drops the state of its widgets it does not draw, too
            if k in ss:
                ss[k] = ss[k]
    with targets_box:
        target_inputs()
    errs = list(errors)
    targets = pg.page_targets(ss, system)
    try:
        targets = validate_targets(targets, FAMILIES)
    except SelectorError as exc:
        errs.insert(i_target_errors, pg.explain(exc, system))
    prepared_ok = False
    if not errs:
        try:
            t = time.perf_counter()
            pg.cached_prepare(*prepare_args)
            timings["expansion"] = time.perf_counter() - t
            prepared_ok = True
        except SelectorError as exc:
            errs.append(pg.explain(exc, system))
    for e in errs:
        message(e)
    st.markdown(pg.settings_line(diameter_mm=d_si, thickness_mm=t_si, length_mm=len_si, targets=targets,
                                 families=ss["families"], all_families=list(FAMILIES),
                                 corrosion_resistant=bool(ss.get("corrosion")),
                                 robust_only=bool(ss.get("robust_only")),
                                 min_p_meet=float(ss.get("min_p_pct") or 90.0) / 100.0, allow=ss.get("allow") or (),
                                 service=service, prices=prices_in_use, system=system))
    cand = None
    rank_args = pg.rank_args_of(prepare_args, targets, service, ss)
    ss["_rank_args"] = rank_args          # the ranking's cache key (serve.py's warm start computes the example's)
    if prepared_ok:
        try:
            t = time.perf_counter()
            cand = pg.cached_rank(*rank_args)
            timings["ranking"] = time.perf_counter() - t
        except SelectorError as exc:
            st.error(pg.explain(exc, system))
            cand = None
    pick = None
    if cand is not None and len(cand):
        pick = ss.get("pick") if ss.get("pick") in set(cand["variant"]) else cand["variant"].iloc[0]
        st.markdown(pg.ranking_summary(cand))

    # only the open view is computed; the others cost nothing until opened (``ss["_all_views"]``,
    # set by the AppTest suite only, computes every view in one run)
    views = dict(zip(TAB_LABELS, st.tabs(TAB_LABELS, key="view", on_change="rerun")))
    no_table = "No candidate table: see the messages above."
    for label, tab in views.items():
        if not (tab.open or ss.get("_all_views")):
            continue
        t = time.perf_counter()
        with tab:
            if label in ("Map and list", "One candidate", "Side by side"):
                if cand is None:
                    st.info(no_table)
                elif len(cand) == 0:
                    if label == "Map and list":
                        misses_view()
                    else:
                        st.info("No candidate meets every target: see the nearest misses under Map and list.")
                elif label == "Map and list":
                    map_view(cand)
                elif label == "One candidate":
                    candidate_view(cand, candidate_states([pick]))
                else:
                    comparison_view(cand)
            elif label == "Alternatives":
                alternatives_view(cand)
            elif label == "Clevis pin":
                pin_view()
            else:
                parts_view()
        timings[label] = time.perf_counter() - t

    # ----------------------------------------------------------------------------- footer
    st.divider()
    notice("footer")
    st.caption("Catalogue values carry a confidence tag (verified, partial, from memory, common practice); "
               "models and their publications are listed in docs/methods.md.  "
               f"This run: #{ss['_runs']}, " + ", ".join(f"{k} {v:.2f} s" for k, v in timings.items())
               + f", page {time.perf_counter() - t0:.2f} s, library {pg.library_seconds() - lib0:.3f} s "
                 "(expansion and ranking are cached).  "
               f"Library computations of this server: {pg.library_calls()} (a unit switch adds none).")


ss["_full_run"] = True
results()
