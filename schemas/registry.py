"""The resources whose contract openapi.yaml carries, with their request and response schemas.

``python -m schemas.openapi`` regenerates the matching parts of openapi.yaml from this list; a test
fails when the file and the schemas disagree.
"""
from dataclasses import dataclass

from .heat_transfer import (AgitationRequestSchema, AgitationResultSchema, CoolantBalanceRequestSchema,
                            CoolantBalanceResultSchema, GeometryRequestSchema, GeometryResultSchema,
                            HeatTransferRequestSchema, HeatTransferResultSchema, ImpellerSchema, MaterialSchema,
                            CorrelationAlternativeSchema)
from .cooling import (CoolingCheckRequestSchema, CoolingCheckResultSchema, ScaleUpRequestSchema,
                      ScaleUpResultSchema)
from .fits import UAFitRequestSchema, UAFitResultSchema, WilsonRequestSchema, WilsonResultSchema
from .properties import FluidSchema, PropertiesQuerySchema, PropertiesResultSchema
from .records import RecordListSchema, RecordSchema, StepRecordSchema, UtilityRecordSchema, VesselRecordSchema
from .screening import ScreeningListSchema, ScreeningRequestSchema, ScreeningResultSchema
from .sizing import JacketSizingRequestSchema, JacketSizingResultSchema
from .window import OperatingWindowRequestSchema, OperatingWindowResultSchema
from .safety import (CSTRRequestSchema, CSTRResultSchema, SimulationRequestSchema, SimulationResultSchema,
                     ThermalSafetyRequestSchema, ThermalSafetyResultSchema)


@dataclass(frozen=True)
class Calculation:
    """A resource answering POST (JSON body) and GET (the same fields as dotted query parameters)."""

    path: str
    tag: str
    summary: str
    description: str
    request: type
    response: type
    media: tuple = ("text/csv", "text/plain")  # besides application/json
    batch: bool = False
    example: str | None = None  # a request file in examples/, shown in the contract
    csv_upload: bool = False  # POST also takes the series as text/csv (header: column [unit])


@dataclass(frozen=True)
class Library:
    path: str
    tag: str
    summary: str
    item: type


