#!/usr/bin/env python3
"""Validates check reports against doc/report.schema.json (JSON Schema
draft 7, with the python3-jsonschema package): 'glassplot check --json' of
every description in checks/ and of every sample, and report.json as
'glassplot build' writes it.  A report broken on purpose must be refused,
so the validation itself is tested.

usage: validate-report.py GLASSPLOT SCHEMA CHECKS_DIR SAMPLES_DIR"""
import glob
import json
import os
import subprocess
import sys
import tempfile

import jsonschema


def main():
    tool, schema_path, checks, samples = sys.argv[1:5]
    with open(schema_path) as f:
        schema = json.load(f)
    jsonschema.Draft7Validator.check_schema(schema)
    validator = jsonschema.Draft7Validator(schema)
    inputs = sorted(glob.glob(os.path.join(checks, "*.yaml")) +
                    glob.glob(os.path.join(samples, "*.yaml")))
    failed = 0
    reports = []
    for path in inputs:
        run = subprocess.run([tool, "check", "--json", path],
                             capture_output=True, text=True)
        if run.returncode not in (0, 1):
            print(f"FAIL {path}: exit status {run.returncode}")
            failed += 1
            continue
        reports.append((path, json.loads(run.stdout)))
    with tempfile.TemporaryDirectory() as out:
        sample = sorted(glob.glob(os.path.join(samples, "*.yaml")))[0]
        run = subprocess.run([tool, "build", "-q", sample, "-o", out],
                             capture_output=True, text=True)
        with open(os.path.join(out, "report.json")) as f:
            reports.append((sample + " (report.json)", json.load(f)))
        with open(os.path.join(out, "report.txt")) as f:
            if "findings:" not in f.read():
                print("FAIL report.txt has no findings line")
                failed += 1
    for name, report in reports:
        errors = list(validator.iter_errors(report))
        for e in errors[:3]:
            print(f"FAIL {name}: {e.message} at {list(e.absolute_path)}")
        failed += bool(errors)
    # the schema refuses what it should
    _, good = next((n, r) for n, r in reports if r["findings"])
    bad = json.loads(json.dumps(good))
    bad["findings"][0]["rule"] = "no-such-rule"
    if validator.is_valid(bad):
        print("FAIL the schema accepts an unknown rule")
        failed += 1
    print(f"{len(reports)} reports checked, {failed} failed")
    return 1 if failed or len(reports) < 6 else 0


if __name__ == "__main__":
    sys.exit(main())
