"""End-to-end test of `unchain report CASE -o FILE.html` on every shipped case:
the file is well-formed XML (so is each SVG on its own), its numbers equal
those of `unchain run --json`, it carries the cautions and the disclaimer,
and headless Chromium renders it to a PNG that is not blank. Also: case text
is escaped, and failures write nothing.

Run as: /usr/bin/python3 test_report.py PATH_TO_unchain SOURCE_DIR
Needs /usr/bin/chromium (Debian package `chromium`, installed by scripts/setup.sh).
One screenshot per shipped case is kept in a temporary folder named in the output.
"""
import glob
import json
import os
import re
import struct
import subprocess
import sys
import tempfile
import xml.dom.minidom
import xml.etree.ElementTree as ET
import zlib

failures = []
SVG_NS = "{http://www.w3.org/2000/svg}"
CHROMIUM = "/usr/bin/chromium"
DISCLAIMER = "defer to local codes, permits and licensed professionals"


def check(condition, what):
    if not condition:
        failures.append(what)
        print("FAILED:", what)


def run(*args):
    return subprocess.run([UNCHAIN, *args], capture_output=True, text=True, timeout=900)


def close(a, b, rel=1e-9, abs_tol=1e-12):
    return a is not None and b is not None and abs(a - b) <= max(rel * max(abs(a), abs(b)), abs_tol)


def keyed_values(root):
    """Every element with data-key and data-value, as {key: [values]} (the report and its SVGs)."""
    values = {}
    for element in root.iter():
        key, value = element.get("data-key"), element.get("data-value")
        if key is not None and value is not None:
            values.setdefault(key, []).append(float(value))
    return values


def text_of(root):
    return " ".join(" ".join(e.itertext()) for e in root.iter() if e.tag in ("li", "p"))


def png_is_not_blank(path):
    """Decodes the PNG with zlib (filters undone) and says whether it holds more than one colour."""
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        return False, "not a PNG"
    pos, idat, width, height, bpp = 8, b"", 0, 0, 0
    while pos < len(data):
        (n,) = struct.unpack(">I", data[pos:pos + 4])
        kind, body = data[pos + 4:pos + 8], data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            width, height, depth, colour_type = struct.unpack(">IIBB", body[:10])
            if depth != 8 or colour_type not in (2, 6):
                return False, f"unexpected PNG format (depth {depth}, colour type {colour_type})"
            bpp = 3 if colour_type == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = width * bpp
    colours, previous, i = set(), bytearray(stride), 0
    # The first 600 rows are enough to see text and a picture.
    for _ in range(min(height, 600)):
        f, line = raw[i], bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = previous[x]
            c = previous[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[x] = (line[x] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        for x in range(0, stride, bpp * 7):
            colours.add(bytes(line[x:x + 3]))
        previous = line
    return len(colours) > 1, f"{width}x{height}, {len(colours)} colours sampled"


def render(html_path, png_path):
    profile = tempfile.mkdtemp(prefix="unchain-chromium-")
    r = subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                        "--disable-background-networking", "--disable-component-update", "--disable-sync",
                        f"--user-data-dir={profile}", f"--screenshot={png_path}", "--window-size=1280,4000",
                        "file://" + os.path.abspath(html_path)],
                       capture_output=True, text=True, timeout=300)
    return r


