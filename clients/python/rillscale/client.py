"""The Rillscale REST API from Python: upload, submit, wait, fetch results, artifacts and provenance.

Standard library only (urllib / http.client), so it runs wherever Python 3.9+ runs.
"""
import csv
import hashlib
import http.client
import json
import mimetypes
import os
import random
import time
import uuid
from typing import Any, Callable, Dict, Iterable, List, Optional
from urllib.parse import quote, urlencode, urlsplit

CHUNK = 1024 * 1024
MEDIA_TYPES = {".tif": "image/tiff", ".tiff": "image/tiff", ".geojson": "application/geo+json", ".json": "application/geo+json", ".zip": "application/zip"}
FINAL = ("succeeded", "failed", "cancelled")


class ApiError(Exception):
    """An RFC 9457 problem answer: `status`, `type`, `title`, `detail`, and the whole `problem` document."""

    def __init__(self, status: int, problem: Dict[str, Any]):
        self.status = status
        self.problem = problem
        self.type = problem.get("type")
        self.title = problem.get("title")
        self.detail = problem.get("detail")
        super().__init__("HTTP %d %s: %s" % (status, self.title or "", self.detail or ""))


class JobFailed(Exception):
    def __init__(self, job: Dict[str, Any]):
        self.job = job
        err = job.get("error") or {}
        super().__init__("job %s ended %s: %s" % (job.get("id"), job.get("status"), err.get("detail", "")))