CALCULATIONS = [
    Calculation("/v1/geometry", "heat transfer", "Liquid level, wetted, jacketed and coil areas of a filled vessel",
                "Volume from level or level from volume (coils displace liquid), wetted and jacketed inside "
                "area, submerged coil area and area per volume.", GeometryRequestSchema, GeometryResultSchema, example="geometry_request.json"),
    Calculation("/v1/agitation", "heat transfer", "Reynolds number, power number and power of the agitator",
                "Impeller Reynolds number, power number across laminar, transitional and turbulent flow, "
                "shaft power, power per volume, tip speed and Froude number.",
                AgitationRequestSchema, AgitationResultSchema, example="agitation_request.json"),
    Calculation("/v1/heat-transfer", "heat transfer", "Film coefficients, resistances, overall U and UA",
                "Process- and coolant-side film coefficients (wall viscosity at the solved wall temperature, "
                "coolant properties at its solved mean temperature), wall and fouling resistances with the "
                "controlling one named, U on the inside area and UA of jacket and coils.",
                HeatTransferRequestSchema, HeatTransferResultSchema, example="heat_transfer_request.json"),
    Calculation("/v1/coolant-balance", "heat transfer", "Coolant outlet temperature, duty and LMTD for a given UA",
                "Single-pass coolant against well-mixed contents: T_out = T_r - (T_r - T_in) exp(-UA / m c_p), "
                "with c_p at the mean coolant temperature.", CoolantBalanceRequestSchema, CoolantBalanceResultSchema,
                example="coolant_balance_request.json"),
    Calculation("/v1/cooling-check", "cooling check", "Can this vessel remove this reaction's heat, with margin?",
                "Heat load (reaction + agitator - sensible heat of cold feed) against the cooling capacity at the "
                "process temperature; margin = capacity / load; adequate when margin >= safety_factor (default "
                "1.3, a conservative engineering choice). Limits are solved: the shortest dosing time, the "
                "warmest coolant inlet and the coolant flow that restore the safety factor. "
                "format=svg or png draws the heat balance; format=html or pdf gives a printable "
                "report (inputs as given, results, limits, warnings, cautions, request hash). A screening estimate: confirm with reaction calorimetry and plant data; "
                "local codes and a licensed engineer's review govern.",
                CoolingCheckRequestSchema, CoolingCheckResultSchema, batch=True,
                media=("text/csv", "text/plain", "image/svg+xml", "image/png", "text/html", "application/pdf"),
                example="cooling_check_production.json"),
    Calculation("/v1/scale-up", "cooling check", "The cooling check at every scale of a scale-up path",
                "From a reference vessel to explicit target vessels or target volumes (geometrically similar "
                "vessels at the same fill fraction) under an agitation rule: per scale the generated geometry and "
                "speed, A/V, films, U, the controlling resistance, capacity, load, margin, verdict and limits; "
                "overall the largest adequate volume solved on the continuous family of similar vessels and "
                "where the controlling resistance switches. format=csv gives one row per scale; format=svg or "
                "png a chart; format=html or pdf a printable report (one page per scale).",
                ScaleUpRequestSchema, ScaleUpResultSchema, media=("text/csv", "text/plain", "image/svg+xml",
                                                                  "image/png", "text/html", "application/pdf"),
                batch=True,
                example="scale_up_demo.json"),
    Calculation("/v1/operating-window", "cooling check", "The cooling margin over a grid of two operating quantities",
                "The cooling check's body plus two axes, each one of heat_release.dosing_time, "
                "coolant.inlet_temperature, coolant.flow, process_temperature or vessel.agitator.speed with "
                "'from', 'to' and 'points': the margin and verdict at every grid point (all solved in one pass "
                "of the vectorised network; each equals the single cooling check with that value), the boundary "
                "of the adequate region (margin = safety factor, solved on each grid line where the verdict "
                "changes) and the request's own point. At most MAX_WINDOW_POINTS grid points (2500; 413 above). "
                "format=csv gives one row per point; format=svg or png a contour chart with the safety-factor "
                "line and the current point; format=html or pdf a printable report (grid summary, current point, "
                "boundary, contours). A screening estimate: confirm with reaction calorimetry and plant "
                "data; local codes and a licensed engineer's review govern.",
                OperatingWindowRequestSchema, OperatingWindowResultSchema,
                media=("text/csv", "text/plain", "image/svg+xml", "image/png", "text/html", "application/pdf"),
                example="operating_window_production.json"),
    Calculation("/v1/jacket-sizing", "cooling check", "Candidate jackets and coils for a vessel shell, ranked",
                "Annular jackets over gaps (with and without a spiral baffle over pitches), half-pipe jackets over "
                "standard pipe sizes (ASME B36.10M), pitches and parallel zones, internal helical coils (ASME "
                "B36.19M tube) that fit between impeller and wall, and a jacket with a coil when no jacket alone "
                "suffices; each evaluated like the cooling check at the utility's flow, cut back to what its "
                "available pressure difference, maximum velocity and maximum flow allow, with area, U, capacity, "
                "margin, flow, velocity and pressure drop. The smallest feasible design of each type and an overall "
                "recommendation with its reasoning. format=csv gives one row per candidate; format=svg or png "
                "plots capacity against pressure drop with the duty line; format=html or pdf a printable report "
                "(recommendation and reasoning, smallest feasible of each type, every candidate). A screening estimate: confirm with "
                "reaction calorimetry and plant data; the fabricator confirms the mechanical design under the "
                "pressure-vessel code; local codes and a licensed engineer's review govern.",
                JacketSizingRequestSchema, JacketSizingResultSchema,
                media=("text/csv", "text/plain", "image/svg+xml", "image/png", "text/html", "application/pdf"),
                batch=True,
                example="jacket_sizing_request.json"),
    Calculation("/v1/thermal-safety", "thermal safety", "Adiabatic rise, MTSR, T_D24, TMR_ad and criticality class",
                "Cooling-failure scenario: MTSR = T_p + X_ac dT_ad (Stoessel 1993); T_D24 and the adiabatic time to "
                "maximum rate at the MTSR from zero-order decomposition kinetics (Townsend & Tou 1980); MTT given or "
                "the boiling point of the contents; criticality class 1-5 from the order of T_p, MTSR, MTT and "
                "T_D24, with the reasoning. A screening estimate: confirm with reaction and adiabatic calorimetry; "
                "local codes and a licensed engineer's review govern.",
                ThermalSafetyRequestSchema, ThermalSafetyResultSchema, example="thermal_safety_production.json"),
    Calculation("/v1/simulations", "thermal safety", "Dynamic batch, semi-batch or continuous run with the jacket",
                "Mole and energy balances of a jacketed stirred tank integrated with a stiff solver: temperatures, "
                "heat release, jacket duty, conversion and accumulation over time, optional PI control of the "
                "coolant inlet, and a cooling failure at a given or the worst time. CSV gives one row per time "
                "point; format=svg or png draws the run. A screening estimate: confirm with reaction calorimetry "
                "and plant data; local codes and a licensed engineer's review govern.",
                SimulationRequestSchema, SimulationResultSchema, media=("text/csv", "text/plain", "image/svg+xml",
                                                                        "image/png"),
                example="simulation_production_failure.json"),
    Calculation("/v1/cstr-steady-states", "thermal safety", "Steady states of a cooled CSTR and their stability",
                "Every intersection of the heat-generation and heat-removal curves (Van Heerden 1953), with "
                "slope and eigenvalue stability (Aris & Amundson 1958). CSV gives one row per state; format=svg "
                "or png draws both curves with the states marked. A screening estimate: confirm with reaction "
                "calorimetry and plant data; local codes and a licensed engineer's review govern.",
                CSTRRequestSchema, CSTRResultSchema, media=("text/csv", "text/plain", "image/svg+xml", "image/png"),
                example="cstr_steady_states.json"),
    Calculation("/v1/ua-fit", "plant data", "UA of a vessel from a logged heat-up or cool-down",
                "Least squares on the batch energy balance M c_p dT/dt = -UA_eff (T - T_in) + shaft power - heat "
                "loss (solve_ivp between the logged coolant inlet temperatures), with the coolant-side balance "
                "when the outlet and flow are logged: UA with its 95 % interval, the fit's time constant, "
                "residuals; format=svg or png draws data, fit and residuals. The series are JSON arrays (any "
                "unit per field) or, POSTed as text/csv, a log whose header names each column and its unit "
                "(time [min],contents_temperature [degC],coolant_inlet_temperature [degC]) with the other fields "
                "as query parameters. A series that cannot determine UA (too short, a clock that does not "
                "increase, no driving force) is a 422 saying why.",
                UAFitRequestSchema, UAFitResultSchema, media=("text/csv", "text/plain", "image/svg+xml", "image/png"),
                example="ua_fit_water_run.json", csv_upload=True),
    Calculation("/v1/wilson-plot", "plant data", "The vessel's own process-side constant from runs at several speeds",
                "Wilson (1915): 1/U = R_rem + (T/(a k Pr^c)) Re^-b over runs that differ only in agitator speed; "
                "least squares gives the process constant a of Nu = a Re^b Pr^c (mu/mu_w)^0.14 and the remaining "
                "resistance (wall + fouling + service film), each with its 95 % interval, and a calibration "
                "object ready for a cooling check or scale-up. Runs give U, UA or a logged series (fitted as in "
                "/v1/ua-fit). format=svg or png draws 1/U against Re^-b.",
                WilsonRequestSchema, WilsonResultSchema, media=("text/csv", "text/plain", "image/svg+xml", "image/png"),
                example="wilson_plot_runs.json"),
]
LIBRARIES = [
    Library("/v1/impellers", "libraries", "The impeller library with power numbers, film constants and sources",
            ImpellerSchema),
    Library("/v1/materials", "libraries", "The wall-material library with conductivities and sources", MaterialSchema),
    Library("/v1/correlations", "libraries", "Every published alternative of each resistance, with source, validity "
            "range and constants (what the correlations object of a request chooses)", CorrelationAlternativeSchema),
]