def check_report(name, html_path, doc, shots):
    with open(html_path, encoding="utf-8") as f:
        text = f.read()
    check("<script" not in text.lower(), f"{name}: the report has no script")
    check(not re.search(r"""(src|href)\s*=\s*["'](https?:)?//""", text), f"{name}: the report fetches nothing")
    try:
        root = ET.fromstring(text)  # the whole page is well-formed XML
    except ET.ParseError as e:
        check(False, f"{name}: the report is well-formed XML ({e})")
        return
    svgs = re.findall(r"<svg\b.*?</svg>", text, flags=re.S)
    check(len(svgs) >= 4, f"{name}: the report holds the flow diagram, Sankey and charts ({len(svgs)} SVGs)")
    for i, markup in enumerate(svgs):
        try:
            xml.dom.minidom.parseString(markup)  # each picture stands on its own too
        except Exception as e:  # noqa: BLE001 - any parser error is the failure
            check(False, f"{name}: SVG {i} is well-formed XML on its own ({e})")
    keys = {s.get("data-key") for s in root.iter(SVG_NS + "svg")}
    for key in ("flow-diagram", "mass-sankey", "energy-bars"):
        check(key in keys, f"{name}: the {key} picture is there")

    v = keyed_values(root)
    kpis, costs, balance = doc["kpis"], doc["costs"], doc["balance"]

    def same(key, expected, rel=1e-9, abs_tol=1e-12):
        got = v.get(key, [None])[0]
        if expected is None:
            check(key not in v, f"{name}: {key} absent when the JSON has null")
        else:
            check(close(got, expected, rel, abs_tol), f"{name}: {key} in the report {got} equals the JSON {expected}")

    same("polymer_fed_kg", kpis["polymer_fed_kg"])
    same("monomer_kg", kpis["monomer_kg"])
    same("energy_purchased_MJ", kpis["per_batch"]["energy_purchased_J"] / 1e6)
    same("energy_per_kg_MJ", kpis["per_kg_monomer"]["energy_purchased_MJ"])
    same("net_cost", kpis["per_batch"]["net_cost"])
    same("net_cost_per_kg", costs["net_cost_per_kg_monomer"])
    same("total_cost", costs["total_cost"])
    same("credits", costs["credits"])
    if kpis["minimum_energy_MJ_per_kg"] is not None:
        same("minimum_energy_MJ_per_kg", kpis["minimum_energy_MJ_per_kg"])
        same("marker", kpis["minimum_energy_MJ_per_kg"])  # the line on the energy bars
    if kpis["per_kg_monomer"]["energy_purchased_MJ"] is not None:
        totals = v.get("row-total", [])
        # The energy bars' "all blocks" row is the purchased energy per kg.
        check(any(close(t, kpis["per_kg_monomer"]["energy_purchased_MJ"], 1e-8) for t in totals),
              f"{name}: the energy bars total {totals} holds the JSON energy per kg")

    # Closure is printed to 6 significant figures: relative 1e-5, or both below 1e-15.
    same("closure-overall-mass", balance["mass_relative_error"], 1e-5, 1e-15)
    same("closure-overall-energy", balance["energy_relative_error"], 1e-5, 1e-15)
    for element, error in balance["element_relative_error"].items():
        same(f"closure-overall-element-{element}", error, 1e-5, 1e-15)
    for bname, block in doc["blocks"].items():
        same(f"closure-block-{bname}-mass", block["balance"]["mass_relative_error"], 1e-5, 1e-15)
        same(f"closure-block-{bname}-energy", block["balance"]["energy_relative_error"], 1e-5, 1e-15)
    for sname, s in doc["streams"].items():
        same(f"stream-mass-{sname}", s["total_kg"])

    # Sankey: feeds in, products out, each flow as in the stream table, node heights proportional to mass.
    same("sankey-in", balance["mass_in_kg"], 1e-9)
    same("sankey-out", balance["mass_out_kg"], 1e-9)
    sankey = [s for s in root.iter(SVG_NS + "svg") if s.get("data-key") == "mass-sankey"]
    ratios = []
    for group in (sankey[0].iter(SVG_NS + "g") if sankey else []):
        if group.get("data-key") != "sankey-flow":
            continue
        stream, kg = group.get("data-stream"), float(group.get("data-kg"))
        check(close(kg, doc["streams"][stream]["total_kg"]), f"{name}: Sankey flow {stream} is its stream's mass")
        node = group.find(SVG_NS + "rect")
        height = float(node.get("height"))
        if height > 3:  # nodes at the minimum visible height are not to scale
            ratios.append(height / kg)
    check(len(ratios) >= 2 and max(ratios) <= min(ratios) * 1.01 + 0.02,
          f"{name}: Sankey node heights are proportional to mass (px/kg {ratios})")
    feeds = [s for s, info in doc["streams"].items() if info["source"] is None and info["destination"] is not None]
    diagram = [s for s in root.iter(SVG_NS + "svg") if s.get("data-key") == "flow-diagram"]
    drawn = {g.get("data-stream") for g in diagram[0].iter(SVG_NS + "g")} if diagram else set()
    for s in feeds:
        check(s in drawn, f"{name}: the flow diagram draws feed {s}")
    for tear in doc["solver"]["tear_streams"]:
        groups = [g for g in diagram[0].iter(SVG_NS + "g") if g.get("data-stream") == tear] if diagram else []
        check(groups and "recycle" in groups[0].get("class", ""), f"{name}: tear stream {tear} is drawn as a recycle")

    words = text_of(root)
    for caution in doc["cautions"]:
        check(caution in words, f"{name}: caution shown: {caution[:60]}...")
    for warning in doc["warnings"]:
        check(warning in words, f"{name}: warning shown: {warning[:60]}...")
    check(DISCLAIMER in words, f"{name}: the planning-aid disclaimer is there")
    title = [e for e in root.iter("h1")]
    check(title and "".join(title[0].itertext()) == doc["case"]["title"], f"{name}: the title is the case's")

    png = os.path.join(shots, name + ".png")
    r = render(html_path, png)
    check(r.returncode == 0, f"{name}: chromium exits 0 (got {r.returncode}: {r.stderr[-400:]})")
    check("Uncaught" not in r.stderr and "CONSOLE" not in r.stderr, f"{name}: chromium logs no page errors")
    check(os.path.exists(png) and os.path.getsize(png) > 10000, f"{name}: the screenshot exists and is not tiny")
    if os.path.exists(png):
        ok, about = png_is_not_blank(png)
        check(ok, f"{name}: the screenshot is not a single colour ({about})")


