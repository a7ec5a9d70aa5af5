"""Coolant hydraulics: friction factors, loss coefficients and the pressure drop of each coolant path."""
