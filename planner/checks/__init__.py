"""Judging a plan: findings (safety and validity checks) and comparisons over a lever.
"""
