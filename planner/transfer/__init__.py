"""The whole transfer: pumps, vessels, the operating point of the system, the timeline,
start-up, stop and restart, and the plan that strings them together.
"""
