"""Browser test of `coilwright serve` with Debian's chromium and
chromium-driver driven by Selenium (tests/interop/setup.sh installs them).

    serve_browser.py BIN DESIGN OUT WORK

BIN is the built coilwright, DESIGN a copy of the fin example (the page
saves into it), OUT the -o folder (must not exist), WORK a scratch folder
for screenshots and the files compared with the command line. With
COILWRIGHT_SCREENSHOT=PATH the page after the layer and turns edits is also
saved to PATH (README's screenshot: docs/workbench.png).

What it does, each check against the command line run on the same text:
- loads the page, changes coil.layers to 4 and coil.turns to 12 in the
  form, waits for the update and compares every number shown with
  `coilwright report --json` (exactly, the SI value) and the preview's
  copper paths with `coilwright check --svg`;
- types an invalid turns value and compares the located error with what
  `coilwright check` prints;
- runs a small sweep and compares its best candidate with `coilwright
  sweep`, takes it into the editor;
- writes the files (then again, confirming the replacement) and saves the
  design (the caller checks both);
- takes screenshots and checks that they are not blank (Pillow).
Logs the edit-to-update times. Prints "FAIL ..." lines and exits 1 on a
failure.
"""

import json
import os
import subprocess
import sys
import time
import xml.etree.ElementTree as ET

from PIL import Image
from selenium import webdriver
from selenium.webdriver.chrome.service import Service
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import WebDriverWait

FAILS = []


def fail(msg):
    FAILS.append(f"FAIL {msg}")
    print(f"FAIL {msg}", flush=True)


def run(args, ok=(0,)):
    p = subprocess.run(args, capture_output=True, text=True)
    if p.returncode not in ok:
        raise SystemExit(f"{' '.join(args)} exited {p.returncode}:\n{p.stdout}{p.stderr}")
    return p


def main():
    bin_, design, out, work = sys.argv[1:5]
    os.makedirs(work, exist_ok=True)
    # Started in the design's folder with its bare name, as a person would.
    server = subprocess.Popen([bin_, "serve", os.path.basename(design), "-o", out, "--port", "0"],
                              stdout=subprocess.PIPE, text=True, cwd=os.path.dirname(design))
    try:
        line = server.stdout.readline()
        url = line.split(": ", 1)[1].strip()
        print(f"server at {url}", flush=True)
        opts = webdriver.ChromeOptions()
        opts.binary_location = "/usr/bin/chromium"
        for a in ["--headless=new", "--no-sandbox", "--disable-gpu", "--window-size=1500,1250",
                  "--disable-dev-shm-usage"]:
            opts.add_argument(a)
        driver = webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=opts)
        try:
            drive(driver, url, bin_, design, out, work)
        finally:
            driver.quit()
    finally:
        server.terminate()
        server.wait(10)
    sys.exit(1 if FAILS else 0)


def settled(driver, states=("ready",), timeout=20):
    """Waits until the page shows the results of its newest edit."""
    WebDriverWait(driver, timeout).until(lambda d: d.execute_script(
        "return document.body.dataset.state !== 'computing' && "
        "document.body.dataset.shownGen === String(S.gen)"))
    state = driver.execute_script("return document.body.dataset.state")
    if state not in states:
        fail(f"page state {state}, expected one of {states}")
    return driver.execute_script("return window.cwLastUpdateMs")


def set_field(driver, key, value):
    f = driver.find_element(By.CSS_SELECTOR, f'#form [data-key="{key}"]')
    driver.execute_script(
        "arguments[0].value = arguments[1];"
        "arguments[0].dispatchEvent(new Event('change'));", f, value)


def shot(driver, path):
    driver.save_screenshot(path)
    img = Image.open(path).convert("RGB")
    colours = img.getcolors(maxcolors=1 << 20)
    distinct = len(colours) if colours else 1 << 20
    lo, hi = img.convert("L").getextrema()
    if distinct < 50 or hi - lo < 100:
        fail(f"screenshot {path} looks blank: {distinct} colours, grey {lo}..{hi}")
    print(f"screenshot {path}: {img.size[0]}x{img.size[1]}, {distinct} colours", flush=True)


