"""End-to-end test of unchain interrupted by a signal: `unchain run CASE
--json out.json` is stopped mid-run by SIGTERM and, separately, by SIGKILL,
where out.json already holds the results of an earlier run. out.json must be
byte-identical afterwards and no temporary file may be left beside it.

Why this holds without a signal handler: the results are written through a
temporary file "out.json.tmp.XXXXXX" that exists only while the finished
results are written, flushed and renamed (app/atomic_file.cpp), never during
the solve. A signal during the solve therefore finds no temporary file, and
the rename is atomic, so out.json is either the old file or the new one.
Only a SIGKILL that lands inside that short write could leave a temporary
file behind (nothing can run on SIGKILL); the test sends its signals during
the solve, where the case below spends all but a few milliseconds.

Run as: /usr/bin/python3 test_signals.py PATH_TO_unchain SOURCE_DIR
"""
import os
import signal
import subprocess
import sys
import tempfile
import time

UNCHAIN = sys.argv[1]

passed = 0
failures = []


def check(condition, what):
    global passed
    if condition:
        passed += 1
    else:
        failures.append(what)
        print("FAILED:", what)


# Invented example for the tests: water warmed in a loop that returns almost
# all of it (a splitter sends 0.999999 back), solved by direct
# substitution, so that the tear stream converges by a factor of only
# 0.999999 per iteration: the solve takes many seconds, far longer than the
# moment the test waits before it signals. The same flowsheet with an even
# split converges in a few dozen iterations and gives the earlier result.
CASE = """# Invented example for the tests: a recycle loop that converges slowly.
case:
  title: "Slow recycle (invented example)"
  basis: batch
components: [water, acetone]
feeds:
  fresh:
    temperature: "20 degC"
    liquid: {{water: "1 kg", acetone: "0.2 kg"}}
blocks:
  mix:
    type: mixer
    inlets: {{feeds: [fresh, returned]}}
    outlets: {{product: mixed}}
  warm:
    type: heater
    outlet_temperature: "30 degC"
    inlets: {{feed: mixed}}
    outlets: {{product: warmed}}
  split:
    type: splitter
    inlets: {{feed: warmed}}
    outlets: {{products: [returned, drawn_off]}}
    fractions: [{returned}, {drawn}]
solver:
  method: direct_substitution
  tolerance: 1e-12
  max_iterations: 1000000
"""


def write_case(path, returned):
    with open(path, "w") as f:
        f.write(CASE.format(returned=repr(returned), drawn=repr(round(1.0 - returned, 12))))


def leftovers(folder):
    return sorted(n for n in os.listdir(folder) if n.startswith("out.json.tmp"))


def test_signal(workdir, sig, label):
    quick = os.path.join(workdir, "quick.yaml")
    slow = os.path.join(workdir, "slow.yaml")
    out = os.path.join(workdir, "out.json")
    write_case(quick, 0.5)
    write_case(slow, 0.999999)

    done = subprocess.run([UNCHAIN, "run", quick, "--quiet", "--json", out],
                          capture_output=True, text=True, timeout=60)
    check(done.returncode == 0, label + ": the earlier run succeeds (%s)" % done.stderr)
    with open(out, "rb") as f:
        before = f.read()
    check(b'"drawn_off"' in before, label + ": the earlier result holds the case's streams")

    process = subprocess.Popen([UNCHAIN, "run", slow, "--quiet", "--json", out],
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    time.sleep(1.0)
    running = process.poll() is None
    check(running, label + ": the slow run is still solving when signalled (exit %s)" % process.returncode)
    if running:
        process.send_signal(sig)
    try:
        _, stderr = process.communicate(timeout=30)
    except subprocess.TimeoutExpired:
        process.kill()
        _, stderr = process.communicate()
    check(process.returncode == -sig,
          label + ": the run ends by the signal (returncode %s, expected %d; %s)"
          % (process.returncode, -sig, stderr.decode(errors="replace")[-300:]))
    with open(out, "rb") as f:
        check(f.read() == before, label + ": out.json is byte-identical to the earlier result")
    check(not leftovers(workdir), label + ": no temporary file left (%s)" % leftovers(workdir))


with tempfile.TemporaryDirectory() as scratch:
    test_signal(scratch, signal.SIGTERM, "SIGTERM")
with tempfile.TemporaryDirectory() as scratch:
    test_signal(scratch, signal.SIGKILL, "SIGKILL")

print("%d passed, %d failed" % (passed, len(failures)))
sys.exit(1 if failures else 0)
