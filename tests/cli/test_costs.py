"""End-to-end costing checks on the two lab demo cases: the figures per kg
of monomer are reported, and the two densification routes differ the way
the physics says they must."""
import csv
import json
import os
import subprocess
import sys
import tempfile

unchain, source = sys.argv[1], sys.argv[2]
failures = []


def check(condition, message):
    if not condition:
        failures.append(message)
        print("FAILED:", message)


def run_json(case, *extra):
    p = subprocess.run([unchain, "run", f"{source}/cases/{case}", "--json", "-", "--quiet", *extra],
                       capture_output=True, text=True)
    check(p.returncode == 0, f"{case}: exit {p.returncode}: {p.stderr[-500:]}")
    return json.loads(p.stdout)


solvent = run_json("lab_acetone_densification.yaml")
ground = run_json("lab_ground_foam.yaml")

for name, r in (("solvent", solvent), ("ground", ground)):
    k = r["kpis"]
    for key in ("energy_purchased_MJ", "energy_purchased_kWh", "net_cost", "total_cost", "solvent_lost_kg"):
        check(k["per_kg_monomer"][key] is not None, f"{name}: per_kg_monomer.{key} missing")
    mj, kwh = k["per_kg_monomer"]["energy_purchased_MJ"], k["per_kg_monomer"]["energy_purchased_kWh"]
    check(abs(mj / kwh - 3.6) < 1e-9, f"{name}: MJ/kWh ratio {mj / kwh}")  # 1 kWh = 3.6 MJ exactly
    check(k["minimum_energy_MJ_per_kg"] is not None, f"{name}: minimum energy missing")
    # Nothing real beats the thermodynamic minimum.
    check(0.0 < k["efficiency_ratio"] < 1.0, f"{name}: efficiency ratio {k['efficiency_ratio']}")
    check(len(k["wastes"]) >= 2, f"{name}: waste streams missing")
    c = r["costs"]
    total = sum(line["cost"] for line in c["lines"] if line["category"] != "credit")
    check(abs(total - c["total_cost"]) <= 1e-9 * max(1.0, abs(total)), f"{name}: cost lines do not add up")
    check(abs(c["total_cost"] - c["credits"] - c["net_cost"]) < 1e-9, f"{name}: net cost is not total less credits")

# The physics: the regrind (80 kg/m3) is far less dense than the
# solvent-densified polymer (350 kg/m3), so the same 1 L flask needs more runs.
runs_solvent = solvent["blocks"]["reactor"]["figures"]["runs_per_batch"]["value"]
runs_ground = ground["blocks"]["reactor"]["figures"]["runs_per_batch"]["value"]
check(runs_ground > runs_solvent, f"runs: ground {runs_ground} should exceed solvent {runs_solvent}")
# More runs means more vessel heat-up and wall loss in the reactor.
heat_solvent = solvent["blocks"]["reactor"]["figures"]["heat_to_vessel"]["value"]
heat_ground = ground["blocks"]["reactor"]["figures"]["heat_to_vessel"]["value"]
check(heat_ground > heat_solvent, "reactor vessel heat should grow with the number of runs")
# Only the solvent route buys and recovers solvent.
check(solvent["kpis"]["per_batch"]["solvent_recovered_kg"] > 3.0, "solvent route recovers its acetone")
check(ground["kpis"]["per_batch"]["solvent_bought_kg"] == 0.0, "ground route buys no solvent")

