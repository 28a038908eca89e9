"""End-to-end test of `unchain run`: every shipped case in cases/, and small
cases written here from the generic blocks (mixer, heater, splitter).

Run as: /usr/bin/python3 test_run.py PATH_TO_unchain SOURCE_DIR
"""
import pathlib
import glob
import json
import os
import subprocess
import sys
import tempfile

from iapws import IAPWS97

failures = []

TOP_LEVEL_FIELDS = ["schema_version", "case", "basis", "amount_unit", "currency", "converged", "solver", "streams",
                    "blocks", "balance", "warnings", "cautions"]
SOLVER_FIELDS = ["iterations", "tear_streams", "calculation_order", "loops"]
STREAM_FIELDS = ["source", "destination", "temperature_K", "pressure_Pa", "components_kg", "phases", "total_kg"]
BLOCK_FIELDS = ["type", "heat_J", "electricity_J", "cooling_J", "process_heat_J", "duration_s", "heat_source",
                "figures", "materials", "equipment", "cautions", "balance"]
BALANCE_FIELDS = ["mass_relative_error", "energy_relative_error", "element_relative_error"]
PLANNING_AID = "a planning aid, not a safety assessment"


def check(condition, what):
    if not condition:
        failures.append(what)
        print("FAILED:", what)


def run(*args):
    return subprocess.run([UNCHAIN, *args], capture_output=True, text=True, timeout=600)


def check_layout(name, doc):
    for field in TOP_LEVEL_FIELDS:
        check(field in doc, f"{name}: JSON has '{field}'")
    if not all(field in doc for field in TOP_LEVEL_FIELDS):
        return
    check(doc["schema_version"] == 1, f"{name}: schema_version 1")
    check(doc["basis"] in ("batch", "continuous"), f"{name}: basis is batch or continuous")
    check(doc["amount_unit"] == {"batch": "kg per batch", "continuous": "kg per hour"}[doc["basis"]],
          f"{name}: amount_unit matches the basis")
    for field in ("title", "description", "file"):
        check(field in doc["case"], f"{name}: case.{field} present")
    for field in SOLVER_FIELDS:
        check(field in doc["solver"], f"{name}: solver.{field} present")
    for loop in doc["solver"]["loops"]:
        for field in ("blocks", "tear_streams", "iterations", "residual_history"):
            check(field in loop, f"{name}: solver.loops[].{field} present")
    for sname, s in doc["streams"].items():
        for field in STREAM_FIELDS:
            check(field in s, f"{name}: streams.{sname}.{field} present")
        check(set(s["phases"]) == {"solid", "liquid", "vapour"}, f"{name}: streams.{sname}.phases has three phases")
        check(abs(sum(s["components_kg"].values()) - s["total_kg"]) <= 1e-9 * max(1.0, s["total_kg"]),
              f"{name}: streams.{sname} total_kg is the sum of its components")
        check(s["temperature_K"] > 0 and s["pressure_Pa"] > 0, f"{name}: streams.{sname} has positive T and P")
    for bname, b in doc["blocks"].items():
        for field in BLOCK_FIELDS:
            check(field in b, f"{name}: blocks.{bname}.{field} present")
        for field in BALANCE_FIELDS:
            check(field in b.get("balance", {}), f"{name}: blocks.{bname}.balance.{field} present")
    for field in BALANCE_FIELDS:
        check(field in doc["balance"], f"{name}: balance.{field} present")
    check(any(PLANNING_AID in c for c in doc["cautions"]), f"{name}: cautions end with the planning-aid note")


def check_closure(name, doc):
    # common practice (project convention): a shipped case closes mass to
    # 1e-9 and energy to 1e-6, relative, overall and in every block.
    balances = [("overall", doc["balance"])] + [(b, v["balance"]) for b, v in doc["blocks"].items()]
    for where, b in balances:
        check(b["mass_relative_error"] < 1e-9, f"{name} {where}: mass closes to 1e-9 (got {b['mass_relative_error']})")
        check(b["energy_relative_error"] < 1e-6,
              f"{name} {where}: energy closes to 1e-6 (got {b['energy_relative_error']})")
        for element, error in b["element_relative_error"].items():
            check(error < 1e-9, f"{name} {where}: element {element} closes to 1e-9 (got {error})")


