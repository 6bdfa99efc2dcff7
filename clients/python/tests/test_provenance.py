"""Provenance from Python against the started server: an admin makes a key with provenance:read, the client
downloads the signed document and its JWS, and the server's verifier accepts them with the artifacts' hashes
and refuses a tampered copy."""
import http.client
import json
import os
import tempfile
import time
import unittest
from urllib.parse import urlsplit

from rillscale import ApiError, Client
from test_client import DEM, PARAMS

ADMIN = "admin@tallow-creek.example"
DEMO_PASSWORD = "rillscale-demo"  # the demo scenario's password (platform contract)


def key_with_provenance_scope() -> str:
    url = urlsplit(os.environ["RILLSCALE_TEST_URL"])
    conn = http.client.HTTPConnection(url.hostname, url.port, timeout=30)
    conn.request("POST", "/api/v1/session", json.dumps({"email": ADMIN, "password": DEMO_PASSWORD}), {"content-type": "application/json"})
    res = conn.getresponse()
    res.read()
    if res.status != 204:
        raise RuntimeError("sign-in answered %d" % res.status)
    cookie = res.getheader("set-cookie").split(";")[0]
    body = {"name": "python provenance test", "scopes": ["datasets:write", "jobs:write", "jobs:read", "results:read", "provenance:read"]}
    conn.request("POST", "/api/v1/keys", json.dumps(body), {"content-type": "application/json", "cookie": cookie})
    res = conn.getresponse()
    created = json.loads(res.read().decode("utf-8"))
    conn.close()
    if res.status != 201:
        raise RuntimeError("key creation answered %d: %s" % (res.status, created))
    return created["secret"]


class Provenance_from_python(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.c = Client(os.environ["RILLSCALE_TEST_URL"], key_with_provenance_scope())
        ds = cls.c.upload(DEM)
        cls.job = cls.c.wait(cls.c.submit(ds["id"], "drainage", PARAMS)["id"], timeout=300)
        cls.dir = tempfile.mkdtemp(prefix="rillscale-prov-")
        deadline = time.monotonic() + 15
        while True:
            try:
                cls.saved = cls.c.provenance(cls.job["id"], cls.dir)
                break
            except ApiError as e:  # the worker signs within a poll or two of the job's end
                if e.status != 404 or time.monotonic() > deadline:
                    raise
                time.sleep(0.2)
        cls.files = [f["path"] for f in cls.c.download_all(cls.job["id"], os.path.join(cls.dir, "artifacts"))]

    def test_the_document_and_artifacts_verify(self):
        verdict = self.c.verify_provenance(self.saved["document"], self.saved["signature"], self.files)
        self.assertTrue(verdict["valid"], verdict)
        self.assertEqual(verdict["job"], self.job["id"])
        self.assertEqual(len(verdict["files"]), len(self.files))

    def test_a_tampered_document_does_not_verify(self):
        with open(self.saved["document"], "rb") as f:
            doc = f.read()
        bad = os.path.join(self.dir, "tampered.json")
        with open(bad, "wb") as f:
            f.write(doc.replace(b'"prov:label"', b'"prov:Label"', 1))
        self.assertFalse(self.c.verify_provenance(bad, self.saved["signature"])["valid"])

    def test_a_file_the_document_does_not_name_is_reported(self):
        stray = os.path.join(self.dir, "stray.txt")
        with open(stray, "w") as f:
            f.write("not an artifact")
        verdict = self.c.verify_provenance(self.saved["document"], self.saved["signature"], [stray])
        self.assertFalse(verdict["valid"])
        self.assertEqual(verdict["files"], [{"name": "stray.txt", "ok": False, "entity": None}])


if __name__ == "__main__":
    unittest.main()