# The discounted cash flow of the demo cases (economics section: 10 years,
# 8 %, one construction year, 60 % capacity in the first operating year).
for name, r in (("solvent", solvent), ("ground", ground)):
    k, cf = r["kpis"], r["costs"]["cash_flow"]
    check(cf is not None, f"{name}: costs.cash_flow missing")
    if cf is None:
        continue
    for key in ("npv", "irr", "payback_years", "minimum_selling_price"):
        check(key in k, f"{name}: kpis.{key} missing")
    check(k["npv"] == cf["npv"], f"{name}: kpis.npv differs from costs.cash_flow.npv")
    # A bench set-up run by hand loses money: the honest answer is a negative
    # NPV, no IRR and no payback, and a minimum price far above the market's.
    check(cf["npv"] < 0.0, f"{name}: NPV {cf['npv']} should be negative for a lab case")
    check(k["irr"] is None, f"{name}: IRR {k['irr']} should be absent (no sign change)")
    check(k["payback_years"] is None, f"{name}: payback {k['payback_years']} should be absent")
    msp, price = k["minimum_selling_price"], r["costs"]["monomer_price_per_kg"]
    check(msp is not None and price is not None and msp > price, f"{name}: minimum selling price {msp} vs {price}")
    years = cf["years"]
    check(len(years) == 11, f"{name}: {len(years)} rows in the year table, expected 1 + 10")
    check(years[0]["operating_year"] == 0 and years[0]["capital"] < 0.0, f"{name}: year 0 should spend the capital")
    check(abs(years[1]["capacity"] - 0.6) < 1e-12 and years[2]["capacity"] == 1.0, f"{name}: ramp-up misplaced")
    # Working capital and 5 % salvage come back in the last year.
    back = cf["working_capital"] + cf["salvage_value"]
    check(abs(years[-1]["capital"] - back) <= 1e-9 * max(1.0, back), f"{name}: end-of-life recovery")
    total = sum(y["net_cash_flow"] / 1.08 ** y["year"] for y in years)
    check(abs(total - cf["npv"]) <= 1e-9 * abs(cf["npv"]), f"{name}: NPV {cf['npv']} is not the discounted sum {total}")
    check(abs(years[-1]["cumulative_discounted"] - cf["npv"]) <= 1e-9 * abs(cf["npv"]), f"{name}: cumulative")
    check(abs(cf["fixed_capital"] - r["costs"]["capital"]["installed_total"]) < 1e-9, f"{name}: fixed capital")

# The CSV table, with units in the headings, and the text summary.
with tempfile.TemporaryDirectory() as folder:
    p = subprocess.run([unchain, "run", f"{source}/cases/lab_ground_foam.yaml", "--csv", folder],
                       capture_output=True, text=True)
    check(p.returncode == 0, f"--csv: exit {p.returncode}: {p.stderr[-500:]}")
    check("Discounted cash flow" in p.stdout and "minimum monomer selling price" in p.stdout,
          "run summary lacks the cash flow section")
    path = os.path.join(folder, "cash_flow.csv")
    check(os.path.exists(path), "cash_flow.csv not written")
    if os.path.exists(path):
        with open(path, newline="") as f:
            rows = list(csv.reader(f))
        head = rows[0]
        for column in ("t_yr", "capacity_fraction", "revenue_USD", "net_cash_flow_USD", "cumulative_discounted_USD"):
            check(column in head, f"cash_flow.csv: no column {column} in {head}")
        check(len(rows) == 12, f"cash_flow.csv: {len(rows)} lines, expected a heading and 11 years")
        npv = float(rows[-1][head.index("cumulative_discounted_USD")])
        check(abs(npv - ground["kpis"]["npv"]) <= 1e-9 * abs(npv), "cash_flow.csv last cumulative is not the NPV")

# A bad economics value is an input error (exit 2) naming the key.
p = subprocess.run([unchain, "run", f"{source}/cases/lab_ground_foam.yaml", "--quiet", "--set",
                    "economics.discount_rate=10"], capture_output=True, text=True)
check(p.returncode == 2, f"bad discount rate: exit {p.returncode}")
check("'economics.discount_rate' must be a fraction per year above -1" in p.stderr, f"message: {p.stderr[-300:]}")

if failures:
    print(f"{len(failures)} failed")
    sys.exit(1)
print("costing end-to-end: all checks passed")
