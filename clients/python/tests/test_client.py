"""The client and the example script against a started server (RILLSCALE_TEST_URL / RILLSCALE_TEST_KEY, set by
run.py): upload, idempotent submit, wait, result tables, artifact downloads with their hashes."""
import csv
import hashlib
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import unittest
import uuid
from urllib.request import Request, urlopen

from rillscale import ApiError, Client, order_table, write_csv

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.abspath(os.path.join(HERE, "..", "..", ".."))
DEM = os.path.join(ROOT, "tests", "fixtures", "cache", "debian", "elev.tif")
# Luxembourg's 95 × 90 DEM at 30″ covers about 2 600 km²; a 5 km² initiation area gives a few orders.
PARAMS = {"channelThreshold": {"method": "area", "km2": 5}}
EXAMPLE = os.path.join(HERE, "..", "examples", "run_analysis.py")
# summary.horton.table's keys (units in their suffixes: M metres, Km2 square kilometres, slope m/m) → CSV columns
CSV_COLUMNS = {"order": "order", "streamCount": "stream_count", "meanLengthM": "mean_length_m",
               "meanAreaKm2": "mean_area_km2", "meanSlope": "mean_slope_m_per_m"}
# the example's on_status lines: "  <status> <stage> <percent> %"
STATUS_LINE = re.compile(r"^  (queued|running|succeeded|failed|cancelled) (\S*) +(\d+) %$")


def client() -> Client:
    return Client(os.environ["RILLSCALE_TEST_URL"], os.environ["RILLSCALE_TEST_KEY"])


def raw_get(path: str):
    """A JSON GET with plain urllib, not the client: the independent side of a comparison."""
    req = Request(os.environ["RILLSCALE_TEST_URL"] + path, headers={"authorization": "Bearer " + os.environ["RILLSCALE_TEST_KEY"]})
    with urlopen(req, timeout=60) as res:
        return json.loads(res.read().decode("utf-8"))


def sha256_of(path: str) -> str:
    with open(path, "rb") as f:
        return hashlib.sha256(f.read()).hexdigest()