def test_shipped_cases(folder, shots):
    cases = sorted(glob.glob(os.path.join(SOURCE_DIR, "cases", "*.yaml")))
    check(len(cases) >= 3, f"at least three shipped cases (found {len(cases)})")
    for path in cases:
        name = os.path.splitext(os.path.basename(path))[0]
        results, html = os.path.join(folder, name + ".json"), os.path.join(folder, name + ".html")
        r = run("run", path, "--json", results, "--quiet")
        check(r.returncode == 0, f"{name}: run exits 0 (got {r.returncode}: {r.stderr[-300:]})")
        r = run("report", path, "-o", html, "--quiet")
        check(r.returncode == 0, f"{name}: report exits 0 (got {r.returncode}: {r.stderr[-300:]})")
        check(r.stdout == "", f"{name}: --quiet prints nothing on standard output")
        if not (os.path.exists(results) and os.path.exists(html)):
            check(False, f"{name}: both the JSON and the report were written")
            continue
        with open(results) as f:
            doc = json.load(f)
        check_report(name, html, doc, shots)


MIX_AND_HEAT = """# Invented example for the tests: water and acetone mixed, then heated.
case:
  title: 'Mixer <&> "heater" & co'
  basis: batch
components: [water, acetone]
feeds:
  cold_water: {temperature: "15 degC", liquid: {water: "2 kg"}}
  solvent: {temperature: "20 degC", liquid: {acetone: "1 kg"}}
blocks:
  mix:
    type: mixer
    inlets: {feeds: [cold_water, solvent]}
    outlets: {product: mixed}
  warm:
    type: heater
    outlet_temperature: "45 degC"
    inlets: {feed: mixed}
    outlets: {product: warm_mixture}
"""


def test_escaping_and_failures(folder):
    path = os.path.join(folder, "mix_and_heat.yaml")
    with open(path, "w") as f:
        f.write(MIX_AND_HEAT)
    html = os.path.join(folder, "mix.html")
    r = run("report", path, "-o", html)
    check(r.returncode == 0, f"a case without prices reports (got {r.returncode}: {r.stderr[-300:]})")
    check("report written to" in r.stdout, f"the command says where the report went (got {r.stdout!r})")
    if os.path.exists(html):
        with open(html, encoding="utf-8") as f:
            text = f.read()
        check("Mixer &lt;&amp;&gt; &quot;heater&quot; &amp; co" in text, "the case title is escaped for XML")
        try:
            root = ET.fromstring(text)
            check("".join(next(root.iter("h1")).itertext()) == 'Mixer <&> "heater" & co',
                  "the escaped title reads back as written")
        except ET.ParseError as e:
            check(False, f"a report with markup characters in the title is well-formed ({e})")

    old = os.path.join(folder, "old.html")
    with open(old, "w") as f:
        f.write("old report\n")
    bad = os.path.join(folder, "bad.yaml")
    with open(bad, "w") as f:
        f.write(MIX_AND_HEAT.replace('"2 kg"', '"2 kgg"'))
    r = run("report", bad, "-o", old)
    check(r.returncode == 2, f"a bad case exits 2 (got {r.returncode})")
    impossible = os.path.join(folder, "impossible.yaml")
    with open(impossible, "w") as f:
        f.write(MIX_AND_HEAT.replace('"45 degC"', '"5 degC"'))
    r = run("report", impossible, "-o", old)
    check(r.returncode == 2, f"a heater asked to cool exits 2 (got {r.returncode})")
    with open(old) as f:
        check(f.read() == "old report\n", "failed reports leave an existing file untouched")
    check(not glob.glob(old + ".tmp.*"), "failed reports leave no temporary file")
    r = run("report", path, "-o", os.path.join(folder, "no_such_folder", "r.html"))
    check(r.returncode == 2, f"a report into a missing folder exits 2 (got {r.returncode})")
    r = run("report", path)
    check(r.returncode == 2, f"report without -o is a usage error (got {r.returncode})")


STUDY_SECTIONS = """
scale:
  factors: [1, 3, 10]
  scaled_parameters:
    - {path: blocks.reactor.reactor_volume, exponent: 1}
    - {path: blocks.reactor.heater_power, exponent: 1}
sensitivity:
  parameters:
    - {path: prices.electricity, low: "0.15 USD/kWh", high: "0.30 USD/kWh", label: "Electricity price"}
    - {path: blocks.reactor.reactor_temperature, low: "400 degC", high: "440 degC"}
uncertainty:
  samples: 1000
  seed: 7
  parameters:
    - {path: prices.electricity, distribution: uniform, low: "0.15 USD/kWh", high: "0.30 USD/kWh"}
"""


