"""The Streamlit dashboard of the planner (entry point ``dashboard/app.py``); DEVELOPERS.md, "Dashboard",
shows the layout and how a request flows through it.

- ``app.py`` one run of the page; ``state.py`` the session's keys and their meaning; ``url_state.py`` the
  address (view, units, open revision or draft); ``loading.py`` loading a scenario; ``sidebar.py``;
  ``header.py`` the top of the page and the key figures;
- ``views/`` one module per tab (``views/inputs/`` by section);
- ``compute/`` the plan and the other jobs, run in worker processes and cached (``record.py``: the typed
  results); no Streamlit except ``cache.py``;
- ``present/`` formatting, tables, figures and the HTML report; no Streamlit;
- ``services/`` the plans database, accounts, saved revisions and drafts.
"""
