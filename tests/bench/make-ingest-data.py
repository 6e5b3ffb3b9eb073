#!/usr/bin/env python3
"""Writes the benchmark inputs: a 10,000-resource transaction Bundle (urn:uuid references) and the same
10,000 resources as NDJSON (with ids), for an invented Riverbend Community Health population."""
import json, sys, uuid

out = sys.argv[1]
patients = 1000
per_patient = 9  # 1 encounter, 1 condition, 5 observations, 1 procedure, 1 immunization

def clinical(n, subject, encounter, ids):
    enc = {"resourceType": "Encounter", "status": "finished",
           "class": {"system": "http://terminology.hl7.org/CodeSystem/v3-ActCode", "code": "AMB"},
           "subject": {"reference": subject}, "period": {"start": "2025-04-0%dT09:00:00Z" % (1 + n % 9), "end": "2025-04-0%dT09:30:00Z" % (1 + n % 9)}}
    cond = {"resourceType": "Condition", "subject": {"reference": subject},
            "clinicalStatus": {"coding": [{"system": "http://terminology.hl7.org/CodeSystem/condition-clinical", "code": "active"}]},
            "code": {"coding": [{"system": "http://hl7.org/fhir/sid/icd-10-cm", "code": "E11.9"}]}, "onsetDateTime": "2018-01-01"}
    obs = [{"resourceType": "Observation", "status": "final",
            "code": {"coding": [{"system": "http://loinc.org", "code": "4548-4"}]}, "subject": {"reference": subject},
            "encounter": {"reference": encounter}, "effectiveDateTime": "2025-0%d-15" % (1 + k),
            "valueQuantity": {"value": 6.0 + (n + k) % 40 / 10, "unit": "%", "system": "http://unitsofmeasure.org", "code": "%"}} for k in range(5)]
    proc = {"resourceType": "Procedure", "status": "completed", "subject": {"reference": subject},
            "code": {"coding": [{"system": "http://snomed.info/sct", "code": "73761001"}]}, "performedDateTime": "2020-06-01"}
    imm = {"resourceType": "Immunization", "status": "completed", "patient": {"reference": subject},
           "vaccineCode": {"coding": [{"system": "http://hl7.org/fhir/sid/cvx", "code": "158"}]}, "occurrenceDateTime": "2024-10-01"}
    return [enc, cond] + obs + [proc, imm]

entries, lines = [], []
for n in range(patients):
    pu = "urn:uuid:" + str(uuid.uuid4()); eu = "urn:uuid:" + str(uuid.uuid4())
    patient = {"resourceType": "Patient", "identifier": [{"system": "http://riverbend.example.org/mrn", "value": "B%06d" % n}],
               "name": [{"family": "Bench%d" % n, "given": ["Test"]}], "gender": "female" if n % 2 else "male", "birthDate": "19%02d-03-04" % (40 + n % 50)}
    res = [patient] + clinical(n, pu, eu, None)
    urls = [pu, eu] + ["urn:uuid:" + str(uuid.uuid4()) for _ in res[2:]]
    for r, u in zip(res, urls):
        entries.append({"fullUrl": u, "resource": r, "request": {"method": "POST", "url": r["resourceType"]}})
    # NDJSON: same resources with ids and relative references.
    pid = "bench-p%06d" % n
    for k, r in enumerate(res):
        r = json.loads(json.dumps(r).replace(pu, "Patient/" + pid).replace(eu, "Encounter/bench-e%06d" % n))
        r["id"] = pid if k == 0 else ("bench-e%06d" % n if k == 1 else "bench-%06d-%d" % (n, k))
        lines.append(json.dumps(r, separators=(",", ":")))

json.dump({"resourceType": "Bundle", "type": "transaction", "entry": entries}, open(f"{out}/transaction-10k.json", "w"), separators=(",", ":"))
open(f"{out}/resources-10k.ndjson", "w").write("\n".join(lines) + "\n")
print(f"{len(entries)} transaction entries, {len(lines)} NDJSON lines")
