"""Saved plans (revisions, review trail) and share links.
"""
