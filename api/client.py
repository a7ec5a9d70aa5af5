"""A small typed Python client of the coolmargin service (requests).

>>> from api.client import Client                          # doctest: +SKIP
>>> service = Client("http://127.0.0.1:8000", token="...")  # doctest: +SKIP
>>> service.cooling_check(body)["margin"]                   # doctest: +SKIP

One method per calculation; each takes the request object as a dict (quantities as numbers in their
default unit or as text with a unit, exactly as in openapi.yaml) and returns the JSON answer. Keyword
``params`` carry the answer's presentation (``output_units``, ``digits``, ``unit.<field>``). The
bearer token comes from ``token`` or ``COOLMARGIN_TOKEN``. Answers 429 and 503 are retried after
their ``Retry-After`` (bounded); any other error raises :class:`ProblemError` with the RFC 9457
details (``status``, ``title``, ``detail``, ``errors``); a server that cannot be reached raises
:class:`ServiceUnreachable`.
"""
from __future__ import annotations

import email.utils
import os
import time
from typing import Any, Mapping

import requests

JSON = dict[str, Any]
RETRY_STATUSES = frozenset({429, 503})
TOKEN_VARIABLE = "COOLMARGIN_TOKEN"


class ClientError(Exception):
    """Base of the client's errors."""


class ServiceUnreachable(ClientError):
    """No answer from the server: refused, timed out or a broken connection."""


class ProblemError(ClientError):
    """The service answered with an error; ``problem`` is its problem+json body."""

    def __init__(self, status: int, problem: Mapping[str, Any]):
        self.status = status
        self.problem = dict(problem)
        self.title: str = str(problem.get("title", ""))
        self.detail: str = str(problem.get("detail", ""))
        self.errors: list[dict[str, str]] = list(problem.get("errors") or [])
        fields = "; ".join(f"{e.get('field')}: {e.get('message')}" for e in self.errors)
        super().__init__(f"{status} {self.title}: {fields or self.detail}")


def retry_delay(header: str | None, default: float) -> float:
    """Seconds to wait from a Retry-After header (seconds or an HTTP date, RFC 9110 §10.2.3).

    >>> retry_delay("3", 1.0), retry_delay(None, 1.0), retry_delay("soon", 2.0)
    (3.0, 1.0, 2.0)
    """
    if header is None:
        return default
    header = header.strip()
    if header.isdigit():
        return float(header)
    try:
        when = email.utils.parsedate_to_datetime(header)
    except (TypeError, ValueError):
        return default
    return max(0.0, when.timestamp() - time.time())


class Client:
    """The service at ``base_url``. ``timeout`` is (connect, read) seconds; ``retries`` bounds 429/503 retries,
    each waiting what ``Retry-After`` says (at most ``max_wait`` seconds)."""

    def __init__(self, base_url: str = "http://127.0.0.1:8000", token: str | None = None, *,
                 timeout: float | tuple[float, float] = (5.0, 120.0), retries: int = 3, max_wait: float = 60.0,
                 session: requests.Session | None = None):
        self.base_url = base_url.rstrip("/")
        self.timeout = timeout
        self.retries = retries
        self.max_wait = max_wait
        self.session = session or requests.Session()
        token = token if token is not None else os.environ.get(TOKEN_VARIABLE) or None
        if token:
            self.session.headers["Authorization"] = f"Bearer {token}"

    def close(self) -> None:
        self.session.close()

    def __enter__(self) -> "Client":
        return self

    def __exit__(self, *exc_info) -> None:
        self.close()

    # ------------------------------------------------------------ transport

    def request(self, method: str, path: str, body: Mapping[str, Any] | None = None,
                params: Mapping[str, Any] | None = None) -> requests.Response:
        """One call with retries on 429/503; raises ProblemError for any other error status."""
        for attempt in range(self.retries + 1):
            try:
                response = self.session.request(method, self.base_url + path, json=body, params=params,
                                                timeout=self.timeout)
            except (requests.ConnectionError, requests.Timeout) as error:
                raise ServiceUnreachable(f"cannot reach {self.base_url}: {error}") from error
            if response.status_code in RETRY_STATUSES and attempt < self.retries:
                time.sleep(min(self.max_wait, retry_delay(response.headers.get("Retry-After"), 2.0 ** attempt)))
                continue
            if response.status_code >= 400:
                try:
                    problem = response.json()
                except ValueError:
                    problem = {"title": response.reason, "detail": response.text[:500]}
                raise ProblemError(response.status_code, problem if isinstance(problem, dict) else {})
            return response
        raise AssertionError("unreachable")  # pragma: no cover (the loop returns or raises)

    def post(self, path: str, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.request("POST", path, body, params or None).json()

    def get(self, path: str, **params: Any) -> JSON:
        return self.request("GET", path, None, params or None).json()

    # ------------------------------------------------------------ the service

    def health(self) -> JSON:
        return self.get("/health")

    def properties(self, fluid: str, temperature: float | str, *, mass_fraction: float | None = None,
                   pressure: float | str | None = None, **params: Any) -> JSON:
        query = {"fluid": fluid, "temperature": temperature, "mass_fraction": mass_fraction, "pressure": pressure}
        return self.get("/v1/properties", **{k: v for k, v in query.items() if v is not None}, **params)

    def geometry(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/geometry", body, **params)

    def agitation(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/agitation", body, **params)

    def heat_transfer(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/heat-transfer", body, **params)

    def coolant_balance(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/coolant-balance", body, **params)

    def cooling_check(self, body: Mapping[str, Any], **params: Any) -> JSON:
        """Verdict, margin, heat load, capacity and limits of one check."""
        return self.post("/v1/cooling-check", body, **params)

    def cooling_check_batch(self, cases: list[Mapping[str, Any]], **params: Any) -> JSON:
        """Several checks in one call: ``{"cases": [{"status", "result" or "problem"}, ...]}``."""
        return self.post("/v1/cooling-check/batch", {"cases": list(cases)}, **params)

    def jacket_sizing(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/jacket-sizing", body, **params)

    def operating_window(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/operating-window", body, **params)

    def screening(self, body: Mapping[str, Any], **params: Any) -> JSON:
        """Screen one step against the stored vessels; the answer is stored (its ``id``)."""
        return self.post("/v1/screenings", body, **params)

    def scale_up(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/scale-up", body, **params)

    def thermal_safety(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/thermal-safety", body, **params)

    def simulation(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/simulations", body, **params)

    def cstr_steady_states(self, body: Mapping[str, Any], **params: Any) -> JSON:
        return self.post("/v1/cstr-steady-states", body, **params)

    def library(self, name: str) -> list[JSON]:
        """A built-in library: ``fluids``, ``impellers`` or ``materials``."""
        return self.get(f"/v1/{name}")["items"]

    def report(self, calculation: str, body: Mapping[str, Any], fmt: str = "pdf", **params: Any) -> bytes:
        """A printable report (``pdf`` or ``html``) of ``cooling-check``, ``scale-up``, ``screenings``,
        ``jacket-sizing`` or ``operating-window``."""
        return self.request("POST", f"/v1/{calculation}", body, {"format": fmt, **params}).content
