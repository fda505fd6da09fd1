"""The local page (``app.py``), in modules by role:

==========  ===============================================================
module      role
==========  ===============================================================
units       display units: labels, conversion of shown and typed values
inputs      the sidebar and pin inputs -> SI values, targets, contexts; the demo
cache       the cached calls of the library (``st.cache_resource``/``st.cache_data``)
text        labels, readable route, band line, cautions, ranking summary
tables      tables in display units
charts      Altair charts (the strength-elongation map and the others)
==========  ===============================================================

No physics and no selection logic live here: every number comes from the library.
The names below are the page's public helpers (``from selector.views import page as pg``).
Results are estimates for preliminary selection; see :data:`selector.CAUTION`.
"""

from selector.views.notice import DEFER_NOTICE  # noqa: F401
from .units import DIGITS, UNIT_INPUTS, convert_inputs, si_key  # noqa: F401
from selector.views.units import (  # noqa: F401
    HARDNESS_SCALES, SI, UNIT_SYSTEMS, US, display_name, quantity_of, to_display, to_si, unit)
from .inputs import (  # noqa: F401
    DEMO, ENVIRONMENTS, LOAD_MODEL_LABELS, PIN_INPUT_KEYS, PIN_TARGET_KEYS, SHEAR_PLANE_LABELS,
    SWEEP_LABELS, SWEEP_MODES, SWEEP_SECONDS_PER_DIAMETER, TARGET_FIELDS, blank_inputs, capacity_for,
    check_families, check_service, convert_length_text, demo_title, example_inputs, explain, format_lengths,
    inputs_from_pin, page_service, page_targets, parse_lengths, pin_case_from_inputs, pin_grip_mm,
    pin_report_for, rank_args_of, read_heat, read_price_sheet, read_route_steps, route_json, service_context,
    si_targets, sweep_diameters, targets_from_inputs, targets_key)
from .text import (  # noqa: F401
    avoid_rule_label, avoid_rules, band_text, candidate_cautions, case_text, family_label,
    first_through_and_case, hardness_text, label_candidates, mass_unit, per_mass_text, percent, pick_label,
    pin_target_explanations, prices_in_use, ranking_summary, route_line, route_steps, settings_line, to_csv)
from .tables import (  # noqa: F401
    SWEEP_SHOWN, alternatives_table, capacity_table, comparison_table, display_table, fmt_window,
    miss_table, pin_stress_table, reachable_table, sweep_table)
from .cache import (  # noqa: F401
    cached_alternatives, cached_evaluate, cached_map, cached_miss_analysis, cached_nearest_misses, cached_prepare,
    cached_rank, cached_sweep, cached_variant_states, library_calls, library_seconds)
from .charts import (  # noqa: F401
    COMPARE_COLOURS, chart_frames, chart_spec, comparison_bars, comparison_frame, fatigue_depth_chart, keep_vertices,
    fatigue_depth_frame, frontier_chart, hull_band, parameter_charts, parameter_frame, profile_chart,
    profile_frame, strength_elongation_chart, sweep_chart, thin_band)
