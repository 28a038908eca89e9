"""End-to-end test of unchain on bad input: every fixture in tests/bad_inputs/
holds one mistake, and the program must refuse it with the right exit code
(2 bad input, 3 no convergence), the key phrase of the message and, for a
mistake in the file, FILE:LINE:COLUMN pointing at the mistake. A failing run
must leave an existing --json output file untouched and no temporary file.

Run as: /usr/bin/python3 test_bad_inputs.py PATH_TO_unchain SOURCE_DIR
"""
import pathlib
import glob
import os
import subprocess
import sys
import tempfile

UNCHAIN = sys.argv[1]
SOURCE_DIR = sys.argv[2]
FIXTURES = os.path.join(SOURCE_DIR, "tests", "bad_inputs")

passed = 0
failures = []


def check(condition, what):
    global passed
    if condition:
        passed += 1
    else:
        failures.append(what)
        print("FAILED:", what)


def run(*args):
    """Runs unchain; returns (exit code, stdout + stderr), or (None, why) on a hang."""
    try:
        done = subprocess.run([UNCHAIN, *args], capture_output=True, text=True, errors="replace", timeout=20)
    except subprocess.TimeoutExpired:
        return None, "timed out after 20 s"
    return done.returncode, done.stdout + done.stderr


# (fixture, command, exit code, (line, column) or None, key phrases of the message).
# The line and column were checked by hand against each fixture: they point at
# the offending key or value (1-based, as editors count).
CASES = [
    ("yaml_syntax_error", "check", 2, (3, 11), ["error: YAML syntax", "end of map flow not found"]),
    ("tab_in_indentation", "check", 2, (9, 1), ["tab character in indentation", "expected spaces"]),
    ("duplicate_key", "check", 2, (5, 3), ["duplicate key 'basis'"]),
    ("unknown_key", "check", 2, (5, 3),
     ["unknown key 'case.ambient_temprature'", "(did you mean 'ambient_temperature'?)"]),
    ("unknown_block_type", "check", 2, (15, 11),
     ["'blocks.mix.type': unknown block type 'mixr'", "(did you mean 'mixer'?)"]),
    ("unknown_component", "check", 2, (5, 21),
     ["unknown component 'acetne'", "(did you mean 'acetone'?)"]),
    ("wrong_dimension", "check", 2, (20, 25),
     ["'blocks.warm.outlet_temperature': wrong dimension",
      "expected temperature (K), found mass (kg)"]),
    ("unknown_unit", "check", 2, (20, 25),
     ["'blocks.warm.outlet_temperature': unknown unit \"degQ\" (expected a unit symbol such as K, degC,",
      "found \"degQ\")", "(did you mean \"degC\"?)"]),
    # An alias inside the value its anchor names: a cycle, not deep nesting.
    ("recursive_alias", "check", 2, (10, 5),
     ["recursive YAML alias: the alias here refers to the anchored value (line 7)",
      "(expected a tree, found a cycle)"]),
    # Found by fuzzing: a byte that is not UTF-8 used to reach the JSON writer (exit 1).
    ("not_utf8", "check", 2, (3, 14),
     ["the file is not valid UTF-8 text (expected UTF-8, found the byte 0xE9)"]),
    # Found by fuzzing: an exponent too large for an int was converted to one
    # (undefined behaviour) while the dimension was described.
    ("huge_unit_exponent", "check", 2, (9, 21),
     ["'feeds.cold_water.liquid.water': wrong dimension (expected mass (kg), found kg^3.33333e+43"]),
    ("missing_number", "check", 2, (9, 21),
     ["'feeds.cold_water.liquid.water': missing number in \"kg\""]),
    ("negative_amount", "check", 2, (9, 21),
     ["'feeds.cold_water.liquid.water': amount must not be negative", "found \"-2 kg\""]),
    ("non_finite_amount", "check", 2, (9, 21),
     ["'feeds.cold_water.liquid.water'", "the number in \"inf kg\" is not finite"]),
    # YAML's own spelling of infinity is refused the same way.
    ("non_finite_amount_yaml_inf", "check", 2, (9, 21),
     ["'feeds.cold_water.liquid.water'", "the number in \".inf kg\" is not finite"]),
    ("splitter_fractions_sum", "check", 2, (30, 16),
     ["'blocks.bottoms_splitter.fractions' must add up to 1", "found 0.9"]),
    ("stream_two_sources", "check", 2, (22, 24),
     ["stream 'mixed' has two sources", "block 'mix' (outlet 'product')",
      "block 'warm' (outlet 'product')"]),
    ("undefined_stream", "check", 2, (21, 20),
     ["undefined stream 'mixd'", "(did you mean 'mixed'?)"]),
    ("missing_required_inlet", "check", 2, (18, 3),
     ["block 'warm' (heater) is missing its required inlet 'feed'"]),
    # Failures of the solve: no line to point at.
    ("recycle_no_convergence", "run", 3, None,
     ["did not converge within 2 iterations", "tear stream 'returned_liquid'"]),
    ("heater_too_small", "run", 2, None,
     ["block 'reactor' (pyrolysis): the heater cannot reach its set-point of 500.0 degC"]),
    ("yield_table_no_closure", "run", 2, None,
     ["block 'reactor' (pyrolysis): closing the element balance of the yields",
      "more than the limit of 0.05"]),
]


