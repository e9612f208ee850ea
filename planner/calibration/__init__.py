"""Calibration from past transfers: read a logged transfer (``log``), replay it through the planner
(``replay``) and fit the site's factors of the scenario's ``[calibration]`` table (``fit``)."""
