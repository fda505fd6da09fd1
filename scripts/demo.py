"""Regenerate the measured tables of docs/demo.md (the invented hitch-pin scenario).

Prints Markdown: the first five robust candidates (rank order) at the demo diameter with
their probability of meeting the targets and their cautions, and the diameter sweep.  Paste the output into docs/demo.md after a change to
the catalogue or the models (the page's defaults come from the same DEMO_CASE).

Usage: python scripts/demo.py
"""
from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))


def _fmt(x, nd=0):
    try:
        import math
        if x is None or (isinstance(x, float) and math.isnan(x)):
            return "—"
    except TypeError:
        pass
    return f"{x:.{nd}f}" if isinstance(x, float) else str(x)


def main() -> int:
    import selector
    from selector.design import pins, sweep

    case = pins.DEMO_CASE
    pin = {k: case[k] for k in pins.DEMO_PIN_KEYS}
    service = dict(plated=case["plated"], plating=case["plating"], mating_material=case["mating_material"],
                   environment=case["environment"], service_temp_c=case["service_temp_c"])
    rep = pins.pin_report(**pin)
    length = sweep.pin_length_mm(case["shear_planes"], case["lug_thickness_mm"], case["clevis_thickness_mm"],
                                 case["gap_mm"])
    cand = selector.select(rep["targets"], case["diameter_mm"], length_mm=length, robust_only=True, **service)
    allc = selector.select(rep["targets"], case["diameter_mm"], length_mm=length, **service)
    print(f"Robust candidates at {case['diameter_mm']:g} mm (p_meet >= 90 %): {len(cand)}; Pareto set of all "
          f"{len(allc)} candidates: {int(allc['pareto'].sum())}; the first five in rank order:\n")
    print("| rank | grade | route | yield, MPa | surface, HRC | p_meet | part cost | cautions |")
    print("|---|---|---|---|---|---|---|---|")
    for _, r in cand.head(5).iterrows():
        print(f"| {r['rank']} | {r['grade']} | {r['route_text']} | {r['yield_mpa']:.0f} | "
              f"{_fmt(r['surface_hardness_hrc'], 1)} | {100 * r['p_meet']:.0f} % | {r['part_cost']:.3f} | "
              f"{r['cautions']} |")
    t0 = time.perf_counter()
    sw = sweep.diameter_sweep(case["sweep_diameters_mm"], caution_context=service,
                              **{k: v for k, v in pin.items() if k != "diameter_mm"})
    dt = time.perf_counter() - t0
    print(f"\nDiameter sweep ({len(sw)} diameters, {dt:.1f} s on this machine):\n")
    print("| d, mm | min yield, MPa | robust candidates | cheapest robust | yield, MPa | surface HRC | part cost |")
    print("|---|---|---|---|---|---|---|")
    for _, r in sw.iterrows():
        d = f"**{r['diameter_mm']:g}**" if r["changed"] else f"{r['diameter_mm']:g}"
        pick = f"{r['grade']}, {r['route_text']}" if r["grade"] else "(none)"
        print(f"| {d} | {r['min_yield_mpa']:.0f} | {r['n_robust']} | {pick} | {_fmt(r['yield_mpa'])} | "
              f"{_fmt(r['surface_hardness_hrc'], 1)} | {_fmt(r['part_cost'], 3)} |")
    print(f"\n{selector.CAUTION}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
