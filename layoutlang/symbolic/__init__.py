"""Symbolic layouts: closed-form design equations, solving for a symbol, sensitivities.

Nothing here is imported by a numeric check; modules that need sympy import it themselves.
"""
