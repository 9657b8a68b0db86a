#!/usr/bin/env python3
"""The web dashboard in a real browser (Debian's headless Chromium through
chromedriver and python3-selenium; nothing is downloaded).

Starts its own pbfleetd on 127.0.0.1 with a temporary database, registers a
small fleet through the API, then as each role: signs in, reads the pages,
compares the winter page with GET /v1/reports/winter, counts the battery
chart's points against the history, submits a bad reading (field error,
nothing stored) and a good one (seen in the history), signs out and checks
the session is refused. Any console error or CSP violation fails the test.
A screenshot of each page is saved under --artifacts. Figures (first
contentful paint, chart draw time) are printed, not asserted.
"""
import argparse
import json
import os
import signal
import subprocess
import sys
import tempfile
import time
import urllib.error
import urllib.request

from selenium.webdriver.common.by import By
from selenium.common.exceptions import WebDriverException
from selenium.webdriver.support.ui import WebDriverWait

from chromium import make_driver

FAILURES = []


def check(condition, what):
    print(("ok   " if condition else "FAIL ") + what, flush=True)
    if not condition:
        FAILURES.append(what)


class Api:
    def __init__(self, base, token):
        self.base, self.token = base, token

    def call(self, method, path, body=None):
        data = json.dumps(body).encode() if body is not None else None
        req = urllib.request.Request(self.base + path, data=data, method=method)
        req.add_header("Authorization", "Bearer " + self.token)
        if data is not None:
            req.add_header("Content-Type", "application/json")
        try:
            with urllib.request.urlopen(req, timeout=20) as r:
                return r.status, json.loads(r.read() or b"null")
        except urllib.error.HTTPError as e:
            return e.code, json.loads(e.read() or b"null")


def start_daemon(pbfleetd, work):
    port_file = os.path.join(work, "port")
    token_file = os.path.join(work, "admin.token")
    log = open(os.path.join(work, "pbfleetd.log"), "w")
    proc = subprocess.Popen([pbfleetd, "--listen", "127.0.0.1:0", "--data", work, "--port-file", port_file,
                             "--init-admin-token", token_file, "--log-level", "warn"],
                            stdout=log, stderr=log, start_new_session=True)
    for _ in range(200):
        if os.path.exists(port_file) and open(port_file).read().strip():
            break
        if proc.poll() is not None:
            sys.exit("pbfleetd exited early; see " + log.name)
        time.sleep(0.05)
    port = int(open(port_file).read())
    return proc, port, open(token_file).read().strip()


def seed(api):
    """Two depots, three batteries each, eight weekly readings per battery
    (every third one taken after too short a rest, one battery with a weak
    cell)."""
    serials = []
    for name, code, prefix, low in (("Quay Road", "KV-11", "QR", -20), ("Moor Gate", "KV-21", "MG", -30)):
        status, depot = api.call("POST", "/v1/depots", {"name": name, "time_zone": "Europe/Oslo", "design_low_c": low})
        assert status == 201, depot
        status, vehicle = api.call("POST", "/v1/vehicles", {"code": code, "depot_id": depot["id"], "engine": "diesel",
                                                            "displacement_l": 6.7})
        assert status == 201, vehicle
        for i in range(1, 4):
            serial = f"{prefix}-{i:03d}"
            status, b = api.call("POST", "/v1/batteries", {
                "serial": serial, "chemistry": "flooded", "nominal_v": 12, "cells": 6, "rated_cca_a": 760,
                "full_charge_sg": 1.265, "installed_on": "2025-09-15", "vehicle_id": vehicle["id"]})
            assert status == 201, b
            serials.append(serial)
    now = time.time()
    batch = []
    for n, serial in enumerate(serials):
        for week in range(8):
            taken = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(now - (8 - week) * 7 * 86400))
            sg = 1.265 - 0.012 * week * (n % 3) / 2
            cells = [round(sg, 3)] * 6
            if n == 1:
                cells[2] = round(sg - 0.070, 3)
            batch.append({"serial": serial, "reading_id": f"{serial}-w{week}", "taken_at": taken,
                          "ocv_v": round(12.65 - 0.03 * week * (n % 3), 2), "cell_sg": cells,
                          "electrolyte_temp_c": 4.0, "rest_h": 0.5 if week % 3 == 1 else 12})
    status, body = api.call("POST", "/v1/readings", batch)
    assert status == 201, body
    return serials


