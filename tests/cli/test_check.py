"""End-to-end test of `unchain check` on good and bad case files written here.

Run as: /usr/bin/python3 test_check.py PATH_TO_unchain SOURCE_DIR
"""
import pathlib
import os
import re
import subprocess
import sys
import tempfile

failures = []


def check(condition, what):
    if not condition:
        failures.append(what)
        print("FAILED:", what)


def run(*args):
    return subprocess.run([UNCHAIN, *args], capture_output=True, text=True, timeout=120)


GOOD_CASE = (pathlib.Path(__file__).parent / "mix_and_heat.yaml").read_text()

# Each bad case: (name, text, the line the error must point at, words the message must hold).
BAD_CASES = [
    ("malformed_yaml", GOOD_CASE.replace('title: "Mix and heat (invented example)"',
                                         'title: {"Mix and heat"'), 3, ["YAML"]),
    ("unknown_component", GOOD_CASE.replace("[water, acetone]", "[water, acetne]"), 5,
     ["unknown component 'acetne'", "did you mean 'acetone'"]),
    ("unknown_unit", GOOD_CASE.replace('"15 degC"', '"15 degQ"'), 8,
     ["feeds.cold_water.temperature", "unknown unit"]),
    ("wrong_dimension", GOOD_CASE.replace('"15 degC"', '"15 kg"'), 8,
     ["feeds.cold_water.temperature", "wrong dimension", "temperature", "mass"]),
    ("negative_amount", GOOD_CASE.replace('"2 kg"', '"-2 kg"'), 9,
     ["feeds.cold_water.liquid.water", "negative"]),
    ("unknown_key", GOOD_CASE.replace("outlet_temperature:", "outlet_temprature:"), 20,
     ["outlet_temprature", "did you mean 'outlet_temperature'"]),
]


def write(folder, name, text):
    path = os.path.join(folder, name + ".yaml")
    with open(path, "w") as f:
        f.write(text)
    return path


def test_good_case(folder):
    path = write(folder, "good", GOOD_CASE)
    r = run("check", path)
    check(r.returncode == 0, f"a valid case checks with exit 0 (got {r.returncode}: {r.stderr!r})")
    check(f"{path}: ok (2 components, 4 streams, 2 blocks)" in r.stdout,
          f"check reports components, streams and blocks (got {r.stdout!r})")


def test_bad_cases(folder):
    for name, text, line, words in BAD_CASES:
        path = write(folder, name, text)
        r = run("check", path)
        check(r.returncode == 2, f"{name}: exit 2 (got {r.returncode})")
        located = re.findall("^" + re.escape(path) + r":(\d+):(\d+): error: (.*)$", r.stderr, re.MULTILINE)
        check(len(located) > 0, f"{name}: message reads FILE:LINE:COL: error: (got {r.stderr!r})")
        at_line = [message for (l, _, message) in located if int(l) == line]
        check(len(at_line) > 0, f"{name}: an error points at line {line} (got {located})")
        check(any(words[0] in m for m in at_line), f"{name}: the error at line {line} mentions {words[0]!r}")
        for word in words:
            check(word in r.stderr, f"{name}: message mentions {word!r} (got {r.stderr!r})")


def test_several_errors_in_one_run(folder):
    text = GOOD_CASE.replace('"15 degC"', '"15 degQ"').replace('"2 kg"', '"-2 kg"')
    path = write(folder, "two_errors", text)
    r = run("check", path)
    check(r.returncode == 2, "two errors: exit 2")
    errors = re.findall(re.escape(path) + r":\d+:\d+: error: ", r.stderr)
    check(len(errors) >= 2, f"both errors are reported in one run (got {r.stderr!r})")


def test_overrides(folder):
    path = write(folder, "good_for_overrides", GOOD_CASE)
    r = run("check", path, "--set", 'blocks.warm.outlet_temperature=60 degC')
    check(r.returncode == 0, f"a valid override checks with exit 0 (got {r.returncode}: {r.stderr!r})")
    r = run("check", path, "--set", "feeds.cold_water.liquid.water=3 degC")
    check(r.returncode == 2, f"an override with the wrong dimension exits 2 (got {r.returncode})")
    check("wrong dimension" in r.stderr, f"the override error says what is wrong (got {r.stderr!r})")
    r = run("check", path, "--set", "no_equals_sign")
    check(r.returncode == 2, f"an override without '=' exits 2 (got {r.returncode})")
    check("PATH=VALUE" in r.stderr, f"the override error shows the expected form (got {r.stderr!r})")


def test_missing_file_and_usage(folder):
    missing = os.path.join(folder, "does_not_exist.yaml")
    r = run("check", missing)
    check(r.returncode == 2, f"a missing case file exits 2 (got {r.returncode})")
    check(missing in r.stderr, f"the message names the missing file (got {r.stderr!r})")
    r = run("check")
    check(r.returncode == 2, f"check without a case is a usage error, exit 2 (got {r.returncode})")
    r = run("chek", "x.yaml")
    check(r.returncode == 2 and "did you mean 'check'" in r.stderr,
          f"a mistyped command exits 2 with a suggestion (got {r.returncode}: {r.stderr!r})")
    r = run("check", "--help")
    check(r.returncode == 0 and "--set" in r.stdout and "Example" in r.stdout,
          "check --help exits 0 and explains --set with an example")


if __name__ == "__main__":
    UNCHAIN = sys.argv[1]
    with tempfile.TemporaryDirectory(prefix="unchain-check-") as folder:
        test_good_case(folder)
        test_bad_cases(folder)
        test_several_errors_in_one_run(folder)
        test_overrides(folder)
        test_missing_file_and_usage(folder)
    if failures:
        print(f"{len(failures)} check(s) failed")
        sys.exit(1)
    print("all checks passed")
