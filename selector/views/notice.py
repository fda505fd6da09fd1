"""The safety notice every face of the tool shows (command line and page).

Parts chosen with this tool can hurt people when they fail: the results are estimates for
preliminary selection, and the final choice belongs to the applicable codes, the heat's
certified test reports and a licensed engineer.
"""
from __future__ import annotations

from .. import CAUTION

#: after :data:`selector.CAUTION`: to whom the final choice is deferred
DEFER_NOTICE = ("Parts chosen here can hurt people when they fail. Defer to the applicable design "
                "code and local regulations, certified material test reports for the actual heat, "
                "and review by a qualified, licensed engineer.")

#: the lines printed at the end of every command's output
CAUTION_LINES = f"CAUTION: {CAUTION}\n{DEFER_NOTICE}"