class Browser:
    def __init__(self, driver, base, artifacts):
        self.d, self.base, self.artifacts = driver, base, artifacts

    def open(self, path, expected_status=None):
        self.d.get(self.base + path)
        self.console_clean(path, expected_status)

    def console_clean(self, where, expected_status=None):
        """Fails on any console error or CSP violation. A page the test
        expects to be refused (403, 422) logs its own status as a network
        error; only that one is let through."""
        def expected(entry):
            return (expected_status is not None and entry["source"] == "network"
                    and f"status of {expected_status}" in entry["message"])
        errors = [e for e in self.d.get_log("browser") if e["level"] == "SEVERE" and not expected(e)]
        check(not errors, f"no console error or CSP violation on {where}: {errors}")

    def click_and_load(self, css):
        """Clicks a submit button and waits until the next page replaced this one."""
        old = self.d.find_element(By.TAG_NAME, "html")
        self.d.find_element(By.CSS_SELECTOR, css).click()
        def replaced(_):
            try:
                old.tag_name
                return False
            except WebDriverException:  # stale, or already detached
                return True
        WebDriverWait(self.d, 15).until(replaced)
        WebDriverWait(self.d, 15).until(lambda d: d.execute_script("return document.readyState") == "complete")

    def shot(self, name):
        """Saves the whole page (the window is stretched to its height)."""
        size = self.d.get_window_size()
        height = self.d.execute_script("return document.documentElement.scrollHeight")
        self.d.set_window_size(size["width"], min(max(height, 400), 6000))
        self.d.save_screenshot(os.path.join(self.artifacts, name + ".png"))
        self.d.set_window_size(size["width"], size["height"])

    def sign_in(self, token, shot=None):
        self.open("/ui/sign-in")
        if shot:
            self.shot(shot)
        self.d.find_element(By.ID, "token").send_keys(token)
        self.click_and_load("form.sign-in button")
        self.console_clean("sign-in")

    def sign_out(self):
        self.click_and_load("form.who button")

    def paint_ms(self):
        return self.d.execute_script(
            "const p = performance.getEntriesByName('first-contentful-paint')[0]; return p ? p.startTime : null;")

    def texts(self, css):
        return [e.text for e in self.d.find_elements(By.CSS_SELECTOR, css)]


def fmt(value, decimals):
    s = f"{value:.{decimals}f}"
    return s[1:] if s.startswith("-") and not s.strip("-0.") else s


def manager_checks(b, api, tokens):
    b.sign_in(tokens["manager"])
    check(b.d.current_url.endswith("/ui/winter"), "the manager lands on the winter page")
    b.console_clean("winter")
    print(f"figure: winter page first contentful paint {b.paint_ms()} ms")
    b.shot("winter")
    status, report = api.call("GET", "/v1/reports/winter")
    check(status == 200, "the API's winter report answers")
    for depot in report["depots"]:
        row = b.d.find_element(By.CSS_SELECTOR, f"#depot-summary tr[data-depot-id='{depot['depot_id']}']")
        for level in ("act_now", "watch", "no_data", "ok"):
            shown = row.find_element(By.CSS_SELECTOR, "td." + level).text
            check(shown == str(depot[level]), f"{depot['depot_name']} {level}: page {shown}, API {depot[level]}")
    rows = b.d.find_elements(By.CSS_SELECTOR, "#risk-list tbody tr")
    check(len(rows) == len(report["batteries"]), "the list has every battery of the report")
    for row, risk in zip(rows, report["batteries"]):
        check(row.get_attribute("data-serial") == risk["serial"], f"rank of {risk['serial']} matches the report")
        if risk.get("projected_soc_percent") is not None:
            shown = row.find_element(By.CSS_SELECTOR, "td.soc").text
            check(shown == fmt(risk["projected_soc_percent"], 0), f"{risk['serial']} projected SOC {shown}")
        check(row.find_element(By.CSS_SELECTOR, "td.action").text.startswith(risk["action"][:40]),
              f"{risk['serial']} shows its action in full")
    # Judge at another low with the control.
    field = b.d.find_element(By.ID, "low_c")
    field.clear()
    field.send_keys("-40")
    b.click_and_load("form.filters button")
    b.console_clean("winter at -40")
    status, colder = api.call("GET", "/v1/reports/winter?low_c=-40")
    lows = b.texts("#depot-summary td.low")
    check(lows and all(t == "-40.0" for t in lows), f"the depots are judged at -40: {lows}")
    act_now = sum(int(t) for t in b.texts("#depot-summary td.act_now"))
    check(act_now == sum(d["act_now"] for d in colder["depots"]), "act-now count at -40 matches the API")
    b.shot("winter-at-minus-40")
    b.open("/ui/trends")
    b.shot("trends")
    b.open("/ui/overdue")
    b.shot("overdue")
    b.d.set_window_size(768, 1024)
    b.open("/ui/winter")
    width = b.d.execute_script("return document.documentElement.scrollWidth")
    check(width <= 768, f"the winter page fits a 768 px tablet without sideways scrolling ({width} px)")
    b.shot("winter-tablet")
    b.d.set_window_size(1280, 800)
    b.sign_out()


