"""End-to-end test of `unchain components`.

Run as: /usr/bin/python3 test_components.py PATH_TO_unchain SOURCE_DIR
"""
import json
import subprocess
import sys

import periodictable

EXPECTED_IDS = [
    "polystyrene", "styrene", "toluene", "ethylbenzene", "alpha_methylstyrene", "benzene", "styrene_dimer",
    "styrene_trimer", "methane", "ethylene", "hydrogen", "char", "acetone", "d_limonene", "ethyl_acetate",
    "water", "nitrogen", "oxygen", "poly_methyl_methacrylate", "methyl_methacrylate",
]

failures = []


def check(condition, what):
    if not condition:
        failures.append(what)
        print("FAILED:", what)


def run(*args):
    return subprocess.run([UNCHAIN, *args], capture_output=True, text=True, timeout=120)


def test_text_listing():
    r = run("components")
    check(r.returncode == 0, f"components exits 0 (got {r.returncode}; stderr {r.stderr!r})")
    for cid in EXPECTED_IDS:
        check(f"\n  {cid} " in r.stdout, f"overview table lists {cid}")
        check(f"\n  {cid} - " in r.stdout, f"details section has an entry for {cid}")
    # Every component has at least its molar-mass source; most have many.
    check(r.stdout.count("source: ") >= 3 * len(EXPECTED_IDS), "text listing carries sources for the values")
    check("M g/mol" in r.stdout and "Tb degC" in r.stdout, "overview headings carry units")


def check_sourced(cid, key, value):
    """A value with a source: the source must say where it comes from."""
    if value is None:
        return
    check(isinstance(value.get("source"), str) and value["source"].strip() != "",
          f"{cid}.{key} has a source")


def check_correlation(cid, key, value):
    if value is None:
        return
    check_sourced(cid, key, value)
    r = value.get("range", {})
    check(r.get("low_K", 0) > 0 and r.get("high_K", 0) > r.get("low_K", 0),
          f"{cid}.{key} has a validity range low < high (got {r})")


def test_json():
    r = run("components", "--json")
    check(r.returncode == 0, f"components --json exits 0 (got {r.returncode})")
    doc = json.loads(r.stdout)
    check(doc.get("schema_version") == 1, "components JSON has schema_version 1")
    by_id = {c["id"]: c for c in doc["components"]}
    check(sorted(by_id) == sorted(EXPECTED_IDS), f"JSON holds exactly the 20 components (got {sorted(by_id)})")

    # Source: IUPAC atomic weights via python3-periodictable, computed here.
    # periodictable carries the older standard atomic weights (C 12.0107,
    # H 1.00794); the data uses the CIAAW 2021 conventional values (C 12.011,
    # H 1.008), which differ by less than 1e-4 relative, so 0.01 g/mol
    # distinguishes a wrong formula or weight from that rounding.
    styrene_reference = periodictable.formula("C8H8").mass
    styrene = by_id["styrene"]["molar_mass"]
    check(styrene["unit"] == "g/mol", "molar mass is given in g/mol")
    check(abs(styrene["value"] - styrene_reference) <= 0.01,
          f"styrene molar mass {styrene['value']} within 0.01 of {styrene_reference:.3f} g/mol")
    check(abs(styrene["value"] - 104.15) <= 0.01, f"styrene molar mass {styrene['value']} is 104.15 g/mol")

    for cid, c in by_id.items():
        formula = c["formula"]
        if all(float(n).is_integer() for n in formula.values()):
            text = "".join(f"{el}{int(n)}" for el, n in formula.items())
            reference = periodictable.formula(text).mass
            # Same source and reasoning as above, relative 1e-4.
            check(abs(c["molar_mass"]["value"] - reference) <= 1e-4 * reference,
                  f"{cid} molar mass {c['molar_mass']['value']} matches {text} = {reference:.4f} g/mol")
        for key in ("normal_boiling_point", "critical_temperature", "critical_pressure", "flash_point",
                    "solid_density", "liquid_density", "flammability_limits", "water_solubility", "hansen",
                    "enthalpy_of_formation"):
            check_sourced(cid, key, c.get(key))
        for key in ("vapour_pressure", "liquid_heat_capacity", "ideal_gas_heat_capacity", "solid_heat_capacity"):
            check_correlation(cid, key, c.get(key))

    # Properties the request names are present where the physics has them.
    check(by_id["styrene"]["vapour_pressure"] is not None, "styrene has a vapour-pressure correlation")
    check(by_id["polystyrene"]["vapour_pressure"] is None, "polystyrene has no vapour pressure")
    check(by_id["acetone"]["flammability_limits"] is not None, "acetone has flammability limits")
    check(by_id["polystyrene"]["hansen"] is not None, "polystyrene has Hansen parameters")


def test_help():
    r = run("components", "--help")
    check(r.returncode == 0, "components --help exits 0")
    check("unchain components --json" in r.stdout, "components --help shows an example")


def test_block_listing(source_dir):
    """`unchain blocks` lists every registered type, and each has a section in the block reference."""
    r = run("blocks", "--json")
    check(r.returncode == 0, f"blocks --json exits 0 (got {r.returncode}; stderr {r.stderr!r})")
    types = [b["type"] for b in json.loads(r.stdout)["block_types"]]
    check(len(types) == 13, f"13 block types are registered (got {len(types)}: {types})")
    check(all(b["summary"] for b in json.loads(r.stdout)["block_types"]), "every block type has a summary")
    with open(f"{source_dir}/docs/block-reference.md", encoding="utf-8") as f:
        reference = f.read()
    for t in types:
        if t in ("heater", "cooler"):
            check("### `heater` and `cooler`" in reference, "the block reference has the heater and cooler")
        else:
            check(f"### `{t}`" in reference, f"the block reference has a section for {t}")
    text = run("blocks")
    check(text.returncode == 0 and "\n  pyrolysis " in text.stdout, "blocks lists pyrolysis in its text table")


if __name__ == "__main__":
    UNCHAIN = sys.argv[1]
    test_text_listing()
    test_json()
    test_help()
    test_block_listing(sys.argv[2])
    if failures:
        print(f"{len(failures)} check(s) failed")
        sys.exit(1)
    print("all checks passed")
