# Reads a PROV-JSON document with the W3C PROV reference library for Python, `prov` (T. D. Huynh; Debian's
# python3-prov 2.0.0), whose maintainer wrote the PROV-JSON Member Submission (Huynh, Jewell, Sezavar Keshavarz,
# Michaelides, Yang & Moreau, W3C 2013). Prints what the library understood, as JSON, for
# tests/integration/provenance-prov-library.test.ts to check: the records by type, the endpoints of every
# relation, the entities by their prov:type, and whether the document survives a PROV-JSON round trip.
# Uses the `prov` package only; run it with Debian's python (/usr/bin/python3), where python3-prov installs.
# Usage: prov_check.py <document.json>   (exits non-zero with the library's traceback when it cannot parse it)
import json
import sys
from datetime import timezone

import prov
from prov.constants import PROV_N_MAP, PROV_TYPE
from prov.model import ProvDocument

RELATIONS = ("used", "wasGeneratedBy", "wasAssociatedWith", "wasDerivedFrom", "wasAttributedTo", "actedOnBehalfOf")
ELEMENTS = ("entity", "activity", "agent")


def name(value):
    """A qualified name as the library resolved it: its prefixed form and the full URI behind the prefix."""
    return None if value is None else {"qname": str(value), "uri": value.uri}


def main(path):
    doc = prov.read(path, format="json")  # raises on malformed PROV-JSON
    records = doc.get_records()
    counts = {kind: 0 for kind in ELEMENTS + RELATIONS}
    elements = {kind: [] for kind in ELEMENTS}
    relations = {kind: [] for kind in RELATIONS}
    unknown = []
    for rec in records:
        kind = PROV_N_MAP.get(rec.get_type())
        if kind not in counts:
            unknown.append(str(rec.get_type()))
            continue
        counts[kind] += 1
        if kind in elements:
            elements[kind].append({
                "id": name(rec.identifier),
                "types": sorted(str(t) for t in rec.get_asserted_types()),
                "prov:type": sorted(str(v) for v in rec.get_attribute(PROV_TYPE)),
            })
            if kind == "activity":  # prov:startTime / prov:endTime as the library parsed them, in UTC
                elements[kind][-1].update({
                    "startTime": rec.get_startTime().astimezone(timezone.utc).isoformat(),
                    "endTime": rec.get_endTime().astimezone(timezone.utc).isoformat(),
                })
        else:
            # formal attributes are the relation's PROV-DM arguments (prov:activity, prov:entity, ...) in order
            relations[kind].append({str(k).split(":", 1)[1]: (None if v is None else str(v)) for k, v in rec.formal_attributes})

    again = ProvDocument.deserialize(content=doc.serialize(format="json"), format="json")
    print(json.dumps({
        "library": {"name": "prov", "version": prov.__version__},
        "namespaces": {ns.prefix: ns.uri for ns in doc.get_registered_namespaces()},
        "records": len(records),
        "counts": counts,
        "unknownRecords": unknown,
        "elements": elements,
        "relations": relations,
        "roundTrip": {"equal": again == doc, "records": len(again.get_records())},
    }, indent=1))


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit("usage: prov_check.py <document.json>")
    main(sys.argv[1])
