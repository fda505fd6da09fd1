import cProfile, pstats, io, os
import streamlit as st
_n = st.session_state.get("_prof_n", 0) + 1
st.session_state["_prof_n"] = _n
_pr = cProfile.Profile()
_pr.enable()
try:
    exec(compile(open("/work/wt-page3/app.py").read(), "/work/wt-page3/app.py", "exec"), {"__name__": "__main__"})
finally:
    _pr.disable()
    _pr.dump_stats(f"/tmp/p3/prof_{_n}.out")