def technician_checks(b, api, tokens, serial):
    b.sign_in(tokens["technician"])
    check("/ui/batteries" in b.d.current_url, "the technician lands on the battery list")
    b.shot("batteries")
    status, history = api.call("GET", f"/v1/batteries/{serial}/history")
    readings = history["readings"]
    with_soc = sum(1 for r in readings if r["derived"].get("soc_percent") is not None)
    flagged = sum(1 for r in readings if r["derived"]["flags"])
    start = time.monotonic()
    b.open(f"/ui/batteries/{serial}")
    took = (time.monotonic() - start) * 1000
    print(f"figure: battery page with {len(readings)} readings loaded and drawn in {took:.0f} ms")
    points = b.d.find_elements(By.CSS_SELECTOR, "#soc-chart .pt")
    marks = b.d.find_elements(By.CSS_SELECTOR, "#soc-chart .pt.flagged")
    check(len(points) == with_soc, f"one SOC point per reading: {len(points)} of {with_soc}")
    check(len(marks) == flagged and flagged > 0, f"flagged readings marked: {len(marks)} of {flagged}")
    titles = [m.find_element(By.TAG_NAME, "title").get_attribute("textContent") for m in marks]
    check(all("flagged" in t for t in titles), "each mark names its flags on hover")
    check(len(b.d.find_elements(By.CSS_SELECTOR, "#flagged-list li")) == flagged, "flagged readings listed below")
    check(len(b.d.find_elements(By.CSS_SELECTOR, "#readings-table tbody tr")) == len(readings), "readings table")
    b.shot("battery")
    b.sign_out()


def crew_checks(b, api, tokens, serial):
    b.sign_in(tokens["crew"])
    check(b.d.find_elements(By.CSS_SELECTOR, "nav a[href='/ui/winter']") == [], "the crew sees no manager pages")
    b.open("/ui/winter", expected_status=403)
    check(b.d.find_element(By.TAG_NAME, "h1").text == "Not for your role", "the crew is refused the winter page")
    b.open(f"/ui/readings/new?serial={serial}")
    check(len(b.d.find_elements(By.CSS_SELECTOR, "input[name^='cell_sg_']")) == 6, "one SG field per cell")
    b.shot("reading-form")
    _, before = api.call("GET", f"/v1/readings?serial={serial}&limit=1000")

    def fill(values):
        for name, value in values.items():
            field = b.d.find_element(By.NAME, name)
            field.clear()
            field.send_keys(value)

    fill({"ocv_v": "12.55", "rest_h": "10", "temp": "6", **{f"cell_sg_{i}": "1.255" for i in range(1, 7)}})
    fill({"cell_sg_4": "2.5"})
    b.click_and_load("form.reading button[type=submit]")
    b.console_clean("refused reading", expected_status=422)
    error = b.d.find_elements(By.ID, "cell_sg_4-error")
    check(bool(error) and "1.400" in error[0].text, "the SG error stands beside cell 4 with the allowed range")
    b.shot("reading-refused")
    _, after = api.call("GET", f"/v1/readings?serial={serial}&limit=1000")
    check(len(after["items"]) == len(before["items"]), "nothing stored on a refusal")
    fill({"cell_sg_4": "1.250"})
    b.click_and_load("form.reading button[type=submit]")
    b.console_clean("saved reading")
    check(bool(b.d.find_elements(By.ID, "saved")), "the saved page shows the derived answer")
    soc = b.d.find_element(By.ID, "derived-soc").text
    check("%" in soc, f"SOC shown after saving: {soc}")
    b.shot("reading-saved")
    _, after = api.call("GET", f"/v1/readings?serial={serial}&limit=1000")
    check(len(after["items"]) == len(before["items"]) + 1, "the good reading is stored once")
    b.open(f"/ui/batteries/{serial}")
    rows = b.d.find_elements(By.CSS_SELECTOR, "#readings-table tbody tr")
    check(len(rows) == len(after["items"]), "the new reading is in the battery's history")
    session_url = b.base + "/ui/batteries"
    b.sign_out()
    b.d.get(session_url)
    check("/ui/sign-in" in b.d.current_url, "after sign-out the session is refused")


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--pbfleetd", required=True)
    parser.add_argument("--artifacts", required=True)
    args = parser.parse_args()
    os.makedirs(args.artifacts, exist_ok=True)
    work = tempfile.mkdtemp(prefix="pbfleet-browser-")
    proc, port, admin_token = start_daemon(args.pbfleetd, work)
    driver = None
    try:
        base = f"http://127.0.0.1:{port}"
        admin = Api(base, admin_token)
        serials = seed(admin)
        tokens = {"admin": admin_token}
        for role in ("crew", "technician", "manager"):
            status, made = admin.call("POST", "/v1/tokens", {"name": f"{role} browser", "role": role})
            assert status == 201, made
            tokens[role] = made["token"]
        driver = make_driver(console_log=True)
        b = Browser(driver, base, args.artifacts)
        b.sign_in(admin_token, shot="sign-in")
        check(b.d.current_url.endswith("/ui/winter"), "the admin signs in")
        b.sign_out()
        manager_checks(b, admin, tokens)
        technician_checks(b, admin, tokens, serials[1])
        crew_checks(b, admin, tokens, serials[0])
        b.d.get(base + "/ui/sign-in")
        b.d.find_element(By.ID, "token").send_keys("not-a-token")
        b.click_and_load("form.sign-in button")
        b.console_clean("refused sign-in", expected_status=401)
        check("unknown token" in b.d.find_element(By.ID, "sign-in-error").text, "a bad token is refused in words")
    finally:
        if driver:
            driver.quit()
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=15)
    if FAILURES:
        print(f"{len(FAILURES)} check(s) failed:", *FAILURES, sep="\n  ")
        return 1
    print("all browser checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
