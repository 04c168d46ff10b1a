"""Loadline's Streamlit entry point: page config, the shared sidebar, and the page router.

Run with `make run` (or `streamlit run app/main.py`); the opening scenario is named by the
LOADLINE_SCENARIO environment variable (default: the mineral coating demo).
"""

import logging

import streamlit as st
from streamlit import delta_generator

from app import state, widgets

# Streamlit checks once per process, at the first element drawn, whether it runs outside
# `streamlit run` (to log a hint); the check walks the call stack with `inspect.stack`,
# which reads the source of every frame (~0.1 s, paid by the first visitor). This script
# runs under `streamlit run` (or AppTest), where the hint never applies: mark it done.
delta_generator._use_warning_has_been_displayed = True

st.set_page_config(page_title="Loadline", page_icon=":material/opacity:", layout="wide",
                   initial_sidebar_state="expanded")
state.init()
state.keep_widget_values()

PAGES = [
    st.Page("views/loading_sweep.py", title="Loading sweep", icon=":material/show_chart:",
            default=True),
    st.Page("views/flow_curve.py", title="Flow curve", icon=":material/airwave:"),
    st.Page("views/sizes_packing.py", title="Sizes & packing", icon=":material/scatter_plot:"),
    st.Page("views/droplets.py", title="Droplets", icon=":material/bubble_chart:"),
    st.Page("views/particle_forces.py", title="Particle forces", icon=":material/join_inner:"),
    st.Page("views/calibrate.py", title="Calibrate", icon=":material/tune:"),
    st.Page("views/design_map.py", title="Design map", icon=":material/grid_on:"),
    st.Page("views/batch_screen.py", title="Batch screen", icon=":material/table_view:"),
    st.Page("views/process_checks.py", title="Process checks", icon=":material/plumbing:"),
]
page = st.navigation(PAGES)
widgets.presentation_style()
widgets.sidebar()
try:
    page.run()
except Exception as err:  # a bug, not a user error: say so plainly, log the details
    logging.getLogger("loadline.app").exception("page %s failed", page.title)
    st.error(f"This page met an unexpected problem ({type(err).__name__}: {err}). The "
             "scenario in the sidebar is kept; please report what you did.",
             icon=":material/bug_report:")
state.snapshot()