def run_case(name, path, folder):
    out = os.path.join(folder, os.path.basename(path) + ".json")
    r = run("run", path, "--json", out)
    check(r.returncode == 0, f"{name}: run exits 0 (got {r.returncode}: {r.stderr[-2000:]!r})")
    if r.returncode != 0:
        return None, r
    for section in ("Streams", "Blocks", "Balance closure", "Cautions"):
        check(f"\n{section}" in r.stdout, f"{name}: summary has a '{section}' section")
    with open(out) as f:
        doc = json.load(f)
    check(not glob.glob(out + ".tmp.*"), f"{name}: no temporary file left behind")
    check_layout(name, doc)
    check_closure(name, doc)
    check(doc["converged"] is True, f"{name}: converged")
    types = {b["type"] for b in doc["blocks"].values()}
    cautions = " ".join(doc["cautions"])
    if "pyrolysis" in types:
        check("inert" in cautions and "Styrene" in cautions, f"{name}: pyrolysis cases carry the hot-reactor and "
                                                             "styrene cautions")
    if types & {"solvent_densification", "solvent_recovery"}:
        check("25 %" in cautions and "LFL" in cautions, f"{name}: solvent cases carry the flammable-vapour caution")
    return doc, r


MIX_AND_HEAT = (pathlib.Path(__file__).parent / "mix_and_heat.yaml").read_text()

HEAT_WATER = """\
# Invented example for the tests: 2 kg of water heated from 15 to 45 degC.
case:
  title: "Heat water (invented example)"
  basis: batch
components: [water]
feeds:
  cold_water:
    temperature: "15 degC"
    liquid: {water: "2 kg"}
blocks:
  warm:
    type: heater
    outlet_temperature: "45 degC"
    inlets: {feed: cold_water}
    outlets: {product: warm_water}
"""

RECYCLE = """\
# Invented example for the tests: a loop that returns 90 % of the flow to the mixer.
case:
  title: "Recycle loop (invented example)"
  basis: batch
components: [water]
feeds:
  fresh:
    temperature: "20 degC"
    liquid: {water: "1 kg"}
blocks:
  mix:
    type: mixer
    inlets: {feeds: [fresh, back]}
    outlets: {product: mixed}
  warm:
    type: heater
    outlet_temperature: "50 degC"
    inlets: {feed: mixed}
    outlets: {product: hot}
  split:
    type: splitter
    fractions: [0.1, 0.9]
    inlets: {feed: hot}
    outlets: {products: [out, back]}
"""


def write(folder, name, text):
    path = os.path.join(folder, name)
    with open(path, "w") as f:
        f.write(text)
    return path


def test_shipped_cases(folder):
    cases = sorted(glob.glob(os.path.join(SOURCE_DIR, "cases", "*.yaml")))
    if not cases:
        print("note: no shipped cases in cases/ yet; only the cases written by this test were run")
    for path in cases:
        run_case(os.path.relpath(path, SOURCE_DIR), path, folder)


def test_generic_cases(folder):
    doc, _ = run_case("mix_and_heat", write(folder, "mix_and_heat.yaml", MIX_AND_HEAT), folder)
    if doc:
        s = doc["streams"]
        check(s["cold_water"]["source"] is None and s["cold_water"]["destination"] == "mix",
              "a feed has source null and its destination block")
        check(s["warm_mixture"]["destination"] is None and s["warm_mixture"]["source"] == "warm",
              "a product has destination null and its source block")
        check(abs(s["warm_mixture"]["temperature_K"] - 318.15) < 1e-6, "heater outlet at its set-point 45 degC")
        check(abs(s["mixed"]["total_kg"] - 3.0) < 1e-12, "the mixer keeps the 3 kg it was given")
        check(doc["solver"]["calculation_order"] == ["mix", "warm"], "blocks computed in flow order")

    doc, _ = run_case("heat_water", write(folder, "heat_water.yaml", HEAT_WATER), folder)
    if doc:
        # Source: IAPWS-IF97 via python3-iapws. The data's liquid cp for water
        # is a fit to IAPWS-95 within 0.2 %; 0.5 % allows for the pressure
        # and the IF97/IAPWS-95 difference.
        h_in = IAPWS97(T=288.15, P=0.101325).h
        h_out = IAPWS97(T=318.15, P=0.101325).h
        reference_J = 2.0 * (h_out - h_in) * 1e3
        duty = doc["blocks"]["warm"]["process_heat_J"]
        check(abs(duty - reference_J) <= 0.005 * reference_J,
              f"heating 2 kg water 15 -> 45 degC takes {duty:.0f} J, within 0.5 % of IAPWS-IF97 {reference_J:.0f} J")
        figure = doc["blocks"]["warm"]["figures"].get("duty", {})
        check(figure.get("unit") == "J" and abs(figure.get("value", 0) - duty) <= 1e-9 * duty,
              "the heater's duty figure equals its process heat, in J")

    doc, _ = run_case("recycle", write(folder, "recycle.yaml", RECYCLE), folder)
    if doc:
        check(doc["solver"]["tear_streams"] == ["back"], f"the recycle is torn at 'back' (got {doc['solver']['tear_streams']})")
        check(len(doc["solver"]["loops"]) == 1 and doc["solver"]["iterations"] > 0, "one loop, iterated")
        # Steady state of the loop: 1 kg fresh, 10 % leaves, so 10 kg circulate.
        check(abs(doc["streams"]["hot"]["total_kg"] - 10.0) < 1e-8, "10 kg circulate at the converged state")
        check(abs(doc["streams"]["out"]["total_kg"] - 1.0) < 1e-9, "what enters leaves")