def read_csv(path: str):
    with open(path, newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


def same_table(test: unittest.TestCase, rows_csv, result):
    expected = order_table(result)
    test.assertEqual(len(rows_csv), len(expected))
    test.assertGreater(len(expected), 0)
    for got, want in zip(rows_csv, expected):
        for k, v in want.items():
            test.assertEqual(got[k], "" if v is None else repr(v) if isinstance(v, float) else str(v), k)


class Against_the_server(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        if not os.path.exists(DEM):
            raise RuntimeError("missing %s: run `bash tests/fixtures/fetch.sh`" % DEM)
        cls.c = client()
        seen = []
        cls.dataset = cls.c.upload(DEM, progress=lambda sent, total: seen.append((sent, total)))
        cls.progress = seen
        cls.key = str(uuid.uuid4())
        cls.job = cls.c.submit(cls.dataset["id"], "drainage", PARAMS, idempotency_key=cls.key)
        cls.done = cls.c.wait(cls.job["id"], timeout=300)
        cls.result = cls.c.result(cls.job["id"])

    def test_upload_reports_progress_up_to_the_file_size_and_the_server_hash_matches(self):
        size = os.path.getsize(DEM)
        self.assertEqual(self.progress[-1], (size, size))
        self.assertEqual(self.dataset["sha256"], sha256_of(DEM))
        self.assertEqual(self.dataset["format"], "geotiff")

    def test_the_same_bytes_again_give_the_same_dataset(self):
        self.assertEqual(self.c.upload(DEM)["id"], self.dataset["id"])

    def test_the_same_idempotency_key_and_body_give_the_same_job(self):
        again = self.c.submit(self.dataset["id"], "drainage", PARAMS, idempotency_key=self.key)
        self.assertEqual(again["id"], self.job["id"])

    def test_the_same_key_with_another_body_is_refused_with_a_problem(self):
        with self.assertRaises(ApiError) as e:
            self.c.submit(self.dataset["id"], "drainage", {"channelThreshold": {"method": "area", "km2": 7}}, idempotency_key=self.key)
        self.assertEqual(e.exception.status, 422)
        self.assertTrue(e.exception.type.startswith("https://"))

    def test_wait_ends_succeeded_and_the_order_table_is_the_results(self):
        self.assertEqual(self.done["status"], "succeeded")
        with tempfile.TemporaryDirectory() as d:
            path = write_csv(order_table(self.result), os.path.join(d, "orders.csv"))
            same_table(self, read_csv(path), self.result)
        orders = [r["order"] for r in order_table(self.result)]
        self.assertEqual(orders, list(range(1, len(orders) + 1)))

    def test_artifacts_download_with_the_hashes_the_listing_states(self):
        listing = {a["name"]: a for a in self.c.artifacts(self.job["id"])}
        self.assertIn("horton-orders.csv", listing)
        with tempfile.TemporaryDirectory() as d:
            for f in self.c.download_all(self.job["id"], d):
                name = os.path.basename(f["path"])
                self.assertEqual(f["sha256"], listing[name]["sha256"], name)
                self.assertEqual(sha256_of(f["path"]), listing[name]["sha256"], name)

    def test_an_unknown_job_is_a_404_problem(self):
        with self.assertRaises(ApiError) as e:
            self.c.job(str(uuid.uuid4()))
        self.assertEqual(e.exception.status, 404)

    def test_the_example_script_runs_a_fresh_job_end_to_end_and_its_csv_matches_the_raw_result(self):
        with tempfile.TemporaryDirectory() as d:
            # the server keys datasets and cached results by the bytes' SHA-256: a copy with 16 fresh bytes after
            # the TIFF's data (readers go by the IFD offsets) is a dataset no earlier run has, so the job computes
            dem = os.path.join(d, "fresh.tif")
            shutil.copyfile(DEM, dem)
            with open(dem, "ab") as f:
                f.write(uuid.uuid4().bytes)
            out = os.path.join(d, "out")
            env = dict(os.environ, RILLSCALE_URL=os.environ["RILLSCALE_TEST_URL"], RILLSCALE_API_KEY=os.environ["RILLSCALE_TEST_KEY"])
            run = subprocess.run([sys.executable, EXAMPLE, dem, "--out", out, "--threshold-km2", str(PARAMS["channelThreshold"]["km2"])],
                                 env=env, capture_output=True, text=True, timeout=600)
            self.assertEqual(run.returncode, 0, run.stderr[-2000:])
            last = json.loads(run.stdout.strip().splitlines()[-1])
            job, raw = raw_get("/api/v1/jobs/" + last["job"]), raw_get("/api/v1/jobs/%s/result" % last["job"])

            # a run of its own, not the result cache: no cachedFrom, started by a worker, stage timings recorded
            self.assertIsNone(job["cachedFrom"])
            self.assertIsNone(raw["cachedFrom"])
            self.assertEqual(job["status"], "succeeded")
            self.assertGreaterEqual(job["attempts"], 1)
            self.assertGreater(len(raw["timingsS"]), 0)
            # the script polled while it ran: a status before the end, and the last one succeeded at 100 %
            seen = [m.groups() for m in (STATUS_LINE.match(l) for l in run.stderr.splitlines()) if m]
            self.assertIn(seen[0][0], ("queued", "running"), run.stderr[-2000:])
            self.assertEqual((seen[-1][0], seen[-1][2]), ("succeeded", "100"))

            table = sorted(raw["summary"]["horton"]["table"], key=lambda r: r["order"])
            self.assertGreater(len(table), 1)
            with open(os.path.join(out, "orders.csv"), newline="", encoding="utf-8") as f:
                reader = csv.DictReader(f)
                self.assertEqual(reader.fieldnames, list(CSV_COLUMNS.values()))
                rows = list(reader)
            self.assertEqual([int(r["order"]) for r in rows], [t["order"] for t in table])
            for row, want in zip(rows, table):
                for key, column in CSV_COLUMNS.items():
                    v = want[key]
                    got = None if row[column] == "" else int(row[column]) if isinstance(v, int) else float(row[column])
                    self.assertEqual(got, v, "order %s %s" % (want["order"], column))
            with open(os.path.join(out, "result.json"), encoding="utf-8") as f:
                self.assertEqual(json.load(f), raw)
            # the same raster and parameters computed afresh give the table the earlier job computed
            self.assertEqual(table, sorted(self.result["summary"]["horton"]["table"], key=lambda r: r["order"]))
            self.assertTrue(all(os.path.exists(p) for p in last["artifacts"]))
            self.assertGreater(len(last["artifacts"]), 0)

if __name__ == "__main__":
    unittest.main()
