"""Where a colder coolant removes less heat, and why (issue 12): pinned, not hidden.

A colder coolant raises the driving force by 1/(T_r - T_in) per kelvin but also its viscosity (30 % glycol near
0 degC: about 4 % per kelvin), which lowers the coolant film. Whether the duty rises depends on how steeply the
film falls with viscosity and how much of 1/U the film is. Scanning the invariant suite's vessels (400 draws)
showed: half pipes and spiral baffles never remove less at any Reynolds number (tests/test_invariants.py); plain
annular jackets can, below Re = 2.2e4, for two different reasons:

* Lehrer (1970) extrapolated to laminar, viscous coolant (10 of 121 annular draws below 2.2e4, all carrying its
  range warnings): an artefact of the correlation outside its data, pinned below with its mechanism;
* Stein & Schmidt (1993) in transitional flow, 2300 < Re < about 1e4 (4 of 112 draws, glycol at Pr 35-50): its
  turbulent term 0.0115 Pr^(1/3) Re^0.9 [1 - (2300/Re)^2.5] vanishes at Re = 2300 as turbulence does, so the film
  falls far faster than Re^0.9 there. That is physics (a chilled coolant relaminarising), not a blend choice.
"""
import pytest
from test_correlation_choice import _body

GLYCOL = {"fluid": "ethylene_glycol", "mass_fraction": 0.3, "flow": "0.5 m^3/h"}


def _annular(client, correlation, inlet, path="/v1/heat-transfer", **extra):
    body = _body("rushton_turbine", 120.0, 2.5, correlations={"annular_jacket": correlation}, **extra)
    body["process_temperature"] = 35.0
    body["coolant"] = {**GLYCOL, "inlet_temperature": inlet}
    return client.post(path, json=body).get_json()


def test_lehrer_extrapolated_to_laminar_glycol_removes_less_when_colder_and_says_why(client):
    # Artefact of extrapolation, flagged: Lehrer (1970) was fitted on water in turbulent jacket flow
    # (Re 1e3-1e5, Pr up to about 20; VDI Heat Atlas, from memory). Its form
    # Nu = 0.03 Re^0.75 Pr / (1 + 1.74 (Pr - 1) Re^-0.125) tends to (0.03/1.74) Re^0.875 when 1.74 Pr Re^-0.125 >> 1:
    # the Prandtl number cancels, so at a fixed mass flow h ~ mu^-0.875, steeper than the driving force gains.
    # Here (30 % glycol, 0.5 m3/h, Re ~ 200, Pr ~ 31) a coolant 8 K colder removes less.
    warm, cold = _annular(client, "lehrer_1970", 0.0), _annular(client, "lehrer_1970", -8.0)
    assert cold["duty"] < warm["duty"]
    messages = " ".join(w["message"] for w in warm["warnings"] if w["code"] == "outside_validity_range")
    assert "Lehrer (1970): Re = " in messages and "Lehrer (1970): Pr = " in messages
    # the film falls as Re^0.875 (within the Sieder-Tate factor and the conductivity's few per cent)
    re_ratio = cold["streams"][0]["service_reynolds"] / warm["streams"][0]["service_reynolds"]
    h_ratio = cold["film_coefficients"]["service_jacket"] / warm["film_coefficients"]["service_jacket"]
    assert h_ratio == pytest.approx(re_ratio ** 0.875, rel=0.04)
    assert h_ratio < re_ratio ** 0.75 * (1 / re_ratio) ** (1 / 3) * 0.95  # not the Pr^(1/3) behaviour of the data
    # Stein & Schmidt (1993) covers laminar and mixed-convection flow (its Nu_A..Nu_C terms): there the film barely
    # changes with viscosity and the colder coolant removes more; the margin band carries it as a member.
    warm_s, cold_s = _annular(client, "stein_schmidt_1993", 0.0), _annular(client, "stein_schmidt_1993", -8.0)
    assert cold_s["duty"] > warm_s["duty"] * 1.1
    check = _annular(client, "lehrer_1970", -8.0, "/v1/cooling-check",
                     heat_release={"model": "total_power", "power": 2.0e3})
    assert "annular_jacket=stein_schmidt_1993" in check["margin_band"]["high_set_by"]

