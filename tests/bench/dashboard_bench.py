#!/usr/bin/env python3
"""Dashboard speed in Debian's headless Chromium (a benchmark, not a test).

Loads the demo-sized fleet (pbfleet-demogen: 320 batteries, three years of
weekly rounds) into a fresh pbfleetd, plus one battery with 260 readings,
then prints one line per figure in the benchmarks' format:

  dashboard.winter.fcp      first contentful paint of the winter page (320 batteries), target < 1 s
  dashboard.history.drawn   load event of a 260-reading battery page, charts included, target < 300 ms

each beside the same measure for the sign-in page (the smallest page) in
the same run. Median of --repeat loads, each in a fresh tab state (cache off).
"""
import argparse
import csv
import io
import json
import os
import signal
import statistics
import subprocess
import sys
import tempfile
import time
import urllib.error
import urllib.request

from selenium.webdriver.common.by import By

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "browser"))
from chromium import make_driver  # noqa: E402


def request(base, token, method, path, body=None, content_type="application/json"):
    data = body if isinstance(body, bytes) else (json.dumps(body).encode() if body is not None else None)
    req = urllib.request.Request(base + path, data=data, method=method)
    req.add_header("Authorization", "Bearer " + token)
    req.add_header("Content-Type", content_type)
    req.add_header("Prefer", "return=minimal")
    with urllib.request.urlopen(req, timeout=60) as r:
        return json.loads(r.read() or b"null")


def load_fleet(base, token, demogen, work):
    out = os.path.join(work, "fleet")
    subprocess.run([demogen, "--out", out], check=True, stderr=subprocess.DEVNULL)
    rows = lambda name: list(csv.DictReader(open(os.path.join(out, name), newline="")))
    for d in rows("depots.csv"):
        request(base, token, "POST", "/v1/depots", {"name": d["name"], "time_zone": d["time_zone"],
                                                    "design_low_c": float(d["design_low_c"])})
    for v in rows("vehicles.csv"):
        request(base, token, "POST", "/v1/vehicles", {
            "code": v["code"], "depot_id": int(v["depot_id"]), "engine": v["engine"],
            "displacement_l": float(v["displacement_l"]), "required_cca_a": float(v["required_cca_a"])})
    for b in rows("batteries.csv"):
        request(base, token, "POST", "/v1/batteries", {
            "serial": b["serial"], "chemistry": b["chemistry"], "nominal_v": 2 * int(b["cells"]),
            "cells": int(b["cells"]), "rated_cca_a": float(b["rated_cca_a"]),
            "reserve_capacity_min": float(b["reserve_capacity_min"]), "full_charge_sg": float(b["full_charge_sg"]),
            "installed_on": b["installed_on"], "vehicle_id": int(b["vehicle_id"])})
    with open(os.path.join(out, "readings.csv"), newline="") as f:
        reader = csv.reader(f)
        header = next(reader)
        chunk = []
        def send():
            text = io.StringIO()
            writer = csv.writer(text, lineterminator="\r\n")
            writer.writerow(header)
            writer.writerows(chunk)
            request(base, token, "POST", "/v1/readings", text.getvalue().encode(), "text/csv")
            chunk.clear()
        for row in reader:
            chunk.append(row)
            if len(chunk) == 500:
                send()
        if chunk:
            send()
    # One battery with five years of weekly rounds: 260 readings.
    request(base, token, "POST", "/v1/batteries", {
        "serial": "LONG-260", "chemistry": "flooded", "nominal_v": 12, "cells": 6, "rated_cca_a": 800,
        "full_charge_sg": 1.265, "installed_on": "2021-11-01", "vehicle_id": 1})
    now = time.time()
    batch = []
    for week in range(260):
        taken = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(now - (260 - week) * 7 * 86400))
        sg = round(1.265 - 0.0002 * week, 3)
        batch.append({"serial": "LONG-260", "taken_at": taken, "ocv_v": round(12.66 - 0.0012 * week, 2),
                      "cell_sg": [sg] * 6, "electrolyte_temp_c": 8.0, "rest_h": 0.5 if week % 5 == 0 else 10})
    request(base, token, "POST", "/v1/readings", batch)