def sane(code, output, label):
    """No hang, no signal, no crash code, no Python-style traceback."""
    check(code is not None, label + ": finished (" + output + ")")
    check(code is None or code in (2, 3), label + ": exit code 2 or 3, found %s" % code)
    check("Traceback" not in output and "terminate called" not in output,
          label + ": no traceback or abort in the output")


def assert_json_untouched(args, code_expected, label, workdir):
    """Runs `unchain run ... --json OUT` with OUT already present; OUT must be unchanged."""
    out = os.path.join(workdir, "results.json")
    known = '{"left": "by an earlier run"}\n'
    with open(out, "w") as f:
        f.write(known)
    code, output = run("run", *args, "--quiet", "--json", out)
    sane(code, output, label + " (run --json)")
    check(code == code_expected, label + " (run --json): exit %s, expected %d" % (code, code_expected))
    with open(out) as f:
        check(f.read() == known, label + ": existing --json file left unchanged")
    leftovers = [n for n in os.listdir(workdir) if n.startswith("results.json.tmp")]
    check(not leftovers, label + ": no temporary file left (%s)" % leftovers)
    return code, output


def test_fixtures(workdir):
    listed = {name for name, *_ in CASES}
    on_disk = {os.path.splitext(os.path.basename(p))[0]
               for p in glob.glob(os.path.join(FIXTURES, "*.yaml"))}
    check(listed == on_disk, "every fixture is asserted (unlisted: %s, missing: %s)"
          % (sorted(on_disk - listed), sorted(listed - on_disk)))
    for name, command, code_expected, location, phrases in CASES:
        path = os.path.join(FIXTURES, name + ".yaml")
        with open(path, encoding="utf-8", errors="replace") as f:  # not_utf8 is not
            check(f.readline().startswith("# Bad input"), name + ": header comment says the mistake")
        if command == "check":
            code, output = run("check", path)
            sane(code, output, name)
            check(code == code_expected, name + ": exit %s, expected %d" % (code, code_expected))
        else:
            code, output = assert_json_untouched([path], code_expected, name, workdir)
        for phrase in phrases:
            check(phrase in output, name + ": message holds %r (output: %s)" % (phrase, output))
        if location is not None:
            prefix = "%s:%d:%d: error: " % (path, location[0], location[1])
            check(prefix in output, name + ": message starts %r (output: %s)" % (prefix, output))
        if command == "check":
            # A bad case must also stop `run` before anything is written.
            assert_json_untouched([path], code_expected, name, workdir)


GOOD_CASE = (pathlib.Path(__file__).parent / "mix_and_heat.yaml").read_text()


