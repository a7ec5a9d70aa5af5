"""The cautions every verdict carries: one definition each, used by every result that needs them.

A wrong "adequate" can mean a runaway reaction, so every result that gives a verdict says what it
is (a screening estimate), what must confirm it (reaction calorimetry, plant data) and what governs
(local codes, a licensed engineer's review).
"""
from __future__ import annotations

#: Heat-transfer results: films, U and UA of a vessel.
HEAT_TRANSFER = (
    "Screening estimate from published correlations that scatter by about +-25-30 %.",
    "Confirm heat release with reaction calorimetry and heat transfer with plant data before relying on it.",
    "Local codes, site process-safety procedures and a licensed engineer's review govern.",
)