class Client:
    """`Client(url, api_key)`; `url` is the server's base URL, e.g. http://127.0.0.1:3000."""

    def __init__(self, url: str, api_key: str, timeout: float = 60.0, user_agent: str = "rillscale-python/0.1"):
        parts = urlsplit(url)
        if parts.scheme not in ("http", "https") or not parts.hostname:
            raise ValueError("url must be http(s)://host[:port]")
        self._scheme = parts.scheme
        self._host = parts.hostname
        self._port = parts.port
        self._prefix = parts.path.rstrip("/")
        self._key = api_key
        self._timeout = timeout
        self._ua = user_agent

    # -- transport ------------------------------------------------------------------------------------------
    def _conn(self) -> http.client.HTTPConnection:
        cls = http.client.HTTPSConnection if self._scheme == "https" else http.client.HTTPConnection
        return cls(self._host, self._port, timeout=self._timeout)

    def _headers(self, extra: Optional[Dict[str, str]] = None) -> Dict[str, str]:
        h = {"authorization": "Bearer " + self._key, "user-agent": self._ua, "accept": "application/json"}
        h.update(extra or {})
        return h

    def _request(self, method: str, path: str, body: Any = None, headers: Optional[Dict[str, str]] = None,
                 query: Optional[Dict[str, Any]] = None) -> http.client.HTTPResponse:
        target = self._prefix + path
        if query:
            target += "?" + urlencode({k: v for k, v in query.items() if v is not None})
        conn = self._conn()
        conn.request(method, target, body=body, headers=self._headers(headers))
        res = conn.getresponse()
        if res.status >= 400:
            raw = res.read()
            conn.close()
            try:
                problem = json.loads(raw.decode("utf-8"))
            except ValueError:
                problem = {"title": raw[:200].decode("utf-8", "replace")}
            raise ApiError(res.status, problem)
        return res

    def _json(self, method: str, path: str, payload: Any = None, headers: Optional[Dict[str, str]] = None,
              query: Optional[Dict[str, Any]] = None) -> Any:
        h = dict(headers or {})
        body = None
        if payload is not None:
            body = json.dumps(payload).encode("utf-8")
            h["content-type"] = "application/json"
        res = self._request(method, path, body, h, query)
        raw = res.read()
        return json.loads(raw.decode("utf-8")) if raw else None

    def _bytes(self, path: str) -> bytes:
        return self._request("GET", path).read()

    # -- datasets -------------------------------------------------------------------------------------------
    def upload(self, path: str, media_type: Optional[str] = None, name: Optional[str] = None, epsg: Optional[int] = None,
               progress: Optional[Callable[[int, int], None]] = None) -> Dict[str, Any]:
        """Streams a file to POST /api/v1/datasets in 1 MiB chunks; `progress(sent, total)` after each one.

        The same bytes uploaded twice give back the same dataset (the server deduplicates by SHA-256).
        """
        size = os.path.getsize(path)
        ext = os.path.splitext(path)[1].lower()
        mtype = media_type or MEDIA_TYPES.get(ext) or mimetypes.guess_type(path)[0] or "application/octet-stream"
        query = urlencode({k: v for k, v in {"filename": name or os.path.basename(path), "epsg": epsg}.items() if v is not None})
        conn = self._conn()
        conn.putrequest("POST", self._prefix + "/api/v1/datasets?" + query)
        for k, v in self._headers({"content-type": mtype, "content-length": str(size)}).items():
            conn.putheader(k, v)
        conn.endheaders()
        sent = 0
        with open(path, "rb") as f:
            while True:
                chunk = f.read(CHUNK)
                if not chunk:
                    break
                conn.send(chunk)
                sent += len(chunk)
                if progress:
                    progress(sent, size)
        res = conn.getresponse()
        raw = res.read()
        conn.close()
        data = json.loads(raw.decode("utf-8")) if raw else {}
        if res.status >= 400:
            raise ApiError(res.status, data)
        return data

    def dataset(self, dataset_id: str) -> Dict[str, Any]:
        return self._json("GET", "/api/v1/datasets/" + quote(dataset_id))

    # -- jobs -----------------------------------------------------------------------------------------------
    def submit(self, dataset_id: str, kind: str, params: Optional[Dict[str, Any]] = None,
               idempotency_key: Optional[str] = None) -> Dict[str, Any]:
        """POST /api/v1/jobs with an Idempotency-Key (a fresh UUID unless given): retrying the same call with
        the same key never queues a second job."""
        key = idempotency_key or str(uuid.uuid4())
        return self._json("POST", "/api/v1/jobs", {"dataset": dataset_id, "kind": kind, "params": params or {}},
                          {"idempotency-key": key})

    def job(self, job_id: str) -> Dict[str, Any]:
        return self._json("GET", "/api/v1/jobs/" + quote(job_id))

    def cancel(self, job_id: str) -> Dict[str, Any]:
        return self._json("POST", "/api/v1/jobs/%s/cancel" % quote(job_id))

    def wait(self, job_id: str, timeout: float = 900.0, first_delay: float = 0.25, max_delay: float = 5.0,
             on_status: Optional[Callable[[Dict[str, Any]], None]] = None, raise_on_failure: bool = True) -> Dict[str, Any]:
        """Polls the job with exponential backoff (doubling from `first_delay` up to `max_delay`, with ±20 %
        jitter) until it succeeds, fails or is cancelled; raises JobFailed unless it succeeded."""
        deadline = time.monotonic() + timeout
        delay = first_delay
        while True:
            job = self.job(job_id)
            if on_status:
                on_status(job)
            if job["status"] in FINAL:
                if raise_on_failure and job["status"] != "succeeded":
                    raise JobFailed(job)
                return job
            if time.monotonic() + delay > deadline:
                raise TimeoutError("job %s still %s after %.0f s" % (job_id, job["status"], timeout))
            time.sleep(delay * random.uniform(0.8, 1.2))
            delay = min(max_delay, delay * 2)

    def result(self, job_id: str) -> Dict[str, Any]:
        return self._json("GET", "/api/v1/jobs/%s/result" % quote(job_id))

    def artifacts(self, job_id: str) -> List[Dict[str, Any]]:
        return self._json("GET", "/api/v1/jobs/%s/artifacts" % quote(job_id))["items"]

    def download(self, job_id: str, name: str, dest: str) -> Dict[str, Any]:
        """Downloads one artifact to `dest` (a file, or a directory to put it in), checking its SHA-256 against
        the ETag the server sends; returns {path, sha256, size}."""
        if os.path.isdir(dest):
            dest = os.path.join(dest, name)
        res = self._request("GET", "/api/v1/jobs/%s/artifacts/%s" % (quote(job_id), quote(name)))
        etag = (res.getheader("etag") or "").strip('"')
        digest = hashlib.sha256()
        size = 0
        tmp = dest + ".part"
        with open(tmp, "wb") as f:
            while True:
                chunk = res.read(CHUNK)
                if not chunk:
                    break
                digest.update(chunk)
                size += len(chunk)
                f.write(chunk)
        if etag and digest.hexdigest() != etag:
            os.remove(tmp)
            raise ApiError(502, {"title": "download corrupted", "detail": "%s: sha256 %s, ETag %s" % (name, digest.hexdigest(), etag)})
        os.replace(tmp, dest)
        return {"path": dest, "sha256": digest.hexdigest(), "size": size}

    def download_all(self, job_id: str, dest_dir: str) -> List[Dict[str, Any]]:
        os.makedirs(dest_dir, exist_ok=True)
        return [self.download(job_id, a["name"], dest_dir) for a in self.artifacts(job_id)]

    def provenance(self, job_id: str, dest_dir: str) -> Dict[str, str]:
        """Saves the signed PROV-JSON document (bytes exactly as signed) and its detached JWS; needs the
        provenance:read scope. Check them with `npm run verify -- <doc> <jws>` or POST /api/v1/provenance/verify."""
        os.makedirs(dest_dir, exist_ok=True)
        doc_path = os.path.join(dest_dir, "provenance.json")
        jws_path = os.path.join(dest_dir, "provenance.jws")
        with open(doc_path, "wb") as f:
            f.write(self._bytes("/api/v1/jobs/%s/provenance" % quote(job_id)))
        with open(jws_path, "wb") as f:
            f.write(self._bytes("/api/v1/jobs/%s/provenance.jws" % quote(job_id)))
        return {"document": doc_path, "signature": jws_path}

    def verify_provenance(self, document_path: str, signature_path: str, files: Iterable[str] = ()) -> Dict[str, Any]:
        """Asks the server (POST /api/v1/provenance/verify) whether the document's signature holds against the
        published keys and whether each file is an input or artifact it names; returns the verdict dict."""
        with open(document_path, "rb") as f:
            document = f.read().decode("utf-8")
        with open(signature_path, "r", encoding="ascii") as f:
            signature = f.read().strip()
        hashes = []
        for path in files:
            digest = hashlib.sha256()
            with open(path, "rb") as f:
                for chunk in iter(lambda: f.read(CHUNK), b""):
                    digest.update(chunk)
            hashes.append({"name": os.path.basename(path), "sha256": digest.hexdigest()})
        return self._json("POST", "/api/v1/provenance/verify", {"document": document, "signature": signature, "files": hashes})


# -- tables -------------------------------------------------------------------------------------------------
ORDER_COLUMNS = [("order", "order"), ("streamCount", "stream_count"), ("meanLengthM", "mean_length_m"),
                 ("meanAreaKm2", "mean_area_km2"), ("meanSlope", "mean_slope_m_per_m")]


def order_table(result: Dict[str, Any]) -> List[Dict[str, Any]]:
    """The per-Strahler-order table of a drainage or network result as plain dicts (snake_case columns with
    units), one per order, lowest order first."""
    horton = (result.get("summary") or {}).get("horton") or {}
    rows = horton.get("table") or []
    return [{out: r.get(src) for src, out in ORDER_COLUMNS} for r in sorted(rows, key=lambda r: r["order"])]


def write_csv(rows: Iterable[Dict[str, Any]], path: str) -> str:
    rows = list(rows)
    with open(path, "w", newline="", encoding="utf-8") as f:
        if rows:
            w = csv.DictWriter(f, fieldnames=list(rows[0].keys()))
            w.writeheader()
            for r in rows:
                w.writerow({k: ("" if v is None else repr(v) if isinstance(v, float) else v) for k, v in r.items()})
    return path
