"""Validation against measurements made by others: one module per published data set.

Run as a user would (import the file as it is, fit, predict); tolerances are stated beside
each check. `python -m tests.validation --readme` rewrites the README section "How close
is it" from the same computations.
"""
