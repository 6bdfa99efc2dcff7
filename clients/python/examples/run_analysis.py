#!/usr/bin/env python3
"""A whole drainage analysis from a DEM path: upload (with progress), submit, wait, then save the summary, the
per-order table as CSV and every artifact.

    RILLSCALE_URL=http://127.0.0.1:3000 RILLSCALE_API_KEY=... python3 run_analysis.py dem.tif --out results/
"""
import argparse
import json
import os
import sys

try:
    from rillscale import Client, order_table, write_csv
except ImportError:  # run from a checkout without `pip install ./clients/python`
    sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))
    from rillscale import Client, order_table, write_csv


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("dem", help="path of a GeoTIFF DEM")
    p.add_argument("--out", default="rillscale-results", help="directory for the outputs")
    p.add_argument("--url", default=os.environ.get("RILLSCALE_URL", "http://127.0.0.1:3000"))
    p.add_argument("--key", default=os.environ.get("RILLSCALE_API_KEY"))
    p.add_argument("--threshold-km2", type=float, default=None, help="channel initiation area (km²)")
    p.add_argument("--timeout", type=float, default=900)
    a = p.parse_args(argv)
    if not a.key:
        p.error("give --key or set RILLSCALE_API_KEY")
    client = Client(a.url, a.key)
    os.makedirs(a.out, exist_ok=True)

    def show(sent, total):
        sys.stderr.write("\rupload %5.1f %%" % (100.0 * sent / max(total, 1)))
        if sent >= total:
            sys.stderr.write("\n")

    dataset = client.upload(a.dem, progress=show)
    print("dataset %s (%s, sha256 %s)" % (dataset["id"], dataset["format"], dataset["sha256"][:12]))
    params = {} if a.threshold_km2 is None else {"channelThreshold": {"method": "area", "km2": a.threshold_km2}}
    job = client.submit(dataset["id"], "drainage", params)
    print("job %s queued" % job["id"])
    job = client.wait(job["id"], timeout=a.timeout,
                      on_status=lambda j: sys.stderr.write("  %s %s %3.0f %%\n" % (j["status"], j.get("stage") or "", 100 * j["progress"])))
    result = client.result(job["id"])
    with open(os.path.join(a.out, "result.json"), "w", encoding="utf-8") as f:
        json.dump(result, f, indent=2, sort_keys=True)
    table = order_table(result)
    write_csv(table, os.path.join(a.out, "orders.csv"))
    files = client.download_all(job["id"], os.path.join(a.out, "artifacts"))
    horton = result["summary"].get("horton", {})
    rb = (horton.get("bifurcationRatio") or {}).get("value")
    print("orders: %d; Rb = %s; %d artifacts in %s" % (len(table), "n/a" if rb is None else "%.3f" % rb, len(files), a.out))
    print(json.dumps({"job": job["id"], "orders": len(table), "artifacts": [x["path"] for x in files]}))
    return 0


if __name__ == "__main__":
    sys.exit(main())
