"""Mechanism check: upper-bound limit analysis by discontinuity layout optimization (DLO).

An independent cross-check of the screening checks, never the design number: every factor
it gives is an *upper bound* (on the unsafe side). See METHOD.md in this folder.
"""