def settled(driver, script, timeout_s=5.0):
    """The script's value once the page has reported it: paint entries come
    when the frame is presented, which can be after the load event (and a
    load event not yet ended reads 0)."""
    deadline = time.monotonic() + timeout_s
    while True:
        value = driver.execute_script(script)
        if 0 < value < 1e9 or time.monotonic() > deadline:
            return value
        time.sleep(0.02)


def median_ms(driver, url, script, repeat):
    values = []
    for _ in range(repeat):
        driver.execute_cdp_cmd("Network.clearBrowserCache", {})
        driver.get(url)
        values.append(settled(driver, script))
    return statistics.median(values)


FCP = "const p = performance.getEntriesByName('first-contentful-paint')[0]; return p ? p.startTime : 1e9;"
LOADED = "const n = performance.getEntriesByType('navigation')[0]; return n.loadEventEnd;"


def figure(name, value, limit_name, limit, target_ms):
    verdict = "ok" if value < target_ms else "MISSED"
    print(f"{name:<28} {value:8.1f} ms  vs {limit_name} {limit:.1f} ms  ratio {value / limit:.2f}  "
          f"target < {target_ms:.0f} ms  {verdict}", flush=True)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--pbfleetd", required=True)
    parser.add_argument("--demogen", required=True)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    work = tempfile.mkdtemp(prefix="pbfleet-dashboard-bench-")
    port_file, token_file = os.path.join(work, "port"), os.path.join(work, "admin.token")
    log = open(os.path.join(work, "pbfleetd.log"), "w")
    proc = subprocess.Popen([args.pbfleetd, "--listen", "127.0.0.1:0", "--data", work, "--port-file", port_file,
                             "--init-admin-token", token_file, "--log-level", "warn"],
                            stdout=log, stderr=log, start_new_session=True)
    driver = None
    try:
        for _ in range(200):
            if os.path.exists(port_file) and open(port_file).read().strip():
                break
            time.sleep(0.05)
        base = f"http://127.0.0.1:{int(open(port_file).read())}"
        token = open(token_file).read().strip()
        started = time.monotonic()
        load_fleet(base, token, args.demogen, work)
        print(f"loaded the demo fleet in {time.monotonic() - started:.1f} s", file=sys.stderr)
        driver = make_driver()
        driver.execute_cdp_cmd("Network.enable", {})
        driver.execute_cdp_cmd("Network.setCacheDisabled", {"cacheDisabled": True})
        sign_in = median_ms(driver, base + "/ui/sign-in", FCP, args.repeat)
        sign_in_loaded = median_ms(driver, base + "/ui/sign-in", LOADED, args.repeat)
        driver.find_element(By.ID, "token").send_keys(token)
        driver.find_element(By.CSS_SELECTOR, "form.sign-in button").click()
        time.sleep(1)
        winter = median_ms(driver, base + "/ui/winter", FCP, args.repeat)
        rows = len(driver.find_elements(By.CSS_SELECTOR, "#risk-list tbody tr"))
        figure("dashboard.winter.fcp", winter, "sign-in page", sign_in, 1000)
        print(f"  (winter page lists {rows} batteries)", file=sys.stderr)
        history = median_ms(driver, base + "/ui/batteries/LONG-260", LOADED, args.repeat)
        points = len(driver.find_elements(By.CSS_SELECTOR, "#soc-chart .pt"))
        figure("dashboard.history.drawn", history, "sign-in page", sign_in_loaded, 300)
        print(f"  (battery page draws {points} SOC points)", file=sys.stderr)
    finally:
        if driver:
            driver.quit()
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=15)


if __name__ == "__main__":
    main()
