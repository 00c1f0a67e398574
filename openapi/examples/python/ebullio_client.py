"""A small client of Ebullio's v1 API using only the Python standard library (urllib).

    from ebullio_client import EbullioClient, EbullioProblem

    ebullio = EbullioClient("http://localhost:8080", api_key)
    try:
        result = ebullio.post("/v1/evaporators/single-effect", body)
    except EbullioProblem as problem:
        print(problem.status, problem.detail, problem.errors)

Every refusal of the API is an RFC 9457 problem (application/problem+json); it is raised as
EbullioProblem with its members. Sweeps and batches can run as jobs (``start_job``,
``wait_for_job``, ``job_result``): the server answers 202 with the job and a Location to poll.
"""

from __future__ import annotations

import json
import time
import urllib.error
import urllib.parse
import urllib.request
from typing import Any

__all__ = ["EbullioClient", "EbullioProblem", "JOB_END_STATES"]

JOB_END_STATES = ("succeeded", "failed", "cancelled")


class EbullioProblem(Exception):
    """An RFC 9457 problem answered by the API (or a non-JSON error, described as one)."""

    def __init__(self, status: int, body: dict[str, Any], headers: dict[str, str] | None = None):
        self.status = status
        self.body = body
        self.headers = headers or {}
        self.type = str(body.get("type", "about:blank"))
        self.title = str(body.get("title", "HTTP error"))
        self.detail = body.get("detail")
        self.errors = body.get("errors") or []
        self.request_id = body.get("requestId")
        super().__init__(f"{status} {self.title}: {self.detail or self.type}")

    @property
    def fields(self) -> list[str]:
        """The request fields the problem names (e.g. ``feed.massFraction``)."""
        return [e["field"] for e in self.errors if isinstance(e, dict) and "field" in e]


class EbullioClient:
    """Calls the API at ``base_url`` (without ``/v1``) with ``Authorization: Bearer <api_key>``."""

    def __init__(self, base_url: str, api_key: str, timeout: float = 60.0, user_agent: str = "ebullio-python-example/1"):
        if not api_key or any(c.isspace() or not c.isprintable() for c in api_key):
            raise ValueError("api_key must be the key as issued: printable characters without spaces")
        parts = urllib.parse.urlsplit(base_url)
        if parts.scheme not in ("http", "https") or not parts.netloc:
            raise ValueError("base_url must be an http or https URL, e.g. http://localhost:8080")
        self.base_url = base_url.rstrip("/")
        self.api_key = api_key
        self.timeout = timeout
        self.user_agent = user_agent

    # -- plumbing -----------------------------------------------------------------------------

    def url(self, path: str) -> str:
        """An API path (``/v1/...``) under the base URL."""
        return self.base_url + (path if path.startswith("/") else "/" + path)

    def request(
        self,
        method: str,
        url: str,
        body: Any = None,
        headers: dict[str, str] | None = None,
    ) -> tuple[int, dict[str, str], Any]:
        """Sends one request; answers (status, headers in lower case, parsed JSON or text).

        A status of 400 or above raises EbullioProblem.
        """
        data = None if body is None else json.dumps(body).encode("utf-8")
        req = urllib.request.Request(url, data=data, method=method)
        req.add_header("Authorization", f"Bearer {self.api_key}")
        req.add_header("Accept", "application/json")
        req.add_header("User-Agent", self.user_agent)
        if data is not None:
            req.add_header("Content-Type", "application/json")
        for name, value in (headers or {}).items():
            req.add_header(name, value)
        try:
            with urllib.request.urlopen(req, timeout=self.timeout) as res:
                return res.status, _lower(res.headers.items()), _parse(res.headers.get("Content-Type"), res.read())
        except urllib.error.HTTPError as err:
            raw = err.read()
            parsed = _parse(err.headers.get("Content-Type"), raw)
            if not isinstance(parsed, dict) or "status" not in parsed:
                parsed = {"type": "about:blank", "title": err.reason or "HTTP error", "status": err.code, "detail": str(parsed)[:500]}
            raise EbullioProblem(err.code, parsed, _lower(err.headers.items())) from None

    def post(self, path: str, body: Any, headers: dict[str, str] | None = None) -> Any:
        """POST a JSON body to an API path and answer the parsed JSON result."""
        return self.request("POST", self.url(path), body, headers)[2]

    def get(self, path_or_url: str) -> Any:
        return self.request("GET", self._resolve(path_or_url))[2]

    def _resolve(self, path_or_url: str) -> str:
        # A job's links and Location are paths such as /v1/jobs/{id}: taken under the base URL.
        if urllib.parse.urlsplit(path_or_url).scheme:
            return path_or_url
        return self.url(path_or_url)

    # -- operations -----------------------------------------------------------------------------

    def single_effect(self, body: dict[str, Any]) -> dict[str, Any]:
        return self.post("/v1/evaporators/single-effect", body)

    def sweep(self, body: dict[str, Any]) -> dict[str, Any]:
        return self.post("/v1/sweeps", body)

    def batch(self, body: dict[str, Any]) -> dict[str, Any]:
        return self.post("/v1/batch", body)

    # -- jobs (Prefer: respond-async) -------------------------------------------------------------

    def start_job(self, path: str, body: dict[str, Any]) -> dict[str, Any]:
        """POSTs a sweep or batch asking for a job (RFC 7240 ``Prefer: respond-async``).

        Answers ``{"job": <job resource>, "location": ...}`` when the server started a job (202),
        or ``{"job": None, "result": <the answer>}`` when it chose to answer at once (200), which
        a server may do with any preference.
        """
        status, headers, parsed = self.request("POST", self.url(path), body, {"Prefer": "respond-async"})
        if status == 202:
            location = headers.get("location") or parsed["links"]["self"]
            return {"job": parsed, "location": location}
        return {"job": None, "result": parsed}

    def get_job(self, location: str) -> dict[str, Any]:
        return self.get(location)

    def wait_for_job(self, location: str, timeout: float = 300.0, poll_interval: float = 0.5) -> dict[str, Any]:
        """Polls ``GET /v1/jobs/{id}`` until the job has ended; answers the final job resource."""
        deadline = time.monotonic() + timeout
        while True:
            status, headers, job = self.request("GET", self._resolve(location))
            if job.get("state") in JOB_END_STATES:
                return job
            if time.monotonic() >= deadline:
                raise TimeoutError(f"job {job.get('id')} still {job.get('state')} after {timeout} s")
            time.sleep(_retry_after(headers.get("retry-after"), poll_interval))

    def job_result(self, job: dict[str, Any]) -> Any:
        """The result of an ended job: the same JSON the synchronous call answers."""
        link = (job.get("links") or {}).get("result")
        if not link:
            raise EbullioProblem(409, {"type": "about:blank", "title": "No result", "status": 409, "detail": f"job {job.get('id')} ended {job.get('state')} without a result"})
        return self.get(link)

    def cancel_job(self, location: str) -> dict[str, Any]:
        return self.request("DELETE", self._resolve(location))[2]


def _lower(items: Any) -> dict[str, str]:
    return {k.lower(): v for k, v in items}


def _parse(content_type: str | None, raw: bytes) -> Any:
    text = raw.decode("utf-8", errors="replace")
    if content_type and "json" in content_type.lower():
        try:
            return json.loads(text)
        except ValueError:
            return text
    return text


def _retry_after(value: str | None, default: float) -> float:
    """Seconds to wait from a Retry-After in seconds (an HTTP date falls back to the default)."""
    try:
        return min(max(float(value), 0.0), 30.0) if value is not None else default
    except ValueError:
        return default
