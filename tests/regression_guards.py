"""Regression guards: the one list of golden values that cite no outside source.

Each value below was measured on this code (by a fit script or a test run) and written
down so that an unintended change shows up as a failing test.  They guard against
unintended change and are not accuracy claims: accuracy is measured only on rows no fit
has seen (``selector validate``, docs/validation.md).  A test that checks against the
outside world cites its source beside the assertion instead, and never imports from here.

When a deliberate model or data change moves one of these, update it here in the same
commit and say why in the commit message.
"""

#: scripts/fit_tempering.py, leave-one-grade-out cross-validation of the tempering surface,
#: pooled over grades (HRC points); measured 2026 (docs/methods/tempering.md), with headroom
TEMPERING_LOGO_MEDIAN_HRC_MAX = 2.5
TEMPERING_LOGO_P90_HRC_MAX = 8.0  # measured 7.64 HRC after the 41Cr4 table and the Cr term (86 rows)

#: scripts/fit_correlations.py: rows per fit family and in all (data/fits/correlations_rows.csv)
CORRELATIONS_ROWS = {"alloy_steel": 58, "carbon_steel": 10}
CORRELATIONS_ROWS_TOTAL = 68
#: pooled leave-one-grade-out median absolute errors of the correlations (docs/methods/correlations.md)
CORRELATIONS_LOGO_YIELD_MPA_MAX = 4.0
CORRELATIONS_LOGO_ELONGATION_PCT_MAX = 2.5
#: in-sample (calibration) medians of correlations.fit_report: yield (relative), elongation
#: and reduction of area (percentage points), per fit family
CORRELATIONS_IN_SAMPLE_MAX = {
    "alloy_steel": {"yield_rel": 0.03, "elongation_pts": 1.5, "reduction_area_pts": 3.5},
    "carbon_steel": {"yield_rel": 0.05, "elongation_pts": 3.0, "reduction_area_pts": 3.0},
}