@dataclass(frozen=True)
class Collection:
    """A catalogue resource: records of one kind with their revisions (create, list, read, replace, update,
    retire)."""

    path: str
    kind: str
    summary: str
    content: type  # the record schema (validated by the calculation schemas inside it)
    vessel_filters: bool = False


COLLECTIONS = [
    Collection("/v1/vessels", "vessel", "Vessels of the plant: geometry, wall, jacket, coils, agitator, fouling, "
               "the utility that serves each, and an optional calibration", VesselRecordSchema, vessel_filters=True),
    Collection("/v1/utilities", "utility", "Utilities (coolants) of the plant: fluid, inlet temperature and flow",
               UtilityRecordSchema),
    Collection("/v1/steps", "step", "Process steps: charge, process temperature, heat release, safety factor and "
               "the cooling-failure scenario", StepRecordSchema),
]
REQUEST_SCHEMAS = ([PropertiesQuerySchema] + [c.request for c in CALCULATIONS] + [c.content for c in COLLECTIONS]
                   + [ScreeningRequestSchema])
RESPONSE_SCHEMAS = ([PropertiesResultSchema, FluidSchema] + [c.response for c in CALCULATIONS] + [library.item for library in LIBRARIES]
                    + [RecordSchema, RecordListSchema, ScreeningResultSchema, ScreeningListSchema])
