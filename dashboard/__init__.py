"""The Streamlit dashboard of the planner (entry point ``dashboard/app.py``).

``app.py``, ``inputs.py``, ``views.py``, ``sharing.py``, ``accounts_ui.py``, ``calibration_view.py`` and
``compute.py`` import Streamlit; ``display.py``, ``results.py``, ``tables.py``, ``figures.py``, ``report.py``,
``plaintext.py``, ``calibration_data.py`` and ``workers.py`` are plain Python so that the HTML report, the
worker processes and the tests can use them without a running app.
"""
