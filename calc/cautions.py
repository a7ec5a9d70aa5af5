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

#: Cooling checks and scale-ups: the verdict under normal operation.
COOLING_CHECK = (
    "Screening estimate: the film coefficients come from published correlations that scatter by "
    "+-25-30 % against measurements; the safety factor is meant to cover that, not more.",
    "Confirm the heat release with reaction calorimetry and the heat transfer with plant data "
    "(a measured U A or a cooling curve of the real vessel) before relying on this verdict.",
    "Local codes and standards and the review of a licensed engineer govern the design and operation "
    "of the plant; this result does not replace them.",
    "The verdict covers normal operation only, not a cooling failure: assess the loss of cooling "
    "(adiabatic temperature rise, MTSR, time to maximum rate) with the thermal-safety calculation.",
)
#: Added to a check whose heat release is a dosing step.
DOSING = ("The dosing model assumes the feed reacts as it is added. Any unreacted feed that "
          "accumulates releases more heat later and is not in this load: check accumulation "
          "by calorimetry.")
#: Added to a check of a step declared heat-absorbing.
ENDOTHERMIC = ("This step was declared heat-absorbing (endothermic): 'adequate' here means only that "
               "the cooling does not limit it. Make sure the sign is right: an exothermic step entered "
               "with a positive enthalpy would be checked as if it needed no cooling.")

#: Thermal-safety assessments (MTSR, TMR_ad, criticality class) and thermal-explosion criteria.
THERMAL_SAFETY = ("Screening estimate: confirm with reaction calorimetry and adiabatic calorimetry of the "
                  "decomposition, follow local codes and have a licensed engineer review the assessment.")

#: Dynamic runs and CSTR steady states.
DYNAMICS = ("Screening estimate: confirm with reaction calorimetry and plant data, follow local codes "
            "and have a licensed engineer review the result.")

#: The line under every chart.
CHART = "Screening estimate - confirm with reaction calorimetry and plant data."

#: Fits of plant data (a logged run's UA, a Wilson plot): what a fit describes, and what governs.
FITS = (
    "A fit describes the vessel as it was run: at the logged coolant flow, speed, fill and fouling. Carry it to "
    "other conditions only through the correlations it calibrates, and re-measure after changes.",
    "Screening estimate: confirm with plant data and reaction calorimetry; local codes and a licensed "
    "engineer's review govern.",
)
