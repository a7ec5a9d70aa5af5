"""Cooling failure: adiabatic rise, MTSR, TMR_ad, criticality, runaway criteria, dynamics, CSTR states."""
