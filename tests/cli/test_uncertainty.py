"""End-to-end checks of `unchain uncertainty` and `unchain sensitivity` on
the small invented case tests/cli/study_heat.yaml: exit codes, the text
summary with units in its headings, the JSON and CSV outputs, and errors
for bad input."""
import csv
import json
import math
import os
import subprocess
import sys
import tempfile

unchain, source = sys.argv[1], sys.argv[2]
case = os.path.join(source, "tests", "cli", "study_heat.yaml")
failures = []
checks = [0]


def check(condition, message):
    checks[0] += 1
    if not condition:
        failures.append(message)
        print("FAILED:", message)


def run(*args):
    return subprocess.run([unchain, *args], capture_output=True, text=True)


with tempfile.TemporaryDirectory() as tmp:
    # ---- uncertainty: summary, JSON, CSV ----------------------------------------
    json_path = os.path.join(tmp, "mc.json")
    samples_path = os.path.join(tmp, "samples.csv")
    p = run("uncertainty", case, "--samples", "120", "--seed", "5", "--threads", "2", "--json", json_path,
            "--samples-csv", samples_path, "--csv", tmp)
    check(p.returncode == 0, f"uncertainty: exit {p.returncode}: {p.stderr[-800:]}")
    out = p.stdout
    check("120 samples, seed 5, 2 threads; 0 failed" in out, "uncertainty: run line missing:\n" + out)
    check("net_cost_per_kg_monomer [USD/kg]" in out, "uncertainty: cost per kg heading with unit missing")
    check("energy_per_kg_monomer [MJ/kg]" in out, "uncertainty: energy heading with unit missing")
    for word in ("P10", "P50", "P90"):
        check(word in out, f"uncertainty: {word} column missing")
    # Not a terminal: no progress bar on standard error.
    check("[#" not in p.stderr and "samples\r" not in p.stderr, "uncertainty: progress bar drawn off a terminal")
    j = json.load(open(json_path))
    check(j["samples"] == 120 and j["seed"] == 5 and j["failed_samples"] == 0, "uncertainty JSON: run fields")
    check([q["path"] for q in j["parameters"]] ==
          ["prices.labour_rate", "prices.electricity", "blocks.warm.outlet_temperature"], "uncertainty JSON: parameters")
    cost = j["outputs"]["net_cost_per_kg_monomer"]
    check(cost["unit"] == "USD/kg", "uncertainty JSON: unit")
    check(cost["min"] <= cost["p10"] <= cost["p50"] <= cost["p90"] <= cost["max"], "uncertainty JSON: quantile order")
    check(sum(b["count"] for b in cost["histogram"]) == cost["count"] == 120, "uncertainty JSON: histogram counts")
    # Labour (0.5 h x U(20, 40) USD/h) dominates: mean near 15 USD/kg, sd near 2.9 (hand arithmetic).
    check(abs(cost["mean"] - 15.0) < 1.5, f"uncertainty JSON: mean {cost['mean']}")
    check("npv" in j["base"], "uncertainty JSON: base figures")
    rows = list(csv.DictReader(open(samples_path)))
    check(len(rows) == 120, f"samples CSV: {len(rows)} rows")
    check("prices.labour_rate_USD_per_h" in rows[0], f"samples CSV: headings {list(rows[0])[:4]}")
    check([int(r["sample"]) for r in rows] == list(range(120)), "samples CSV: rows in sample order")
    mean = sum(float(r["net_cost_per_kg_monomer_USD_per_kg"]) for r in rows) / len(rows)
    check(abs(mean - cost["mean"]) < 1e-9 * abs(mean), "samples CSV: mean differs from the JSON")
    summary = list(csv.DictReader(open(os.path.join(tmp, "uncertainty.csv"))))
    check(any(r["figure"] == "net_cost_per_kg_monomer" for r in summary), "uncertainty.csv: figure row missing")

    # Same seed on one thread: the same statistics.
    json1 = os.path.join(tmp, "mc1.json")
    p = run("uncertainty", case, "--samples", "120", "--seed", "5", "--threads", "1", "--json", json1, "--quiet")
    check(p.returncode == 0, f"uncertainty 1 thread: exit {p.returncode}")
    j1 = json.load(open(json1))
    check(j1["outputs"] == j["outputs"], "uncertainty: 1 and 2 threads differ for the same seed")

    # JSON on standard output, summary on standard error.
    p = run("uncertainty", case, "--samples", "20", "--json", "-")
    check(p.returncode == 0, f"uncertainty --json -: exit {p.returncode}")
    check(json.loads(p.stdout)["samples"] == 20, "uncertainty --json -: stdout is not the JSON")
    check("Monte Carlo uncertainty" in p.stderr, "uncertainty --json -: summary not on stderr")

    # ---- uncertainty: bad input ---------------------------------------------------
    bad = os.path.join(tmp, "bad.yaml")
    text = open(case).read().replace('low: "20 USD/h"\n      high: "40 USD/h"', 'low: "40 USD/h"\n      high: "20 USD/h"')
    open(bad, "w").write(text)
    p = run("uncertainty", bad)
    check(p.returncode == 2, f"uncertainty low > high: exit {p.returncode}")
    check("bad.yaml:" in p.stderr and "low must be below high" in p.stderr, "uncertainty low > high: " + p.stderr)
    open(bad, "w").write(open(case).read().replace("distribution: normal", "distribution: gaussian"))
    p = run("uncertainty", bad)
    check(p.returncode == 2 and "unknown distribution" in p.stderr, "uncertainty unknown distribution: " + p.stderr)
    open(bad, "w").write(open(case).read().replace("path: prices.electricity\n", "path: prices.electricty\n"))
    p = run("uncertainty", bad)
    check(p.returncode == 2 and "names nothing in the case" in p.stderr and "did you mean 'electricity'" in p.stderr,
          "uncertainty bad path: " + p.stderr)
    check(not os.path.exists(os.path.join(tmp, "never.csv")), "nothing written")
    p = run("uncertainty", bad, "--samples-csv", os.path.join(tmp, "never.csv"))
    check(not os.path.exists(os.path.join(tmp, "never.csv")), "uncertainty: samples CSV written on bad input")
    p = run("uncertainty", case, "--samples", "0")
    check(p.returncode == 2, f"uncertainty --samples 0: exit {p.returncode}")
    no_section = os.path.join(source, "tests", "cli", "mix_and_heat.yaml")
    p = run("uncertainty", no_section)
    check(p.returncode == 2 and "no 'uncertainty' section" in p.stderr, "uncertainty without a section: " + p.stderr)
    # Every sample failing (all below absolute zero): exit 3, and no samples file.
    failing = os.path.join(tmp, "failing.yaml")
    open(failing, "w").write(open(case).read().split("uncertainty:")[0] + """uncertainty:
  samples: 10
  parameters:
    - {path: blocks.warm.outlet_temperature, distribution: uniform, low: "-400 degC", high: "-300 degC"}
""")
    p = run("uncertainty", failing, "--samples-csv", os.path.join(tmp, "failed.csv"))
    # The median (-350 degC) is itself below absolute zero: refused before sampling.
    check(p.returncode == 2, f"uncertainty impossible values: exit {p.returncode}: {p.stderr[-400:]}")
    check(not os.path.exists(os.path.join(tmp, "failed.csv")), "uncertainty: samples CSV written on failure")

    # ---- sensitivity ------------------------------------------------------------------
    json_path = os.path.join(tmp, "tornado.json")
    p = run("sensitivity", case, "--json", json_path, "--csv", tmp)
    check(p.returncode == 0, f"sensitivity: exit {p.returncode}: {p.stderr[-800:]}")
    out = p.stdout
    check("net_cost_per_kg_monomer [USD/kg]" in out, "sensitivity: heading with unit missing:\n" + out)
    check(out.index("Labour rate") < out.index("prices.electricity"), "sensitivity: bars not sorted by swing")
    t = json.load(open(json_path))
    cost = t["tornadoes"][0]
    check(cost["key"] == "net_cost_per_kg_monomer", "sensitivity JSON: first tornado")
    swings = [b["swing"] for b in cost["bars"]]
    check(swings == sorted(swings, reverse=True), "sensitivity JSON: swings not sorted")
    # 0.5 h x (40 - 20) USD/h over 1 kg of monomer (hand arithmetic).
    check(abs(cost["bars"][0]["swing"] - 10.0) < 1e-9, f"sensitivity JSON: labour swing {cost['bars'][0]['swing']}")
    # A bar's low output equals a plain run with that override.
    p = run("run", case, "--json", "-", "--quiet", "--set", "prices.labour_rate=20 USD/h")
    net = json.loads(p.stdout)["kpis"]["per_kg_monomer"]["net_cost"]
    check(abs(cost["bars"][0]["low_output"] - net) <= 1e-12 * abs(net), "sensitivity: low output differs from run")
    rows = list(csv.DictReader(open(os.path.join(tmp, "sensitivity.csv"))))
    check(len(rows) >= 3 and rows[0]["path"] == "prices.labour_rate", "sensitivity.csv rows")

    bad = os.path.join(tmp, "bad_tornado.yaml")
    open(bad, "w").write(open(case).read().replace('high: "80 degC"', 'high: "80 kg"'))
    p = run("sensitivity", bad)
    check(p.returncode == 2 and "sensitivity.parameters[2].high" in p.stderr, "sensitivity bad unit: " + p.stderr)
    p = run("sensitivity", no_section)
    check(p.returncode == 2 and "no 'sensitivity' section" in p.stderr, "sensitivity without a section")

print(f"{checks[0] - len(failures)} passed, {len(failures)} failed")
sys.exit(1 if failures else 0)