def text_of(driver):
    return driver.find_element(By.ID, "text").get_attribute("value")


def drive(driver, url, bin_, design, out, work):
    driver.get(url)
    first = settled(driver)
    print(f"first view {first:.1f} ms after load's edit", flush=True)
    shot(driver, os.path.join(work, "start.png"))

    # 1. layers and turns from the form; numbers and copper as the CLI.
    times = {}
    for key, value in [("coil.layers", "4"), ("coil.turns", "12")]:
        set_field(driver, key, value)
        total = settled(driver)
        times[key] = (driver.execute_script("return window.cwCopperMs"), total)
    for key, (copper, total) in times.items():
        print(f"edit-to-update {key}: copper and rule problems {copper:.1f} ms, "
              f"numbers and plots {total:.1f} ms (fin example, 2 cores)", flush=True)
    text = text_of(driver)
    if "layers = 4" not in text or "turns = 12" not in text:
        fail("the form's edits are not in the text")
    edited = os.path.join(work, "edited.toml")
    with open(edited, "w") as f:
        f.write(text)
    report = json.loads(run([bin_, "report", edited, "--json"]).stdout)
    cells = driver.find_elements(By.CSS_SELECTOR, "#numbers td[data-key]")
    if len(cells) < 10:
        fail(f"only {len(cells)} numbers shown")
    for c in cells:
        key, si = c.get_attribute("data-key"), c.get_attribute("data-si")
        want = report.get(key)
        got = float(si) if si else None
        if got != want:
            fail(f"number {key}: page {got}, report --json {want}")
        if want is not None and not c.text.strip():
            fail(f"number {key} shown empty")
    svg_file = os.path.join(work, "check.svg")
    run([bin_, "check", edited, "--svg", svg_file], ok=(0, 1))
    ns = "{http://www.w3.org/2000/svg}"
    want_d = [p.get("d") for p in ET.parse(svg_file).getroot().iter(ns + "path")]
    got_d = driver.execute_script(
        "return [...document.querySelectorAll('#preview svg path')].map(p => p.getAttribute('d'))")
    if got_d != want_d or not want_d:
        fail(f"preview paths differ from check --svg ({len(got_d)} vs {len(want_d)})")
    layers = driver.execute_script(
        "return document.querySelectorAll('#preview svg g[id^=\"layer-\"]').length")
    if layers != 4:
        fail(f"preview shows {layers} layer groups, expected 4")
    # a layer toggle hides its copper
    driver.find_element(By.CSS_SELECTOR, '#toggles input[data-layer="2"]').click()
    vis = driver.execute_script(
        "return document.querySelector('#preview svg #layer-2').getAttribute('visibility')")
    if vis != "hidden":
        fail(f"layer toggle: layer 2 visibility {vis}")
    driver.find_element(By.CSS_SELECTOR, '#toggles input[data-layer="2"]').click()
    shot(driver, os.path.join(work, "four-layers.png"))
    docs = os.environ.get("COILWRIGHT_SCREENSHOT")
    if docs:
        driver.save_screenshot(docs)
        print(f"wrote {docs}", flush=True)

    # 2. an invalid value: the located error, as check prints it.
    set_field(driver, "coil.turns", "many")
    settled(driver, states=("errors",))
    bad = text_of(driver)
    items = driver.find_elements(By.CSS_SELECTOR, "#error-list li")
    if not items:
        fail("no located error shown")
    else:
        li = items[0]
        line, col = int(li.get_attribute("data-line")), int(li.get_attribute("data-column"))
        if "coil.turns" not in li.text:
            fail(f"error does not name coil.turns: {li.text}")
        at = bad.split("\n")[line - 1][col - 1:]
        if not at.startswith('"many"'):
            fail(f"error at {line}:{col} does not point at the value: {at!r}")
        check_dir = os.path.join(work, "check")
        os.makedirs(check_dir, exist_ok=True)
        bad_file = os.path.join(check_dir, os.path.basename(design))
        with open(bad_file, "w") as f:
            f.write(bad)
        p = subprocess.run([bin_, "check", os.path.basename(bad_file)], capture_output=True,
                           text=True, cwd=check_dir)
        if p.returncode != 2:
            fail(f"check of the invalid text exited {p.returncode}")
        rendered = driver.execute_script("return document.getElementById('rendered').textContent")
        if rendered != p.stderr:
            fail(f"page error text differs from check:\n{rendered}\n---\n{p.stderr}")
    shot(driver, os.path.join(work, "error.png"))
    set_field(driver, "coil.turns", "12")
    settled(driver)

    # 3. a small sweep, compared with the command line's.
    base = os.path.join(work, "sweep-base.toml")
    with open(base, "w") as f:
        f.write(text_of(driver))
    vary = ["coil.turns=8..14:2", "coil.layers=2,4"]
    require = ["temperature_c <= 60"]
    driver.execute_script(
        "document.getElementById('sw-vary').value = arguments[0];"
        "document.getElementById('sw-require').value = arguments[1];"
        "document.getElementById('sw-objective').value = 'force_per_sqrt_w_n';"
        "document.getElementById('sw-sense').value = 'max';",
        "\n".join(vary), "\n".join(require))
    started = time.monotonic()
    driver.find_element(By.ID, "sw-run").click()
    WebDriverWait(driver, 60).until(
        lambda d: d.execute_script("return document.body.dataset.sweep === 'done'"))
    print(f"sweep of 8 candidates shown after {time.monotonic() - started:.2f} s", flush=True)
    cli = os.path.join(work, "sweep-cli")
    args = [bin_, "sweep", base, "--maximize", "force_per_sqrt_w_n", "-o", cli]
    for v in vary:
        args += ["--vary", v]
    for r in require:
        args += ["--require", r]
    run(args)
    with open(os.path.join(cli, "best.toml")) as f:
        params = [ln for ln in f.read().splitlines() if ln.startswith("# Parameters: ")][0]
    want = params[len("# Parameters: "):]
    got = driver.find_element(By.ID, "sw-state").text
    if got != f"best: {want}":
        fail(f"sweep best: page '{got}', coilwright sweep '{want}'")
    rows = driver.find_elements(By.CSS_SELECTOR, "#sw-table tbody tr")
    if not rows:
        fail("no ranked sweep rows shown")
    plot_w = driver.execute_script("return document.getElementById('sw-plot').naturalWidth")
    if not plot_w:
        fail("trade-off plot not drawn")
    driver.find_element(By.ID, "sw-take").click()
    settled(driver)
    for kv in want.split(", "):
        k, v = kv.split(" = ")
        if f"{k.split('.')[1]} = {v}" not in text_of(driver):
            fail(f"best candidate's {k} = {v} not in the editor")
    shot(driver, os.path.join(work, "sweep.png"))

    # 4. write files, then again (the page asks before replacing), save.
    driver.find_element(By.ID, "write").click()
    WebDriverWait(driver, 30).until(
        lambda d: d.execute_script("return document.body.dataset.written"))
    status = driver.execute_script("return document.body.dataset.written")
    if status != "written":
        fail(f"write files: {status}: {driver.find_element(By.ID, 'message').text}")
    driver.execute_script("delete document.body.dataset.written")
    driver.find_element(By.ID, "write").click()
    WebDriverWait(driver, 10).until(lambda d: _alert(d))
    alert = driver.switch_to.alert
    if "exists" not in alert.text:
        fail(f"replacement question: {alert.text}")
    alert.accept()
    WebDriverWait(driver, 30).until(
        lambda d: d.execute_script("return document.body.dataset.written"))
    if driver.execute_script("return document.body.dataset.written") != "written":
        fail("second write (replacing) failed")
    driver.find_element(By.ID, "save").click()
    WebDriverWait(driver, 10).until(lambda d: d.execute_script("return document.body.dataset.saved"))
    with open(design) as f:
        if f.read() != text_of(driver):
            fail("saved design differs from the editor's text")
    shot(driver, os.path.join(work, "written.png"))
    print("browser checks done", flush=True)


def _alert(driver):
    try:
        driver.switch_to.alert
        return True
    except Exception:
        return False


if __name__ == "__main__":
    main()