def test_generated(workdir):
    # A file that does not exist.
    missing = os.path.join(workdir, "no_such_case.yaml")
    code, output = run("check", missing)
    sane(code, output, "missing file")
    check(code == 2, "missing file: exit %s, expected 2" % code)
    check(missing + ": error: cannot open file" in output, "missing file: message (%s)" % output)

    good = os.path.join(workdir, "good.yaml")
    with open(good, "w") as f:
        f.write(GOOD_CASE)
    code, output = run("check", good)
    check(code == 0, "the good case used below checks clean (exit %s: %s)" % (code, output))

    # Text in UTF-8 beyond ASCII (two-, three- and four-byte forms, and a
    # byte-order mark) is fine; only bytes that are not UTF-8 are refused.
    accented = os.path.join(workdir, "accented.yaml")
    with open(accented, "w", encoding="utf-8") as f:
        f.write("\ufeff" + GOOD_CASE.replace('title: "Mix and heat (invented example)"',
                                             'title: "Caf\u00e9 wash \u2014 45 \u00b0C \U0001F9EA (invented example)"'))
    code, output = run("check", accented)
    check(code == 0, "a UTF-8 title with accents and symbols checks clean (exit %s: %s)" % (code, output))

    # An output folder that cannot be written: one that does not exist under
    # /proc, and one whose parent is a regular file (tests run as root, so
    # permissions alone would not stop the write).
    blocker = os.path.join(workdir, "a_regular_file")
    with open(blocker, "w") as f:
        f.write("not a folder\n")
    for label, target, reason in [
            ("json under /proc", "/proc/nonexistent/x.json", "No such file or directory"),
            ("json under a regular file", os.path.join(blocker, "x.json"), "Not a directory")]:
        code, output = run("run", good, "--quiet", "--json", target)
        sane(code, output, label)
        check(code == 2, label + ": exit %s, expected 2" % code)
        check("error: cannot write '%s'" % target in output and reason in output,
              label + ": message names the path and the reason (%s)" % output)
    with open(blocker) as f:
        check(f.read() == "not a folder\n", "json under a regular file: the file is untouched")

    # A file larger than 16 MiB: the good case padded with comments.
    big = os.path.join(workdir, "big.yaml")
    with open(big, "w") as f:
        f.write(GOOD_CASE)
        line = "# " + "x" * 1021 + "\n"
        for _ in range(17 * 1024):
            f.write(line)
    size = os.path.getsize(big)
    check(size > 16 * 1024 * 1024, "big file is over 16 MiB")
    code, output = run("check", big)
    sane(code, output, "big file")
    check(code == 2, "big file: exit %s, expected 2" % code)
    check("%s: error: file too large (expected at most 16777216 bytes, found %d)" % (big, size)
          in output, "big file: message (%s)" % output)
    assert_json_untouched([big], 2, "big file", workdir)
    os.remove(big)

    # Deeply nested flow sequences and flow mappings.
    for label, text in [("deep sequence", "[" * 10000 + "\n"),
                        ("deep mapping", "a: " + "{b: " * 10000 + "\n")]:
        deep = os.path.join(workdir, "deep.yaml")
        with open(deep, "w") as f:
            f.write(text)
        code, output = run("check", deep)
        sane(code, output, label)
        check(code == 2, label + ": exit %s, expected 2" % code)
        check("%s: error: nesting deeper than 64 levels" % deep in output,
              label + ": message (%s)" % output)
        assert_json_untouched([deep], 2, label, workdir)

    # A cycle given on the command line: refused like one in a file (it used
    # to send the copy of the override into endless recursion).
    code, output = run("check", good, "--set", "blocks.mix.inlets={feeds: &loop [*loop]}")
    sane(code, output, "recursive alias in --set")
    check(code == 2, "recursive alias in --set: exit %s, expected 2" % code)
    check("command line: error: --set 'blocks.mix.inlets': the value is not a valid YAML list or mapping "
          "(recursive YAML alias" in output, "recursive alias in --set: message (%s)" % output)

    # Aliases that multiply: ten levels of ten references stand for 10^10
    # values. Refused in a moment by a cap on the expanded size, never walked.
    bomb = os.path.join(workdir, "alias_bomb.yaml")
    with open(bomb, "w") as f:
        f.write("level0: &l0 [x, x, x, x, x, x, x, x, x, x]\n")
        for level in range(1, 11):
            f.write("level%d: &l%d [%s]\n" % (level, level, ", ".join(["*l%d" % (level - 1)] * 10)))
    code, output = run("check", bomb)
    sane(code, output, "alias bomb")
    check(code == 2, "alias bomb: exit %s, expected 2" % code)
    check("%s:" % bomb in output and "error: the YAML aliases expand to more than 200000 values" in output,
          "alias bomb: message (%s)" % output)


with tempfile.TemporaryDirectory() as scratch:
    test_fixtures(scratch)
    test_generated(scratch)

print("%d passed, %d failed" % (passed, len(failures)))
sys.exit(1 if failures else 0)
