"""The Streamlit dashboard of the planner (entry point ``dashboard/app.py``).

Only ``app.py``, ``inputs.py``, ``views.py`` and ``sharing.py`` import Streamlit; ``display.py``,
``results.py``, ``tables.py``, ``figures.py`` and ``report.py`` are plain Python so that the HTML
report and the tests can use them without a running app.
"""