def svg_by_key(root, key):
    found = [s for s in root.iter(SVG_NS + "svg") if s.get("data-key") == key]
    return found[0] if found else None


def test_study_sections(folder, shots):
    """The shipped PMMA case (fast to solve) with scale, sensitivity and uncertainty sections added."""
    source = os.path.join(SOURCE_DIR, "cases", "lab_pmma_regrind.yaml")
    with open(source) as f:
        text = f.read()
    prices = os.path.join(SOURCE_DIR, "cases", "prices", "illustrative_lab.yaml")
    check("file: prices/illustrative_lab.yaml" in text, "the PMMA case names its price file as expected")
    path = os.path.join(folder, "pmma_studies.yaml")
    with open(path, "w") as f:
        f.write(text.replace("file: prices/illustrative_lab.yaml", "file: " + prices) + STUDY_SECTIONS)
    html = os.path.join(folder, "pmma_studies.html")
    r = run("report", path, "-o", html, "--quiet", "--samples", "100")
    check(r.returncode == 0, f"studies: report exits 0 (got {r.returncode}: {r.stderr[-300:]})")
    if not os.path.exists(html):
        return
    with open(html, encoding="utf-8") as f:
        root = ET.fromstring(f.read())
    v = keyed_values(root)
    net = v.get("net_cost_per_kg", [None])[0]
    for key in ("scale-ladder-cost", "scale-ladder-energy", "tornado-net_cost_per_kg_monomer", "monte-carlo"):
        check(svg_by_key(root, key) is not None, f"studies: the {key} chart is there")
    ladder = svg_by_key(root, "scale-ladder-cost")
    if ladder is not None:
        points = {float(c.get("data-x")): float(c.get("data-y")) for c in ladder.iter(SVG_NS + "circle")}
        check(sorted(points) == [1.0, 3.0, 10.0], f"studies: the ladder has the three factors ({sorted(points)})")
        # The rung at factor 1 is the case as written.
        check(close(points.get(1.0), net, 1e-9), f"studies: ladder at x1 {points.get(1.0)} is the net cost {net}")
    tornado = svg_by_key(root, "tornado-net_cost_per_kg_monomer")
    if tornado is not None:
        base = keyed_values(tornado).get("base", [None])[0]
        check(close(base, net, 1e-9), f"studies: tornado base {base} is the net cost {net}")
        bars = {}
        for rect in tornado.iter(SVG_NS + "rect"):
            if rect.get("data-row") == "Electricity price":
                bars[rect.get("data-key")] = float(rect.get("data-value"))
        # Dearer electricity costs more: low price below base, high price above.
        check(bars.get("low", 1e300) < base < bars.get("high", -1e300),
              f"studies: the electricity bar runs from below to above base ({bars}, base {base})")
    p10, p50, p90 = (v.get(f"monte-carlo-{p}", [None])[0] for p in ("p10", "p50", "p90"))
    check(None not in (p10, p50, p90) and p10 <= p50 <= p90, f"studies: P10 <= P50 <= P90 ({p10}, {p50}, {p90})")
    check("100 samples" in " ".join(root.itertext()), "studies: --samples sets the Monte Carlo sample count")
    png = os.path.join(shots, "pmma_studies.png")
    render(html, png)
    if os.path.exists(png):
        ok, about = png_is_not_blank(png)
        check(ok, f"studies: the screenshot is not a single colour ({about})")

    plain = os.path.join(folder, "pmma_plain.html")
    r = run("report", path, "-o", plain, "--quiet", "--no-studies")
    check(r.returncode == 0, f"--no-studies: report exits 0 (got {r.returncode})")
    if os.path.exists(plain):
        with open(plain, encoding="utf-8") as f:
            check('id="studies"' not in f.read(), "--no-studies leaves the study sections out")


if __name__ == "__main__":
    UNCHAIN = sys.argv[1]
    SOURCE_DIR = os.path.abspath(sys.argv[2])
    if not os.access(CHROMIUM, os.X_OK):
        print(f"FAILED: {CHROMIUM} is missing; install the Debian package 'chromium' (scripts/setup.sh does)")
        sys.exit(1)
    shots = tempfile.mkdtemp(prefix="unchain-report-screenshots-")
    with tempfile.TemporaryDirectory(prefix="unchain-report-") as folder:
        test_shipped_cases(folder, shots)
        test_escaping_and_failures(folder)
        test_study_sections(folder, shots)
    print(f"screenshots kept in {shots}")
    if failures:
        print(f"{len(failures)} check(s) failed")
        sys.exit(1)
    print("all checks passed")
