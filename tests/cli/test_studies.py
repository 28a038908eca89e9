"""End-to-end checks of the study commands: `unchain scale`, `unchain sweep`
(one parameter and a grid of two) and `unchain compare` (the two lab cases),
with their exit codes for bad paths and bad value lists. Fixtures:
tests/cli/scale_mix_heat.yaml and scale_mix_heat_continuous.yaml (fast);
the lab cases only for compare."""
import csv
import json
import math
import os
import subprocess
import sys
import tempfile

unchain, source = sys.argv[1], sys.argv[2]
fixture = f"{source}/tests/cli/scale_mix_heat.yaml"
failures = []


def check(condition, message):
    if not condition:
        failures.append(message)
        print("FAILED:", message)


def run(*args):
    return subprocess.run([unchain, *args], capture_output=True, text=True)


def run_json(*args):
    p = run(*args, "--json", "-", "--quiet")
    check(p.returncode == 0, f"{args}: exit {p.returncode}: {p.stderr[-800:]}")
    return json.loads(p.stdout) if p.returncode == 0 else None


def close(a, b, rel=1e-9):
    return a is not None and b is not None and abs(a - b) <= rel * max(abs(a), abs(b), 1e-300)


def value(figures, key):
    return figures[key]["value"]


with tempfile.TemporaryDirectory() as tmp:
    # ---- scale ------------------------------------------------------------------
    ladder = run_json("scale", fixture)
    if ladder:
        rungs = {r["factor"]: r for r in ladder["rungs"]}
        check(sorted(rungs) == [1.0, 2.0, 10.0], f"factors {sorted(rungs)}")
        check(all(r["status"] == "solved" for r in ladder["rungs"]), "every size solves")
        m1 = value(rungs[1.0]["figures"], "monomer_per_basis")
        # The feeds doubled double the monomer: 1 kg of acetone -> 2 kg (hand calculation).
        check(close(m1, 1.0, 1e-12), f"monomer at f=1: {m1}")
        check(close(value(rungs[2.0]["figures"], "monomer_per_basis"), 2.0 * m1, 1e-12), "monomer doubles")
        # Labour 2 h x 10^0.25 (the fixture's rule).
        check(close(rungs[10.0]["labour_hours_per_basis"], 2.0 * 10 ** 0.25, 1e-12), "labour rule")
        # Heater rating = duty / duration grows as f / f^0.5 = f^0.5, so the
        # six-tenths rule gives capital x (f^0.5)^0.6 = f^0.3 (hand calculation).
        c1 = value(rungs[1.0]["figures"], "installed_capital")
        c10 = value(rungs[10.0]["figures"], "installed_capital")
        check(close(c10 / c1, 10 ** 0.3, 1e-9), f"capital ratio {c10 / c1} vs 10^0.3")
        check(ladder["cautions"] == [], "no pyrolysis, no caution")
    p = run("scale", fixture, "--csv", tmp, "--quiet")
    check(p.returncode == 0, f"scale --csv: exit {p.returncode}: {p.stderr[-500:]}")
    with open(os.path.join(tmp, "scale.csv")) as f:
        rows = list(csv.DictReader(f))
    check(len(rows) == 3, "scale.csv has a row per size")
    check("energy_per_kg_monomer_MJ_per_kg" in rows[0] and "installed_capital_USD" in rows[0],
          f"units in the scale.csv headings: {list(rows[0])[:12]}")

    # The switch to the continuous case at the same annual output:
    # 1 kg/batch x 10 x 200 batches/yr = 2000 kg/yr = 0.5 kg/h x m x 8000 h/yr -> m = 0.5.
    ladder = run_json("scale", fixture, "--set", "scale.continuous_case=scale_mix_heat_continuous.yaml",
                      "--set", "scale.continuous_above=5")
    if ladder:
        top = [r for r in ladder["rungs"] if r["factor"] == 10.0][0]
        check(top["continuous"] and top["basis"] == "hour", "factor 10 runs on the continuous case")
        check(close(top["multiplier"], 0.5, 1e-9), f"continuous multiplier {top['multiplier']}")
        check(close(top["annual_monomer_kg"], 2000.0, 1e-9), f"annual monomer {top['annual_monomer_kg']}")
        check(close(top["target_annual_monomer_kg"], 2000.0, 1e-12), "target annual monomer")

    # A scaled parameter whose path leads nowhere: exit 2, file, line and key named.
    bad = os.path.join(tmp, "bad_scale.yaml")
    with open(fixture) as f:
        text = f.read()
    with open(bad, "w") as f:
        f.write(text.replace("path: blocks.warm.duration", "path: blocks.warm.duratoin"))
    p = run("scale", bad)
    check(p.returncode == 2, f"bad scale path: exit {p.returncode}")
    entry_line = text.splitlines().index(next(l for l in text.splitlines() if "path: blocks.warm.duration" in l)) + 1
    check(f"bad_scale.yaml:{entry_line}:" in p.stderr and "'scale.scaled_parameters[0].path'" in p.stderr
          and "no key 'duratoin' in 'blocks.warm'" in p.stderr and "did you mean 'duration'" in p.stderr,
          f"bad scale path message: {p.stderr[-400:]}")

    # ---- sweep: one parameter -------------------------------------------------------
    sweep = run_json("sweep", fixture, "--set", "blocks.warm.outlet_temperature=45 degC,55 degC,65 degC")
    if sweep:
        check(sweep["parameters"] == ["blocks.warm.outlet_temperature"], "swept path")
        points = sweep["points"]
        check(len(points) == 3 and all(p["status"] == "solved" for p in points), "three points solve")
        e = [value(p["figures"], "energy_per_kg_monomer") for p in points]
        check(e[0] < e[1] < e[2], f"energy grows with the outlet temperature: {e}")
        # Hand calculation: each 10 K on 2 kg water + 1 kg acetone is about
        # (2 x 4.18 + 2.16) kJ/K x 10 K = 0.105 MJ per kg of acetone (cp from memory, 4 %).
        check(abs((e[1] - e[0]) / 0.1052 - 1) < 0.04, f"energy step {e[1] - e[0]} MJ/kg")
        check(points[0]["values"] == {"blocks.warm.outlet_temperature": "45 degC"}, "values as written")

    # A failed point keeps its row; the sweep goes on (exit 0).
    p = run("sweep", fixture, "--set", "blocks.warm.outlet_temperature=45 degC,5 degC", "--json",
            os.path.join(tmp, "sweep.json"))
    check(p.returncode == 0, f"sweep with a failed point: exit {p.returncode}")
    with open(os.path.join(tmp, "sweep.json")) as f:
        points = json.load(f)["points"]
    check([q["status"] for q in points] == ["solved", "bad_input"], f"statuses {[q['status'] for q in points]}")
    check("use a cooler" in (points[1]["error"] or ""), f"the failed point's error: {points[1]['error']}")

    # ---- sweep: a grid of two --------------------------------------------------------
    grid = run_json("sweep", fixture, "--set", "blocks.warm.outlet_temperature=45 degC,55 degC",
                    "--set", "blocks.warm.duration=30 min,2 h", "--set", "prices.electricity=0.25 USD/kWh")
    if grid:
        pts = grid["points"]
        check(len(pts) == 4, f"2 x 2 grid: {len(pts)} points")
        check(grid["fixed_overrides"] == [{"path": "prices.electricity", "value": "0.25 USD/kWh"}], "fixed override")
        order = [(q["values"]["blocks.warm.outlet_temperature"], q["values"]["blocks.warm.duration"]) for q in pts]
        check(order == [("45 degC", "30 min"), ("45 degC", "2 h"), ("55 degC", "30 min"), ("55 degC", "2 h")],
              f"grid order {order}")
        # Four times the duration is a quarter of the heater rating: capital x 0.25^0.6 (six-tenths rule).
        ratio = value(pts[1]["figures"], "installed_capital") / value(pts[0]["figures"], "installed_capital")
        check(close(ratio, 0.25 ** 0.6, 1e-9), f"capital ratio {ratio}")
    p = run("sweep", fixture, "--set", "blocks.warm.outlet_temperature=45 degC,55 degC", "--set",
            "blocks.warm.duration=30 min,2 h", "--csv", tmp, "--quiet")
    check(p.returncode == 0, f"sweep --csv: exit {p.returncode}")
    with open(os.path.join(tmp, "sweep.csv")) as f:
        rows = list(csv.DictReader(f))
    check(len(rows) == 4, "sweep.csv has a row per point")
    check("net_cost_per_kg_monomer_USD_per_kg" in rows[0] and "monomer_per_batch_kg" in rows[0],
          f"units in the sweep.csv headings: {list(rows[0])}")

    # ---- sweep: bad input ---------------------------------------------------------------
    p = run("sweep", fixture, "--set", "blocks.warm.outlet_temperatur=45 degC,55 degC")
    check(p.returncode == 2, f"misspelt path: exit {p.returncode}")
    check("scale_mix_heat.yaml" in p.stderr and "outlet_temperatur" in p.stderr
          and "did you mean 'outlet_temperature'" in p.stderr, f"misspelt path message: {p.stderr[-400:]}")
    p = run("sweep", fixture, "--set", "blocks.heater.outlet_temperature=45 degC,55 degC")
    check(p.returncode == 2 and "no key 'heater' in 'blocks'" in p.stderr, f"missing block: {p.stderr[-300:]}")
    for values, expected in (("45 degC,,55 degC", "empty value in the list"),
                             ("45 degC,", "empty value in the list"),
                             ("45 degC,2 kg", "different dimensions")):
        out_json = os.path.join(tmp, "never.json")
        p = run("sweep", fixture, "--set", f"blocks.warm.outlet_temperature={values}", "--json", out_json)
        check(p.returncode == 2, f"bad list '{values}': exit {p.returncode}")
        check(expected in p.stderr and "blocks.warm.outlet_temperature" in p.stderr,
              f"bad list '{values}': {p.stderr[-300:]}")
        check(not os.path.exists(out_json), "nothing written on bad input")
    p = run("sweep", fixture, "--set", "blocks.warm.outlet_temperature=45 degC")
    check(p.returncode == 2 and "no --set has a list" in p.stderr, "a sweep without a list is a usage error")
    p = run("sweep", fixture, "--set", "a=1,2", "--set", "b=1,2", "--set", "c=1,2")
    check(p.returncode == 2 and "at most 2" in p.stderr, f"three lists: {p.stderr[-300:]}")
    # Every point bad: exit 2, nothing written.
    p = run("sweep", fixture, "--set", "blocks.warm.outlet_temperature=5 degC,6 degC", "--json",
            os.path.join(tmp, "never.json"))
    check(p.returncode == 2 and not os.path.exists(os.path.join(tmp, "never.json")), "no point solved: exit 2")

    # No point converges: exit 3 (the first failure's code).
    p = run("sweep", f"{source}/tests/bad_inputs/recycle_no_convergence.yaml", "--set", "solver.max_iterations=1,2")
    check(p.returncode == 3 and "did not converge" in p.stderr, f"no point converged: exit {p.returncode}")

    # ---- compare: the densification question --------------------------------------------
    solvent, ground = f"{source}/cases/lab_acetone_densification.yaml", f"{source}/cases/lab_ground_foam.yaml"
    p = run("compare", solvent, ground, "--json", os.path.join(tmp, "compare.json"), "--csv", tmp)
    check(p.returncode == 0, f"compare: exit {p.returncode}: {p.stderr[-500:]}")
    check(p.stdout.count("caution: Hot surfaces") == 1, "the pyrolysis caution once")
    check("[MJ/kg]" in p.stdout and "[USD/kg]" in p.stdout and "monomer_per_batch [kg]" in p.stdout,
          "units in the text headings")
    with open(os.path.join(tmp, "compare.json")) as f:
        cmp = json.load(f)
    figures = {f["key"]: f for f in cmp["figures"]}
    for key in ("energy_per_batch", "energy_per_kg_monomer", "net_cost_per_batch", "net_cost_per_kg_monomer",
                "monomer_per_batch", "solvent_lost_per_batch", "solvent_lost_per_kg_monomer"):
        check(key in figures, f"compare shows {key}")
    e = figures["energy_per_kg_monomer"]
    check(close(e["ratio_to_first"][1], e["values"][1] / e["values"][0], 1e-12), "ratio against the first case")
    check(close(e["difference_from_first"][1], e["values"][1] - e["values"][0], 1e-12), "difference")
    check(e["ratio_to_first"][0] is None, "no ratio for the first case")
    # Per batch and per kg agree: energy per batch / monomer per batch = energy per kg.
    for k in (0, 1):
        check(close(figures["energy_per_batch"]["values"][k] / figures["monomer_per_batch"]["values"][k],
                    e["values"][k], 1e-9), "energy per batch and per kg agree")
    # Only the solvent route loses solvent.
    check(figures["solvent_lost_per_batch"]["values"][0] > 0 and figures["solvent_lost_per_batch"]["values"][1] == 0,
          "solvent lost only on the solvent route")
    with open(os.path.join(tmp, "compare.csv")) as f:
        rows = list(csv.DictReader(f))
    check(len(rows) == 2 and "energy_per_kg_monomer_MJ_per_kg" in rows[0], "compare.csv: a row per case, units")
    p = run("compare", solvent)
    check(p.returncode == 2, f"compare with one case: exit {p.returncode}")
    p = run("compare", solvent, os.path.join(tmp, "missing.yaml"))
    check(p.returncode == 2 and "missing.yaml" in p.stderr, "compare with a missing file")

if failures:
    print(f"{len(failures)} failed")
    sys.exit(1)
print("studies end-to-end: all checks passed")