def test_output_options(folder):
    path = write(folder, "options.yaml", MIX_AND_HEAT)
    r = run("run", path, "--json", "-")
    check(r.returncode == 0, "--json - exits 0")
    try:
        json.loads(r.stdout)
        parsed = True
    except ValueError:
        parsed = False
    check(parsed, "--json - writes only JSON on standard output")
    check("Balance closure" in r.stderr, "--json - sends the summary to standard error")

    r = run("run", path, "--quiet")
    check(r.returncode == 0 and r.stdout == "", f"--quiet prints no summary (got {r.stdout[:200]!r})")

    r = run("run", path, "--set", "blocks.warm.outlet_temperature=60 degC", "--json", "-", "--quiet")
    doc = json.loads(r.stdout)
    check(abs(doc["streams"]["warm_mixture"]["temperature_K"] - 333.15) < 1e-6, "--set changes a block parameter")

    unwritable = os.path.join(folder, "no_such_folder", "results.json")
    r = run("run", path, "--json", unwritable)
    check(r.returncode == 2, f"an unwritable output path exits 2 (got {r.returncode})")
    check(unwritable in r.stderr, f"the message names the path (got {r.stderr!r})")


def test_failures_keep_old_results(folder):
    results = os.path.join(folder, "kept.json")
    with open(results, "w") as f:
        f.write("old results\n")

    path = write(folder, "not_converging.yaml", RECYCLE + "solver:\n  max_iterations: 3\n")
    r = run("run", path, "--json", results)
    check(r.returncode == 3, f"a loop that does not converge exits 3 (got {r.returncode})")
    check("did not converge" in r.stderr, f"the message says the loop did not converge (got {r.stderr!r})")

    path = write(folder, "impossible.yaml", MIX_AND_HEAT.replace('"45 degC"', '"5 degC"'))
    r = run("run", path, "--json", results)
    check(r.returncode == 2, f"a heater asked to cool exits 2 (got {r.returncode})")
    check("warm" in r.stderr, f"the model error names the block (got {r.stderr!r})")

    path = write(folder, "bad_unit.yaml", MIX_AND_HEAT.replace('"2 kg"', '"2 kgg"'))
    r = run("run", path, "--json", results)
    check(r.returncode == 2, f"a bad case exits 2 (got {r.returncode})")

    with open(results) as f:
        check(f.read() == "old results\n", "failed runs leave an existing results file untouched")
    check(not glob.glob(results + ".tmp.*"), "failed runs leave no temporary file")


if __name__ == "__main__":
    UNCHAIN = sys.argv[1]
    SOURCE_DIR = sys.argv[2]
    with tempfile.TemporaryDirectory(prefix="unchain-run-") as folder:
        test_shipped_cases(folder)
        test_generic_cases(folder)
        test_output_options(folder)
        test_failures_keep_old_results(folder)
    if failures:
        print(f"{len(failures)} check(s) failed")
        sys.exit(1)
    print("all checks passed")
